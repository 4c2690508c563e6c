"""Placed parts with their labels: the small helpers every layout uses."""

from __future__ import annotations

import math

from docgen.design import Part
from docgen.draw import classify
from docgen.draw.placement import LABEL_GAP, Placed
from docgen.draw.route import PITCH


def label(placed: Placed) -> Placed:
    """Give a placed part its label text and a spot beside its body."""
    part = placed.part
    value = classify.value_text(part)
    x, y = placed.origin
    body = placed.body()
    if part.kind == "opamp":
        placed.label = f"{part.name}\n{value}".strip()
        placed.label_at, placed.label_align = (x + 1.8, y - 0.35), ("left", "top")
    elif part.kind in classify.ACTIVE:
        placed.label = f"{part.name}\n{value}".strip()
        gap = LABEL_GAP + 0.2
        if placed.orientation == "mirrored":
            placed.label_at, placed.label_align = (body[0] - gap, y), ("right", "center")
        else:
            placed.label_at, placed.label_align = (body[2] + gap, y), ("left", "center")
    elif placed.orientation in ("left", "right"):
        placed.label = f"{part.name} {value}".strip()
        placed.label_at, placed.label_align = ((body[0] + body[2]) / 2, body[3] + 0.15), (
            "center", "bottom")
    else:
        placed.label = f"{part.name}\n{value}".strip()
        placed.label_at, placed.label_align = (body[2] + LABEL_GAP, (body[1] + body[3]) / 2), (
            "left", "center")
    return placed


def place(part: Part, orientation: str, origin: tuple[float, float]) -> Placed:
    """A labelled part at ``origin`` (moved up/right onto the wiring grid)."""
    snapped = (math.ceil(origin[0] / PITCH - 1e-9) * PITCH,
               math.ceil(origin[1] / PITCH - 1e-9) * PITCH)
    return label(Placed(part, orientation, snapped))


def extent(placed: Placed) -> tuple[float, float]:
    """Leftmost and rightmost x of a part with its label and pins."""
    boxes = [placed.keepout(), placed.label_box()]
    xs = [p[0] for p, _ in placed.pins().values()]
    return (min(min(b[0] for b in boxes), *xs), max(max(b[2] for b in boxes), *xs))


def shift(placed: Placed, dx: float, dy: float = 0.0) -> Placed:
    """The same part moved by (dx, dy)."""
    return place(placed.part, placed.orientation, (placed.origin[0] + dx, placed.origin[1] + dy))
