"""Requirement verdicts: each ``require`` line held against the solved results.

A verdict reads the metric's value with :func:`docgen.metric_values.evaluate` (nominal), and for
``across boards`` / ``across temperature`` / ``across all`` the per-board and per-temperature
values the spread analysis wrote, judged on the worst one, with the yield.  The margin is the
distance to the nearest limit in the metric's unit, positive inside the limit, and as a fraction
of that limit's magnitude.  The review status of the page sets how loud a failure is: an
approved or in-review design failing is an error, a draft or retired one a warning.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

from docgen.design import Design, Limit, Requirement
from docgen.diagnostics import Diagnostic, Span
from docgen.metric_values import evaluate, samples
from docgen.metrics import Metric, MetricError, parse, unknown_names

#: limit units each metric unit accepts ("" is a plain number in the metric's unit), and the
#: factor that turns the limit into the metric's unit.
_PP_FROM_RMS = 2 * math.sqrt(2)  # a sine's peak-to-peak is 2√2 times its rms
UNIT_FACTORS: dict[str, dict[str, float]] = {
    "V pp": {"V pp": 1.0, "V": 1.0, "V rms": _PP_FROM_RMS, "": 1.0},
    "V": {"V": 1.0, "V rms": 1.0, "": 1.0},
    "%": {"%": 1.0},
}
STRICT_STATUSES = ("approved", "review")


@dataclass(frozen=True, slots=True)
class Checked:
    """A requirement whose metric read: the metric and the factor applied to its limit."""

    requirement: Requirement
    metric: Metric
    factor: float


def _units_fit(metric: Metric, limit: Limit) -> float | None:
    """The factor from the limit's unit to the metric's unit, or ``None`` if they differ."""
    table = UNIT_FACTORS.get(metric.unit, {metric.unit: 1.0, "": 1.0})
    return table.get(limit.unit)


def read(design: Design) -> tuple[list[Checked], list[Diagnostic]]:
    """Parse every requirement's metric and check names and units; report what does not fit."""
    lines = design.source.splitlines()
    parts = {p.name: p.kind for p in design.parts}
    checked, problems = [], []

    def problem(span: Span, message: str, hint: str | None = None) -> None:
        text = lines[span.line - 1] if 0 < span.line <= len(lines) else None
        problems.append(Diagnostic(design.path, span, "error", message, hint, text))

    for requirement in design.requirements:
        at = requirement.metric_span
        try:
            metric = parse(requirement.metric)
        except MetricError as exc:
            problem(Span(at.line, at.col + exc.col - 1, exc.width), exc.message, exc.hint)
            continue
        names = unknown_names(metric, parts, design.nets)
        if names:
            problem(at, names[0])
            continue
        factor = _units_fit(metric, requirement.limit)
        if factor is None:
            unit = requirement.limit.unit or "a plain number"
            problem(requirement.limit_span, f"the limit is in {unit} but '{metric.text}' is "
                    f"in {metric.unit}", f"write the limit in {metric.unit}")
            continue
        checked.append(Checked(requirement, metric, factor))
    return checked, problems


def margin(value: float, low: float | None, high: float | None) -> tuple[float, float | None]:
    """(margin, margin as a fraction of the nearest limit's magnitude); positive passes."""
    candidates = []
    if low is not None:
        candidates.append((value - low, low))
    if high is not None:
        candidates.append((high - value, high))
    distance, bound = min(candidates)
    return distance, (distance / abs(bound) if bound else None)


def _bounds(checked: Checked) -> tuple[float | None, float | None]:
    limit, scale = checked.requirement.limit, checked.factor
    return (None if limit.low is None else limit.low * scale,
            None if limit.high is None else limit.high * scale)


def _across(checked: Checked, results: dict[str, Any]) -> dict[str, Any]:
    """Worst value and yield over boards and/or temperature points."""
    low, high = _bounds(checked)
    values: list[float | None] = []
    for what in checked.requirement.across:
        found, reason = samples(checked.metric, results, what)
        if found is None:
            analysis = "spread" if what == "boards" else "temperature"
            if "did not run" in reason:
                reason = f"the {analysis} analysis is not available ({reason})"
            return {"verdict": "not computed", "reason": reason}
        values.extend(found)
    if not values:
        return {"verdict": "not computed", "reason": "no samples"}
    good = [v for v in values if v is not None and math.isfinite(v)]
    failed_to_solve = len(values) - len(good)
    margins = [margin(v, low, high)[0] for v in good]
    passing = sum(m >= 0 for m in margins)
    row: dict[str, Any] = {"samples": len(values), "unsolved": failed_to_solve,
                           "yield": passing / len(values)}
    if good:
        worst = good[min(range(len(good)), key=margins.__getitem__)]
        row["worst"] = worst
        row["margin"], row["margin_fraction"] = margin(worst, low, high)
    row["verdict"] = "pass" if passing == len(values) else "fail"
    if failed_to_solve:
        row["reason"] = f"{failed_to_solve} of {len(values)} samples did not solve (counted as " \
                        "failing)"
    return row


def verdict(checked: Checked, results: dict[str, Any], status: str) -> dict[str, Any]:
    """The verdict of one requirement as a plain dict (see docs/results.md, ``checks``)."""
    requirement, metric = checked.requirement, checked.metric
    low, high = _bounds(checked)
    value = evaluate(metric, results)
    row: dict[str, Any] = {
        "metric": metric.text, "key": metric.key, "unit": metric.unit,
        "limit": requirement.limit.text, "kind": requirement.limit.kind, "low": low,
        "high": high, "across": list(requirement.across), "value": value.value,
        "margin": None, "margin_fraction": None, "reason": value.reason,
        "line": requirement.span.line, "col": requirement.span.col,
    }
    if value.value is not None:
        row["margin"], row["margin_fraction"] = margin(value.value, low, high)
        row["verdict"] = "pass" if row["margin"] >= 0 else "fail"
    else:
        row["verdict"] = "not computed"
    if requirement.across:
        row.update(_across(checked, results))
        row["nominal"] = value.value
    row["severity"] = severity(row["verdict"], status)
    return row


def severity(outcome: str, status: str) -> str | None:
    """How loud a verdict is on a page of ``status``: None when it passes."""
    if outcome == "pass":
        return None
    if outcome == "fail" and status in STRICT_STATUSES:
        return "error"
    return "warning"


def verdicts(design: Design, results: dict[str, Any]) -> list[dict[str, Any]]:
    """Every requirement's verdict; a requirement whose metric does not read is 'invalid'."""
    checked, problems = read(design)
    rows = [verdict(c, results, design.header.status) for c in checked]
    rows += [{"metric": None, "verdict": "invalid", "reason": d.message, "line": d.line,
              "col": d.col, "severity": "error"} for d in problems]
    return sorted(rows, key=lambda r: (r["line"], r["col"]))


def analyse(ctx: Any) -> list[dict[str, Any]]:
    """The ``checks`` section of the results."""
    return verdicts(ctx.design, ctx.results)


def yield_of(design: Design, values: dict[str, Sequence[float | None]]
             ) -> tuple[float | None, dict[str, float]]:
    """The fraction of boards meeting every requirement, and each requirement's own fraction.

    For the spread analysis: ``values`` maps a metric's canonical key to its value on each
    board (``None`` for a board that did not solve: it fails).  Requirements whose metric has
    no values are left out; the overall yield is ``None`` when none has values.
    """
    checked, _ = read(design)
    passing: list[list[bool]] = []
    each: dict[str, float] = {}
    for item in checked:
        found = values.get(item.metric.key)
        if found is None:
            continue
        low, high = _bounds(item)
        ok = [v is not None and math.isfinite(v) and margin(v, low, high)[0] >= 0
              for v in found]
        passing.append(ok)
        each[f"{item.metric.text} : {item.requirement.limit.text}"] = sum(ok) / len(ok) \
            if ok else 0.0
    if not passing:
        return None, each
    boards = min(len(p) for p in passing)
    overall = sum(all(p[i] for p in passing) for i in range(boards)) / boards if boards else 0.0
    return overall, each


def metrics_of(design: Design) -> Sequence[Metric]:
    """The metrics a page's requirements and estimates use (for ``sections_needed``)."""
    from docgen.check import estimates

    checked, _ = read(design)
    found = [c.metric for c in checked]
    if any(c.requirement.across for c in checked):
        found.append(parse("yield"))  # the spread analysis must run
    for estimate in estimates.read(design)[0]:
        found.append(estimate.metric)
        found += estimates.metrics_in(estimate)
    return found
