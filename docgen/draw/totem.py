"""The complementary push-pull pair drawn as a totem, the way it is drawn by hand.

An n-type device (npn, n-JFET, n-MOSFET) above a p-type one, emitters (sources) facing each
other and joined directly or through one part each with the output node between them at the
signal row's height; the bias string between the two bases (diodes, a resistor) stands in its
own column to the left, with the parts from the rails to the two bases above and below it.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from docgen.design import Part
from docgen.draw.parts import extent, place
from docgen.draw.placement import Placed

STACK_OFFSET = 2.5  # a rail part's centre this far beyond the base it feeds
GAP = 1.0

N_TYPE = {"npn": "e", "njfet": "s", "nmos": "s"}
P_TYPE = {"pnp": "e", "pjfet": "s", "pmos": "s"}
INPUT = {"npn": "b", "pnp": "b", "njfet": "g", "pjfet": "g", "nmos": "g", "pmos": "g"}
DEVICE_Y = 5.5  # the devices' centres above and below the signal row
STRING_Y = (4.0, 0.0, -4.0)  # centres of a bias string of one to three parts (by count)


@dataclass
class Totem:
    """A push-pull pair found in a circuit, with the parts that go with it."""

    upper: Part
    lower: Part
    emitter_parts: list[Part] = field(default_factory=list)  # from the upper device down
    bias_parts: list[Part] = field(default_factory=list)  # from the upper base down
    rail_parts: list[tuple[Part, str]] = field(default_factory=list)  # (part, upper/lower)

    @property
    def parts(self) -> list[Part]:
        """Every part the totem places."""
        return [self.upper, self.lower, *self.emitter_parts, *self.bias_parts,
                *(p for p, _ in self.rail_parts)]

    @property
    def lead(self) -> Part:
        """The device that stands for the group in the signal row."""
        return self.upper

    def input_nets(self) -> set[str]:
        """The bias string and both bases take the signal."""
        return {n for p in self.bias_parts for n in p.nets} | {
            d.net(INPUT[d.kind]) for d in (self.upper, self.lower)}

    def right_inputs(self) -> set[str]:
        """Input nets reached from the right (none: the bias string is on the left)."""
        return set()

    def claim(self, builder: Any) -> None:
        """Take the parts from the rails to the two bases (they stand above and below the
        bias string)."""
        if not self.bias_parts:
            return
        top = self.upper.net(INPUT[self.upper.kind])
        bottom = self.lower.net(INPUT[self.lower.kind])
        for side, row, node in ((builder.upper, "upper", top), (builder.lower, "lower", bottom)):
            if side.get(node):
                self.rail_parts.append((side[node].pop(0), row))

    def arrange(self, builder: Any, stacked: set[str]) -> list[Placed]:
        """The group's parts placed around the origin (the builder moves them into line)."""
        group: list[Placed] = []
        net = self.upper.net(INPUT[self.upper.kind])
        heights = {1: STRING_Y[1:2], 2: STRING_Y[::2], 3: STRING_Y}.get(len(self.bias_parts), ())
        for part, y in zip(self.bias_parts, heights, strict=True):
            group.append(place(part, "down" if part.nets[0] == net else "up", (0.0, y)))
            net = part.nets[1] if part.nets[0] == net else part.nets[0]
        for part, row in self.rail_parts:
            y = DEVICE_Y + STACK_OFFSET if row == "upper" else -DEVICE_Y - STACK_OFFSET
            group.extend(builder.column(part, row, 0.0, y))
        x = (max(extent(p)[1] for p in group) + GAP + 1.0) if group else 0.0
        devices = [place(self.upper, builder.orient(self.upper, "middle"), (x, DEVICE_Y)),
                   place(self.lower, builder.orient(self.lower, "middle"), (x, -DEVICE_Y))]
        group.extend(devices)
        net = self.upper.net(N_TYPE[self.upper.kind])
        for part, y in zip(self.emitter_parts, (2.0, -2.0), strict=False):
            group.append(place(part, "down" if part.nets[0] == net else "up", (x, y)))
            net = part.nets[1] if part.nets[0] == net else part.nets[0]
        inner = {n for p in self.emitter_parts + self.bias_parts for n in p.nets}
        inner.add(self.upper.net(N_TYPE[self.upper.kind]))
        stacked.update(inner)  # nothing stands between the two devices
        for device in devices:
            group.extend(builder.stacks(device.part, device, stacked))
        return group


def _series(start: str, goal: str, pool: list[Part], limit: int) -> list[Part] | None:
    """A chain of at most ``limit`` two-terminal parts from net ``start`` to net ``goal``;
    ``[]`` when the nets are the same."""
    if start == goal:
        return []
    if limit == 0:
        return None
    for part in pool:
        if start not in part.nets or part.nets[0] == part.nets[1]:
            continue
        other = part.nets[1] if part.nets[0] == start else part.nets[0]
        rest = _series(other, goal, [p for p in pool if p is not part], limit - 1)
        if rest is not None:
            return [part, *rest]
    return None


def find_totems(parts: list[Part], two_terminal: list[Part]) -> list[Totem]:
    """Push-pull pairs among ``parts`` (the signal row's devices); ``two_terminal`` are the
    parts between two signal nodes that may join their emitters or bases."""
    found: list[Totem] = []
    used: set[str] = set()
    for upper in parts:
        if upper.kind not in N_TYPE or upper.name in used:
            continue
        for lower in parts:
            if lower.kind not in P_TYPE or lower.name in used:
                continue
            pool = [p for p in two_terminal if p.name not in used]
            emitters = _series(upper.net(N_TYPE[upper.kind]), lower.net(P_TYPE[lower.kind]),
                               pool, 2)
            if emitters is None or len(emitters) == 1:
                continue
            pool = [p for p in pool if p not in emitters]
            bases = _series(upper.net(INPUT[upper.kind]), lower.net(INPUT[lower.kind]), pool, 3)
            if bases is None:
                continue
            found.append(Totem(upper, lower, emitters, bases))
            used.update(p.name for p in found[-1].parts)
            break
    return found
