"""Plots for the published notebook: matplotlib figures rendered to deterministic SVG text.

Every function takes plain numbers (SI units) and returns an SVG document as a string.  Output is
byte-identical for identical input: the SVG hash salt is fixed, no date goes into the metadata,
text stays text (no font-dependent glyph paths) and the Agg backend is forced.  Frequency axes are
logarithmic; every axis is labelled with its unit in engineering notation.  Requirement limits are
drawn on the plot they constrain as :class:`Mark` objects.
"""

from __future__ import annotations

import contextlib
import io
from collections.abc import Callable, Iterator, Sequence
from dataclasses import dataclass
from typing import Any, Literal

WIDTH_IN = 7.0  # fits the page's text column at 96 dpi (about 670 px)
ROW_IN = 2.6
SMALL_WIDTH_IN = 3.45  # two small plots (histograms, drift) side by side in the column
MARGIN_IN = (0.85, 0.15, 0.55, 0.12)  # left, right, bottom, top
LIMIT_COLOUR = "#b03a2e"
CURVE_COLOURS = ("#1f4e79", "#7a5c00", "#3d7a3d", "#6b3d7a")


@dataclass(frozen=True, slots=True)
class Mark:
    """A requirement limit drawn on a plot.

    :param where: ``"y"`` a horizontal limit over the whole x range (``low``/``high`` in y units);
        ``"x"`` a vertical limit (``low``/``high`` in x units); ``"point"`` a bar at ``at``
        (x units) spanning ``low``..``high`` in y units.
    :param label: the requirement text shown beside the mark.
    :param panel: which panel of a multi-panel figure (0 = first).
    """

    where: Literal["x", "y", "point"]
    low: float | None
    high: float | None
    label: str
    at: float | None = None
    panel: int = 0


#: the house style; set on matplotlib's rcParams before every figure (only when something
#: changed them: validating an update costs milliseconds, comparing microseconds)
STYLE = {
    "svg.hashsalt": "docgen",
    "svg.fonttype": "none",
    "font.family": ["sans-serif"],
    "font.size": 8.5,
    "axes.grid": True,
    "grid.color": "#d9d9d9",
    "grid.linewidth": 0.6,
    "axes.edgecolor": "#555555",
    "axes.linewidth": 0.7,
    "lines.linewidth": 1.4,
    "figure.dpi": 96,
    "figure.facecolor": "none",  # the page shows through around the axes
    "savefig.facecolor": "none",
    "axes.facecolor": "white",
    "path.simplify": False,
}


def _pyplot() -> Any:
    import matplotlib

    matplotlib.use("Agg", force=True)
    import matplotlib.pyplot as plt

    if any(plt.rcParams[key] != value for key, value in STYLE.items()):
        plt.rcParams.update(STYLE)
    return plt


def _eng(unit: str) -> Any:
    """Tick labels in engineering notation (``10 kHz``); units that take no SI prefix (dB,
    °, %) are printed plainly (``−20 dB``)."""
    from matplotlib.ticker import EngFormatter, FuncFormatter

    from docgen.units import PREFIXABLE, format_eng

    if unit in PREFIXABLE:
        return EngFormatter(unit=unit, sep=" ")
    return FuncFormatter(lambda value, _position: format_eng(value, unit, digits=4))


def _to_svg(fig: Any) -> str:
    """The figure's SVG text; the figure is closed unless it is a reused canvas."""
    plt = _pyplot()
    buffer = io.StringIO()
    fig.savefig(buffer, format="svg", metadata={"Date": None, "Creator": "docgen"})
    if not getattr(fig, "docgen_canvas", False):
        plt.close(fig)
    return buffer.getvalue()


# --- canvases: one figure per figure kind and process, redrawn for each call ---------------
#
# Building a figure's axes and their tick objects is about a third of a small figure's cost,
# and a site draws the same few kinds of figure hundreds of times.  Each kind's figure is
# made once (axes, scales, fixed labels and locators set up by the kind's ``setup``) and
# reused: its data artists and legend are removed, the axes re-limited, and the new data
# drawn.  The SVG is byte for byte what a fresh figure gives (tests/test_site_plots.py).

_CANVASES: dict[tuple[Any, ...], tuple[Any, list[Any]]] = {}
_REUSE = [True]


@contextlib.contextmanager
def fresh_figures() -> Iterator[None]:
    """Within the block every plot builds a new figure (the reference the canvases are
    checked against)."""
    _REUSE.append(False)
    try:
        yield
    finally:
        _REUSE.pop()


def _canvas(key: tuple[Any, ...], setup: Callable[[], tuple[Any, list[Any]]]
            ) -> tuple[Any, list[Any]]:
    """The figure and axes for figure kind ``key``: a new one from ``setup`` the first time
    (or always, inside :func:`fresh_figures`), else the kept one cleared of its data."""
    if not _REUSE[-1]:
        return setup()
    _pyplot()  # rcParams as a fresh figure would see them
    kept = _CANVASES.get(key)
    if kept is None:
        kept = _CANVASES[key] = setup()
        kept[0].docgen_canvas = True
    else:
        _clear(kept[1])
    return kept


def _clear(axes: Sequence[Any]) -> None:
    """Remove what one drawing added (data artists, legend, bar containers) and return the
    axes to their state after setup: no data limits, autoscaling on, property cycles reset."""
    for ax in axes:
        for artist in [*ax.lines, *ax.patches, *ax.collections, *ax.texts]:
            artist.remove()
        ax.containers.clear()
        if ax.get_legend() is not None:
            ax.get_legend().remove()
        ax.set_prop_cycle(None)
        ax.relim()
        ax.set_autoscale_on(True)


def _figure(rows: int, *, sharex: bool = True, height: float = ROW_IN,
            width: float = WIDTH_IN) -> tuple[Any, list[Any]]:
    plt = _pyplot()
    total = height * rows
    fig, axes = plt.subplots(rows, 1, figsize=(width, total), sharex=sharex, squeeze=False)
    # Fixed margins in inches (not a "tight" bounding box): one drawing pass instead of two,
    # and every figure of a kind lines up with the others.
    fig.subplots_adjust(left=MARGIN_IN[0] / width, right=1 - MARGIN_IN[1] / width,
                        bottom=MARGIN_IN[2] / total, top=1 - MARGIN_IN[3] / total,
                        hspace=0.55 / height)
    return fig, [row[0] for row in axes]


def _draw_marks(axes: Sequence[Any], marks: Sequence[Mark]) -> None:
    style = {"color": LIMIT_COLOUR, "linewidth": 1.0, "linestyle": "--"}
    for mark in marks:
        ax = axes[min(mark.panel, len(axes) - 1)]
        if mark.where == "y":
            for value in (mark.low, mark.high):
                if value is not None:
                    ax.axhline(value, **style)
        elif mark.where == "x":
            for value in (mark.low, mark.high):
                if value is not None:
                    ax.axvline(value, **style)
        elif mark.at is not None:
            low = mark.low if mark.low is not None else ax.get_ylim()[0]
            high = mark.high if mark.high is not None else ax.get_ylim()[1]
            ax.plot([mark.at, mark.at], [low, high], color=LIMIT_COLOUR, linewidth=2.2,
                    solid_capstyle="butt")
            for value in (mark.low, mark.high):
                if value is not None:
                    ax.plot([mark.at], [value], marker="_", markersize=12, color=LIMIT_COLOUR)
    if marks:
        from matplotlib.lines import Line2D

        # the limit joins the curves' names when the plot has a legend already
        handles, labels = (axes[0].get_legend_handles_labels()
                           if axes[0].get_legend() is not None else ([], []))
        axes[0].legend([*handles, Line2D([], [], **style)], [*labels, "requirement limit"],
                       loc="best", fontsize=7.5, frameon=False)


def _log_x(ax: Any, unit: str) -> None:
    from matplotlib.ticker import LogLocator, NullFormatter

    ax.set_xscale("log")
    ax.xaxis.set_major_formatter(_eng(unit))
    # Minor ticks at 2 and 5 of each decade: enough to read a log axis, and a quarter of the
    # tick objects matplotlib would otherwise build (they dominate the drawing time).
    ax.xaxis.set_minor_locator(LogLocator(base=10, subs=(2.0, 5.0), numticks=40))
    ax.xaxis.set_minor_formatter(NullFormatter())


def frequency_response(freq_hz: Sequence[float], gain_db: Sequence[float],
                       phase_deg: Sequence[float] | None = None, *,
                       marks: Sequence[Mark] = ()) -> str:
    """Bode plot: gain in dB (and phase in degrees when given) against log frequency."""
    rows = 2 if phase_deg is not None else 1

    def setup() -> tuple[Any, list[Any]]:
        fig, axes = _figure(rows)
        for ax, label in zip(axes, ("gain (dB)", "phase (°)"), strict=False):
            ax.set_ylabel(label)
            _log_x(ax, "Hz")
        axes[-1].set_xlabel("frequency")
        return fig, axes

    fig, axes = _canvas(("response", rows), setup)
    axes[0].plot(freq_hz, gain_db, color=CURVE_COLOURS[0])
    if phase_deg is not None:
        axes[1].plot(freq_hz, phase_deg, color=CURVE_COLOURS[1])
    _draw_marks(axes, marks)
    return _to_svg(fig)


def curves(freq_hz: Sequence[float], series: Sequence[tuple[str, Sequence[float]]], *,
           unit: str, ylabel: str, log_y: bool = True, marks: Sequence[Mark] = ()) -> str:
    """Several named curves against log frequency on one axis (impedances, noise densities)."""

    def setup() -> tuple[Any, list[Any]]:
        fig, axes = _figure(1)
        _log_x(axes[0], "Hz")
        if log_y:
            from matplotlib.ticker import LogLocator, NullFormatter

            axes[0].set_yscale("log")
            axes[0].yaxis.set_minor_locator(LogLocator(base=10, subs=(2.0, 5.0), numticks=40))
            axes[0].yaxis.set_minor_formatter(NullFormatter())
        axes[0].set_xlabel("frequency")
        return fig, axes

    fig, axes = _canvas(("curves", log_y), setup)
    ax = axes[0]
    for index, (name, values) in enumerate(series):
        ax.plot(freq_hz, values, color=CURVE_COLOURS[index % len(CURVE_COLOURS)], label=name)
    ax.yaxis.set_major_formatter(_eng(unit))
    ax.set_ylabel(ylabel)
    ax.legend(loc="best", fontsize=7.5, frameon=False)  # names the curve, even a single one
    _draw_marks(axes, marks)
    return _to_svg(fig)


def waveform(time_s: Sequence[float], traces: Sequence[tuple[str, Sequence[float]]]) -> str:
    """Voltages against time (the bench sine's steady state)."""

    def setup() -> tuple[Any, list[Any]]:
        fig, axes = _figure(1)
        axes[0].xaxis.set_major_formatter(_eng("s"))
        axes[0].yaxis.set_major_formatter(_eng("V"))
        axes[0].set_xlabel("time")
        axes[0].set_ylabel("voltage")
        return fig, axes

    fig, axes = _canvas(("waveform",), setup)
    ax = axes[0]
    for index, (name, values) in enumerate(traces):
        ax.plot(time_s, values, color=CURVE_COLOURS[index % len(CURVE_COLOURS)], label=name)
    if len(traces) > 1:
        ax.legend(loc="best", fontsize=7.5, frameon=False)
    return _to_svg(fig)


def spectrum(orders: Sequence[int], level_db: Sequence[float]) -> str:
    """Harmonic levels in dB relative to the fundamental, as bars by harmonic order."""

    def setup() -> tuple[Any, list[Any]]:
        fig, axes = _figure(1, height=2.2)
        axes[0].set_xlabel("harmonic order")
        axes[0].set_ylabel("level (dB re fundamental)")
        return fig, axes

    fig, axes = _canvas(("spectrum",), setup)
    ax = axes[0]
    bottom = min(min(level_db, default=-120.0), -20.0) - 10.0
    ax.bar(list(orders), [v - bottom for v in level_db], bottom=bottom, width=0.6,
           color=CURVE_COLOURS[0])
    ax.set_xticks(list(orders))
    ax.set_ylim(bottom, 5)
    return _to_svg(fig)


def histogram(samples: Sequence[float], *, unit: str, label: str, bins: int = 30,
              counts: Sequence[float] | None = None, edges: Sequence[float] | None = None,
              marks: Sequence[Mark] = ()) -> str:
    """Distribution of one metric across boards: raw ``samples``, or ``counts`` per bin with
    the bin ``edges``.

    Written directly as SVG (:mod:`docgen.plot_svg`, about fifty times cheaper) when every
    mark is a vertical limit; other marks, or an axis that would need an offset text, are
    drawn by matplotlib (:func:`_histogram_figure`), which the direct drawing imitates.
    """
    if counts is None or edges is None:
        import numpy as np

        counts, edges = np.histogram(np.asarray(samples, dtype=float), bins=bins)
    if len(counts) and all(m.where == "x" for m in marks):
        from docgen import plot_svg

        limits = [v for m in marks for v in (m.low, m.high) if v is not None]
        svg = plot_svg.histogram([float(c) for c in counts], [float(e) for e in edges],
                                 unit=unit, label=label, limits=limits, legend=bool(marks))
        if svg is not None:
            return svg
    return _histogram_figure(counts, edges, unit=unit, label=label, marks=marks)


def _histogram_figure(counts: Sequence[float], edges: Sequence[float], *, unit: str,
                      label: str, marks: Sequence[Mark] = ()) -> str:
    """The histogram drawn by matplotlib (see :func:`histogram`)."""

    def setup() -> tuple[Any, list[Any]]:
        from matplotlib.ticker import MaxNLocator

        fig, axes = _figure(1, height=2.1, width=SMALL_WIDTH_IN)
        axes[0].yaxis.set_major_locator(MaxNLocator(integer=True))
        # at most four x intervals: labels must not collide on a small plot
        axes[0].xaxis.set_major_locator(MaxNLocator(nbins=4))
        axes[0].set_ylabel("boards")
        return fig, axes

    fig, axes = _canvas(("histogram",), setup)
    ax = axes[0]
    widths = [b - a for a, b in zip(edges[:-1], edges[1:], strict=True)]
    ax.bar(list(edges[:-1]), list(counts), width=widths, align="edge", color=CURVE_COLOURS[0])
    ax.xaxis.set_major_formatter(_eng(unit))
    ax.set_xlabel(label)
    _draw_marks(axes, marks)
    return _to_svg(fig)


def drift(temperature_c: Sequence[float], values: Sequence[float], *, unit: str,
          label: str, marks: Sequence[Mark] = ()) -> str:
    """One metric against ambient temperature."""

    def setup() -> tuple[Any, list[Any]]:
        fig, axes = _figure(1, height=2.1, width=SMALL_WIDTH_IN)
        axes[0].set_xlabel("ambient (°C)")
        return fig, axes

    fig, axes = _canvas(("drift",), setup)
    ax = axes[0]
    ax.plot(temperature_c, values, marker="o", markersize=3, color=CURVE_COLOURS[0])
    ax.yaxis.set_major_formatter(_eng(unit))
    ax.set_ylabel(label)
    _draw_marks(axes, marks)
    return _to_svg(fig)
