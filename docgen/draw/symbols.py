"""The one adapter between docgen's part kinds and schemdraw's elements.

Two halves that must agree, and a test proves they do:

* :data:`SHAPES` is plain data the layout uses without importing schemdraw: for each kind, the
  grid pins of every terminal (in the kind's upright orientation, origin at the symbol's
  centre), the direction a wire leaves each pin, and the body box.
* :func:`make_part` builds the schemdraw element(s) for a placed part: the symbol put at
  explicit coordinates with an explicit direction, plus the short stubs that carry each
  off-grid anchor out to its grid pin.

Every element carries ``docgen_part`` (the part's name) and ``docgen_anchors`` (terminal ->
schemdraw anchor name) so the read-back can tell which pin is which; where a pin *is* and
what it touches comes from geometry alone.  Coordinates are schemdraw units (0.5 in) with y
up.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

Point = tuple[float, float]
Box = tuple[float, float, float, float]  # xmin, ymin, xmax, ymax

PART_FONT = 11.0  # points, part labels
NET_FONT = 10.0  # points, net names on symbols and flags
POINTS_PER_UNIT = 36.0  # schemdraw: one unit is 0.5 in


@dataclass(frozen=True, slots=True)
class Shape:
    """A kind's symbol in its upright orientation, origin at the symbol's centre.

    :param pins: terminal -> (x, y, dx, dy): the grid pin and the outward direction of its wire.
    :param body: the body box (no leads).
    :param keepout: the box wires must not enter (body and leads, with a margin).
    """

    pins: dict[str, tuple[float, float, int, int]]
    body: Box
    keepout: Box


def _two(width: float, length: float, names: tuple[str, str] = ("p", "n")) -> Shape:
    pins = {names[0]: (0.0, 1.5, 0, 1), names[1]: (0.0, -1.5, 0, -1)}
    return Shape(pins, (-width, -length, width, length), (-width - 0.3, -1.5, width + 0.3, 1.5))


SHAPES: dict[str, Shape] = {
    "resistor": _two(0.25, 0.5),
    "capacitor": _two(0.3, 0.2),
    "inductor": _two(0.4, 0.5),
    "diode": _two(0.3, 0.3, ("anode", "cathode")),
    "supply": _two(0.5, 0.5),
    "signal": _two(0.5, 0.5),
    "current": _two(0.5, 0.5),
    "npn": Shape({"c": (0, 1.5, 0, 1), "b": (-1.0, 0, -1, 0), "e": (0, -1.5, 0, -1)},
                 (-0.8, -0.6, 0.1, 0.6), (-0.9, -1.5, 0.4, 1.5)),
    "pnp": Shape({"e": (0, 1.5, 0, 1), "b": (-1.0, 0, -1, 0), "c": (0, -1.5, 0, -1)},
                 (-0.8, -0.6, 0.1, 0.6), (-0.9, -1.5, 0.4, 1.5)),
    "njfet": Shape({"d": (0, 2.0, 0, 1), "g": (-1.0, 0, -1, 0), "s": (0, -1.5, 0, -1)},
                   (-0.95, -0.45, 0.15, 0.95), (-0.95, -1.5, 0.4, 2.0)),
    "pjfet": Shape({"s": (0, 1.5, 0, 1), "g": (-1.0, 0, -1, 0), "d": (0, -2.0, 0, -1)},
                   (-0.95, -0.95, 0.15, 0.45), (-0.95, -2.0, 0.4, 1.5)),
    "nmos": Shape({"d": (0, 1.5, 0, 1), "g": (-1.5, 0, -1, 0), "s": (0, -1.5, 0, -1)},
                  (-1.4, -0.8, 0.3, 0.8), (-1.4, -1.5, 0.4, 1.5)),
    "pmos": Shape({"s": (0, 1.5, 0, 1), "g": (-1.5, 0, -1, 0), "d": (0, -1.5, 0, -1)},
                  (-1.4, -0.8, 0.3, 0.8), (-1.4, -1.5, 0.4, 1.5)),
    "opamp": Shape({"in-": (-1.5, 0.5, -1, 0), "in+": (-1.5, -0.5, -1, 0), "out": (2.0, 0, 1, 0),
                    "v+": (0, 1.5, 0, 1), "v-": (0, -1.5, 0, -1)},
                   (-1.1, -1.0, 1.7, 1.0), (-1.45, -1.0, 1.95, 1.0)),
}

TWO_TERMINAL_ORIENTATIONS = ("down", "up", "right", "left")
OPAMP_ORIENTATIONS = ("normal", "flipped")
OPAMP_CENTRE = 0.8 * (2.5 * 3 ** 0.5 / 2) / 6  # triangle centre right of the supply pins
MULTI_ORIENTATIONS = ("normal", "mirrored")


def rotate(point: Point, orientation: str) -> Point:
    """Map a point from the upright frame into ``orientation``.

    Two-terminal parts are drawn upright as ``down`` (first net on top); ``up`` turns them
    over, ``right`` puts the first net on the left, ``left`` on the right.  Multi-terminal
    parts are ``normal`` or ``mirrored`` (left and right swapped).
    """
    x, y = point
    if orientation in ("down", "normal"):
        return (x, y)
    if orientation == "flipped":
        return (x, -y)
    if orientation == "up":
        return (-x, -y)
    if orientation == "right":
        return (-y, x)
    if orientation == "left":
        return (y, -x)
    if orientation == "mirrored":
        return (-x, y)
    raise ValueError(f"unknown orientation {orientation!r}")


def rotate_box(box: Box, orientation: str) -> Box:
    """The axis-aligned box ``box`` after :func:`rotate`."""
    a = rotate((box[0], box[1]), orientation)
    b = rotate((box[2], box[3]), orientation)
    return (min(a[0], b[0]), min(a[1], b[1]), max(a[0], b[0]), max(a[1], b[1]))


def pins_at(kind: str, orientation: str, origin: Point) -> dict[str, tuple[Point, Point]]:
    """Terminal -> (absolute grid pin, outward direction) for a part placed at ``origin``."""
    out = {}
    pins = dict(SHAPES[kind].pins)
    if orientation == "flipped":  # an op-amp with in+ on top; supplies stay + up, − down
        pins["in+"], pins["in-"] = pins["in-"], pins["in+"]
        orientation = "normal"
    for terminal, (x, y, dx, dy) in pins.items():
        px, py = rotate((x, y), orientation)
        ox, oy = rotate((dx, dy), orientation)
        out[terminal] = ((origin[0] + px, origin[1] + py), (round(ox), round(oy)))
    return out


def text_size(text: str, fontsize: float) -> tuple[float, float]:
    """Width and height of ``text`` in drawing units, by schemdraw's own estimate."""
    from schemdraw.backends.svgtext import text_approx_size

    width, height, _ = text_approx_size(text, "Arial", fontsize)
    lines = text.count("\n") + 1
    # schemdraw's estimate gives one line's height; several lines stack at 1.2 × size
    height = max(height, fontsize * 1.2 * lines)
    return width / POINTS_PER_UNIT, height / POINTS_PER_UNIT


def text_box(text: str, at: Point, halign: str, valign: str, fontsize: float) -> Box:
    """The box a text occupies when anchored at ``at`` with the given alignment."""
    width, height = text_size(text, fontsize)
    x0 = {"left": at[0], "center": at[0] - width / 2, "right": at[0] - width}[halign]
    y0 = {"bottom": at[1], "center": at[1] - height / 2, "top": at[1] - height}[valign]
    return (x0, y0, x0 + width, y0 + height)


# ---- schemdraw side ----------------------------------------------------------------------

_TWO_TERMINAL_CLASS = {
    "resistor": "ResistorIEC", "capacitor": "Capacitor", "inductor": "Inductor2",
    "diode": "Diode", "supply": "SourceV", "signal": "SourceSin", "current": "SourceI",
}


def _direction_name(start: Point, end: Point) -> str:
    """``up``/``down``/``left``/``right`` from ``start`` towards ``end`` (axis-aligned)."""
    if abs(end[0] - start[0]) > abs(end[1] - start[1]):
        return "right" if end[0] > start[0] else "left"
    return "up" if end[1] > start[1] else "down"


def _symbol(kind: str, part_params: dict[str, float], orientation: str, origin: Point) -> Any:
    """The schemdraw element of a part, placed; returns (element, terminal -> anchor name)."""
    import schemdraw.elements as elm

    ox, oy = origin
    if kind in _TWO_TERMINAL_CLASS:
        cls = getattr(elm, _TWO_TERMINAL_CLASS[kind])
        element = cls(polar=True) if kind == "capacitor" and part_params.get("polarised") else cls()
        pins = pins_at(kind, orientation, origin)
        # sources draw their '+' (and the current arrow's head) towards the end anchor
        first, second = list(SHAPES[kind].pins)[::-1 if kind in ("supply", "signal") else 1]
        start, end = pins[first][0], pins[second][0]
        direction = _direction_name(start, end)
        length = abs(end[0] - start[0]) + abs(end[1] - start[1])
        element = getattr(element.at(start), direction)(length)
        return element, {first: "start", second: "end"}
    mirrored = orientation == "mirrored"
    if kind in ("npn", "pnp"):
        element = (elm.BjtNpn2() if kind == "npn" else elm.BjtPnp2())
        element = element.at((ox, oy - 1.5)).to((ox, oy + 1.5))
        anchors = {"c": "collector", "b": "base", "e": "emitter"}
    elif kind in ("njfet", "pjfet", "nmos", "pmos"):
        cls = {"njfet": elm.JFetN2, "pjfet": elm.JFetP2, "nmos": elm.NFet2, "pmos": elm.PFet2}
        ends = [y for _x, y, _dx, dy in SHAPES[kind].pins.values() if dy]
        top, bottom = max(ends), min(ends)
        if kind.startswith("n"):  # drain at the top, start anchor is the drain
            element = cls[kind]().at((ox, oy + top)).to((ox, oy + bottom))
        else:  # source at the top: draw from the drain at the bottom upwards
            element = cls[kind]().at((ox, oy + bottom)).to((ox, oy + top))
        mirrored = not mirrored if kind.startswith("n") else mirrored
        anchors = {"d": "drain", "g": "gate", "s": "source"}
    elif kind == "opamp":
        # inputs left, output right; "flipped" puts in+ on top (the supply pins stay put)
        element = elm.Opamp(leads=True).scale(0.8).anchor("center").at((ox + OPAMP_CENTRE, oy))
        element = element.right()
        if orientation == "flipped":
            return element.flip(), {"in-": "in1", "in+": "in2", "out": "out", "v+": "vs",
                                    "v-": "vd"}
        return element, {"in-": "in1", "in+": "in2", "out": "out", "v+": "vd", "v-": "vs"}
    else:
        raise ValueError(f"no symbol for kind {kind!r}")
    if mirrored:
        element = element.flip()
    return element, anchors


def make_part(drawing: Any, part: Any, orientation: str, origin: Point) -> Any:
    """Add a part's symbol and its pin stubs to ``drawing``; return the symbol element."""
    element, anchors = _symbol(part.kind, dict(part.params), orientation, origin)
    element.docgen_part = part.name
    element.docgen_anchors = anchors
    drawing.add(element)
    for terminal, (pin, _direction) in pins_at(part.kind, orientation, origin).items():
        anchor = element.absanchors[anchors[terminal]]
        start = (float(anchor[0]), float(anchor[1]))
        if abs(start[0] - pin[0]) > 1e-6 or abs(start[1] - pin[1]) > 1e-6:
            add_wire(drawing, [start, pin])
    return element


def add_wire(drawing: Any, points: list[Point]) -> Any:
    """An orthogonal polyline through ``points``, as one element (its segments read back as
    separate straight conductors)."""
    from schemdraw.elements import Element
    from schemdraw.segments import Segment

    x0, y0 = points[0]
    element = Element()
    element.segments.append(Segment([(x - x0, y - y0) for x, y in points]))
    element.anchors["start"] = (0, 0)
    element.anchors["end"] = (points[-1][0] - x0, points[-1][1] - y0)
    element.docgen_wire = True
    return drawing.add(element.at(points[0]).right())


def add_text(drawing: Any, text: str, at: Point, halign: str, valign: str,
             fontsize: float = PART_FONT) -> Any:
    """A free text (part label, net label) anchored at ``at``."""
    from schemdraw.elements import Element
    from schemdraw.segments import SegmentText

    element = Element()
    element.segments.append(SegmentText((0, 0), text, align=(halign, valign), fontsize=fontsize))
    element.anchors["start"] = (0, 0)
    return drawing.add(element.at(at).right())


def add_dot(drawing: Any, at: Point) -> Any:
    """A junction dot."""
    import schemdraw.elements as elm

    return drawing.add(elm.Dot().at(at).right())


GROUND_DEPTH = 0.64  # the ground symbol hangs this far below its pin
RAIL_HEIGHT = 0.4  # supply arrows/bars stand this far from their pin


def add_port(drawing: Any, style: str, net: str, at: Point) -> Any:
    """A symbol that joins a net by name: ``ground``, ``up`` (positive rail), ``down``
    (negative rail) or ``flag`` (a named connection point).  The drawn name is the net.
    """
    import schemdraw.elements as elm
    from schemdraw.segments import SegmentText

    if style == "ground":
        element = elm.Ground()
    elif style == "up":
        element = elm.Vdd()
        element.segments.append(SegmentText((0, RAIL_HEIGHT + 0.08), net,
                                            align=("center", "bottom"), fontsize=NET_FONT))
    elif style == "down":
        element = elm.Vss()
        element.segments.append(SegmentText((0, -RAIL_HEIGHT - 0.08), net,
                                            align=("center", "top"), fontsize=NET_FONT))
    elif style == "flag":
        element = elm.Dot(open=True)
        element.segments.append(SegmentText((0.15, 0.1), net, align=("left", "bottom"),
                                            fontsize=NET_FONT))
    else:
        raise ValueError(f"unknown port style {style!r}")
    element.docgen_port = style
    return drawing.add(element.at(at).right())


def port_box(style: str, net: str, at: Point) -> Box:
    """The box a port symbol and its name occupy (the layout reserves it)."""
    x, y = at
    if style == "ground":
        return (x - 0.3, y - GROUND_DEPTH - 0.05, x + 0.3, y)
    if style == "flag":
        tx = text_box(net, (x + 0.15, y + 0.1), "left", "bottom", NET_FONT)
        return (x - 0.1, y - 0.1, tx[2], tx[3])
    width, height = text_size(net, NET_FONT)
    half = max(0.25, width / 2)
    if style == "up":
        return (x - half, y, x + half, y + RAIL_HEIGHT + 0.08 + height)
    return (x - half, y - RAIL_HEIGHT - 0.08 - height, x + half, y)
