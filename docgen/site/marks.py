"""Requirement limits as plot marks: which requirement constrains which plot, and where.

A requirement's metric is parsed with the metric vocabulary (:mod:`docgen.metrics`); its form
decides the plot (``gain at 1 kHz`` → a bar at 1 kHz on the gain panel of the Bode plot,
``low corner`` → a vertical line on it, ``Q1 collector current`` → lines on that metric's
spread histogram...).  Limits are in the metric's SI unit, as the reader stores them.
"""

from __future__ import annotations

from collections.abc import Iterable
from typing import Any

from docgen.design import Design, Requirement
from docgen.plots import Mark


def parsed_requirements(design: Design) -> list[tuple[Requirement, Any]]:
    """Each requirement with its parsed metric (requirements whose metric does not parse are
    left out: the checks report them)."""
    try:
        from docgen import metrics
    except ImportError:  # the metric vocabulary is not part of this build
        return []
    out = []
    for requirement in design.requirements:
        try:
            out.append((requirement, metrics.parse(requirement.metric)))
        except ValueError:
            continue
    return out


def _bounds(requirement: Requirement) -> tuple[float | None, float | None]:
    limit = requirement.limit
    return limit.low, limit.high


def _label(requirement: Requirement) -> str:
    return f"{requirement.metric} : {requirement.limit.text}".strip()


def marks_for(design: Design, forms: dict[str, tuple[str, int]],
              at: dict[str, float] | None = None) -> list[Mark]:
    """Marks for the requirements whose metric form is in ``forms``.

    :param forms: metric form name -> (mark kind ``x``/``y``/``point``, panel).
    :param at: for forms without a frequency slot drawn as a point, where to put it
        (e.g. ``{"zin": signal frequency}``).
    """
    marks = []
    for requirement, metric in parsed_requirements(design):
        if metric.form not in forms:
            continue
        where, panel = forms[metric.form]
        low, high = _bounds(requirement)
        x = metric.args.get("freq", (at or {}).get(metric.form))
        if where == "point" and x is None:
            continue
        marks.append(Mark(where, low, high, _label(requirement), at=x, panel=panel))  # type: ignore[arg-type]
    return marks


def marks_for_key(design: Design, key: str, where: str = "x") -> list[Mark]:
    """Marks for requirements on the metric whose canonical key is ``key`` (spread plots)."""
    return [Mark(where, *_bounds(requirement), _label(requirement))  # type: ignore[arg-type]
            for requirement, metric in parsed_requirements(design) if metric.key == key]


def metric_keys(design: Design) -> Iterable[str]:
    """Canonical keys of the metrics the requirements name, in order."""
    return [metric.key for _, metric in parsed_requirements(design)]
