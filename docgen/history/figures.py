"""Figures of the history and diff pages: headline trends across revisions and the response
curves of two revisions overlaid.  Deterministic SVG through :mod:`docgen.plots` (same style,
same hash salt, no dates).  A history draws many of them, so each kind is drawn on one figure
per process that is cleared and redrawn: the same bytes as a new figure, at half the cost."""

from __future__ import annotations

import functools
import hashlib
import json
import math
from collections.abc import Mapping, Sequence
from importlib import metadata
from typing import Any

from docgen import __version__

Json = dict[str, Any]


@functools.cache
def _matplotlib_version() -> str:
    """Installed matplotlib's version, looked up once (each lookup scans the installed
    distributions: about 35 ms, paid per figure on every rebuild before)."""
    return metadata.version("matplotlib")


def figure_key(name: str, payload: Any) -> str:
    """The cache key of figure ``name`` drawn from ``payload``: the payload, docgen's code and
    matplotlib's version."""
    from docgen.site.cache import code_fingerprint

    text = json.dumps([name, payload, __version__, code_fingerprint(), _matplotlib_version()],
                      sort_keys=True, default=str)
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


def trend_series(rows: Sequence[Json], limit: int = 6) -> list[tuple[str, str, list[float | None]]]:
    """``(metric, unit, values oldest → newest)`` for headline figures that change across rows.

    ``rows`` are history rows newest first; a figure missing at a revision is ``None``.  Only
    figures with at least two values are kept, at most ``limit`` of them: those that changed
    first, each group in headline order.
    """
    order: list[tuple[str, str]] = []
    for row in rows:
        for figure in row["figures"]:
            if (figure["metric"], figure["unit"]) not in order:
                order.append((figure["metric"], figure["unit"]))
    series = []
    for metric, unit in order:
        values = []
        for row in reversed(rows):
            found = [f["value"] for f in row["figures"] if f["metric"] == metric]
            values.append(found[0] if found else None)
        if sum(v is not None for v in values) >= 2:
            series.append((metric, unit, values))
    # figures that moved come first: a flat line says little when panels are limited
    moved = [s for s in series if len({v for v in s[2] if v is not None}) > 1]
    return (moved + [s for s in series if s not in moved])[:limit]


def trend_plot(labels: Sequence[str], series: Sequence[tuple[str, str, Sequence[float | None]]],
               *, reuse: bool = True) -> str:
    """One small panel per figure against revision (oldest left), sharing the revision axis.

    :param reuse: draw on this process's figure with as many panels (made on first use; the
        axes and their tick objects are most of a trend's cost), else on a new one; the SVG is
        the same either way (tests/test_history_figures.py compares them).
    """
    from docgen import plots

    fig, axes = _trend_canvas(len(series)) if reuse else _trend_figure(len(series))
    positions = list(range(len(labels)))
    for index, (ax, (metric, unit, values)) in enumerate(zip(axes, series, strict=True)):
        _clear(ax)
        points = [(x, v) for x, v in zip(positions, values, strict=True) if v is not None]
        ax.plot([p[0] for p in points], [p[1] for p in points], marker="o", markersize=3.5,
                color=plots.CURVE_COLOURS[index % len(plots.CURVE_COLOURS)])
        ax.yaxis.set_major_formatter(plots._eng(unit))
        ax.set_title(metric, fontsize=8.5, loc="left")
        ax.relim()
        ax.autoscale_view()
    axes[-1].set_xticks(positions)
    axes[-1].set_xticklabels(labels, rotation=30, ha="right", fontsize=7.5)
    return _svg(fig) if reuse else plots._to_svg(fig)


def _trend_figure(panels: int) -> tuple[Any, list[Any]]:
    from docgen import plots

    fig, axes = plots._figure(panels, height=1.55)
    fig.subplots_adjust(hspace=0.55)
    axes[-1].set_xlabel("revision (oldest left)")
    return fig, axes


@functools.cache
def _trend_canvas(panels: int) -> tuple[Any, list[Any]]:
    return _trend_figure(panels)


def _clear(ax: Any) -> None:
    """Take the curves and the legend off a reused axes (what is drawn anew each time)."""
    for line in list(ax.lines):
        line.remove()
    if ax.get_legend() is not None:
        ax.get_legend().remove()


def _svg(fig: Any) -> str:
    """The SVG of a figure that stays open for reuse (``plots._to_svg`` closes it)."""
    import io

    buffer = io.StringIO()
    fig.savefig(buffer, format="svg", metadata={"Date": None, "Creator": "docgen"})
    return buffer.getvalue()


def response_overlay(old_ac: Mapping[str, Any] | None, new_ac: Mapping[str, Any] | None,
                     labels: tuple[str, str]) -> str | None:
    """Gain against frequency of both revisions on one plot, or ``None`` without two curves.

    When the sweeps differ, the older curve is interpolated (log frequency) onto the newer
    sweep and left blank outside its own range.
    """
    if not _has_curve(old_ac) or not _has_curve(new_ac):
        return None
    import numpy as np

    freq = np.asarray(new_ac["freq_hz"], dtype=float)
    old_f = np.asarray(old_ac["freq_hz"], dtype=float)
    old_gain = np.asarray(old_ac["gain_db"], dtype=float)
    if old_f.shape == freq.shape and np.array_equal(old_f, freq):
        before = old_gain
    else:
        before = np.interp(np.log10(freq), np.log10(old_f), old_gain, left=math.nan,
                           right=math.nan)
    return _overlay_canvas().draw(freq, [(labels[0], before), (labels[1], new_ac["gain_db"])])


class _Canvas:
    """The overlay figure, made once per process and redrawn for each pair of revisions.

    Building a figure's axes and tick objects is about half the cost of drawing an overlay,
    and a history has one overlay per diff page.  Removing the curves and the legend and
    re-limiting the axes gives the same SVG bytes as a fresh ``plots.curves(..., unit="dB",
    ylabel="gain (dB)", log_y=False)`` figure; tests/test_history_figures.py compares the two.
    """

    def __init__(self) -> None:
        from docgen import plots

        self.plots = plots
        self.figure, (self.axes,) = plots._figure(1)
        plots._log_x(self.axes, "Hz")
        self.axes.yaxis.set_major_formatter(plots._eng("dB"))
        self.axes.set_ylabel("gain (dB)")
        self.axes.set_xlabel("frequency")

    def draw(self, freq: Any, series: Sequence[tuple[str, Any]]) -> str:
        """The SVG of ``series`` (name, gain in dB) against ``freq`` (Hz)."""
        ax, colours = self.axes, self.plots.CURVE_COLOURS
        _clear(ax)
        for index, (name, values) in enumerate(series):
            ax.plot(freq, values, color=colours[index % len(colours)], label=name)
        ax.relim()
        ax.autoscale_view()
        ax.legend(loc="best", fontsize=7.5, frameon=False)
        return _svg(self.figure)


@functools.cache
def _overlay_canvas() -> _Canvas:
    return _Canvas()


def _has_curve(ac: Mapping[str, Any] | None) -> bool:
    return bool(ac) and isinstance(ac.get("freq_hz"), list) and isinstance(ac.get("gain_db"),
                                                                           list) \
        and len(ac["freq_hz"]) == len(ac["gain_db"]) > 1
