"""Requirements read against the metric vocabulary: limits in the metric's unit, margins, yield.

The layer under both the solve stage's spread analysis (which samples the metrics the
requirements name and reports the yield) and the check stage's verdicts, so both use the same
limits and neither reaches into the other.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

from docgen.design import Design, Limit, Requirement
from docgen.diagnostics import Diagnostic, Span
from docgen.metrics import Metric, MetricError, parse, unknown_names

#: limit units each metric unit accepts ("" is a plain number in the metric's unit), and the
#: factor that turns the limit into the metric's unit.
_PP_FROM_RMS = 2 * math.sqrt(2)  # a sine's peak-to-peak is 2√2 times its rms
UNIT_FACTORS: dict[str, dict[str, float]] = {
    "V pp": {"V pp": 1.0, "V": 1.0, "V rms": _PP_FROM_RMS, "": 1.0},
    "V": {"V": 1.0, "V rms": 1.0, "": 1.0},
    "%": {"%": 1.0},
}


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


def bounds(checked: Checked) -> tuple[float | None, float | None]:
    limit, scale = checked.requirement.limit, checked.factor
    return (None if limit.low is None else limit.low * scale,
            None if limit.high is None else limit.high * scale)


def yield_of(design: Design, values: dict[str, Sequence[float | None]]
             ) -> tuple[float | None, dict[str, float]]:
    """The fraction of boards meeting every requirement, and each requirement's own fraction.

    ``values`` maps a metric's canonical key to its value on each
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
        low, high = bounds(item)
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


def requirement_metrics(design: Design) -> list[Metric]:
    """The metrics the page's requirements name (plus ``yield`` when one holds across boards)."""
    checked, _ = read(design)
    found = [c.metric for c in checked]
    if any(c.requirement.across for c in checked):
        found.append(parse("yield"))  # the spread analysis must run
    return found
