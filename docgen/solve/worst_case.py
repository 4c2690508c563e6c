"""Worst case: explicit extreme-value corners of the values that matter most to each metric.

Public API::

    worst_case(circuit, metrics, varied, sensitivities, ports, start, references) -> dict

For each metric, the (up to) :data:`WORST_CASE_PARTS` varied values that can move it most to
first order — |normalised sensitivity| × the value's largest relative excursion, so a β of
150..350 outranks a 1 % resistor of equal sensitivity — are set to every combination of their
low and high ends (2^k corners), the rest nominal, at the bench ambient.  The lowest and highest
value over those corners, and the corner giving each, are reported apart from the Monte Carlo
extremes.  Metrics are solved on their own corner rows only, in one batch per kind of metric
(operating point and single frequencies together; the per-board sweep and the noise apart).
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

from docgen.elaborate import Circuit, Variation
from docgen.metrics import Metric
from docgen.solve import board_metrics

Array = np.ndarray

#: How many of a metric's most important varied values the corners combine.
WORST_CASE_PARTS = 4
#: Sensitivities below this are treated as none.
SENSITIVITY_FLOOR = 1e-5


def worst_case(circuit: Circuit, metrics: Sequence[Metric], varied: Sequence[Variation],
               sensitivities: Mapping[str, Mapping[tuple[str, str], float]], ports: Any,
               start: Any, references: Mapping[str, float]) -> dict[str, Any]:
    """Every low/high corner of each metric's most important varied values (see the module
    docstring); ``sensitivities`` maps a metric key to ``{(part, name): (dM/M)/(dp/p)}``."""
    plans = []
    for metric in metrics:
        row = sensitivities.get(metric.key)
        if row is None:
            continue
        effect = {v: _effect(v, row[(v.part, v.name)]) for v in varied
                  if (v.part, v.name) in row}
        ranked = sorted(effect, key=lambda v: (-effect[v], label(v)))
        chosen = [v for v in ranked[:WORST_CASE_PARTS] if effect[v] > 0]
        if chosen:
            plans.append((metric, chosen))
    if not plans:
        return {}
    total = sum(2 ** len(chosen) for _, chosen in plans)
    overrides = {(v.part, v.name): np.full(total, v.nominal) for v in varied}
    spans, at = [], 0
    for _metric, chosen in plans:
        corners = (np.arange(2 ** len(chosen))[:, None] >> np.arange(len(chosen))) & 1
        for j, v in enumerate(chosen):
            overrides[(v.part, v.name)][at:at + len(corners)] = np.where(corners[:, j], v.high,
                                                                         v.low)
        spans.append(slice(at, at + len(corners)))
        at += len(corners)
    batch = _by_cost(circuit, plans, spans, overrides, ports, start, references)
    out = {}
    for (metric, chosen), rows in zip(plans, spans, strict=True):
        values = batch.values[metric.key][rows]
        if not np.isfinite(values).any():
            out[metric.key] = {"parameters": [label(v) for v in chosen], "low": None,
                               "high": None, "unsolved": int(np.sum(~batch.converged[rows]))}
            continue
        low, high = int(np.nanargmin(values)), int(np.nanargmax(values))
        corner = {k: overrides[k][rows] for k in ((v.part, v.name) for v in chosen)}
        out[metric.key] = {
            "parameters": [label(v) for v in chosen],
            "low": float(values[low]), "high": float(values[high]),
            "low_corner": {label(v): float(corner[(v.part, v.name)][low]) for v in chosen},
            "high_corner": {label(v): float(corner[(v.part, v.name)][high]) for v in chosen},
            "unsolved": int(np.sum(~batch.converged[rows])),
        }
    return out


@dataclass
class _Corners:
    """The worst-case batch's values (``NaN`` outside each metric's own rows)."""

    values: dict[str, Array]
    converged: Array


def _by_cost(circuit: Circuit, plans: list, spans: list[slice], overrides: dict, ports: Any,
             start: Any, references: dict[str, float]) -> _Corners:
    """Each metric on its own corner rows only: one batch per kind of metric (operating point
    and single frequencies together; the sweep's and the noise's costly ones apart)."""
    total = spans[-1].stop
    values = {metric.key: np.full(total, np.nan) for metric, _ in plans}
    converged = np.ones(total, dtype=bool)
    groups: dict[str, list[int]] = {}
    for i, (metric, _) in enumerate(plans):
        kind = ("sweep" if metric.form in board_metrics.SWEEP_FORMS else
                "noise" if metric.form in board_metrics.NOISE_FORMS else "point")
        groups.setdefault(kind, []).append(i)
    for members in groups.values():
        rows = np.concatenate([np.arange(spans[i].start, spans[i].stop) for i in members])
        batch = board_metrics.evaluate(circuit, [plans[i][0] for i in members],
                                       {k: v[rows] for k, v in overrides.items()}, ports=ports,
                                       start=start, phase_reference=references)
        converged[rows] = batch.converged
        for i in members:
            key = plans[i][0].key
            values[key][rows] = batch.values[key]
    return _Corners(values, converged)


def _effect(v: Variation, sensitivity: float) -> float:
    """How far a value can move a metric, to first order: |S| × its largest relative excursion
    (a ±1 % resistor with S = 1 matters less than a β of 150..350 with S = 0.05)."""
    if not math.isfinite(sensitivity) or abs(sensitivity) < SENSITIVITY_FLOOR:
        return 0.0
    excursion = max(abs(v.high - v.nominal), abs(v.nominal - v.low)) / abs(v.nominal)
    return abs(sensitivity) * excursion


def label(v: Variation) -> str:
    """``R1`` for a part's value, ``Q1.beta`` for a model parameter."""
    return v.part if v.name == "value" else f"{v.part}.{v.name}"
