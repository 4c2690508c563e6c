"""``docgen neaten [PATHS]``: rewrite pages' blocks in the canonical aligned layout.

``--check`` changes nothing and exits 1 if a file would change (for a pre-commit hook).  A file
with input errors is never rewritten: its diagnostics are printed and the exit code is 2.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from docgen.diagnostics import DocgenError
from docgen.neaten import neaten_text
from docgen.record import page_files

DEFAULT_ROOT = "designs"


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """The command's options."""
    parser.add_argument("paths", nargs="*", metavar="PATH",
                        help=f"pages or folders (default: {DEFAULT_ROOT}/)")
    parser.add_argument("--check", action="store_true",
                        help="change nothing; exit 1 if a file would change")


def run(args: argparse.Namespace) -> int:
    """Neaten (or check) every page under the given paths."""
    changed: list[str] = []
    broken = 0
    for root in args.paths or [DEFAULT_ROOT]:
        if not Path(root).exists():
            print(f"{root}:1:1: error: no such file or folder", file=sys.stderr)
            broken += 1
            continue
        for path in page_files(root):
            outcome = _one(path, args.check)
            if outcome is None:
                broken += 1
            elif outcome:
                changed.append(path.as_posix())
    verb = "would neaten" if args.check else "neatened"
    for path in changed:
        print(f"{verb} {path}")
    if broken:
        return 2
    return 1 if args.check and changed else 0


def _one(path: Path, check: bool) -> bool | None:
    """True if the file changes (or would), False if already neat, None on input errors."""
    data = path.read_bytes()
    try:
        text = data.decode("utf-8")
        new = neaten_text(text, path.as_posix())
    except UnicodeDecodeError:
        print(f"{path.as_posix()}:1:1: error: not UTF-8 text", file=sys.stderr)
        return None
    except DocgenError as exc:
        for d in exc.diagnostics:
            print(d.render(), file=sys.stderr)
        return None
    if new == text:
        return False
    if not check:
        path.write_bytes(new.encode("utf-8"))
    return True
