"""Metrics of many boards at once: the spread analysis' evaluator (one batch, S samples).

Public API::

    batch = evaluate(circuit, metrics, overrides, temperature, ports=..., start=...)
    batch.values[metric.key]     # (S,) floats, NaN where a board did not solve or has no value
    batch.converged              # (S,) booleans
    supported(metric) -> bool    # can this module compute the metric per board?
    headline(circuit, ports) -> list[Metric]   # the figures every spread section reports

Each call solves the operating point of every sample together (:func:`solve_op`, converged
samples frozen), linearises them together, and solves the small-signal network for all samples
at the few frequencies the metrics need in one batched complex solve ``(S, F, N, N)``.  Corners
come from a coarse per-board sweep (:data:`SWEEP_POINTS_PER_DECADE`) whose brackets are then
narrowed on each board's own grid, batched, as :mod:`docgen.solve.curves` does for one board.
A single design solve is simply a batch of one: there is no separate single-sample path.

Values follow the metric vocabulary (:mod:`docgen.metrics`) and the conventions of the ``op``,
``ac`` and ``noise`` sections, so a board with nominal values reads what those sections read.
Metrics that need the large-signal or feedback analyses are not computed per board
(:func:`supported` says no); the spread section lists them as not sampled.
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass, replace
from typing import Any

import numpy as np

from docgen.elaborate import Circuit
from docgen.metrics import Metric, parse
from docgen.solve import curves, phasor, spectra
from docgen.solve.linearise import SmallSignal, linearise
from docgen.solve.noise import noise_band, noise_sources
from docgen.solve.operating_point import OpSolution, part_quantities, solve_op
from docgen.solve.response import port_curves, transfer

Array = np.ndarray

#: Points per decade of the coarse per-board sweep used to bracket midband and corners.
SWEEP_POINTS_PER_DECADE = 5
#: Golden-section steps narrowing the peak's bracket (0.4 decade × 0.618^30 ≈ 2e-7 decade).
PEAK_ROUNDS = 30
#: Regula falsi rounds narrowing each corner's bracket (superlinear; 12 reach 1e-9 dB).
CORNER_ROUNDS = 12
#: Points per decade of the per-board noise grid (the noise section's own grid is finer;
#: the rms of a board differs from it by well under 0.1 %).
NOISE_POINTS_PER_DECADE = 10

OP_FORMS = {"net_voltage", "supply_current", "supply_power"}
AC_POINT_FORMS = {"gain_at", "phase_at", "zin", "zout", "zin_at", "zout_at"}
SWEEP_FORMS = {"midband_gain", "low_corner", "high_corner"}
NOISE_FORMS = {"input_noise", "input_noise_band", "input_noise_density",
               "output_noise_density"}


def supported(metric: Metric) -> bool:
    """True when :func:`evaluate` computes ``metric`` board by board."""
    return (metric.form.startswith("part:") or metric.form in OP_FORMS | AC_POINT_FORMS
            | SWEEP_FORMS | NOISE_FORMS)


_HEADLINE_PART = {"npn": ("collector current", "collector-emitter voltage",
                          "base-emitter voltage"),
                  "pnp": ("collector current", "collector-emitter voltage",
                          "base-emitter voltage"),
                  "njfet": ("drain current", "drain-source voltage", "gate-source voltage"),
                  "pjfet": ("drain current", "drain-source voltage", "gate-source voltage"),
                  "nmos": ("drain current", "drain-source voltage", "gate-source voltage"),
                  "pmos": ("drain current", "drain-source voltage", "gate-source voltage"),
                  "opamp": ("output voltage",)}


def headline(circuit: Circuit, ports: tuple[str, str] | None) -> list[Metric]:
    """The headline figures: bias of every active part, the output's DC voltage and the
    supply current; with a signal path also the gain at the signal frequency, midband gain,
    corners, impedances and input noise."""
    texts: list[str] = []
    for device in circuit.devices:
        texts += [f"{device.name} {words}" for words in _HEADLINE_PART.get(device.kind, ())]
    if circuit.bench.output and circuit.bench.output != "gnd":
        texts.append(f"voltage at {circuit.bench.output}")
    if circuit.of_kind("supply"):
        texts.append("supply current")
    if ports is not None:
        signal_hz = circuit.device(ports[0]).values["frequency"]
        texts += [f"gain at {signal_hz!r} Hz", "midband gain", "low corner", "high corner",
                  "input impedance", "output impedance", "input noise"]
    return [parse(text) for text in texts]


@dataclass
class Batch:
    """Per-sample metric values of one batch and how the batch solved."""

    values: dict[str, Array]
    converged: Array
    solution: OpSolution


def evaluate(
    circuit: Circuit,
    metrics: Iterable[Metric],
    overrides: Mapping[tuple[str, str], Any] | None = None,
    temperature: Array | float | None = None,
    *,
    ports: tuple[str, str] | None = None,
    start: OpSolution | Array | None = None,
    phase_reference: Mapping[str, float] | None = None,
) -> Batch:
    """Every supported metric for every sample (see the module docstring).

    :param ports: ``(input part, output net)``; ``None`` when the design has no signal path
        (small-signal metrics are then left out).
    :param phase_reference: metric key → nominal phase (°); each board's phase is put on the
        turn nearest to it, as the ``ac`` section anchors its phase.
    """
    solution = solve_op(circuit, overrides, temperature, start=start)
    ok = solution.converged
    wanted = [m for m in dict.fromkeys(metrics) if supported(m)]
    values: dict[str, Array] = {}
    for metric in wanted:
        if metric.form.startswith("part:") or metric.form in OP_FORMS:
            values[metric.key] = _op_metric(solution, metric)
    small = [m for m in wanted if m.key not in values]
    if small and ports is not None:
        network = _guarded(linearise(solution), ok)
        values.update(_small_signal(network, small, ports, phase_reference or {}))
    for key, array in values.items():
        values[key] = np.where(ok, array, np.nan)
    return Batch(values, ok, solution)


# ------------------------------------------------------------------------ operating point


def _op_metric(solution: OpSolution, metric: Metric) -> Array:
    if metric.form == "net_voltage":
        return np.asarray(solution.voltage(metric.args["net"]), dtype=float)
    if metric.form in ("supply_current", "supply_power"):
        key = "current_a" if metric.form == "supply_current" else "power_w"
        supplies = solution.circuit.of_kind("supply")
        total = np.zeros(solution.problem.samples)
        for supply in supplies:
            total = total - part_quantities(solution, supply.name)[key]  # delivered
        return total if supplies else np.full(solution.problem.samples, np.nan)
    part, key = metric.args["part"], metric.quantity_key
    figures = part_quantities(solution, part)
    if solution.circuit.device(part).kind == "supply" and key in ("current_a", "power_w"):
        return -np.asarray(figures[key], dtype=float)  # a supply reports what it delivers
    return np.asarray(figures[key], dtype=float)


# ------------------------------------------------------------------------ small signal


def _guarded(network: SmallSignal, ok: Array) -> SmallSignal:
    """The network with every unconverged sample replaced by the identity (solvable; masked)."""
    if ok.all():
        return network
    G, C = network.G.copy(), network.C.copy()
    G[~ok], C[~ok] = np.eye(network.size), 0.0
    return replace(network, G=G, C=C)


def _db(h: Array) -> Array:
    return np.asarray(curves.magnitude_db(h), dtype=float)


def _small_signal(network: SmallSignal, metrics: Sequence[Metric], ports: tuple[str, str],
                  phase_reference: Mapping[str, float]) -> dict[str, Array]:
    input_part, output_net = ports
    signal_hz = float(network.solution.problem.values[input_part]["frequency"][0])
    points = sorted({m.args.get("freq", signal_hz) for m in metrics if m.form in AC_POINT_FORMS})
    out: dict[str, Array] = {}
    if points:
        ports_at = _solve_or_nan(lambda: port_curves(network, np.array(points), input_part,
                                                     output_net), network.samples, len(points))
        for metric in metrics:
            if metric.form in AC_POINT_FORMS:
                column = points.index(metric.args.get("freq", signal_hz))
                out[metric.key] = _point_value(metric, ports_at, column, phase_reference)
    if any(m.form in SWEEP_FORMS for m in metrics):
        out.update(_sweep_metrics(network, metrics, input_part, output_net))
    noise = [m for m in metrics if m.form in NOISE_FORMS]
    if noise:
        out.update(_noise_metrics(network, noise, input_part, output_net))
    return out


def _solve_or_nan(solve: Any, samples: int, count: int) -> Any:
    """``solve()``; on a singular batch, NaN curves of the expected shape."""
    try:
        return solve()
    except np.linalg.LinAlgError:
        nan = np.full((samples, count), np.nan + 0j)
        return {"gain": nan, "gain_from_input_net": nan, "zin": nan, "zout": nan}


def _point_value(metric: Metric, ports_at: Mapping[str, Array], column: int,
                 phase_reference: Mapping[str, float]) -> Array:
    form = metric.form
    if form == "gain_at":
        return _db(ports_at["gain"][:, column])
    if form == "phase_at":
        phase = np.degrees(np.angle(ports_at["gain"][:, column]))
        reference = phase_reference.get(metric.key, 0.0)
        return phase - 360.0 * np.round((phase - reference) / 360.0)
    curve = ports_at["zin" if form.startswith("zin") else "zout"][:, column]
    with np.errstate(invalid="ignore"):
        return np.where(np.isfinite(curve), np.abs(curve), np.nan)


def _gain_db(network: SmallSignal, freq: Array, input_part: str, output_net: str) -> Array:
    """|gain| in dB, ``freq`` ``(F,)`` or ``(S, F)``; NaN for a singular batch."""
    try:
        return _db(transfer(network, freq, input_part, output_net))
    except np.linalg.LinAlgError:
        return np.full((network.samples, np.shape(freq)[-1]), np.nan)


def _sweep_metrics(network: SmallSignal, metrics: Sequence[Metric], input_part: str,
                   output_net: str) -> dict[str, Array]:
    bench = network.solution.circuit.bench
    freq = curves.log_sweep(bench.f_start, bench.f_stop, SWEEP_POINTS_PER_DECADE)
    gain = _gain_db(network, freq, input_part, output_net)

    def evaluate_db(log_f: Array) -> Array:
        """The gain (dB) of each board at its own frequency ``10**log_f`` (``(S,)``)."""
        return _gain_db(network, 10.0 ** log_f[:, None], input_part, output_net)[:, 0]

    peak_index = np.argmax(np.where(np.isnan(gain), -np.inf, gain), axis=1)
    peak_f, peak_g = _refine_peaks(freq, gain, peak_index, evaluate_db)
    level = peak_g - curves.CORNER_DROP_DB
    found = {"midband_gain": peak_g,
             "low_corner": _corners(freq, gain, peak_index, peak_f, peak_g, level, -1,
                                    evaluate_db),
             "high_corner": _corners(freq, gain, peak_index, peak_f, peak_g, level, 1,
                                     evaluate_db)}
    return {m.key: found[m.form] for m in metrics if m.form in SWEEP_FORMS}


def _refine_peaks(freq: Array, gain: Array, index: Array, evaluate_db: Any
                  ) -> tuple[Array, Array]:
    """Each board's largest gain: golden-section search between its sweep neighbours where
    the largest sweep point is interior (never below the sweep's own value)."""
    rows = np.arange(len(index))
    best_f, best_g = freq[index].astype(float), gain[rows, index]
    interior = (index > 0) & (index < len(freq) - 1)
    if not interior.any():
        return best_f, best_g
    log_f = np.log10(freq)
    a = log_f[np.clip(index - 1, 0, None)]
    b = log_f[np.clip(index + 1, None, len(freq) - 1)]
    ratio = (math.sqrt(5.0) - 1.0) / 2.0
    c, d = b - ratio * (b - a), a + ratio * (b - a)
    gain_c, gain_d = evaluate_db(c), evaluate_db(d)
    for _ in range(PEAK_ROUNDS):
        left = gain_c > gain_d  # the peak lies in [a, d]
        a, b = np.where(left, a, c), np.where(left, d, b)
        c_new = np.where(left, b - ratio * (b - a), d)
        d_new = np.where(left, c, a + ratio * (b - a))
        probe = np.where(left, c_new, d_new)
        gain_probe = evaluate_db(probe)
        gain_c, gain_d = (np.where(left, gain_probe, gain_d), np.where(left, gain_c, gain_probe))
        c, d = c_new, d_new
    top = np.maximum(gain_c, gain_d)
    top_f = np.where(gain_c >= gain_d, c, d)
    better = interior & (top > best_g)
    return np.where(better, 10.0 ** top_f, best_f), np.where(better, top, best_g)


def _corners(freq: Array, gain: Array, peak_index: Array, peak_f: Array, peak_g: Array,
             level: Array, step: int, evaluate_db: Any) -> Array:
    """The −3.01 dB crossing nearest the peak on one side (NaN where the sweep has none).

    The sweep brackets the crossing; regula falsi with the Illinois modification (in log f
    against dB) narrows each board's bracket, one frequency per board per round.
    """
    count = len(freq)
    positions = np.arange(count)
    side = positions < peak_index[:, None] if step < 0 else positions > peak_index[:, None]
    below = side & (gain < level[:, None])
    has = below.any(axis=1)
    if step < 0:
        outer = np.where(has, count - 1 - np.argmax(below[:, ::-1], axis=1), 0)
    else:
        outer = np.where(has, np.argmax(below, axis=1), 0)
    inner = np.clip(outer - step, 0, count - 1)
    rows = np.arange(len(peak_index))
    log_in = np.log10(np.where(inner == peak_index, peak_f, freq[inner]))
    res_in = np.where(inner == peak_index, peak_g, gain[rows, inner]) - level  # ≥ 0
    log_out, res_out = np.log10(freq[outer]), gain[rows, outer] - level  # < 0
    previous = np.zeros(len(rows), dtype=bool)  # the inner end moved last round
    started = False
    for _ in range(CORNER_ROUNDS):
        with np.errstate(divide="ignore", invalid="ignore"):
            guess = log_out + res_out / (res_out - res_in) * (log_in - log_out)
        guess = np.where(np.isfinite(guess), guess, 0.5 * (log_in + log_out))
        res = evaluate_db(guess) - level
        above = res >= 0
        # Illinois: when the same end moves twice running, halve the other end's residual.
        again = (above == previous) & started
        res_out = np.where(above, np.where(again, 0.5 * res_out, res_out), res)
        res_in = np.where(above, res, np.where(again, 0.5 * res_in, res_in))
        log_out, log_in = np.where(above, log_out, guess), np.where(above, guess, log_in)
        previous, started = above, True
    with np.errstate(divide="ignore", invalid="ignore"):
        final = log_out + res_out / (res_out - res_in) * (log_in - log_out)
    final = np.where(np.isfinite(final), final, 0.5 * (log_in + log_out))
    return np.where(has, 10.0 ** final, np.nan)


# ------------------------------------------------------------------------ noise


def _noise_metrics(network: SmallSignal, metrics: Sequence[Metric], input_part: str,
                   output_net: str) -> dict[str, Array]:
    """Input-referred noise per board: the noise section's sources and integration, on a
    grid of :data:`NOISE_POINTS_PER_DECADE` (each band solved once however often named)."""
    bench = network.solution.circuit.bench
    points = min(bench.points_per_decade, NOISE_POINTS_PER_DECADE)
    solved: dict[tuple[float, ...], tuple[Array, Array]] = {}
    out: dict[str, Array] = {}
    for metric in metrics:
        if metric.form in ("input_noise", "input_noise_band"):
            band = tuple(metric.args.get("band") or noise_band(bench))
            grid = curves.log_sweep(band[0], band[1], points)
        else:
            band = (metric.args["freq"],)
            grid = np.array(band)
        if band not in solved:
            solved[band] = _densities(network, grid, input_part, output_net)
        output_density, input_density = solved[band]
        if metric.form == "output_noise_density":
            out[metric.key] = output_density[:, 0]
        elif metric.form == "input_noise_density":
            out[metric.key] = input_density[:, 0]
        else:
            with np.errstate(invalid="ignore"):
                out[metric.key] = np.asarray(spectra.rms(grid, input_density ** 2), dtype=float)
    return out


def _densities(network: SmallSignal, freq: Array, input_part: str, output_net: str
               ) -> tuple[Array, Array]:
    """(output, input-referred) noise densities ``(S, F)``.  One adjoint solve per frequency
    gives every source's transfer and the gain (the transfer from the signal's branch row)."""
    try:
        sensitivity = phasor.adjoint(network.G, network.C, freq,
                                     network.unit(network.row(output_net)))
    except np.linalg.LinAlgError:
        nan = np.full((network.samples, len(freq)), np.nan)
        return nan, nan
    sources = noise_sources(network, freq)
    patterns = np.stack([source.pattern for source in sources])  # (P, S, K)
    psd = np.stack([source.psd for source in sources])  # (P, S, F)
    total = np.sum(np.abs(np.einsum("sfk,psk->psf", sensitivity, patterns)) ** 2 * psd, axis=0)
    gain = np.abs(sensitivity[..., network.branch_row(input_part)])
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.sqrt(total), np.sqrt(total) / gain


def finite_or_none(values: Array) -> list[float | None]:
    """Plain JSON values: floats, ``None`` for NaN and infinities."""
    return [float(v) if math.isfinite(v) else None for v in np.asarray(values, dtype=float)]
