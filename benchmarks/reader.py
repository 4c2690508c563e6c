"""Speed of reading: pages per second for the reader, the record and neaten.

Run: ``python benchmarks/reader.py [FOLDER]`` (default: designs/).  Prints a table (never run by
CI).  Times are CPU time per call, best of five rounds.
"""

from __future__ import annotations

import sys
import time
from collections.abc import Callable
from pathlib import Path

from docgen.neaten import neaten_text
from docgen.reader import read_text
from docgen.record import load_record


def best(run: Callable[[], object], repeat: int = 5, number: int = 20) -> float:
    """Best CPU seconds per call over ``repeat`` rounds of ``number`` calls."""
    times = []
    for _ in range(repeat):
        start = time.process_time()
        for _ in range(number):
            run()
        times.append((time.process_time() - start) / number)
    return min(times)


def main() -> None:
    """Print one row per page and one for the whole record."""
    root = Path(sys.argv[1] if len(sys.argv) > 1 else "designs")
    pages = sorted(root.rglob("*.md"))
    print(f"{'page':40} {'lines':>6} {'read ms':>8} {'neaten ms':>10}")
    for path in pages:
        text = path.read_text(encoding="utf-8")
        read = best(lambda text=text: read_text(text, "x.md"))
        neat = best(lambda text=text: neaten_text(text, "x.md"))
        print(f"{path.name:40} {len(text.splitlines()):6d} {read * 1e3:8.2f} {neat * 1e3:10.2f}")
    whole = best(lambda: load_record(root), repeat=3, number=3)
    print(f"load_record({root}): {whole * 1e3:.1f} ms for {len(pages)} pages")


if __name__ == "__main__":
    main()
