"""Spread: tolerances, production spread, temperature, sensitivity and yield (``spread``).

Public API::

    analyse(ctx) -> dict          # the ``spread`` section (``temperature`` and ``sensitivity``
                                  # nested inside it: see below)
    parameters(circuit) -> list[Parameter]   # what the sensitivities are taken against
    statistics(values) -> dict               # min, max, mean, std, percentiles, histogram

What it does, in one batch (:func:`docgen.solve.board_metrics.evaluate`):

- **Monte Carlo**: ``bench.boards`` boards; every part value within its tolerance (supplies
  included), every model parameter within its production range, drawn by
  :mod:`docgen.solve.sampling` (one stable stream per design, part and value).  A board whose
  operating point does not converge keeps its place: its values are ``null``, it is counted in
  ``unsolved`` and it fails every requirement in the yield.
- **Sensitivity**: the normalised sensitivity (dM/M)/(dp/p) of every metric to every part value
  and model parameter (:func:`parameters`), by central differences of ±:data:`STEP` relative;
  each perturbation is a sample of the same batch.  For metrics in dB, M is the linear
  magnitude (so dM/M = ln10/20 · d(dB)).
- **Temperature**: the nominal design at ambient points across ``bench.ambient_range`` with the
  temperature-dependent device equations and the parts' tempco (also samples of that batch).
- **Worst case** (:mod:`docgen.solve.worst_case`): for each metric, every low/high combination
  of the few varied values that can move it most (the rest nominal, bench ambient), a second
  batch; the extremes are reported apart from the Monte Carlo ones, with the corner of each.

The pipeline stores the returned dict under ``spread``; the temperature results sit at
``spread.temperature`` and the sensitivities at ``spread.sensitivity`` (one analysis writes one
section; :mod:`docgen.metric_values` and the site read them there).  Per-board values are keyed by
the metric's canonical spelling (``spread.samples``), as docs/results.md specifies; the yield is
computed by :func:`docgen.limits.yield_of` from those samples with the same limits the check
stage's verdicts use (both read requirements through :mod:`docgen.limits`).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

from docgen.diagnostics import AnalysisError
from docgen.elaborate import Circuit, Variation, variations
from docgen.limits import requirement_metrics, yield_of
from docgen.metrics import Metric
from docgen.solve import board_metrics, sampling
from docgen.solve.operating_point import require_converged, solve_op
from docgen.solve.worst_case import SENSITIVITY_FLOOR, label, worst_case

Array = np.ndarray

#: Relative step of the central differences for the sensitivities.
STEP = 1e-3
PERCENTILES = (1, 5, 50, 95, 99)
HISTOGRAM_BINS = 20
#: Ambient points are at most this far apart (°C), and at least :data:`MIN_AMBIENT_POINTS`.
AMBIENT_STEP_C = 5.0
MIN_AMBIENT_POINTS = 5
#: Unsolved boards listed by number (the count is always given).
LISTED_UNSOLVED = 20
PART_VALUE_KINDS = ("resistor", "capacitor", "inductor", "supply", "current")


@dataclass(frozen=True, slots=True)
class Parameter:
    """A value the sensitivities are taken against: ``part`` and its ``name`` in
    :attr:`docgen.elaborate.Device.values`, its nominal, and how it is shown (``R1``,
    ``Q1.beta``)."""

    part: str
    name: str
    nominal: float

    @property
    def label(self) -> str:
        """``R1`` for a part's value, ``Q1.beta`` for a model parameter (as estimates write)."""
        return self.part if self.name == "value" else f"{self.part}.{self.name}"


def parameters(circuit: Circuit) -> list[Parameter]:
    """Every part value (not the signal's amplitude) and every finite, non-zero model
    parameter except ratings, in circuit order."""
    found: list[Parameter] = []
    for device in circuit.devices:
        if device.bench:
            continue
        if device.kind in PART_VALUE_KINDS:
            names = ["value"]
        elif device.model is not None:
            names = [n for n in device.values if not n.startswith("max_")]
        else:
            names = []
        for name in names:
            nominal = float(device.values[name])
            if nominal != 0 and math.isfinite(nominal):
                found.append(Parameter(device.name, name, nominal))
    return found


def statistics(values: Array) -> dict[str, Any]:
    """Summary of one metric over boards (NaN = unsolved or no value, left out)."""
    finite = np.asarray(values, dtype=float)
    finite = finite[np.isfinite(finite)]
    if not len(finite):
        return {"solved": 0}
    low, high = float(finite.min()), float(finite.max())
    if high - low > 1e-9 * max(abs(low), abs(high)):
        counts, edges = np.histogram(finite, bins=HISTOGRAM_BINS)
    else:  # no spread beyond rounding: one bin (numpy cannot split a range this narrow)
        counts, edges = np.array([len(finite)]), np.array([low, high])
    return {
        "solved": len(finite),
        "min": low, "max": high,
        "mean": float(finite.mean()),
        "std": float(finite.std(ddof=1)) if len(finite) > 1 else 0.0,
        "percentiles": {str(p): float(v) for p, v in
                        zip(PERCENTILES, np.percentile(finite, PERCENTILES), strict=True)},
        "histogram": {"edges": edges.tolist(), "counts": counts.tolist()},
    }


# ----------------------------------------------------------------------------- planning


def _ports(ctx: Any) -> tuple[str, str] | None:
    from docgen.solve.response import endpoints

    try:
        return endpoints(ctx)
    except AnalysisError:
        return None


def _plan(ctx: Any, ports: tuple[str, str] | None) -> tuple[list[Metric], list[str]]:
    """(metrics sampled, texts of the requirement metrics that cannot be sampled)."""
    wanted = board_metrics.headline(ctx.circuit, ports)
    for metric in requirement_metrics(ctx.design):
        inner = metric.args.get("metric") if metric.form == "drift" else None
        wanted.append(inner or metric)
    sampled, skipped = [], []
    for metric in wanted:
        if board_metrics.supported(metric) and (metric.section == "op" or ports is not None):
            sampled.append(metric)
        elif metric.form != "yield":
            skipped.append(metric.key)
    unique = list({m.key: m for m in sampled}.values())
    return unique, sorted(set(skipped))


def _ambient_points(circuit: Circuit) -> Array | None:
    span = circuit.bench.ambient_range
    if span is None:
        return None
    low, high = float(span[0]), float(span[1])
    count = max(MIN_AMBIENT_POINTS, int(math.ceil((high - low) / AMBIENT_STEP_C)) + 1)
    return np.linspace(low, high, count)


def _phase_references(ctx: Any, metrics: Sequence[Metric]) -> dict[str, float]:
    from docgen.metric_values import evaluate

    found = {}
    for metric in metrics:
        if metric.form == "phase_at":
            value = evaluate(metric, ctx.results)
            if value.value is not None:
                found[metric.key] = value.value
    return found


# ----------------------------------------------------------------------------- the batch


@dataclass
class _Rows:
    """The samples of the main batch, by purpose: slices into the sample axis."""

    nominal: slice
    plus: slice
    minus: slice
    boards: slice
    ambient: slice
    total: int


def _main_overrides(circuit: Circuit, varied: Sequence[Variation], params: Sequence[Parameter],
                    draws: dict[tuple[str, str], Array], ambient: Array | None
                    ) -> tuple[dict[tuple[str, str], Array], Array, _Rows]:
    """Overrides and temperature for nominal, ±step per parameter, boards and ambient points."""
    count, boards = len(params), len(next(iter(draws.values()))) if draws else 0
    boards = boards or circuit.bench.boards
    points = 0 if ambient is None else len(ambient)
    rows = _Rows(slice(0, 1), slice(1, 1 + count), slice(1 + count, 1 + 2 * count),
                 slice(1 + 2 * count, 1 + 2 * count + boards),
                 slice(1 + 2 * count + boards, 1 + 2 * count + boards + points),
                 1 + 2 * count + boards + points)
    keys = {(p.part, p.name): p.nominal for p in params}
    keys.update({(v.part, v.name): v.nominal for v in varied})
    overrides = {key: np.full(rows.total, nominal) for key, nominal in keys.items()}
    for i, p in enumerate(params):
        overrides[(p.part, p.name)][rows.plus.start + i] = p.nominal * (1 + STEP)
        overrides[(p.part, p.name)][rows.minus.start + i] = p.nominal * (1 - STEP)
    for key, values in draws.items():
        overrides[key][rows.boards] = values
    temperature = np.full(rows.total, circuit.temperature_c)
    if ambient is not None:
        temperature[rows.ambient] = ambient
    return overrides, temperature, rows


def _normalised(metric: Metric, plus: Array, minus: Array, nominal: float) -> Array:
    """(dM/M)/(dp/p) by central differences; dB metrics as linear magnitudes."""
    with np.errstate(divide="ignore", invalid="ignore"):
        if metric.unit == "dB":
            return (plus - minus) * math.log(10) / 20.0 / (2 * STEP)
        return (plus - minus) / (2 * STEP * nominal)


def _sensitivities(metrics: Sequence[Metric], params: Sequence[Parameter],
                   values: dict[str, Array], rows: _Rows) -> dict[str, Array]:
    out = {}
    for metric in metrics:
        column = values[metric.key]
        nominal = float(column[rows.nominal][0])
        if not math.isfinite(nominal) or (nominal == 0 and metric.unit != "dB"):
            continue
        out[metric.key] = _normalised(metric, column[rows.plus], column[rows.minus], nominal)
    return out


def _by_value(params: Sequence[Parameter], sensitivities: dict[str, Array]
              ) -> dict[str, dict[tuple[str, str], float]]:
    return {key: {(p.part, p.name): float(row[i]) for i, p in enumerate(params)}
            for key, row in sensitivities.items()}


def _ranking(params: Sequence[Parameter], sensitivities: dict[str, Array]) -> list[dict]:
    ranking = []
    for key, row in sensitivities.items():
        order = sorted(range(len(params)), key=lambda i: (-abs(np.nan_to_num(row[i])),
                                                          params[i].label))
        ranking += [{"metric": key, "parameter": params[i].label, "part": params[i].part,
                     "name": params[i].name, "sensitivity": float(row[i])}
                    for i in order if math.isfinite(row[i]) and abs(row[i]) >= SENSITIVITY_FLOOR]
    return ranking


# ----------------------------------------------------------------------------- the section


def _temperature(metrics: Sequence[Metric], values: dict[str, Array], rows: _Rows,
                 ambient: Array, converged: Array) -> dict[str, Any]:
    samples, drift = {}, {}
    for metric in metrics:
        column = values[metric.key][rows.ambient]
        samples[metric.key] = column
        good = np.isfinite(column)
        if good.sum() >= 2:
            slope = np.polyfit(ambient[good], column[good], 1)[0]
            drift[metric.key] = {"change": float(column[good].max() - column[good].min()),
                                 "per_degree": float(slope)}
    return {"ambient_c": ambient, "samples": samples, "drift": drift,
            "unsolved": int(np.sum(~converged[rows.ambient]))}


def _yield(design: Any, samples: dict[str, list]) -> tuple[float | None, dict[str, float]]:
    return yield_of(design, samples)


def analyse(ctx: Any) -> dict[str, Any]:
    """The ``spread`` section (see the module docstring and docs/results.md)."""
    circuit, bench = ctx.circuit, ctx.circuit.bench
    nominal = solve_op(circuit, options=ctx.options.get("solve_options"))
    require_converged(nominal)
    ports = _ports(ctx)
    metrics, skipped = _plan(ctx, ports)
    references = _phase_references(ctx, metrics)
    varied, params = variations(circuit), parameters(circuit)
    draws = sampling.draw(varied, bench.boards, bench.seed, bench.distribution, ctx.design.path)
    ambient = _ambient_points(circuit)
    overrides, temperature, rows = _main_overrides(circuit, varied, params, draws, ambient)
    batch = board_metrics.evaluate(circuit, metrics, overrides, temperature, ports=ports,
                                   start=nominal, phase_reference=references)
    values = batch.values
    boards_ok = batch.converged[rows.boards]
    samples = {key: column[rows.boards] for key, column in values.items()}
    sensitivities = _sensitivities(metrics, params, values, rows)
    overall, each = _yield(ctx.design, {key: board_metrics.finite_or_none(column)
                                        for key, column in samples.items()})
    section: dict[str, Any] = {
        "boards": int(bench.boards), "seed": int(bench.seed), "distribution": bench.distribution,
        "unsolved": int(np.sum(~boards_ok)),
        "unsolved_boards": np.flatnonzero(~boards_ok)[:LISTED_UNSOLVED].tolist(),
        "varied": [{"parameter": label(v), "part": v.part, "name": v.name,
                    "nominal": v.nominal, "low": v.low, "high": v.high, "origin": v.origin}
                   for v in varied],
        "metrics": {m.key: {"unit": m.unit, "nominal": float(values[m.key][0]),
                            **statistics(samples[m.key])} for m in metrics},
        "samples": samples,
        "not_sampled": skipped,
        "yield": overall,
        "yield_by_requirement": each,
        "worst_case": worst_case(circuit, metrics, varied, _by_value(params, sensitivities),
                                 ports, nominal, references),
        "sensitivity": {"step": STEP, "ranking": _ranking(params, sensitivities)},
    }
    if ambient is not None:
        section["temperature"] = _temperature(metrics, values, rows, ambient, batch.converged)
    return _plain(section)


def _plain(item: Any) -> Any:
    """JSON-ready data: arrays become lists, NaN and infinities ``None`` (files round later,
    where results are written; the yield and checks see the values as solved)."""
    if isinstance(item, dict):
        return {key: _plain(value) for key, value in item.items()}
    if isinstance(item, np.ndarray):
        if item.dtype.kind == "f":
            return board_metrics.finite_or_none(item)
        return item.tolist()
    if isinstance(item, list | tuple):
        return [_plain(value) for value in item]
    if isinstance(item, float | np.floating):
        return float(item) if math.isfinite(item) else None
    if isinstance(item, np.integer):
        return int(item)
    return item

