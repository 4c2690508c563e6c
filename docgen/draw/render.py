"""A wired placement as a schemdraw drawing (SVG back-end, explicit positions only)."""

from __future__ import annotations

from typing import Any

from docgen.draw import symbols
from docgen.draw.placement import Placement


def to_drawing(placement: Placement) -> Any:
    """The schemdraw ``Drawing`` of a wired placement (nothing implicit: every element gets an
    explicit position and direction; no ``with`` block, no global style)."""
    import schemdraw

    drawing = schemdraw.Drawing(canvas="svg", show=False)
    drawing.config(unit=3, fontsize=symbols.PART_FONT, font="Arial")
    for placed in placement.parts:
        symbols.make_part(drawing, placed.part, placed.orientation, placed.origin)
    for polyline in placement.wires:
        symbols.add_wire(drawing, polyline)
    for port in placement.ports:
        symbols.add_port(drawing, port.style, port.net, port.at)
    for dot in placement.dots:
        symbols.add_dot(drawing, dot)
    for placed in placement.parts:
        symbols.add_text(drawing, placed.label, placed.label_at, *placed.label_align)
    return drawing


def to_svg(drawing: Any) -> str:
    """The SVG text of a drawing (deterministic: schemdraw's SVG back-end writes no dates or
    random ids)."""
    data = drawing.get_imagedata("svg")
    return data.decode("utf-8") if isinstance(data, bytes) else data
