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
from typing import Any

from docgen.design import Design
from docgen.limits import (  # noqa: F401 - re-exported: the verdicts' vocabulary
    UNIT_FACTORS,
    Checked,
    bounds,
    margin,
    read,
    requirement_metrics,
    yield_of,
)
from docgen.metric_values import evaluate, samples
from docgen.metrics import Metric

STRICT_STATUSES = ("approved", "review")

def _across(checked: Checked, results: dict[str, Any]) -> dict[str, Any]:
    """Worst value and yield over boards and/or temperature points."""
    low, high = bounds(checked)
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
    low, high = bounds(checked)
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


def metrics_of(design: Design) -> Sequence[Metric]:
    """The metrics a page's requirements and estimates use (for ``sections_needed``)."""
    from docgen.check import estimates

    found = requirement_metrics(design)
    for estimate in estimates.read(design)[0]:
        found.append(estimate.metric)
        found += estimates.metrics_in(estimate)
    return found
