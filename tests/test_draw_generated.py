"""Hundreds of seeded random circuits (bridges, transistors, op-amps, not only chains) are all
drawn faithfully and readably, and the drawing's connectivity, read from geometry alone, is
compared with the netlist as a graph.  Reference for the comparison: the netlist itself
(each part terminal on the same net), partitioned independently of docgen's drawing code.
"""

from __future__ import annotations

import pytest
from draw_circuits import design, part
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


EDGE_CASES = {
    "one resistor": [part(1, "R1", "resistor", 1e3, "a", "gnd")],
    "both ends on one net": [part(1, "R1", "resistor", 1e3, "a", "a"),
                             part(2, "R2", "resistor", 1e3, "a", "gnd")],
    "no signal source": [part(1, "VB", "supply", 5, "v", "gnd"),
                         part(2, "R1", "resistor", 1e3, "v", "x"),
                         part(3, "Q1", "npn", None, "c=x", "b=x", "e=gnd")],
    "everything on rails": [part(1, "VB", "supply", 5, "v", "gnd"),
                            part(2, "C1", "capacitor", 1e-6, "v", "gnd"),
                            part(3, "Q1", "npn", None, "c=v", "b=v", "e=gnd")],
    "floating supply": [part(1, "VB", "supply", 5, "a", "b"),
                        part(2, "R1", "resistor", 1e3, "a", "b")],
    "op-amp follower": [part(1, "VS", "signal", 1, "in", "gnd"),
                        part(2, "U1", "opamp", None, "in+=in", "in-=out", "out=out", "v+=gnd",
                             "v-=gnd")],
    "ring of capacitors": [part(1, "VS", "signal", 1, "in", "gnd"),
                           part(2, "R9", "resistor", 1, "in", "n0"),
                           *(part(3, f"C{i}", "capacitor", 1e-9, f"n{i}", f"n{(i + 1) % 6}")
                             for i in range(6))],
    "twelve parts on one net": [part(1, "VS", "signal", 1, "in", "gnd"),
                                *(part(2, f"R{i}", "resistor", 1e3, "in", "gnd")
                                  for i in range(12))],
    "five pnps in parallel": [part(1, "VS", "signal", 1, "in", "gnd"),
                              part(2, "VB", "supply", 9, "vcc", "gnd"),
                              *(part(3, f"Q{i}", "pnp", None, f"c=c{i}", "b=in", "e=vcc")
                                for i in range(5))],
}


@pytest.mark.parametrize("name", list(EDGE_CASES))
def test_unusual_circuits_draw_without_crashing(name: str) -> None:
    circuit = design(name, EDGE_CASES[name], "out")
    schematic = draw(circuit)
    assert schematic.report.ok, (schematic.report.faults, schematic.report.problems)
    assert schematic.svg().startswith("<svg")


def test_a_failing_amplifier_layout_falls_back(monkeypatch: pytest.MonkeyPatch) -> None:
    import docgen.draw.amplifier

    def broken(*_args: object, **_kwargs: object) -> None:
        raise RuntimeError("deliberately broken for the test")

    monkeypatch.setattr(docgen.draw.amplifier, "amplifier_layout", broken)
    schematic = draw(random_design(5))
    assert schematic.placement.style == "layered" and schematic.report.ok
    assert "deliberately broken" in schematic.notes[0]
