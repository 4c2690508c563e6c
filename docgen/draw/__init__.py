"""Schematics drawn from the netlist, and proved to match it.

``draw_svg(design)`` lays the circuit out (:mod:`~docgen.draw.amplifier`, the amplifier-aware
layout, or :mod:`~docgen.draw.fallback`, the general layered one), wires it on a grid
(:mod:`~docgen.draw.route`), draws it with schemdraw through one adapter
(:mod:`~docgen.draw.symbols`), then reads the drawing back from its geometry
(:mod:`~docgen.draw.readback`).  If the amplifier layout's drawing is not faithful and readable,
the layered one is used instead; a drawing is never returned without being checked.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import Any

from docgen.design import Design
from docgen.draw import classify
from docgen.draw.hints import Hints, read_hints
from docgen.draw.placement import Placement, wire
from docgen.draw.readback import Report

__all__ = ["Schematic", "draw", "draw_svg", "layout"]


@dataclass
class Schematic:
    """A finished drawing: its placement, the schemdraw drawing and the read-back verdict."""

    placement: Placement
    drawing: Any
    report: Report
    notes: list[str] = field(default_factory=list)  # why a layout was set aside

    def svg(self) -> str:
        """The SVG text."""
        from docgen.draw.render import to_svg

        return to_svg(self.drawing)


def layout(design: Design, op_voltages: Mapping[str, float] | None = None,
           hints: Hints | None = None, style: str | None = None) -> Placement:
    """Place and wire ``design`` (``style``: ``amplifier`` or ``layered``; default from the
    hints, else ``amplifier``)."""
    from docgen.draw.amplifier import amplifier_layout, net_flags
    from docgen.draw.fallback import layered_layout

    hints = hints if hints is not None else read_hints(design)
    rails = classify.rails(design, op_voltages)
    chosen = style or hints.arrangement
    if chosen == "layered":
        placement = layered_layout(design, rails, hints, op_voltages)
    else:
        placement = amplifier_layout(design, rails, hints)
    placement.flags = net_flags(design, hints)
    return wire(placement)


def draw(design: Design, op_voltages: Mapping[str, float] | None = None,
         style: str | None = None) -> Schematic:
    """Draw ``design``'s schematic and check it; falls back to the layered layout when the
    amplifier layout's drawing fails its read-back (``style="layered"`` asks for it)."""
    from docgen.draw import readback
    from docgen.draw.render import to_drawing

    if not design.parts:
        raise ValueError(f"{design.path}: nothing to draw (no circuit parts)")
    hints = read_hints(design)
    chosen = style or hints.arrangement
    styles = ["layered"] if chosen == "layered" else ["amplifier", "layered"]
    notes: list[str] = []
    result = None
    for style in styles:
        try:
            placement = layout(design, op_voltages, hints, style)
        except Exception as exc:  # noqa: BLE001 - a layout bug must not cost the drawing
            if style == "layered":
                raise
            notes.append(f"the amplifier layout failed ({type(exc).__name__}: {exc})")
            continue
        drawing = to_drawing(placement)
        result = Schematic(placement, drawing, readback.check(design, drawing), notes)
        if result.report.ok and not placement.flagged:
            break
        notes.append(f"the {style} layout was not clean; "
                     + "; ".join((result.report.faults + result.report.problems)[:3]
                                 or [f"nets drawn by name: {', '.join(placement.flagged)}"]))
    return result


def draw_svg(design: Design, op_voltages: Mapping[str, float] | None = None) -> str:
    """The schematic of ``design`` as SVG text (deterministic)."""
    return draw(design, op_voltages).svg()
