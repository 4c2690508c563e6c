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


def measure_builds(designs_dir: Path | str = "designs", jobs: int | None = None
                   ) -> dict[str, dict[str, Any]]:
    """Time a cold build (empty cache), a rebuild with nothing changed, and a rebuild after one
    design's notes changed; each with the seconds, designs solved and reused, files written."""
    with tempfile.TemporaryDirectory(prefix="docgen-bench-") as folder:
        work = Path(folder)
        designs = work / "designs"
        shutil.copytree(designs_dir, designs)
        options = BuildOptions(designs, work / "site", jobs=jobs or os.cpu_count() or 1,
                               cache_dir=work / "cache", progress=False)
        timings = {"cold build": _timed(options), "no-change rebuild": _timed(options)}
        first = sorted(p for p in designs.rglob("*.md") if "```circuit" in p.read_text())[0]
        first.write_text(first.read_text() + "\nA sentence added for the benchmark.\n")
        timings["one-design rebuild"] = _timed(options)
    return timings


def main(argv: list[str] | None = None) -> int:
    """Print the build timings of a designs folder (default ``designs``)."""
    args = sys.argv[1:] if argv is None else argv
    timings = measure_builds(args[0] if args else "designs")
    print(f"{'site build':<20} {'seconds':>8} {'solved':>7} {'reused':>7} {'files':>6}")
    for name, row in timings.items():
        print(f"{name:<20} {row['seconds']:>8.2f} {row['solved']:>7} {row['reused']:>7} "
              f"{row['files']:>6}")
    return 0


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
