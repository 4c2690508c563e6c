"""Read a finished drawing back from its geometry alone and compare it with the netlist.

Nothing here looks at the layout's bookkeeping.  From the schemdraw elements it takes only:
wire segments (``Line`` start and end), the leads of two-terminal symbols (``start``→``istart``,
``iend``→``end``), each part's terminal anchors, port symbols (ground, supply arrows and name
flags: global names, read from the text drawn on them), dots, and every text's box.

Connectivity is the connected components (union–find) of a graph over snapped coordinates: segment
end points join; a point lying inside another segment joins it (a T-junction, and so also a
collinear overlap); segments that merely cross do not join.  Readability checks use bounding
boxes with a small margin.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from itertools import pairwise
from typing import Any

from docgen.design import Design
from docgen.kinds import GROUND

Point = tuple[float, float]
Segment = tuple[Point, Point]
Box = tuple[float, float, float, float]
EPS = 1e-4
MARGIN = 0.05  # boxes closer than this count as touching
TOLERANCE = 1e-3  # points closer than this are one point


@dataclass
class Geometry:
    """What the drawing shows, as plain geometry."""

    wires: list[Segment] = field(default_factory=list)
    leads: list[tuple[str, Segment]] = field(default_factory=list)  # (part, segment)
    pins: dict[tuple[str, str], Point] = field(default_factory=dict)
    ports: list[tuple[str, Point]] = field(default_factory=list)  # (net name, point)
    dots: list[Point] = field(default_factory=list)
    bodies: list[tuple[str, Box]] = field(default_factory=list)
    texts: list[tuple[str, Box]] = field(default_factory=list)
    attach: dict[str, set[Point]] = field(default_factory=dict)  # body -> its connection points
    extent: Box = (0.0, 0.0, 0.0, 0.0)


@dataclass
class Report:
    """The verdict on one drawing."""

    nets: list[set[tuple[str, str]]]
    faults: list[str]  # connectivity differs from the netlist
    problems: list[str]  # readability

    @property
    def faithful(self) -> bool:
        """True when the drawing connects exactly what the netlist connects."""
        return not self.faults

    @property
    def ok(self) -> bool:
        """Faithful and readable."""
        return not self.faults and not self.problems


class _Snap:
    """Maps points closer than :data:`TOLERANCE` to one representative (float noise from
    rotations and scaling must not split a junction)."""

    def __init__(self) -> None:
        self.cells: dict[tuple[int, int], list[Point]] = {}

    def __call__(self, point: Any) -> Point:
        x, y = float(point[0]), float(point[1])
        cx, cy = round(x / TOLERANCE), round(y / TOLERANCE)
        for i in (cx - 1, cx, cx + 1):
            for j in (cy - 1, cy, cy + 1):
                for known in self.cells.get((i, j), ()):
                    if abs(known[0] - x) <= TOLERANCE and abs(known[1] - y) <= TOLERANCE:
                        return known
        rounded = (round(x, 4) + 0.0, round(y, 4) + 0.0)
        self.cells.setdefault((cx, cy), []).append(rounded)
        return rounded


def geometry(drawing: Any) -> Geometry:
    """Extract the geometry of a schemdraw drawing."""
    from schemdraw.elements import Element2Term, Line
    from schemdraw.segments import SegmentText

    geo = Geometry()
    _round = _Snap()
    boxes = []
    for element in drawing.elements:
        anchors = element.absanchors
        boxes.append(element.get_bbox(transform=True, includetext=True))
        for segment in element.segments:
            # marks inside a part's symbol ('+' of an electrolytic) belong to its body
            if isinstance(segment, SegmentText) and not hasattr(element, "docgen_part"):
                box = segment.xform(element.transform).get_bbox()
                geo.texts.append((segment.text, tuple(box)))
        if isinstance(element, Line):
            geo.wires.append((_round(anchors["start"]), _round(anchors["end"])))
        elif hasattr(element, "docgen_wire"):
            path = [_round(p) for p in element.segments[0].xform(element.transform).path]
            geo.wires.extend(pairwise(path))
        elif hasattr(element, "docgen_part"):
            name = element.docgen_part
            for terminal, anchor in element.docgen_anchors.items():
                geo.pins[(name, terminal)] = _round(anchors[anchor])
            if isinstance(element, Element2Term):
                geo.leads.append((name, (_round(anchors["start"]), _round(anchors["istart"]))))
                geo.leads.append((name, (_round(anchors["iend"]), _round(anchors["end"]))))
            geo.bodies.append((name, _body_box(element)))
            geo.attach[name] = {geo.pins[(name, t)] for t in element.docgen_anchors}
        elif hasattr(element, "docgen_port"):
            texts = [s.text for s in element.segments if isinstance(s, SegmentText)]
            name = GROUND if element.docgen_port == "ground" else texts[0]
            geo.ports.append((name, _round(anchors["start"])))
            body = f"{element.docgen_port} {name}"
            geo.bodies.append((body, tuple(element.get_bbox(transform=True, includetext=False))))
            geo.attach.setdefault(body, set()).add(_round(anchors["start"]))
        elif type(element).__name__ == "Dot":
            geo.dots.append(_round(anchors["center"]))
    geo.extent = (min(b[0] for b in boxes), min(b[1] for b in boxes),
                  max(b[2] for b in boxes), max(b[3] for b in boxes))
    return geo


def _body_box(element: Any) -> Box:
    """A symbol's body without its leads, in drawing coordinates."""
    from schemdraw.elements import Element2Term, Opamp

    x0, y0, x1, y1 = element.get_bbox(transform=False, includetext=False)
    if isinstance(element, Element2Term):
        ends = sorted((element.anchors["istart"][0], element.anchors["iend"][0]))
        x0, x1 = max(x0, ends[0]), min(x1, ends[1])
    elif isinstance(element, Opamp):
        x0, x1 = x0 + 0.5, x1 - 0.5  # the input and output leads (before scaling)
    corners = [element.transform.transform((x, y)) for x in (x0, x1) for y in (y0, y1)]
    return (min(c[0] for c in corners), min(c[1] for c in corners),
            max(c[0] for c in corners), max(c[1] for c in corners))


# ---- connectivity ------------------------------------------------------------------------

def inside(point: Point, segment: Segment) -> bool:
    """True if ``point`` lies on ``segment`` strictly between its ends."""
    (x0, y0), (x1, y1) = segment
    px, py = point
    cross = (x1 - x0) * (py - y0) - (y1 - y0) * (px - x0)
    if abs(cross) > EPS * max(1.0, abs(x1 - x0) + abs(y1 - y0)):
        return False
    dot = (px - x0) * (x1 - x0) + (py - y0) * (y1 - y0)
    length = (x1 - x0) ** 2 + (y1 - y0) ** 2
    return EPS < dot < length - EPS


def lying_inside(points: list[Point], segments: list[Segment]) -> list[tuple[int, int]]:
    """Index pairs (point, segment) where the point lies strictly inside the segment
    (:func:`inside` for every pair at once)."""
    import numpy as np

    if not points or not segments:
        return []
    p = np.asarray(points, dtype=float)[:, None, :]
    a = np.asarray([s[0] for s in segments], dtype=float)[None, :, :]
    b = np.asarray([s[1] for s in segments], dtype=float)[None, :, :]
    d = b - a
    r = p - a
    cross = d[..., 0] * r[..., 1] - d[..., 1] * r[..., 0]
    scale = np.maximum(1.0, np.abs(d[..., 0]) + np.abs(d[..., 1]))
    dot = r[..., 0] * d[..., 0] + r[..., 1] * d[..., 1]
    length = d[..., 0] ** 2 + d[..., 1] ** 2
    hit = (np.abs(cross) <= EPS * scale) & (dot > EPS) & (dot < length - EPS)
    return [(int(i), int(j)) for i, j in zip(*np.nonzero(hit), strict=True)]


def connectivity(geo: Geometry) -> list[set[tuple[str, str]]]:
    """The drawing's nets: sets of (part, terminal) joined by its conductors and port names."""
    segments = geo.wires + [s for _, s in geo.leads]
    points = sorted({p for s in segments for p in s} | set(geo.pins.values())
                    | {p for _, p in geo.ports})
    index = {p: i for i, p in enumerate(points)}
    links = [(index[a], index[b]) for a, b in segments]
    links += [(i, index[segments[j][0]]) for i, j in lying_inside(points, segments)]
    named: dict[str, Point] = {}
    links += [(index[named.setdefault(name, p)], index[p]) for name, p in geo.ports]
    label = _components(len(points), links)
    groups: dict[int, set[tuple[str, str]]] = {}
    for key, point in geo.pins.items():
        groups.setdefault(label[index[point]], set()).add(key)
    return sorted(groups.values(), key=lambda g: sorted(g))


def _components(count: int, links: list[tuple[int, int]]) -> list[int]:
    """The connected component of each of ``count`` nodes joined by ``links`` (union–find
    with path halving: a drawing has a few hundred points, and scipy's graph routines would
    cost a 0.3 s import in every process that draws)."""
    parent = list(range(count))

    def root(node: int) -> int:
        while parent[node] != node:
            parent[node] = parent[parent[node]]
            node = parent[node]
        return node

    for a, b in links:
        parent[root(a)] = root(b)
    return [root(node) for node in range(count)]


def netlist_nets(design: Design) -> list[set[tuple[str, str]]]:
    """The netlist's nets as sets of (part, terminal)."""
    nets: dict[str, set[tuple[str, str]]] = {}
    for part in design.parts:
        for terminal, net in part.terminals:
            nets.setdefault(net, set()).add((part.name, terminal))
    return sorted(nets.values(), key=lambda g: sorted(g))


def _connection_faults(design: Design, geo: Geometry,
                       drawn: list[set[tuple[str, str]]]) -> list[str]:
    faults = []
    expected = netlist_nets(design)
    for group in drawn:
        if group not in expected:
            faults.append("drawn net " + ", ".join(f"{p}.{t}" for p, t in sorted(group))
                          + " is not a net of the circuit")
    for group in expected:
        if group not in drawn:
            faults.append("circuit net " + ", ".join(f"{p}.{t}" for p, t in sorted(group))
                          + " is not drawn as one net")
    union_of = {key: i for i, g in enumerate(drawn) for key in g}
    for name, point in geo.ports:  # a port's name must be the net it touches
        touching = [k for k, p in geo.pins.items() if p == point]
        for part, terminal in touching:
            if design.part(part).net(terminal) != name:
                faults.append(f"{part}.{terminal} touches a '{name}' symbol")
    del union_of
    return faults


# ---- readability -------------------------------------------------------------------------

def overlap(a: Box, b: Box, margin: float = MARGIN) -> bool:
    """True if two boxes overlap (closer than ``margin``)."""
    return not (a[2] + margin <= b[0] or b[2] + margin <= a[0] or a[3] + margin <= b[1]
                or b[3] + margin <= a[1])


def crosses_box(segment: Segment, box: Box, shrink: float = 0.02) -> bool:
    """True if an axis-aligned segment passes through the inside of ``box``."""
    (x0, y0), (x1, y1) = segment
    bx0, by0, bx1, by1 = box[0] + shrink, box[1] + shrink, box[2] - shrink, box[3] - shrink
    if bx0 >= bx1 or by0 >= by1:
        return False
    return (max(x0, x1) > bx0 and min(x0, x1) < bx1 and max(y0, y1) > by0
            and min(y0, y1) < by1)


def _degree(geo: Geometry) -> dict[Point, int]:
    count: dict[Point, int] = {}
    for a, b in geo.wires:
        for p in (a, b):
            count[p] = count.get(p, 0) + 1
    for p in list(geo.pins.values()) + [p for _, p in geo.ports]:
        count[p] = count.get(p, 0) + 1
    points = list(count)
    for i, _j in lying_inside(points, geo.wires):
        count[points[i]] += 2
    return count


def readability(geo: Geometry) -> list[str]:
    """Dots, overlaps, wires through bodies, label clashes and aspect ratio."""
    problems = []
    degree = _degree(geo)
    dots = set(geo.dots)
    for point, count in sorted(degree.items()):
        if count >= 3 and point not in dots:
            problems.append(f"{count}-way junction at {point} has no dot")
    for point in sorted(dots):
        if degree.get(point, 0) < 3:
            problems.append(f"dot at {point} where fewer than three conductors meet")
    bodies = geo.bodies
    for i, (name_a, a) in enumerate(bodies):
        for name_b, b in bodies[i + 1:]:
            if overlap(a, b, 0.0):
                problems.append(f"bodies of {name_a} and {name_b} overlap")
    own_pins = geo.attach
    for segment in geo.wires:
        for name, box in bodies:
            # a stub may reach into its own symbol's box to meet an off-grid anchor
            if set(segment) & own_pins.get(name, set()):
                continue
            if crosses_box(segment, box):
                problems.append(f"a wire {segment} runs through {name}")
    texts = geo.texts
    for i, (text_a, a) in enumerate(texts):
        for text_b, b in texts[i + 1:]:
            if overlap(a, b):
                problems.append(f"labels {text_a!r} and {text_b!r} overlap")
        for name, box in bodies:
            if overlap(a, box):
                problems.append(f"label {text_a!r} overlaps {name}")
        for segment in geo.wires + [s for _, s in geo.leads]:
            if crosses_box(segment, a, shrink=0.0):
                problems.append(f"a wire {segment} runs through label {text_a!r}")
    width, height = geo.extent[2] - geo.extent[0], geo.extent[3] - geo.extent[1]
    if height <= 0 or not 0.25 <= width / height <= 6.0:
        problems.append(f"aspect ratio {width:.1f} × {height:.1f} is not sane")
    return problems


def check(design: Design, drawing: Any) -> Report:
    """Read ``drawing`` back and compare it with ``design``'s netlist."""
    geo = geometry(drawing)
    drawn = connectivity(geo)
    return Report(drawn, _connection_faults(design, geo, drawn), readability(geo))
