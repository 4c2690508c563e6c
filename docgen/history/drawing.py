"""The history's figures, planned first and drawn together over the build's worker processes.

A cold build of a long record draws one trend figure per design and one response overlay per
pair of consecutive revisions — most of the history's time.  Planning every figure a page shows
(:class:`FigureJob`, keyed by content through :func:`docgen.history.figures.figure_key`) before
any page is rendered lets :func:`draw_missing` draw only those not cached yet, ``jobs`` at a
time.  A figure is the same bytes whichever process draws it (fixed hash salt, no dates).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

from docgen.history.cache import ResultsCache
from docgen.history.figures import figure_key, response_overlay, trend_plot, trend_series
from docgen.history.workers import worker_pool

Json = dict[str, Any]


@dataclass(frozen=True)
class FigureJob:
    """One figure a history or diff page shows.

    :param key: the content key it is cached under.
    :param kind: ``"trend"`` (:func:`~docgen.history.figures.trend_plot`) or ``"response"``
        (:func:`~docgen.history.figures.response_overlay`).
    :param args: what the drawing function takes (plain data, so a worker can draw it).
    """

    key: str
    kind: str
    args: tuple[Any, ...]


def trend_job(rows: Sequence[Json]) -> FigureJob | None:
    """The history page's trend figure, or ``None`` when there is nothing to draw."""
    series = trend_series(rows)
    if len(rows) < 2 or not series:
        return None
    labels = [r["short"][:7] for r in reversed(rows)]
    return FigureJob(figure_key("trend", [labels, series]), "trend", (labels, series))


def response_job(rows: Sequence[Json], results: Sequence[Json], index: int) -> FigureJob | None:
    """The response overlay of the diff between row ``index + 1`` (older) and row ``index``,
    or ``None`` when either revision has no response to draw."""
    old_ac, new_ac = results[index + 1].get("ac"), results[index].get("ac")
    if not old_ac or not new_ac:
        return None
    labels = (rows[index + 1]["short"][:7], rows[index]["short"][:7])
    key = figure_key("response", [rows[index + 1]["key"], rows[index]["key"], labels])
    return FigureJob(key, "response", (_curve(old_ac), _curve(new_ac), labels))


def _curve(ac: Json) -> Json:
    """The part of an ``ac`` section the overlay reads (less to send to a worker)."""
    return {name: ac.get(name) for name in ("freq_hz", "gain_db")}


def draw(job: FigureJob) -> str | None:
    """The SVG of one figure (run in a worker or here)."""
    if job.kind == "trend":
        return trend_plot(*job.args)
    return response_overlay(*job.args)


def _draw_all(jobs: Sequence[FigureJob]) -> list[str | None]:
    return [draw(job) for job in jobs]


def draw_missing(cache: ResultsCache, jobs: Sequence[FigureJob], workers: int = 1
                 ) -> dict[str, str | None]:
    """The SVG of every job by key: cached ones read, the others drawn (``workers`` processes
    at a time) and cached."""
    found: dict[str, str | None] = {}
    todo: dict[str, FigureJob] = {}
    for job in jobs:
        if job.key in found or job.key in todo:
            continue
        svg = cache.figure(job.key)
        if svg is None:
            todo[job.key] = job
        else:
            found[job.key] = svg
    pending = list(todo.values())
    # a few figures per round trip, yet enough rounds to keep every worker busy to the end
    size = max(1, min(_BATCH, len(pending) // (4 * max(1, workers))))
    batches = [pending[i:i + size] for i in range(0, len(pending), size)]
    with worker_pool(workers, len(batches), _preload_plots) as pool:
        drawn = pool.map(_draw_all, batches) if pool is not None else map(_draw_all, batches)
        for batch, svgs in zip(batches, drawn, strict=True):
            for job, svg in zip(batch, svgs, strict=True):
                found[job.key] = svg
                if svg is not None:
                    cache.put_figure(job.key, svg)
    return found


#: The most figures sent to a worker at once.
_BATCH = 8


def _preload_plots() -> None:
    """Import matplotlib once here rather than once in every worker."""
    from docgen import plots

    plots._pyplot()
