"""The spread histogram written as SVG text directly, without building a matplotlib figure.

A site draws up to eight histograms per design, and matplotlib spends about 50 ms on each
(tick and text objects, the renderer); this writer takes about a millisecond.  It draws what
:func:`docgen.plots.histogram`'s matplotlib figure draws, in the same places: the same figure
and axes size (:data:`docgen.plots.SMALL_WIDTH_IN`, :data:`docgen.plots.MARGIN_IN`), colours,
font and sizes, grid, tick marks and labels, axis labels, dashed requirement limits and the
"requirement limit" legend in matplotlib's "best" corner.  What depends on matplotlib's
choices is asked of matplotlib's cheap parts: tick positions from its locators, tick labels
from its formatters, text widths and font heights from its font metrics, the limits from its
autoscaling rule (5 % margins, bars standing on zero).  tests/test_site_plots.py compares the
texts, their positions and the bars with a matplotlib figure's.
"""

from __future__ import annotations

import functools
from collections.abc import Sequence
from typing import Any

from docgen import plots

HEIGHT_IN = 2.1
POINTS = 72.0  # SVG user units per inch, as matplotlib writes them
FONT_SIZE = 8.5  # plots.py rcParams: font.size
LEGEND_SIZE = 7.5
TICK_LENGTH, TICK_WIDTH, TICK_PAD, LABEL_PAD = 3.5, 0.8, 3.5, 4.0  # matplotlib's defaults
MARGIN = 0.05  # matplotlib's axes.xmargin / axes.ymargin
Box = tuple[float, float, float, float]  # left, top, right, bottom in SVG units (y down)


def _number(value: float) -> str:
    """A coordinate as matplotlib's SVG writer prints it (six decimals, no trailing zeros)."""
    text = f"{value:f}".rstrip("0").rstrip(".")
    return "0" if text in ("", "-0") else text


GRID = 'style="fill: none; stroke: #d9d9d9; stroke-width: 0.6; stroke-linecap: square"'
TICK = f'style="stroke: #000000; stroke-width: {_number(TICK_WIDTH)}"'
CLIP = 'clip-path="url(#axes-area)"'  # bars, grid and limits stay inside the axes


def _escape(text: str) -> str:
    return text.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;")


@functools.cache
def _font() -> tuple[str, float, float]:
    """The CSS font family list and the font's ascent and descent per point of size (the
    OS/2 table's typographic metrics, which matplotlib uses for a line's height)."""
    import matplotlib
    from matplotlib.font_manager import FontProperties, fontManager, get_font

    plots._pyplot()
    families = matplotlib.rcParams["font.sans-serif"]
    css = ", ".join(f if f == "sans-serif" else f"'{f}'" for f in families) + (
        "" if "sans-serif" in families else ", sans-serif")
    font = get_font(fontManager._find_fonts_by_props(FontProperties()))
    table, units = font.get_sfnt_table("OS/2"), font.get_sfnt_table("head")["unitsPerEm"]
    return css, table["sTypoAscender"] / units, -table["sTypoDescender"] / units


@functools.lru_cache(maxsize=4096)
def _width(text: str, size: float) -> float:
    """Advance width of ``text`` at ``size`` points (matplotlib's own text metrics)."""
    from matplotlib.font_manager import FontProperties
    from matplotlib.textpath import text_to_path

    return text_to_path.get_text_width_height_descent(
        text, FontProperties(size=size), ismath=False)[0]


def _text(x: float, y: float, text: str, *, anchor: str, size: float = FONT_SIZE,
          rotate: int = 0) -> str:
    css = _font()[0]
    return (f'<text style="font-size: {_number(size)}px; font-family: {css}; text-anchor: '
            f'{anchor}" x="{_number(x)}" y="{_number(y)}" transform="rotate({-rotate} '
            f'{_number(x)} {_number(y)})">{_escape(text)}</text>')


def _limits(low: float, high: float, sticky_zero: bool) -> tuple[float, float]:
    """matplotlib's autoscaled view of data ``low..high``: widened when empty (its locators'
    rule), 5 % margins, not below zero when the bars stand on zero and zero is the data's
    lower end."""
    from matplotlib.ticker import MaxNLocator

    low, high = MaxNLocator().nonsingular(low, high)
    on_zero = sticky_zero and low + 1e-5 * abs(high - low) > 0.0
    delta = (high - low) * MARGIN
    return (max(low - delta, 0.0) if on_zero else low - delta), high + delta


def _ticks(locator: Any, formatter: Any, low: float, high: float
           ) -> tuple[list[tuple[float, str]], str]:
    """Tick positions inside ``low..high`` with their labels, and the formatter's offset
    text (empty when it has none)."""
    locations = [float(v) for v in locator.tick_values(low, high)]
    span = high - low
    inside = [v for v in locations if low - 1e-10 * span <= v <= high + 1e-10 * span]
    formatter.create_dummy_axis()
    formatter.axis.set_view_interval(low, high)
    labels = formatter.format_ticks(inside)
    return list(zip(inside, labels, strict=True)), formatter.get_offset()


def _legend_box(axes: Box, blocked: list[Box], crossing: list[float]) -> Box:
    """matplotlib's "best" legend place: the first of its nine places (upper right, upper
    left, lower left, lower right, right, center left, center right, lower center, upper
    center, center) that no bar overlaps and no limit line crosses, else the least bad."""
    left, top, right, bottom = axes
    pad, border = 0.5 * LEGEND_SIZE, 0.4 * LEGEND_SIZE
    width = 2 * border + 2.0 * LEGEND_SIZE + 0.8 * LEGEND_SIZE + _width("requirement limit",
                                                                      LEGEND_SIZE)
    height = 2 * border + LEGEND_SIZE  # the row is max(handle, font ascent) + font descent
    xs = {"left": left + pad, "right": right - pad - width,
          "center": (left + right) / 2 - width / 2}
    ys = {"upper": top + pad, "lower": bottom - pad - height,
          "center": (top + bottom) / 2 - height / 2}
    places = [("upper", "right"), ("upper", "left"), ("lower", "left"), ("lower", "right"),
              ("center", "right"), ("center", "left"), ("center", "right"),
              ("lower", "center"), ("upper", "center"), ("center", "center")]
    candidates = []
    for index, (vertical, horizontal) in enumerate(places):
        x0, y0 = xs[horizontal], ys[vertical]
        x1, y1 = x0 + width, y0 + height
        badness = sum(1 for b in blocked if b[0] < x1 and b[2] > x0 and b[1] < y1 and b[3] > y0)
        badness += sum(1 for x in crossing if x0 <= x <= x1)
        candidates.append((badness, index, (x0, y0, x1, y1)))
        if badness == 0:
            break
    return min(candidates)[2]


def histogram(counts: Sequence[float], edges: Sequence[float], *, unit: str, label: str,
              limits: Sequence[float], legend: bool) -> str | None:
    """The SVG of bars ``counts`` between ``edges``, with dashed vertical limits at
    ``limits`` (x units) and the limit legend when ``legend``; ``None`` when the figure needs
    what this writer does not draw (an axis offset text), so the caller draws it with
    matplotlib."""
    from matplotlib.ticker import MaxNLocator, ScalarFormatter

    width_pt, height_pt = plots.SMALL_WIDTH_IN * POINTS, HEIGHT_IN * POINTS
    left, right = plots.MARGIN_IN[0] * POINTS, width_pt - plots.MARGIN_IN[1] * POINTS
    top, bottom = plots.MARGIN_IN[3] * POINTS, height_pt - plots.MARGIN_IN[2] * POINTS
    xlo, xhi = _limits(min([edges[0], *limits]), max([edges[-1], *limits]), False)
    ylo, yhi = _limits(0.0, max(max(counts), 0.0), True)
    xticks, xoffset = _ticks(MaxNLocator(nbins=4), plots._eng(unit), xlo, xhi)
    yticks, yoffset = _ticks(MaxNLocator(integer=True), ScalarFormatter(), ylo, yhi)
    if xoffset or yoffset:
        return None

    def x_at(value: float) -> float:
        return left + (value - xlo) / (xhi - xlo) * (right - left)

    def y_at(value: float) -> float:
        return bottom - (value - ylo) / (yhi - ylo) * (bottom - top)

    out = [_head(width_pt, height_pt),
           f'  <g id="axes_1">\n   <path d="{_rectangle(left, top, right, bottom)}" '
           'style="fill: #ffffff"/>']
    bars: list[Box] = []
    for low, high, count in zip(edges[:-1], edges[1:], counts, strict=True):
        bars.append((x_at(low), y_at(count), x_at(high), y_at(0.0)))
        out.append(f'   <path d="{_rectangle(*bars[-1])}" {CLIP} '
                   f'style="fill: {plots.CURVE_COLOURS[0]}"/>')
    out.append(_x_axis([(x_at(v), text) for v, text in xticks], label, (left, top, right, bottom)))
    out.append(_y_axis([(y_at(v), text) for v, text in yticks], (left, top, right, bottom)))
    dashed = f'style="fill: none; stroke-dasharray: 3.7,1.6; stroke: {plots.LIMIT_COLOUR}"'
    for value in limits:
        out.append(_line(x_at(value), bottom, x_at(value), top, dashed))
    out.append(f'   <path d="{_rectangle(left, top, right, bottom)} z" style="fill: none; '
               'stroke: #555555; stroke-width: 0.7; stroke-linejoin: miter; '
               'stroke-linecap: square"/>')
    if legend:
        out.append(_legend(_legend_box((left, top, right, bottom), bars,
                                       [x_at(v) for v in limits]), dashed))
    out.append(f'  </g>\n </g>\n <defs>\n  <clipPath id="axes-area">\n   <rect x="{_number(left)}"'
               f' y="{_number(top)}" width="{_number(right - left)}" height="'
               f'{_number(bottom - top)}"/>\n  </clipPath>\n </defs>\n</svg>\n')
    return "\n".join(out)


def _line(x0: float, y0: float, x1: float, y1: float, style: str) -> str:
    """A straight line clipped to the axes."""
    return (f'   <path d="M {_number(x0)} {_number(y0)} L {_number(x1)} {_number(y1)}" {CLIP} '
            f'{style}/>')


def _tick(mark: str, x: float, y: float, label: str) -> str:
    """Tick mark ``mark`` (a ``<defs>`` id) placed at ``x``, ``y``, then its label's SVG."""
    return f'   <use xlink:href="#{mark}" x="{_number(x)}" y="{_number(y)}" {TICK}/>\n   {label}'


def _x_axis(ticks: list[tuple[float, str]], label: str, axes: Box) -> str:
    """Grid lines, tick marks and labels at ``ticks`` (SVG x, text) and the axis label."""
    _, ascent, descent = _font()
    left, top, right, bottom = axes
    below = bottom + TICK_LENGTH + TICK_PAD
    out = [f'   <defs>\n    <path id="xtick" d="M 0 0 L 0 {_number(TICK_LENGTH)}" {TICK}/>'
           '\n   </defs>']
    for x, text in ticks:
        out.append(_line(x, bottom, x, top, GRID))
        out.append(_tick("xtick", x, bottom, _text(x, below + ascent * FONT_SIZE, text,
                                                   anchor="middle")))
    # the axis label's top sits a label pad below the tick labels' line (ascent + descent)
    out.append("   " + _text((left + right) / 2, below + (2 * ascent + descent) * FONT_SIZE
                             + LABEL_PAD, label, anchor="middle"))
    return "\n".join(out)


def _y_axis(ticks: list[tuple[float, str]], axes: Box) -> str:
    """Grid lines, tick marks and labels at ``ticks`` (SVG y, text) and the "boards" label,
    a label pad left of the widest tick label."""
    _, ascent, descent = _font()
    left, top, right, bottom = axes
    before = left - TICK_LENGTH - TICK_PAD
    out = [f'   <defs>\n    <path id="ytick" d="M 0 0 L {_number(-TICK_LENGTH)} 0" {TICK}/>'
           '\n   </defs>']
    for y, text in ticks:
        out.append(_line(left, y, right, y, GRID))
        out.append(_tick("ytick", left, y, _text(before, y + ascent * FONT_SIZE / 2, text,
                                                 anchor="end")))
    widest = max((_width(text, FONT_SIZE) for _, text in ticks), default=0.0)
    out.append("   " + _text(before - widest - LABEL_PAD - descent * FONT_SIZE,
                             (top + bottom) / 2, "boards", anchor="middle", rotate=90))
    return "\n".join(out)


def _rectangle(left: float, top: float, right: float, bottom: float) -> str:
    return (f"M {_number(left)} {_number(bottom)} L {_number(right)} {_number(bottom)} "
            f"L {_number(right)} {_number(top)} L {_number(left)} {_number(top)}")


def _legend(box: Box, dashed: str) -> str:
    """The legend's dashed sample line and its text inside ``box`` (no frame)."""
    _, ascent, descent = _font()
    border, handle = 0.4 * LEGEND_SIZE, 2.0 * LEGEND_SIZE
    baseline = box[3] - border - descent * LEGEND_SIZE
    line_y = baseline - 0.7 * LEGEND_SIZE / 2
    start = box[0] + border
    points = " L ".join(f"{_number(start + k * handle / 2)} {_number(line_y)}" for k in range(3))
    return (f'   <path d="M {points}" {dashed}/>\n   '
            + _text(start + handle + 0.8 * LEGEND_SIZE, baseline, "requirement limit",
                    anchor="start", size=LEGEND_SIZE))


def _head(width: float, height: float) -> str:
    return ('<?xml version="1.0" encoding="utf-8" standalone="no"?>\n'
            '<!DOCTYPE svg PUBLIC "-//W3C//DTD SVG 1.1//EN"\n'
            '  "http://www.w3.org/Graphics/SVG/1.1/DTD/svg11.dtd">\n'
            f'<svg xmlns:xlink="http://www.w3.org/1999/xlink" width="{_number(width)}pt" '
            f'height="{_number(height)}pt" viewBox="0 0 {_number(width)} {_number(height)}" '
            'xmlns="http://www.w3.org/2000/svg" version="1.1">\n'
            ' <metadata>\n  <rdf:RDF xmlns:dc="http://purl.org/dc/elements/1.1/" '
            'xmlns:cc="http://creativecommons.org/ns#" '
            'xmlns:rdf="http://www.w3.org/1999/02/22-rdf-syntax-ns#">\n   <cc:Work>\n'
            '    <dc:type rdf:resource="http://purl.org/dc/dcmitype/StillImage"/>\n'
            '    <dc:format>image/svg+xml</dc:format>\n    <dc:creator>\n     <cc:Agent>\n'
            '      <dc:title>docgen</dc:title>\n     </cc:Agent>\n    </dc:creator>\n'
            '   </cc:Work>\n  </rdf:RDF>\n </metadata>\n'
            ' <defs>\n  <style type="text/css">*{stroke-linejoin: round; stroke-linecap: butt}'
            '</style>\n </defs>\n <g id="figure_1">')
