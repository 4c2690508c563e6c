"""The placement data both layouts produce, and the wiring step that completes it.

A layout decides where each part goes and which way it faces (:class:`Placed`), which nets
are rails drawn as symbols, and which nets get a name flag.  :func:`wire` then routes every
connection on the grid (:mod:`docgen.draw.route`) and fills in wires, port symbols and
junction dots.  Nothing here draws; :mod:`docgen.draw.render` turns a finished placement into
schemdraw elements.
"""

from __future__ import annotations

from collections import Counter
from dataclasses import dataclass, field
from itertools import pairwise

from docgen.design import Part
from docgen.draw import symbols
from docgen.draw.route import PITCH, Grid, Node, node_of, nodes_in, point_of
from docgen.draw.symbols import Box, Point

LABEL_GAP = 0.2
MARGIN = 4.0  # free border around the parts for wires and symbols


@dataclass
class Placed:
    """One part with its place, its orientation and its label."""

    part: Part
    orientation: str
    origin: Point
    label: str = ""
    label_at: Point = (0.0, 0.0)
    label_align: tuple[str, str] = ("left", "center")

    def pins(self) -> dict[str, tuple[Point, tuple[int, int]]]:
        """Terminal -> (grid pin, outward direction)."""
        return symbols.pins_at(self.part.kind, self.orientation, self.origin)

    def _shifted(self, box: Box) -> Box:
        x0, y0, x1, y1 = symbols.rotate_box(box, self.orientation)
        ox, oy = self.origin
        return (x0 + ox, y0 + oy, x1 + ox, y1 + oy)

    def keepout(self) -> Box:
        """The box wires must keep out of (body and leads)."""
        return self._shifted(symbols.SHAPES[self.part.kind].keepout)

    def body(self) -> Box:
        """The body box."""
        return self._shifted(symbols.SHAPES[self.part.kind].body)

    def label_box(self) -> Box:
        """The box the label occupies."""
        return symbols.text_box(self.label, self.label_at, *self.label_align, symbols.PART_FONT)


@dataclass(frozen=True, slots=True)
class Port:
    """A symbol that joins a net by name (``ground``, ``up``, ``down``, ``flag``)."""

    style: str
    net: str
    at: Point


@dataclass
class Placement:
    """A complete schematic in plain data (all coordinates in schemdraw units)."""

    parts: list[Placed]
    rails: dict[str, str]  # net -> port style for rail nets
    flags: list[str] = field(default_factory=list)  # nets that get a name flag
    top_level: float | None = None  # positive-rail symbols at or above this y
    bottom_level: float | None = None  # ground/negative-rail symbols at or below this y
    free_ports: set[str] = field(default_factory=set)  # parts whose rail pins skip the levels
    shared_rails: list[list[tuple[str, str]]] = field(default_factory=list)  # wired together,
    # one symbol for the group: [(part, terminal), ...] on one rail
    style: str = "amplifier"
    wires: list[list[Point]] = field(default_factory=list)
    ports: list[Port] = field(default_factory=list)
    dots: list[Point] = field(default_factory=list)
    flagged: list[str] = field(default_factory=list)  # nets drawn by flags (no route found)


def _grow(box: Box, margin: float) -> Box:
    return (box[0] - margin, box[1] - margin, box[2] + margin, box[3] + margin)


def _bounds(placement: Placement) -> tuple[int, int, int, int]:
    boxes = [p.keepout() for p in placement.parts] + [p.label_box() for p in placement.parts]
    x0 = min(b[0] for b in boxes) - MARGIN
    y0 = min(b[1] for b in boxes) - MARGIN
    x1 = max(b[2] for b in boxes) + MARGIN
    y1 = max(b[3] for b in boxes) + MARGIN
    return (int(x0 / PITCH) - 1, int(y0 / PITCH) - 1, int(x1 / PITCH) + 1, int(y1 / PITCH) + 1)


def wire(placement: Placement) -> Placement:
    """Route every net of a placement; fill ``wires``, ``ports`` and ``dots``."""
    grid = Grid(_bounds(placement))
    for placed in placement.parts:
        grid.block(placed.keepout())
        grid.block(_grow(placed.label_box(), 0.1))
    pins_by_net: dict[str, list[tuple[Node, Placed]]] = {}
    for placed in placement.parts:
        for terminal, (pin, outward) in placed.pins().items():
            net = placed.part.net(terminal)
            grid.add_pin(net, node_of(pin), outward)
            pins_by_net.setdefault(net, []).append((node_of(pin), placed))
    ports: list[Port] = []
    grouped = _shared_rails(grid, placement, ports)
    for net in sorted(placement.rails, key=_net_order(placement)):
        for node, placed in sorted(pins_by_net.get(net, []), key=lambda item: item[0]):
            if node not in grouped:
                _rail_port(grid, placement, ports, net, node, placed)
    signal_nets = [n for n in pins_by_net if n not in placement.rails]
    for net in sorted(signal_nets, key=lambda n: (_spread(pins_by_net[n]), n)):
        pins = sorted(node for node, _ in pins_by_net[net])
        _route_net(grid, placement, ports, net, pins)
    grid.reserved.clear()  # every pin has its wire now; unused exits may hold a flag
    for index, net in enumerate(placement.flags):
        if net in pins_by_net and net not in placement.rails and net not in placement.flagged:
            _name_flag(grid, ports, net, rightmost=index > 0)
    placement.ports = ports
    placement.wires = [_polyline(path) for _net, path in grid.paths if len(path) > 1]
    placement.dots = _junctions(grid, ports)
    return placement


def _shared_rails(grid: Grid, placement: Placement, ports: list[Port]) -> set[Node]:
    """Wire each group of rail pins together and give the group one symbol."""
    done: set[Node] = set()
    by_name = {p.part.name: p for p in placement.parts}
    for group in placement.shared_rails:
        placed = [by_name[name] for name, _ in group]
        net = placed[0].part.net(group[0][1])
        nodes = [node_of(p.pins()[t][0]) for p, (_, t) in zip(placed, group, strict=True)]
        grid.lay(net, [nodes[0]])
        if not all(grid.connect(net, node) for node in nodes[1:]):
            continue  # left to the pin-by-pin symbols
        done.update(nodes)
        style = placement.rails[net]
        for start in sorted(grid.tree[net] - set(nodes)) or nodes:
            if _add_port(grid, ports, net, start, style, lambda _node: True, force=False):
                break
        else:
            _add_port(grid, ports, net, nodes[0], "flag", lambda _node: True)
    return done


def _net_order(placement: Placement):  # noqa: ANN202 - a sort key
    order = {net: index for index, net in enumerate(placement.rails)}
    return lambda net: order[net]


def _spread(pins: list[tuple[Node, Placed]]) -> int:
    xs = [n[0] for n, _ in pins]
    ys = [n[1] for n, _ in pins]
    return (max(xs) - min(xs)) + (max(ys) - min(ys))


def _rail_port(grid: Grid, placement: Placement, ports: list[Port], net: str, node: Node,
               placed: Placed) -> None:
    style = placement.rails[net]
    free = placed.part.name in placement.free_ports

    def level_ok(at: Node) -> bool:
        y = point_of(at)[1]
        if free:
            return True
        if style == "up" and placement.top_level is not None:
            return y >= placement.top_level - 1e-9
        if style in ("ground", "down") and placement.bottom_level is not None:
            return y <= placement.bottom_level + 1e-9
        return True

    if not _add_port(grid, ports, net, node, style, level_ok):
        placement.flagged.append(net)
        _add_port(grid, ports, net, node, "flag", lambda _node: True)


def _add_port(grid: Grid, ports: list[Port], net: str, start: Node, style: str,
              level_ok, force: bool = True) -> bool:  # noqa: ANN001 - a predicate
    """Route ``start`` to a new port symbol; a flag that finds no room is put on ``start``
    itself (crowded but still faithful) unless ``force`` is off."""
    def fits(at: Node) -> bool:
        if not level_ok(at):
            return False
        box = _grow(symbols.port_box(style, net, point_of(at)), 0.25)
        return all(n == at or grid.free(n, net) for n in nodes_in(box))

    at = grid.connect_port(net, start, style, fits)
    if at is None:
        if style != "flag" or not force:
            return False
        at = start
        grid.lay(net, [start])
    grid.block(_grow(symbols.port_box(style, net, point_of(at)), 0.1))
    grid.blocked.discard(at)
    ports.append(Port(style, net, point_of(at)))
    return True


def _name_flag(grid: Grid, ports: list[Port], net: str, rightmost: bool) -> None:
    """A name flag on a routed net, from the outermost node of its wiring that has room."""
    nodes = sorted(grid.tree.get(net, ()), key=lambda n: (n[0], -n[1]), reverse=rightmost)
    for start in [n for n in nodes if n not in grid.crossings][:12]:
        if _add_port(grid, ports, net, start, "flag", lambda _node: True, force=False):
            return


def _route_net(grid: Grid, placement: Placement, ports: list[Port], net: str,
               pins: list[Node]) -> None:
    grid.lay(net, [pins[0]])
    pending = pins[1:]
    while pending:
        tree = grid.tree[net]
        pending.sort(key=lambda p: (min(abs(p[0] - t[0]) + abs(p[1] - t[1]) for t in tree), p))
        pin = pending.pop(0)
        if not grid.connect(net, pin):
            # no clear path: join this pin and the tree by name instead of by wire
            if net not in placement.flagged:
                placement.flagged.append(net)
                _add_port(grid, ports, net, pins[0], "flag", lambda _node: True)
            grid.lay(net, [pin])
            _add_port(grid, ports, net, pin, "flag", lambda _node: True)


def _polyline(path: list[Node]) -> list[Point]:
    """The corner points of a grid path (straight runs merged)."""
    corners = [path[0]]
    for before, here, after in zip(path, path[1:], path[2:], strict=False):
        if (here[0] - before[0], here[1] - before[1]) != (after[0] - here[0], after[1] - here[1]):
            corners.append(here)
    corners.append(path[-1])
    return [point_of(n) for n in corners]


def _junctions(grid: Grid, ports: list[Port]) -> list[Point]:
    """Nodes where three or more conductors of one net meet (pins and ports count as one)."""
    edges: dict[Node, set[Node]] = {}
    for _net, path in grid.paths:
        for a, b in pairwise(path):
            edges.setdefault(a, set()).add(b)
            edges.setdefault(b, set()).add(a)
    count: Counter[Node] = Counter()
    for node, neighbours in edges.items():
        if node in grid.crossings:
            continue
        count[node] = len(neighbours)
    for node in grid.outward:
        count[node] += 1
    for port in ports:
        count[node_of(port.at)] += 1
    return [point_of(n) for n in sorted(count) if count[n] >= 3]
