"""Build timings for the benchmark script: cold build, no-change rebuild, one-design rebuild.

``python -m docgen.site.benchmark [DESIGNS_DIR]`` prints the table; ``measure_builds`` returns
the numbers.  The designs are copied to a temporary folder, so the record is not touched.
"""

from __future__ import annotations

import os
import shutil
import sys
import tempfile
import time
from pathlib import Path
from typing import Any

from docgen.site.build import BuildOptions, build_site


def _timed(options: BuildOptions) -> dict[str, Any]:
    start = time.perf_counter()
    report = build_site(options)
    return {"seconds": time.perf_counter() - start, "solved": len(report.solved),
            "reused": len(report.reused), "files": report.pages}


def nudge_value(page: Path, up: bool = True) -> str:
    """Move the first resistor of the design at ``page`` to its E24 neighbour (up or down):
    a one-design change that is solved, plotted and drawn again.  Returns what changed."""
    from docgen import eseries
    from docgen.reader import read_text
    from docgen.units import format_eng

    text = page.read_text(encoding="utf-8")
    part = next(p for p in read_text(text, str(page)).parts
                if p.kind == "resistor" and p.value and "value" in p.spans)
    step = eseries.next_up if up else eseries.next_down
    new = format_eng(step(part.value, "E24"), "").replace(" ", "")
    span = part.spans["value"]
    lines = text.split("\n")
    line = lines[span.line - 1]
    lines[span.line - 1] = line[:span.col - 1] + new + line[span.col - 1 + span.width:]
    page.write_text("\n".join(lines), encoding="utf-8")
    return f"{part.name} {part.value_text} -> {new}"


def _has_resistor(page: Path) -> bool:
    """A design page that reads cleanly and has a resistor (the value edit's target)."""
    from docgen.diagnostics import DocgenError
    from docgen.reader import read_text

    try:
        design = read_text(page.read_text(encoding="utf-8"), str(page))
    except DocgenError:
        return False
    return any(p.kind == "resistor" and p.value for p in design.parts)


def measure_builds(designs_dir: Path | str = "designs", jobs: int | None = None
                   ) -> dict[str, dict[str, Any]]:
    """Time a cold build (empty cache), a rebuild with nothing changed, a rebuild after one
    design's notes changed (its bundle is reused) and one after a value of it changed; each
    with the seconds, designs solved and reused, files written."""
    with tempfile.TemporaryDirectory(prefix="docgen-bench-") as folder:
        work = Path(folder)
        designs = work / "designs"
        shutil.copytree(designs_dir, designs)
        options = BuildOptions(designs, work / "site", jobs=jobs or os.cpu_count() or 1,
                               cache_dir=work / "cache", progress=False)
        timings = {"cold build": _timed(options), "no-change rebuild": _timed(options)}
        first = next(p for p in sorted(designs.rglob("*.md")) if _has_resistor(p))
        first.write_text(first.read_text() + "\nA sentence added for the benchmark.\n")
        timings["one-design, notes"] = _timed(options)
        nudge_value(first)
        timings["one-design, value"] = _timed(options)
    return timings


def main(argv: list[str] | None = None) -> int:
    """Print the build timings of a designs folder (default ``designs``)."""
    import argparse

    parser = argparse.ArgumentParser(prog="python -m docgen.site.benchmark",
                                     description="Time a cold build, a no-change rebuild and "
                                     "two one-design rebuilds of a copy of a designs folder.")
    parser.add_argument("designs", nargs="?", default="designs", help="the designs folder")
    args = parser.parse_args(sys.argv[1:] if argv is None else argv)
    if not Path(args.designs).is_dir():
        parser.error(f"no designs folder at '{args.designs}'")
    timings = measure_builds(args.designs)
    print(f"{'site build':<20} {'seconds':>8} {'solved':>7} {'reused':>7} {'files':>6}")
    for name, row in timings.items():
        print(f"{name:<20} {row['seconds']:>8.2f} {row['solved']:>7} {row['reused']:>7} "
              f"{row['files']:>6}")
    return 0


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
