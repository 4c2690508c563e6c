"""The adapter's plain-data pin table agrees with schemdraw's own anchors.

The layout routes wires to the grid pins in :data:`docgen.draw.symbols.SHAPES` without ever
building a schemdraw element; this proves, for every kind and orientation, that each pin is
reached from the real anchor by a short straight stub in the pin's outward direction, and that
pins land on the routing grid.  Reference: schemdraw's installed element geometry
(``element.absanchors``), a general-purpose library.
"""

from __future__ import annotations

import pytest
import schemdraw

from docgen.draw import symbols
from docgen.draw.route import PITCH
from docgen.kinds import KINDS

CASES = [(kind, orientation)
         for kind in symbols.SHAPES
         for orientation in (symbols.OPAMP_ORIENTATIONS if kind == "opamp" else
                             symbols.MULTI_ORIENTATIONS if len(KINDS[kind].terminals) > 2
                             else symbols.TWO_TERMINAL_ORIENTATIONS)]


def test_every_kind_has_a_symbol() -> None:
    assert set(symbols.SHAPES) == set(KINDS)


@pytest.mark.parametrize(("kind", "orientation"), CASES)
def test_pins_reach_the_schemdraw_anchors(kind: str, orientation: str) -> None:
    origin = (7.5, -3.0)
    drawing = schemdraw.Drawing(canvas="svg", show=False)
    element, anchors = symbols._symbol(kind, {}, orientation, origin)
    drawing.add(element)
    pins = symbols.pins_at(kind, orientation, origin)
    assert set(pins) == set(KINDS[kind].terminals)
    for terminal, ((px, py), (dx, dy)) in pins.items():
        ax, ay = element.absanchors[anchors[terminal]]
        assert abs(px / PITCH - round(px / PITCH)) < 1e-9
        assert abs(py / PITCH - round(py / PITCH)) < 1e-9
        run_x, run_y = px - ax, py - ay
        # the stub is straight, shorter than two grid steps, and points outwards
        assert min(abs(run_x), abs(run_y)) < 1e-6, (terminal, run_x, run_y)
        assert abs(run_x) + abs(run_y) < 2 * PITCH
        assert run_x * dx >= -1e-6 and run_y * dy >= -1e-6
        if abs(run_x) > 1e-6:
            assert dx != 0
        if abs(run_y) > 1e-6:
            assert dy != 0


@pytest.mark.parametrize("kind", ["supply", "signal"])
def test_sources_put_plus_at_the_first_net(kind: str) -> None:
    # schemdraw draws a source's '+' next to its end anchor; docgen's first net is positive
    drawing = schemdraw.Drawing(canvas="svg", show=False)
    element, anchors = symbols._symbol(kind, {}, "down", (0.0, 0.0))
    drawing.add(element)
    assert anchors["p"] == "end"
    assert element.absanchors["end"][1] > element.absanchors["start"][1]


def test_text_box_follows_alignment() -> None:
    left = symbols.text_box("RT\n150 kΩ", (1.0, 2.0), "left", "center", symbols.PART_FONT)
    right = symbols.text_box("RT\n150 kΩ", (1.0, 2.0), "right", "center", symbols.PART_FONT)
    assert left[0] == pytest.approx(1.0) and right[2] == pytest.approx(1.0)
    assert left[1] < 2.0 < left[3]
    assert left[3] - left[1] > right[3] - right[1] - 1e-9 > 0
