"""The amplifier-aware layout: how an analog engineer arranges a discrete stage by hand.

Rows, from the top: positive-rail symbols; the *upper* row (parts between a positive rail and a
node, vertical); the *middle* row (transistors upright, op-amps, and parts between two signal
nodes lying horizontal, e.g. coupling capacitors); the *lower* row (parts between a node and
ground or a negative rail, vertical); ground symbols on one baseline.  Parts that feed a later
node back to an earlier one lie horizontally above the stage; supplies stand at the right.

Left to right follows the signal: middle-row parts are ordered by their distance from the input
net.  Each node's vertical parts stand in a *slot* just before the first part that takes its
signal from that node (bias divider between coupling capacitor and base), except that the first
part on a collector/drain or emitter/source stands directly above or below that pin.
"""

from __future__ import annotations

from docgen.design import Design, Part
from docgen.draw import classify
from docgen.draw.hints import Hints
from docgen.draw.pair import Pair, find_pairs
from docgen.draw.parts import extent, place, shift
from docgen.draw.placement import Placed, Placement
from docgen.draw.totem import Totem, find_totems
from docgen.kinds import GROUND

UPPER_Y = 4.0
LOWER_Y = -4.0
TOP_LEVEL = 5.5
BOTTOM_LEVEL = -5.5
GAP = 1.0
STACK_OFFSET = 2.5  # a part above/below a pin: its centre this far from the pin
MAX_CHAIN = 3  # rail parts a chain head may lead to
CHAIN_STEP = 4.0  # between the centres of two parts in series in one column
SPLIT_Y = 2.5  # centres of split supplies above and below their shared ground
FEEDBACK_CLEARANCE = 2.5  # room for rail symbols between the stage and a feedback part
OPAMP_FEEDBACK_Y = 3.5
RAIL_ORDER = {"up": 2, "ground": 1, "down": 0}


class _Builder:
    """One run of the amplifier layout over a design."""

    def __init__(self, design: Design, rails: dict[str, str], hints: Hints):
        self.design = design
        self.rails = rails
        self.hints = hints
        self.ranks = classify.signal_ranks(design, rails)
        self.upper: dict[str, list[Part]] = {}
        self.lower: dict[str, list[Part]] = {}
        self.middle: list[Part] = []
        self.feedback: list[Part] = []
        self.rail_parts: list[Part] = []
        self.chain: dict[str, list[Part]] = {}  # a chain head -> the rail parts beyond it
        self.free_partners: set[str] = set()  # chained rail parts whose symbols sit anywhere
        self.groups: dict[str, Totem | Pair] = {}  # lead device -> its group
        self.taken: set[str] = set()  # parts placed by a group
        self.placed: list[Placed] = []

    # ---- roles ---------------------------------------------------------------------------

    def sort_roles(self) -> None:
        for part in self.design.parts:
            nets = part.nets
            if part.kind in classify.ACTIVE:
                self.middle.append(part)
                continue
            on_rail = [n for n in nets if n in self.rails]
            if len(on_rail) == 2 or nets[0] == nets[1]:
                self.rail_parts.append(part)
            elif len(on_rail) == 1:
                node = next(n for n in nets if n not in self.rails)
                side = self.upper if self.rails[on_rail[0]] == "up" else self.lower
                side.setdefault(node, []).append(part)
            elif self._is_feedback(part):
                self.feedback.append(part)
            else:
                self.middle.append(part)
        for part in list(self.middle):
            self._make_chain(part)
        self.middle.sort(key=lambda p: (classify.input_rank(p, self.ranks),
                                        max((self.ranks[n] for n in p.nets
                                             if n in self.ranks), default=0)))
        self.middle = self.hints.order(self.middle)

    def _make_chain(self, part: Part) -> None:
        """A part whose far net leads only to rail parts on one side (RE1, then RE2 and CE
        to ground) stands in their column, in series with them."""
        if part.kind in classify.ACTIVE:
            return
        for near, far in (part.nets, part.nets[::-1]):
            if far in (self.design.bench.output, classify.input_net(self.design)):
                continue  # the input and output nodes stay in the signal row
            others = [p for p in self.design.parts if far in p.nets and p is not part]
            if not 1 <= len(others) <= MAX_CHAIN or near in self.rails or any(
                    p.kind == "signal" for p in [part, *others]):
                continue  # the source keeps its place at the input
            for side in (self.upper, self.lower):
                if all(p in side.get(far, []) for p in others):
                    for p in others:
                        side[far].remove(p)
                    side.setdefault(near, []).append(part)
                    self.middle.remove(part)
                    self.chain[part.name] = others
                    return
            ups, downs = self.upper.get(far, []), self.lower.get(far, [])
            if all(p in ups or p in downs for p in others) and any(p in downs for p in others):
                # a bias node (a mid-rail divider): the part hangs below its node and the
                # divider stands beside it, its positive end marked where it stands
                self.chain[part.name] = sorted(others, key=lambda p: p in ups)
                for p in others:
                    (ups if p in ups else downs).remove(p)
                    self.free_partners.add(p.name)
                self.lower.setdefault(near, []).append(part)
                self.middle.remove(part)
                return

    def _is_feedback(self, part: Part) -> bool:
        return classify.feeds_back(self.design, self.rails, part)

    # ---- orientation ---------------------------------------------------------------------

    def orient(self, part: Part, row: str) -> str:
        if part.kind == "opamp":  # in+ on top when the signal enters there
            plus, minus = (self.ranks.get(part.net(t), classify.UNREACHED)
                           for t in ("in+", "in-"))
            return "flipped" if plus < minus else "normal"
        if part.kind in classify.ACTIVE:
            return "mirrored" if self.hints.mirrored(part.name) else "normal"
        p, n = part.nets
        if part.name in self.chain:  # its chained partner's net goes away from the middle
            far = next(x for x in self.chain[part.name][0].nets if x in (p, n))
            chosen = "down" if (far == n) == (row == "lower") else "up"
        elif row == "upper":
            chosen = "down" if p in self.rails else "up"
        elif row == "lower":
            chosen = "down" if n in self.rails else "up"
        elif row == "rail":
            chosen = "down" if RAIL_ORDER[self.rails.get(p, "ground")] >= RAIL_ORDER[
                self.rails.get(n, "ground")] else "up"
        else:
            chosen = "right" if self.ranks.get(p, 0) <= self.ranks.get(n, 0) else "left"
        if self.hints.turned(part.name):
            chosen = {"down": "up", "up": "down", "right": "left", "left": "right"}[chosen]
        return chosen

    # ---- placing rows --------------------------------------------------------------------

    def input_nets(self, part: Part) -> set[str]:
        if part.name in self.groups:
            return self.groups[part.name].input_nets()
        if part.kind in classify.ACTIVE:
            return {n for t, n in part.terminals if t in classify.INPUT_TERMINALS}
        ranked = sorted(part.nets, key=lambda n: self.ranks.get(n, 0))
        return {ranked[0]}

    def item_nets(self, part: Part) -> set[str]:
        """The nets of a signal-row item (a push-pull pair counts all its parts)."""
        if part.name in self.groups:
            return {n for p in self.groups[part.name].parts for n in p.nets}
        return set(part.nets)

    def stacks(self, part: Part, placed: Placed, taken: set[str]) -> list[Placed]:
        """Parts standing straight above/below a transistor's top and bottom pins."""
        out = []
        for terminal, (pin, outward) in placed.pins().items():
            net = part.net(terminal)
            side, row, y = ((self.upper, "upper", pin[1] + STACK_OFFSET) if outward == (0, 1)
                            else (self.lower, "lower", pin[1] - STACK_OFFSET)
                            if outward == (0, -1) else (None, "", 0.0))
            if side is None or net in taken or not side.get(net) or part.kind == "opamp":
                continue
            taken.add(net)
            out.extend(self.column(side[net].pop(0), row, pin[0], y))
        return out

    def column(self, part: Part, row: str, x: float, y: float) -> list[Placed]:
        """A side part at (x, y) and, if it heads a chain, the parts beyond it: the first
        straight on, the others side by side with it."""
        out = [place(part, self.orient(part, row), (x, y))]
        offset = CHAIN_STEP if row == "upper" else -CHAIN_STEP
        for partner in self.chain.get(part.name, []):
            up = any(self.rails.get(n) == "up" for n in partner.nets)
            item = place(partner, self.orient(partner, "upper" if up else row), (x, y + offset))
            if len(out) > 1:
                item = shift(item, max(extent(p)[1] for p in out[1:]) + GAP - extent(item)[0])
            out.append(item)
        return out

    def find_groups(self) -> None:
        """Push-pull and differential pairs: the first device stays in the signal row and
        stands for the whole group."""
        pool = [p for p in self.middle + self.feedback if p.kind not in classify.ACTIVE]
        devices = [p for p in self.middle if p.kind in classify.ACTIVE]
        for found in [*find_totems(devices, pool), *find_pairs(devices, pool, self)]:
            if any(p.name in self.taken for p in found.parts):
                continue
            self.groups[found.lead.name] = found
            self.taken.update(p.name for p in found.parts)
            others = {p.name for p in found.parts if p is not found.lead}
            self.middle = [p for p in self.middle if p.name not in others]
            self.feedback = [p for p in self.feedback if p.name not in others]
            found.claim(self)

    def group_item(self, group: Totem | Pair, cursor: float, stacked: set[str]) -> float:
        """Place a group (push-pull pair, differential pair) as one item of the signal row."""
        items = group.arrange(self, stacked)
        left = min(extent(p)[0] for p in items)
        right = max(extent(p)[1] for p in items)
        self.placed.extend(shift(p, cursor - left) for p in items)
        return cursor + right - left + GAP

    def run(self) -> Placement:
        self.sort_roles()
        self.find_groups()
        slots_before: dict[str, list[str]] = {}
        slots_after: dict[str, list[str]] = {}
        nets_with_parts = [n for n in self.design.nets if self.upper.get(n) or self.lower.get(n)]
        for net in nets_with_parts:
            takers = [p for p in self.middle if net in self.input_nets(p)]
            touchers = [p for p in self.middle if net in self.item_nets(p)]
            facing_right = takers and takers[0].name in self.groups and net in self.groups[
                takers[0].name].right_inputs()
            if takers and not facing_right:
                slots_before.setdefault(takers[0].name, []).append(net)
            elif facing_right:
                slots_after.setdefault(takers[0].name, []).append(net)
            elif touchers:
                slots_after.setdefault(touchers[-1].name, []).append(net)
        placed_slots: set[str] = set()
        stacked: set[str] = set()
        cursor = 0.0
        for part in self.middle:
            for net in slots_before.get(part.name, []):
                cursor = self.slot(net, cursor, placed_slots)
            if part.name in self.groups:
                cursor = self.group_item(self.groups[part.name], cursor, stacked)
            else:
                cursor = self.middle_part(part, cursor, stacked)
            for net in slots_after.get(part.name, []):
                cursor = self.slot(net, cursor, placed_slots)
        for net in nets_with_parts:
            cursor = self.slot(net, cursor, placed_slots)
        shared: list[list[tuple[str, str]]] = []
        for column in self.supply_columns():
            items = [place(part, "down", (0.0, y)) for part, y in column]
            left = min(extent(p)[0] for p in items)
            right = max(extent(p)[1] for p in items)
            self.placed.extend(shift(p, cursor - left) for p in items)
            cursor += right - left + GAP
            if len(column) == 2:  # split supplies: one ground between them
                shared.append([(column[0][0].name, "n"), (column[1][0].name, "p")])
        self.place_feedback()
        return Placement(self.placed, dict(self.rails), shared_rails=shared, top_level=TOP_LEVEL,
                         bottom_level=BOTTOM_LEVEL,
                         free_ports={p.part.name for p in self.placed
                                     if p.part.kind == "opamp" or p.part in self.rail_parts
                                     or p.part.name in self.free_partners})

    def middle_part(self, part: Part, cursor: float, stacked: set[str]) -> float:
        item = place(part, self.orient(part, "middle"), (0.0, 0.0))
        group = [item, *self.stacks(part, item, stacked)]
        left = min(extent(p)[0] for p in group)
        right = max(extent(p)[1] for p in group)
        self.placed.extend(shift(p, cursor - left) for p in group)
        return cursor + right - left + GAP

    def slot(self, net: str, cursor: float, done: set[str]) -> float:
        if net in done:
            return cursor
        done.add(net)
        ups, downs = self.upper.get(net, []), self.lower.get(net, [])
        for index in range(max(len(ups), len(downs))):
            column = [item
                      for group, row, y in ((ups, "upper", UPPER_Y), (downs, "lower", LOWER_Y))
                      if index < len(group) for item in self.column(group[index], row, 0.0, y)]
            left = min(extent(p)[0] for p in column)
            right = max(extent(p)[1] for p in column)
            self.placed.extend(shift(p, cursor - left) for p in column)
            cursor += right - left + GAP
        return cursor

    def supply_columns(self) -> list[list[tuple[Part, float]]]:
        """Parts between rails, one per column; a positive and a negative supply on ground
        stand in one column, the positive one on top."""
        ups = [p for p in self.rail_parts if p.kind == "supply" and p.nets[1] == GROUND
               and self.rails.get(p.nets[0]) == "up"]
        downs = [p for p in self.rail_parts if p.kind == "supply" and p.nets[0] == GROUND
                 and self.rails.get(p.nets[1]) == "down"]
        pairs = list(zip(ups, downs, strict=False))
        paired = {p.name for pair in pairs for p in pair}
        columns = [[(up, SPLIT_Y), (down, -SPLIT_Y)] for up, down in pairs]
        columns += [[(p, 0.0)] for p in self.rail_parts if p.name not in paired]
        return columns

    def place_feedback(self) -> None:
        xs: dict[str, list[float]] = {}
        for placed in self.placed:
            for terminal, (pin, _) in placed.pins().items():
                xs.setdefault(placed.part.net(terminal), []).append(pin[0])
        for part in self.feedback:
            a, b = part.nets
            mean = {n: sum(xs.get(n, [0.0])) / len(xs.get(n, [0.0])) for n in (a, b)}
            centre = (mean[a] + mean[b]) / 2
            opamps = [p for p in self.placed if p.part.kind == "opamp" and {a, b} <= set(
                p.part.nets)]
            y = (OPAMP_FEEDBACK_Y if opamps[0].orientation == "normal" else -OPAMP_FEEDBACK_Y
                 ) if opamps else (
                self._lowest() - FEEDBACK_CLEARANCE if self._on_lower_pin(a, b)
                else self._highest() + FEEDBACK_CLEARANCE)
            step = -1.0 if y < 0 else 1.0
            # the end whose node lies further left goes left
            orientation = "right" if mean[a] <= mean[b] else "left"
            if self.hints.turned(part.name):
                orientation = "left" if orientation == "right" else "right"
            item = place(part, orientation, (round(centre * 2) / 2, y))
            while self._collides(item):
                item = shift(item, 0.0, step)
            self.placed.append(item)

    def _lowest(self) -> float:
        return min(min(p.keepout()[1], p.label_box()[1]) for p in self.placed)

    def _highest(self) -> float:
        return max(max(p.keepout()[3], p.label_box()[3]) for p in self.placed)

    def _on_lower_pin(self, *nets: str) -> bool:
        """True if a net leaves a middle-row part downwards (an emitter or source)."""
        return any(placed.part.net(t) in nets and outward == (0, -1)
                   for placed in self.placed if placed.part in self.middle
                   for t, (_pin, outward) in placed.pins().items())

    def _collides(self, item: Placed) -> bool:
        mine = [item.keepout(), item.label_box()]
        for other in self.placed:
            for box in (other.keepout(), other.label_box()):
                if any(_overlap(box, m, 0.6) for m in mine):
                    return True
        return False


def _overlap(a: tuple[float, ...], b: tuple[float, ...], margin: float) -> bool:
    return not (a[2] + margin <= b[0] or b[2] + margin <= a[0] or a[3] + margin <= b[1]
                or b[3] + margin <= a[1])


def amplifier_layout(design: Design, rails: dict[str, str], hints: Hints) -> Placement:
    """Place the parts of ``design`` the way a discrete amplifier stage is drawn by hand."""
    return _Builder(design, rails, hints).run()


def net_flags(design: Design, hints: Hints) -> list[str]:
    """Nets that carry a name flag: the input, the output and any the hints name."""
    nets = [classify.input_net(design), design.bench.output, *hints.labels]
    known = set(design.nets)
    return [n for i, n in enumerate(nets) if n and n in known and n not in nets[:i]]
