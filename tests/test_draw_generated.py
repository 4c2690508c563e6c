"""Hundreds of seeded random circuits (bridges, transistors, op-amps, not only chains) are all
drawn faithfully and readably, and the drawing's connectivity, read from geometry alone, is
compared with the netlist as a graph.  Reference for the comparison: the netlist itself
(each part terminal on the same net), partitioned independently of docgen's drawing code.
"""

from __future__ import annotations

import pytest
from draw_random import random_design

from docgen.draw import draw


def _check(seed: int) -> None:
    design = random_design(seed)
    schematic = draw(design)
    expected = sorted(sorted((p.name, t) for p, t in [(q, t) for q in design.parts
                                                      for t, n in q.terminals if n == net])
                      for net in design.nets)
    drawn = sorted(sorted(group) for group in schematic.report.nets)
    assert drawn == expected, (seed, schematic.report.faults)
    assert schematic.report.problems == [], (seed, schematic.report.problems)


@pytest.mark.parametrize("seed", range(1000, 1030))
def test_random_circuit(seed: int) -> None:
    _check(seed)


@pytest.mark.slow
def test_three_hundred_random_circuits() -> None:
    failures = []
    for seed in range(300):
        try:
            _check(seed)
        except AssertionError as exc:
            failures.append(str(exc)[:300])
    assert failures == []


def test_generator_makes_structures_not_only_chains() -> None:
    kinds = [p.kind for seed in range(300) for p in random_design(seed).parts]
    for kind in ("npn", "pnp", "njfet", "pmos", "opamp", "diode", "current"):
        assert kind in kinds
    bridges = sum(1 for seed in range(300)
                  if sum(p.kind == "resistor" for p in random_design(seed).parts) >= 5)
    assert bridges > 50
