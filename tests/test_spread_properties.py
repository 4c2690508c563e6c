"""Property tests of the spread analysis on resistive dividers (hypothesis).

Reference: V·R2/(R1 + R2) rises with R2 and falls with R1, so its extremes over the tolerance
box are the two opposite corners (the textbook divider formula, differentiated by hand); every
board must lie between them, and the worst case must be exactly them.
"""

from __future__ import annotations

from hypothesis import given, settings
from hypothesis import strategies as st
from solver_helpers import _BUILTINS, design_text

from docgen.elaborate import elaborate
from docgen.pipeline import Context
from docgen.reader import read_text
from docgen.solve import spread

resistance = st.sampled_from([100.0, 470.0, 1e3, 2.2e3, 10e3, 47e3, 100e3])
tolerance = st.sampled_from([1, 2, 5, 10, 20])


@settings(max_examples=15, deadline=None)
@given(r1=resistance, r2=resistance, t1=tolerance, t2=tolerance,
       distribution=st.sampled_from(["uniform", "normal"]), seed=st.integers(0, 1000))
def test_divider_boards_lie_within_the_worst_case_corners(r1: float, r2: float, t1: int,
                                                          t2: int, distribution: str,
                                                          seed: int) -> None:
    circuit = (f"V1 supply 10 V : top gnd\nR1 resistor {r1:g} {t1}% : top mid\n"
               f"R2 resistor {r2:g} {t2}% : mid gnd")
    design = read_text(design_text(circuit, bench=f"output mid\nboards 60\nseed {seed}\n"
                                                  f"distribution {distribution}"), "p.md")
    section = spread.analyse(Context(design, elaborate(design, _BUILTINS), _BUILTINS, {}))
    low = 10 * r2 * (1 - t2 / 100) / (r1 * (1 + t1 / 100) + r2 * (1 - t2 / 100))
    high = 10 * r2 * (1 + t2 / 100) / (r1 * (1 - t1 / 100) + r2 * (1 + t2 / 100))
    corner = section["worst_case"]["voltage at mid"]
    assert abs(corner["low"] - low) <= 1e-9 * high and abs(corner["high"] - high) <= 1e-9 * high
    boards = section["samples"]["voltage at mid"]
    assert section["unsolved"] == 0 and len(boards) == 60
    if distribution == "uniform":  # a normal's tails may leave the tolerance box
        assert all(low * (1 - 1e-9) <= v <= high * (1 + 1e-9) for v in boards)
    figures = section["metrics"]["voltage at mid"]
    assert figures["min"] <= figures["percentiles"]["50"] <= figures["max"]
