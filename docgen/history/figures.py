"""Figures of the history and diff pages: headline trends across revisions and the response
curves of two revisions overlaid.  Deterministic SVG through :mod:`docgen.plots` (same style,
same hash salt, no dates); like every plot, each kind is redrawn on one figure kept per process
(the same bytes as a new figure, at about half the cost)."""

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
    from docgen.cachekey import code_fingerprint

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


def trend_plot(labels: Sequence[str], series: Sequence[tuple[str, str, Sequence[float | None]]]
               ) -> str:
    """One small panel per figure against revision (oldest left), sharing the revision axis.

    Drawn on the process's kept figure with as many panels (:func:`docgen.plots._canvas`: the
    same SVG bytes as a new figure, without building axes and ticks again each time).
    """
    from docgen import plots

    def setup() -> tuple[Any, list[Any]]:
        fig, axes = plots._figure(len(series), height=1.55)
        fig.subplots_adjust(hspace=0.55)
        axes[-1].set_xlabel("revision (oldest left)")
        return fig, axes

    fig, axes = plots._canvas(("history trend", len(series)), setup)
    positions = list(range(len(labels)))
    for index, (ax, (metric, unit, values)) in enumerate(zip(axes, series, strict=True)):
        points = [(x, v) for x, v in zip(positions, values, strict=True) if v is not None]
        ax.plot([p[0] for p in points], [p[1] for p in points], marker="o", markersize=3.5,
                color=plots.CURVE_COLOURS[index % len(plots.CURVE_COLOURS)])
        ax.yaxis.set_major_formatter(plots._eng(unit))
        ax.set_title(metric, fontsize=8.5, loc="left")
    axes[-1].set_xticks(positions)
    axes[-1].set_xticklabels(labels, rotation=30, ha="right", fontsize=7.5)
    return plots._to_svg(fig)


def response_overlay(old_ac: Mapping[str, Any] | None, new_ac: Mapping[str, Any] | None,
                     labels: tuple[str, str]) -> str | None:
    """Gain against frequency of both revisions on one plot, or ``None`` without two curves.

    When the sweeps differ, the older curve is interpolated (log frequency) onto the newer
    sweep and left blank outside its own range.
    """
    if not _has_curve(old_ac) or not _has_curve(new_ac):
        return None
    import numpy as np

    from docgen import plots

    freq = np.asarray(new_ac["freq_hz"], dtype=float)
    old_f = np.asarray(old_ac["freq_hz"], dtype=float)
    old_gain = np.asarray(old_ac["gain_db"], dtype=float)
    if old_f.shape == freq.shape and np.array_equal(old_f, freq):
        before = old_gain
    else:
        before = np.interp(np.log10(freq), np.log10(old_f), old_gain, left=math.nan,
                           right=math.nan)
    return plots.curves(freq, [(labels[0], before), (labels[1], new_ac["gain_db"])],
                        unit="dB", ylabel="gain (dB)", log_y=False)


def _has_curve(ac: Mapping[str, Any] | None) -> bool:
    return bool(ac) and isinstance(ac.get("freq_hz"), list) and isinstance(ac.get("gain_db"),
                                                                           list) \
        and len(ac["freq_hz"]) == len(ac["gain_db"]) > 1
