"""The differential (long-tailed) pair drawn the way it is drawn by hand.

Two devices of one kind side by side, the second mirrored so both bases face outwards, the
emitters (sources) meeting at the tail node below them, directly or through one part each,
and the tail's source standing under the middle of the pair: a transistor (with whatever
stands under its emitter) or a two-terminal part to a rail.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from docgen.design import Part
from docgen.draw.parts import extent, place
from docgen.draw.placement import Placed

LOW = {"npn": "e", "pnp": "e", "njfet": "s", "pjfet": "s", "nmos": "s", "pmos": "s"}
HIGH = {"npn": "c", "pnp": "c", "njfet": "d", "pjfet": "d", "nmos": "d", "pmos": "d"}
INPUT = {"npn": "b", "pnp": "b", "njfet": "g", "pjfet": "g", "nmos": "g", "pmos": "g"}
EMITTER_Y = -4.0  # centre of the emitter parts
TAIL_Y = -8.0  # centre of the tail's source
GAP = 1.0


@dataclass
class Pair:
    """A differential pair with its emitter parts and the tail's source."""

    left: Part
    right: Part
    tail: str
    emitter_parts: list[Part] = field(default_factory=list)  # left's, then right's
    source: Part | None = None  # a transistor or a two-terminal part feeding the tail
    source_row: str = ""  # where a two-terminal source was taken from ("upper"/"lower")

    @property
    def parts(self) -> list[Part]:
        """Every part the group places."""
        return [self.left, self.right, *self.emitter_parts,
                *([self.source] if self.source is not None else [])]

    @property
    def lead(self) -> Part:
        """The device that stands for the group in the signal row."""
        return self.left

    def input_nets(self) -> set[str]:
        """Both bases, and the tail transistor's base."""
        devices = [self.left, self.right] + ([self.source] if self.source is not None
                                             and self.source.kind in INPUT else [])
        return {d.net(INPUT[d.kind]) for d in devices}

    def right_inputs(self) -> set[str]:
        """The mirrored device's base faces right: its parts stand right of the pair."""
        return {self.right.net(INPUT[self.right.kind])} - {self.left.net(INPUT[self.left.kind])}

    def claim(self, builder: Any) -> None:
        """Take a two-terminal tail source out of the builder's rail rows."""
        if self.source is not None and self.source.kind not in INPUT:
            for side in (builder.upper, builder.lower):
                if self.source in side.get(self.tail, []):
                    side[self.tail].remove(self.source)

    def arrange(self, builder: Any, stacked: set[str]) -> list[Placed]:
        """The group's parts placed around the origin (the builder moves them into line)."""
        left = place(self.left, "normal", (0.0, 0.0))
        right = place(self.right, "mirrored", (0.0, 0.0))
        width = extent(left)[1] - extent(right)[0] + GAP
        right = place(self.right, "mirrored", (width, 0.0))
        group = [left, right]
        for device, x in ((self.left, 0.0), (self.right, right.origin[0])):
            for part in self.emitter_parts:
                if device.net(LOW[device.kind]) in part.nets:
                    on_top = part.nets[0] == device.net(LOW[device.kind])
                    group.append(place(part, "down" if on_top else "up", (x, EMITTER_Y)))
        middle = right.origin[0] / 2
        if self.source is not None and self.source.kind in INPUT:
            tail = place(self.source, "normal", (middle + 0.5, TAIL_Y))
            group.append(tail)
            group.extend(builder.stacks(self.source, tail, stacked))
        elif self.source is not None:
            on_top = self.source.nets[0] == self.tail
            group.append(place(self.source, "down" if on_top else "up", (middle, TAIL_Y)))
        stacked.update({self.tail, *(d.net(LOW[d.kind]) for d in (self.left, self.right))})
        for device in (left, right):
            group.extend(builder.stacks(device.part, device, stacked))
        return group


def find_pairs(devices: list[Part], two_terminal: list[Part], builder: Any) -> list[Pair]:
    """Differential pairs among the signal row's ``devices``."""
    found: list[Pair] = []
    used: set[str] = set()
    for index, a in enumerate(devices):
        for b in devices[index + 1:]:
            if a.kind != b.kind or a.kind not in LOW or {a.name, b.name} & used:
                continue
            pair = _pair(a, b, two_terminal, devices, builder)
            if pair is not None:
                found.append(pair)
                used.update(p.name for p in pair.parts)
    return found


def _pair(a: Part, b: Part, pool: list[Part], devices: list[Part], builder: Any
          ) -> Pair | None:
    ea, eb = a.net(LOW[a.kind]), b.net(LOW[b.kind])
    if ea in builder.rails or eb in builder.rails:
        return None
    if ea == eb:
        pair = Pair(a, b, ea)
    else:
        pa = [p for p in pool if ea in p.nets and eb not in p.nets]
        pb = [p for p in pool if eb in p.nets and ea not in p.nets]
        joint = [(x, y, t) for x in pa for y in pb for t in set(x.nets) & set(y.nets)
                 if t not in (ea, eb) and t not in builder.rails]
        if not joint:
            return None
        x, y, tail = joint[0]
        pair = Pair(a, b, tail, [x, y])
    feeders = [d for d in devices if d not in (a, b) and d.kind in HIGH
               and d.net(HIGH[d.kind]) == pair.tail]
    if feeders:
        pair.source = feeders[0]
    else:
        for side, row in ((builder.lower, "lower"), (builder.upper, "upper")):
            if side.get(pair.tail):
                pair.source, pair.source_row = side[pair.tail][0], row
                break
    return pair
