"""``docgen history PATH``: the revisions of a design with their headline figures and verdicts.

One row per commit that changed the design (following renames) or a library page it uses,
newest first; each revision is solved once, ever (the results cache).  ``--json`` prints the
rows as data.  A shallow clone or a folder outside git says history is not available.
"""

from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """Options of ``docgen history``."""
    parser.add_argument("path", metavar="PATH", help="the design file")
    parser.add_argument("--designs", default="designs", metavar="DIR",
                        help="the designs folder whose library pages designs use "
                             "(default: designs)")
    parser.add_argument("--json", action="store_true", help="print the rows as JSON")


def run(args: argparse.Namespace) -> int:
    """Print the history; exit 2 when the file is not there."""
    from docgen.history.snapshot import open_repo, solver_for
    from docgen.history.timeline import design_history

    if not Path(args.path).is_file():
        print(f"docgen history: no such file: {args.path}", file=sys.stderr)
        return 2
    repo, designs_root = open_repo(args.designs)
    rel = Path(args.path).as_posix()
    if repo is not None:
        try:
            rel = repo.relative(args.path)
        except ValueError:
            repo = None  # the design is in another repository (or none)
    solver = solver_for(repo, designs_root) if repo is not None else None
    if solver is None:
        history = {"path": rel, "available": False, "rows": [], "changed_since_approval": None,
                   "unavailable": "history is not available: the design is not in the same "
                                  "git repository as the designs folder"}
    else:
        history = design_history(repo, rel, designs_root, solver, with_diffs=False)
    history.pop("diffs", None)
    history.pop("results", None)
    if args.json:
        print(json.dumps(history, indent=2, sort_keys=True, ensure_ascii=False))
        return 0
    print(render(history), end="")
    return 0


def render(history: dict) -> str:
    """The terminal table: one line per revision, its figures indented below."""
    from docgen.history.describe import value_text

    if not history["available"]:
        return f"{history['path']}: {history['unavailable']}\n"
    rows = history["rows"]
    out = [f"{history['path']}: {len(rows)} revision{'s' if len(rows) != 1 else ''}, "
           "newest first"]
    flag = history.get("changed_since_approval")
    if flag:
        out.append(f"  {flag['message']}")
        out.extend(f"    {change}" for change in flag["changes"])
    author_width = max(len(r["author"]) for r in rows)
    for row in rows:
        verdict = f"{row['passed']}/{row['total']} met" if row["total"] else "no requirements"
        status = row["status"] or "unreadable"
        out.append(f"{row['short']}  {row['date'][:10]}  {row['author']:<{author_width}}  "
                   f"{status:<10}  {verdict:<15}  {row['subject']}")
        if row["reason"] == "library":
            out.append(f"    library changed: {', '.join(row['library_paths'])}")
        if row["path"] != history["path"]:
            out.append(f"    then at {row['path']}")
        figures = [f"{f['metric']} {value_text(f['value'], f['unit'])}" for f in row["figures"]]
        if figures:
            out.append("    " + " · ".join(figures))
    return "\n".join(out) + "\n"
