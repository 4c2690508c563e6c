"""Speed of the batched operating point: one design, S samples solved at once.

Run: ``python benchmarks/operating_point.py [DESIGN]`` (default: the demo common-emitter stage,
``designs/hydrophone-preamp.md``).  Prints a table; never run by CI.  Every value with a
tolerance or production range is drawn uniformly within it and the temperature within
−20..60 °C, as a tolerance run would; each batch is solved from 0 V and again from the nominal
operating point.
"""

from __future__ import annotations

import sys
import time

import numpy as np

from docgen.elaborate import elaborate, variations
from docgen.record import load_record
from docgen.solve.operating_point import solve_op

DEFAULT = "designs/hydrophone-preamp.md"


def _row(label: int | str, samples: int, seconds: float, solution, note: str = "") -> str:
    return (f"{label!s:>8}  {seconds:>8.3f}  {1e6 * seconds / samples:>10.1f}  "
            f"{int(solution.converged.sum()):>9}  {int(solution.dc.iterations.max()):>10}{note}")


def main(path: str = DEFAULT) -> None:
    """Time S = 1 … 10 000 and print samples, seconds, µs per sample and iterations."""
    record = load_record(path, ["designs"])
    design = record.designs[0]
    circuit = elaborate(design, record.models_for(design))
    nominal = solve_op(circuit)
    varied = variations(circuit)
    print(f"{path}: {len(circuit.devices)} parts, {nominal.problem.layout.size} unknowns, "
          f"{len(varied)} varied values")
    print(f"{'samples':>8}  {'seconds':>8}  {'µs/sample':>10}  {'converged':>9}  iterations")
    for samples in (1, 10, 100, 1000, 10000):
        rng = np.random.default_rng(1)
        overrides = {(v.part, v.name): rng.uniform(v.low, v.high, samples) for v in varied}
        temperature = rng.uniform(-20, 60, samples)
        start = time.perf_counter()
        cold = solve_op(circuit, overrides, temperature)
        print(_row(samples, samples, time.perf_counter() - start, cold))
        start = time.perf_counter()
        warm = solve_op(circuit, overrides, temperature, start=nominal)
        print(_row("", samples, time.perf_counter() - start, warm,
                   "  (from the nominal point)"))


if __name__ == "__main__":
    main(*sys.argv[1:2])
