"""Time for the bench sine's steady state (and the whole transient section) of each demo design.

Run: ``python benchmarks/transient.py [FOLDER]``.  Prints; never run by CI.  The figures come
from :func:`docgen.solve.transient_benchmark.benchmark`.
"""

from __future__ import annotations

import sys

from docgen.solve.transient_benchmark import DEFAULT, benchmark

if __name__ == "__main__":
    benchmark(*(sys.argv[1:2] or [DEFAULT]))
