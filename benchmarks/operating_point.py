"""Speed of the batched operating point: one circuit, S samples solved at once.

Run: ``python benchmarks/operating_point.py``.  Prints a table (never run by CI).  The circuit
mixes every device kind (op-amp, npn, pnp, JFET, MOSFET, diode) so the figure reflects a
realistic stage; the samples vary resistor values, β and temperature as a tolerance run would.
"""

from __future__ import annotations

import time

import numpy as np

from docgen.elaborate import elaborate
from docgen.reader import read_text
from docgen.record import builtin_page
from docgen.solve.operating_point import solve_op

PAGE = """---
title: benchmark stage
---

```circuit
VP  supply    12 V                  : vp gnd
VN  supply    12 V                  : gnd vn
VS  signal    1 mV 1 kHz offset=0.2 : in gnd
U1  opamp     generic-opamp         : in+=in in-=fb out=out v+=vp v-=vn
RF  resistor  9k                    : out fb
RG  resistor  1k                    : fb gnd
R1  resistor  10k                   : vp c
Q1  npn       generic-npn           : c=c b=out e=e
RE  resistor  4k7                   : e gnd
Q2  pnp       generic-pnp           : c=vn b=e e=pe
R2  resistor  10k                   : vp pe
J1  njfet     generic-njfet         : d=vp g=gnd s=js
RS  resistor  1k                    : js gnd
M1  pmos      generic-pmos          : d=md g=gnd s=vp
RD  resistor  1k                    : md gnd
D1  diode     generic-diode         : vp dk
RK  resistor  2k2                   : dk gnd
```
"""


def main() -> None:
    """Time S = 1 … 5000 and print samples, seconds and microseconds per sample."""
    library = {m.name: m for m in builtin_page().models}
    circuit = elaborate(read_text(PAGE, "benchmark.md"), library)
    nominal = solve_op(circuit)
    print(f"{'samples':>8}  {'seconds':>8}  {'µs/sample':>10}  {'converged':>9}  iterations")
    for samples in (1, 10, 100, 1000, 5000):
        rng = np.random.default_rng(1)
        overrides = {
            ("RF", "value"): 9e3 * rng.uniform(0.99, 1.01, samples),
            ("RE", "value"): 4.7e3 * rng.uniform(0.99, 1.01, samples),
            ("Q1", "beta"): rng.uniform(100, 300, samples),
            ("J1", "drain_saturation_current"): rng.uniform(3e-3, 12e-3, samples),
        }
        temperature = rng.uniform(-20, 60, samples)
        start = time.perf_counter()
        solution = solve_op(circuit, overrides, temperature)
        seconds = time.perf_counter() - start
        print(f"{samples:>8}  {seconds:>8.3f}  {1e6 * seconds / samples:>10.1f}  "
              f"{int(solution.converged.sum()):>9}  {int(solution.dc.iterations.max())}")
        start = time.perf_counter()
        warm = solve_op(circuit, overrides, temperature, start=nominal)
        seconds = time.perf_counter() - start
        print(f"{'':>8}  {seconds:>8.3f}  {1e6 * seconds / samples:>10.1f}  "
              f"{int(warm.converged.sum()):>9}  {int(warm.dc.iterations.max())}"
              "  (started from the nominal point)")


if __name__ == "__main__":
    main()
