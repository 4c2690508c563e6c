"""Speed of the spread batch: 10 000 samples of the demo common-emitter stage (operating point
and gain at three frequencies) against numpy's raw batched solves of the same shapes.

Run: ``python benchmarks/spread.py [DESIGN] [SAMPLES]``.  Prints; never run by CI.  The figures
come from :func:`docgen.solve.spread_benchmark.benchmark` (the benchmark script calls it too).
"""

from __future__ import annotations

import sys

from docgen.solve.spread_benchmark import DEFAULT, benchmark

if __name__ == "__main__":
    benchmark(*(sys.argv[1:2] or [DEFAULT]), *(int(a) for a in sys.argv[2:3]))
