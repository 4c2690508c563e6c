"""``docgen diff [REV_A] [REV_B] [PATHS]``: what changed in the designs between two revisions.

Defaults: ``HEAD`` against the work tree, every design whose text or library changed.  Leading
arguments that name commits are revisions; the rest are design files or folders.  Prints the
changes in the circuit, models, requirements and bench, every headline figure before and after,
the verdicts that flipped and the text diff; ``--json`` prints the same as data.
"""

from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """Options of ``docgen diff``."""
    parser.add_argument("items", nargs="*", metavar="REV_OR_PATH",
                        help="up to two revisions (default HEAD and the work tree), then design "
                             "files or folders (default: every design that changed)")
    parser.add_argument("--designs", default="designs", metavar="DIR",
                        help="the designs folder whose library pages designs use "
                             "(default: designs)")
    parser.add_argument("--json", action="store_true", help="print the diffs as JSON")
    parser.add_argument("--no-text", action="store_true",
                        help="leave out the plain text diff of each source")


def run(args: argparse.Namespace) -> int:
    """Compare; exit 0 (differences are not an error), 2 on a bad revision or path."""
    from docgen.history.compare import compare, design_pairs
    from docgen.history.snapshot import open_repo, solver_for

    repo, designs_root = open_repo(args.designs)
    if repo is None or not repo.has_commits():
        print("docgen diff: needs a git repository with at least one commit", file=sys.stderr)
        return 2
    revs, paths = _split(repo, args.items)
    if len(revs) > 2:
        print(f"docgen diff: at most two revisions, got {', '.join(revs)}", file=sys.stderr)
        return 2
    rev_a = revs[0] if revs else "HEAD"
    rev_b = revs[1] if len(revs) > 1 else None
    missing = [p for p in paths if not Path(p).exists() and rev_b is None]
    if missing:
        print(f"docgen diff: no such file or revision: {', '.join(missing)}", file=sys.stderr)
        return 2
    rel_paths = [_relative(repo, p) for p in paths]
    pairs = design_pairs(repo, rev_a, rev_b, designs_root, rel_paths)
    diffs = compare(pairs, solver_for(repo, designs_root))
    if args.json:
        print(json.dumps({"from": rev_a, "to": rev_b or "work tree", "diffs": diffs},
                         indent=2, sort_keys=True, ensure_ascii=False))
        return 0
    print(render(diffs, rev_a, rev_b or "work tree", text=not args.no_text), end="")
    return 0


def _split(repo, items: list[str]) -> tuple[list[str], list[str]]:  # noqa: ANN001
    """Leading items naming commits (and not files) are revisions; the rest are paths."""
    revs: list[str] = []
    for index, item in enumerate(items):
        if Path(item).exists() or repo.resolve(item) is None:
            return revs, items[index:]
        revs.append(item)
    return revs, []


def _relative(repo, path: str) -> str:  # noqa: ANN001
    try:
        return repo.relative(path)
    except ValueError:
        return Path(path).as_posix()


def render(diffs: list[dict], rev_a: str, rev_b: str, *, text: bool = True) -> str:
    """The terminal report: one section per design."""
    from docgen.history.describe import (
        bench_lines,
        circuit_lines,
        metric_lines,
        model_lines,
        requirement_lines,
    )

    if not diffs:
        return f"no design changed between {rev_a} and {rev_b}\n"
    out: list[str] = []
    for diff in diffs:
        old_path, new_path = diff["paths"]
        name = new_path if old_path == new_path else f"{old_path} → {new_path}"
        label_a, label_b = diff["labels"]
        side_b = rev_b if label_b in (rev_b, "work tree") else f"{rev_b} ({label_b})"
        out.append(f"{name}: {rev_a} ({label_a}) → {side_b}")
        if diff.get("only"):
            out.append("  only in " + (rev_b if diff["only"] == "new" else rev_a))
        elif not diff["readable"]:
            out.append("  one side has input errors (run docgen check); text diff only")
        else:
            for title, lines in (("circuit", circuit_lines(diff)), ("models", model_lines(diff)),
                                 ("requirements", requirement_lines(diff)),
                                 ("bench and header", bench_lines(diff)),
                                 ("figures and verdicts", metric_lines(diff))):
                if lines:
                    out.append(f"  {title}")
                    out.extend(f"    {line}" for line in lines)
        if text and diff.get("text"):
            out.append("  text")
            out.extend(f"    {line}" for line in diff["text"].splitlines())
        out.append("")
    return "\n".join(out) + "\n"
