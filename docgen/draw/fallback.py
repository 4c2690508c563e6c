"""The general layered layout: for circuits the amplifier layout does not draw cleanly.

Parts go into columns by their distance from the input (the signal still runs left to right),
each column a stack of parts with generous room between them; every part keeps its usual
orientation (two-terminal parts vertical, transistors upright).  The grid router then wires
whatever the structure is, so the drawing is always complete and faithful; rails are drawn as
symbols wherever there is room.
"""

from __future__ import annotations

from collections.abc import Mapping

from docgen.design import Design
from docgen.draw import classify
from docgen.draw.hints import Hints
from docgen.draw.parts import extent, place, shift
from docgen.draw.placement import Placed, Placement

COLUMN_GAP = 2.5
ROW_GAP = 3.0
MAX_STACK = 4  # parts per column before a new column starts (keeps the aspect sane)
RAIL_ORDER = {"up": 2, "ground": 1, "down": 0}


def _orientation(part, rails: dict[str, str], hints: Hints,  # noqa: ANN001
                 volts: Mapping[str, float]) -> str:
    if part.kind in classify.ACTIVE:
        return "mirrored" if hints.mirrored(part.name) else "normal"
    p, n = part.nets
    if p in volts and n in volts and p not in rails and n not in rails:
        chosen = "down" if volts[p] >= volts[n] else "up"  # the higher voltage on top
    else:  # the more positive rail (or the signal node) on top
        chosen = "down" if RAIL_ORDER.get(rails.get(p, ""), 1.5) >= RAIL_ORDER.get(
            rails.get(n, ""), 1.5) else "up"
    if hints.turned(part.name):
        chosen = "up" if chosen == "down" else "down"
    return chosen


def layered_layout(design: Design, rails: dict[str, str], hints: Hints,
                   volts: Mapping[str, float] | None = None, spacing: float = 1.0) -> Placement:
    """Columns by signal distance, stacks within a column; wires are left to the router.
    With the operating point (``volts``), a part's higher-voltage end is drawn on top."""
    ranks = classify.signal_ranks(design, rails)
    columns: dict[int, list] = {}
    for part in design.parts:
        rank = classify.input_rank(part, ranks)
        if part.kind == "supply":
            rank = classify.UNREACHED + 1
        columns.setdefault(rank, []).append(part)
    placed: list[Placed] = []
    cursor = 0.0
    stacks = [parts[i:i + MAX_STACK] for rank in sorted(columns)
              for parts in [columns[rank]] for i in range(0, len(parts), MAX_STACK)]
    for parts in stacks:
        stack = [place(p, _orientation(p, rails, hints, volts or {}), (0.0, 0.0))
                 for p in parts]
        left = min(extent(p)[0] for p in stack)
        right = max(extent(p)[1] for p in stack)
        y = 0.0
        for item in stack:
            box = item.keepout()
            label = item.label_box()
            top = max(box[3], label[3])
            bottom = min(box[1], label[1])
            placed.append(shift(item, cursor - left, y - top))
            y -= (top - bottom) + ROW_GAP * spacing
        cursor += right - left + COLUMN_GAP * spacing
    return Placement(placed, dict(rails), style="layered",
                     free_ports={p.part.name for p in placed})
