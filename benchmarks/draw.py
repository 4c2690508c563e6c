"""Time to lay out and draw each demo design (milliseconds, best of three).

Run: ``python benchmarks/draw.py [FILES]`` (default: every design in designs/).  Prints a table;
never run by CI.
"""

from __future__ import annotations

import sys
from pathlib import Path

from docgen.draw.timing import print_draw_timings


def main() -> None:
    """Print the table for the files named, or for designs/*.md."""
    paths = sys.argv[1:] or sorted(str(p) for p in Path("designs").glob("*.md")
                                   if "```circuit" in p.read_text(encoding="utf-8"))
    print_draw_timings(paths)


if __name__ == "__main__":
    main()
