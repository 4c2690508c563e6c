"""The read-back judges drawings from geometry alone — tested on drawings built by hand.

Each case draws a few schemdraw elements at chosen coordinates (no docgen layout involved) and
states the connectivity a reader of the picture sees: a wire ending on another wire's middle
joins it (a T-junction), wires that merely cross do not, a wire lying along another joins it,
ground symbols are one net.  Reference: the conventions of circuit diagrams in IEC 60617
(junction drawn with a dot; crossing without one) — from memory, common practice.
"""

from __future__ import annotations

import schemdraw
import schemdraw.elements as elm
from draw_circuits import design, part
from hypothesis import given, settings
from hypothesis import strategies as st

from docgen.draw import readback, symbols


def _drawing():  # noqa: ANN202
    return schemdraw.Drawing(canvas="svg", show=False)


def _resistor(drawing, name: str, start, end):  # noqa: ANN001, ANN202
    element = elm.ResistorIEC().at(start).to(end)
    element.docgen_part = name
    element.docgen_anchors = {"p": "start", "n": "end"}
    return drawing.add(element)


def _pins(drawing) -> list[set[tuple[str, str]]]:  # noqa: ANN001
    return readback.connectivity(readback.geometry(drawing))


def test_shared_end_points_join() -> None:
    d = _drawing()
    _resistor(d, "R1", (0, 0), (3, 0))
    _resistor(d, "R2", (3, 0), (6, 0))
    assert {("R1", "n"), ("R2", "p")} in _pins(d)


def test_t_junction_joins_but_crossing_does_not() -> None:
    d = _drawing()
    _resistor(d, "R1", (0, 0), (0, -3))
    _resistor(d, "R2", (4, 0), (4, -3))
    symbols.add_wire(d, [(-2, 2), (6, 2)])  # a bus
    symbols.add_wire(d, [(0, 0), (0, 2)])  # ends on the bus: joins
    symbols.add_wire(d, [(4, 0), (4, 4)])  # passes through the bus: crosses only
    nets = _pins(d)
    assert {("R1", "p")} in nets and {("R2", "p")} in nets
    symbols.add_wire(d, [(4, 2), (5, 2)])  # now an end point sits on both: joined
    assert {("R1", "p"), ("R2", "p")} in _pins(d)


def test_collinear_overlap_joins() -> None:
    d = _drawing()
    _resistor(d, "R1", (0, 0), (0, -3))
    _resistor(d, "R2", (6, 0), (6, -3))
    symbols.add_wire(d, [(0, 0), (0, 1), (4, 1)])
    symbols.add_wire(d, [(6, 0), (6, 1), (2, 1)])  # runs back along the other wire
    assert {("R1", "p"), ("R2", "p")} in _pins(d)


def test_ground_symbols_are_one_net_and_named_rails_by_name() -> None:
    d = _drawing()
    _resistor(d, "R1", (0, 3), (0, 0))
    _resistor(d, "R2", (4, 3), (4, 0))
    symbols.add_port(d, "ground", "gnd", (0, 0))
    symbols.add_port(d, "ground", "gnd", (4, 0))
    symbols.add_port(d, "up", "vcc", (0, 3))
    symbols.add_port(d, "up", "vdd", (4, 3))
    nets = _pins(d)
    assert {("R1", "n"), ("R2", "n")} in nets
    assert {("R1", "p")} in nets and {("R2", "p")} in nets


def _divider():  # noqa: ANN202
    circuit = design("divider", [part(1, "R1", "resistor", 1e3, "vcc", "mid"),
                                 part(2, "R2", "resistor", 1e3, "mid", "gnd"),
                                 part(3, "R3", "resistor", 1e3, "mid", "gnd")], "mid")
    d = _drawing()
    _resistor(d, "R1", (0, 6), (0, 3))
    _resistor(d, "R2", (0, 2), (0, -1))
    _resistor(d, "R3", (3, 2), (3, -1))
    symbols.add_port(d, "up", "vcc", (0, 6))
    symbols.add_port(d, "ground", "gnd", (0, -1))
    symbols.add_port(d, "ground", "gnd", (3, -1))
    return circuit, d


def test_faithful_drawing_passes() -> None:
    circuit, d = _divider()
    symbols.add_wire(d, [(0, 3), (0, 2)])
    symbols.add_wire(d, [(0, 2.5), (3, 2.5), (3, 2)])
    symbols.add_dot(d, (0, 2.5))
    report = readback.check(circuit, d)
    assert report.faithful, report.faults
    assert not [p for p in report.problems if "aspect" not in p]


def test_missing_wire_is_an_open_net() -> None:
    circuit, d = _divider()
    symbols.add_wire(d, [(0, 3), (0, 2)])  # R3 left unconnected
    report = readback.check(circuit, d)
    assert not report.faithful
    assert any("not drawn as one net" in f for f in report.faults)


def test_stray_wire_is_a_short() -> None:
    circuit, d = _divider()
    symbols.add_wire(d, [(0, 3), (0, 2)])
    symbols.add_wire(d, [(0, 2.5), (3, 2.5), (3, 2)])
    symbols.add_dot(d, (0, 2.5))
    symbols.add_wire(d, [(3, 2), (4, 2), (4, -1), (3, -1)])  # shorts R3
    report = readback.check(circuit, d)
    assert not report.faithful


def test_junction_without_dot_and_dot_without_junction() -> None:
    circuit, d = _divider()
    symbols.add_wire(d, [(0, 3), (0, 2)])
    symbols.add_wire(d, [(0, 2.5), (3, 2.5), (3, 2)])
    symbols.add_dot(d, (3, 2.5))  # on a corner: only two conductors meet there
    problems = readback.check(circuit, d).problems
    assert any("has no dot" in p for p in problems)
    assert any("fewer than three" in p for p in problems)


def test_wire_through_a_body_and_overlapping_labels() -> None:
    circuit, d = _divider()
    symbols.add_wire(d, [(0, 3), (0, 2)])
    symbols.add_wire(d, [(0, 2.5), (3, 2.5), (3, 2)])
    symbols.add_dot(d, (0, 2.5))
    symbols.add_wire(d, [(-1, 0.5), (1, 0.5)])  # across R2's body, touching nothing
    symbols.add_text(d, "R2 1 kΩ", (1.3, 0.0), "left", "center")
    symbols.add_text(d, "R3 1 kΩ", (1.5, 0.0), "left", "center")
    report = readback.check(circuit, d)
    assert report.faithful  # a crossing wire changes no connection...
    assert any("runs through R2" in p for p in report.problems)  # ...but is not readable
    assert any("labels" in p and "overlap" in p for p in report.problems)


def test_overlapping_bodies() -> None:
    d = _drawing()
    _resistor(d, "R1", (0, 0), (0, -3))
    _resistor(d, "R2", (0.2, 0), (0.2, -3))
    problems = readback.readability(readback.geometry(d))
    assert any("bodies of R1 and R2 overlap" in p for p in problems)


def test_aspect_ratio() -> None:
    d = _drawing()
    _resistor(d, "R1", (0, 0), (60, 0))
    assert any("aspect" in p for p in readback.readability(readback.geometry(d)))


@settings(max_examples=60, deadline=None)
@given(st.integers(1, 40).flatmap(lambda n: st.tuples(
    st.just(n), st.lists(st.tuples(st.integers(0, n - 1), st.integers(0, n - 1)), max_size=60))))
def test_components_agree_with_scipy(graph):
    # scipy's connected_components is the reference for the drawing's own union–find
    import numpy as np
    from scipy.sparse import coo_matrix
    from scipy.sparse.csgraph import connected_components

    from docgen.draw.readback import _components

    count, links = graph
    ours = _components(count, links)
    rows = np.array([a for a, _ in links] or [0])
    cols = np.array([b for _, b in links] or [0])
    _, theirs = connected_components(coo_matrix((np.ones(len(rows)), (rows, cols)),
                                                shape=(count, count)), directed=False)
    pairs = [(i, j) for i in range(count) for j in range(count)]
    assert all((ours[i] == ours[j]) == (theirs[i] == theirs[j]) for i, j in pairs)
