"""Metrics of many boards at once: the spread analysis' evaluator (one batch, S samples).

Public API::

    batch = evaluate(circuit, metrics, overrides, temperature, ports=..., start=...)
    batch.values[metric.key]     # (S,) floats, NaN where a board did not solve or has no value
    batch.converged              # (S,) booleans
    supported(metric) -> bool    # can this module compute the metric per board?
    headline(circuit, ports) -> list[Metric]   # the figures every spread section reports

Each call solves the operating point of every sample together (:func:`solve_op`, converged
samples frozen), linearises them together, and solves the small-signal network for all samples
at the few frequencies the metrics need as batched complex solves ``(S, F, N, N)``, taken in
chunks of samples (:data:`CHUNK_ENTRIES`) so memory is reused.  Midband, corners and the
unity-gain frequency come from a coarse per-board sweep (:data:`SWEEP_POINTS_PER_DECADE`)
narrowed on each board's own frequencies (:mod:`docgen.solve.board_sweep`); noise figures use
the noise section's sources and formulas with one adjoint solve per frequency.  A single design
solve is simply a batch of one: there is no separate single-sample path.

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
from docgen.solve.board_sweep import midband_and_corners
from docgen.solve.linearise import SmallSignal, linearise
from docgen.solve.noise import noise_band, noise_sources
from docgen.solve.operating_point import OpSolution, part_quantities, solve_op
from docgen.solve.response import port_curves, transfer

Array = np.ndarray

#: Points per decade of the coarse per-board sweep used to bracket midband and corners.
SWEEP_POINTS_PER_DECADE = 5
#: Complex matrix entries per batched solve: samples are solved in chunks this size so the
#: working arrays are reused from chunk to chunk (touching large fresh arrays can cost more
#: than the solves themselves).
CHUNK_ENTRIES = 1 << 18
#: Points per decade of the per-board noise grid (the noise section's own grid is finer;
#: the rms of a board differs from it by well under 0.1 %).
NOISE_POINTS_PER_DECADE = 10

OP_FORMS = {"net_voltage", "supply_current", "supply_power"}
AC_POINT_FORMS = {"gain_at", "phase_at", "zin", "zout", "zin_at", "zout_at"}
SWEEP_FORMS = {"midband_gain", "low_corner", "high_corner", "unity_gain"}
NOISE_FORMS = {"input_noise", "input_noise_band", "input_noise_density",
               "output_noise_density", "snr", "noise_figure"}


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
        impedances = any(m.form.startswith(("zin", "zout")) for m in metrics)
        ports_at = (_port_curves(network, np.array(points), input_part, output_net)
                    if impedances else  # the gain alone: one solve instead of two
                    {"gain": _transfer(network, np.array(points), input_part, output_net)})
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


def _chunks(samples: int, frequencies: int, size: int) -> list[slice]:
    """Sample ranges of at most :data:`CHUNK_ENTRIES` complex matrix entries each."""
    per = max(1, CHUNK_ENTRIES // max(1, frequencies * size * size))
    return [slice(i, min(i + per, samples)) for i in range(0, samples, per)]


def _rows(network: SmallSignal, rows: slice) -> SmallSignal:
    """The network (and its operating point) of the samples in ``rows`` only."""
    solution, dc = network.solution, network.solution.dc
    sub_dc = replace(dc, x=dc.x[rows], converged=dc.converged[rows], method=dc.method[rows],
                     iterations=dc.iterations[rows], unsettled=dc.unsettled[rows],
                     singular=dc.singular[rows])
    index = np.arange(network.samples)[rows]
    sub = OpSolution(solution.circuit, solution.problem.subset(index), sub_dc,
                     {name: value[rows] for name, value in solution.currents.items()})
    return replace(network, solution=sub, G=network.G[rows], C=network.C[rows])


def _port_curves(network: SmallSignal, freq: Array, input_part: str, output_net: str
                 ) -> dict[str, Array]:
    """:func:`port_curves` chunk by chunk; NaN for a chunk whose system is singular."""
    out = {key: np.full((network.samples, len(freq)), np.nan + 0j)
           for key in ("gain", "gain_from_input_net", "zin", "zout")}
    for rows in _chunks(network.samples, 2 * len(freq), network.size):
        try:
            found = port_curves(_rows(network, rows), freq, input_part, output_net)
        except np.linalg.LinAlgError:
            continue
        for key, value in found.items():
            out[key][rows] = value
    return out


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


def _transfer(network: SmallSignal, freq: Array, input_part: str, output_net: str) -> Array:
    """The complex gain, ``freq`` ``(F,)`` or ``(S, F)``, chunk by chunk; NaN where singular."""
    freq = np.asarray(freq, dtype=float)
    out = np.full((network.samples, freq.shape[-1]), np.nan + 0j)
    for rows in _chunks(network.samples, freq.shape[-1], network.size):
        part = replace(network, G=network.G[rows], C=network.C[rows])  # transfer reads G, C
        try:
            out[rows] = transfer(part, freq[rows] if freq.ndim == 2 else freq, input_part,
                                 output_net)
        except np.linalg.LinAlgError:
            continue
    return out


def _gain_db(network: SmallSignal, freq: Array, input_part: str, output_net: str) -> Array:
    """|gain| in dB (see :func:`_transfer`)."""
    return _db(_transfer(network, freq, input_part, output_net))


def _sweep_metrics(network: SmallSignal, metrics: Sequence[Metric], input_part: str,
                   output_net: str) -> dict[str, Array]:
    bench = network.solution.circuit.bench
    freq = curves.log_sweep(bench.f_start, bench.f_stop, SWEEP_POINTS_PER_DECADE)
    gain = _gain_db(network, freq, input_part, output_net)

    def evaluate_db(log_f: Array) -> Array:
        """The gain (dB) of each board at its own frequency ``10**log_f`` (``(S,)``)."""
        return _gain_db(network, 10.0 ** log_f[:, None], input_part, output_net)[:, 0]

    found = midband_and_corners(freq, gain, evaluate_db,
                                unity=any(m.form == "unity_gain" for m in metrics))
    return {m.key: found[m.form] for m in metrics if m.form in SWEEP_FORMS}


# ------------------------------------------------------------------------ noise


def _noise_metrics(network: SmallSignal, metrics: Sequence[Metric], input_part: str,
                   output_net: str) -> dict[str, Array]:
    """Noise figures per board: the noise section's sources, integration and definitions, on a
    grid of :data:`NOISE_POINTS_PER_DECADE` (each band solved once however often named)."""
    bench = network.solution.circuit.bench
    points = min(bench.points_per_decade, NOISE_POINTS_PER_DECADE)
    solved: dict[tuple[float, ...], _Noise] = {}
    out: dict[str, Array] = {}
    for metric in metrics:
        if metric.form in ("input_noise_density", "output_noise_density"):
            band: tuple[float, ...] = (metric.args["freq"],)
            grid = np.array(band)
        else:
            band = tuple(metric.args.get("band") or noise_band(bench))
            grid = curves.log_sweep(band[0], band[1], points)
        if band not in solved:
            solved[band] = _densities(network, grid, input_part, output_net)
        noise = solved[band]
        with np.errstate(invalid="ignore", divide="ignore"):
            out[metric.key] = _noise_figure_of(metric, network, noise, grid, input_part,
                                               output_net)
    return out


def _noise_figure_of(metric: Metric, network: SmallSignal, noise: _Noise, grid: Array,
                     input_part: str, output_net: str) -> Array:
    if metric.form == "output_noise_density":
        return noise.output[:, 0]
    if metric.form == "input_noise_density":
        return noise.input[:, 0]
    if metric.form == "snr":
        signal = network.solution.problem.values[input_part]
        gain_db = _gain_db(network, signal["frequency"][:, None], input_part, output_net)[:, 0]
        output_rms = np.asarray(spectra.rms(grid, noise.output ** 2), dtype=float)
        return _scalar(spectra.snr_db)(signal["value"] / math.sqrt(2.0)
                                       * 10.0 ** (gain_db / 20.0), output_rms)
    if metric.form == "noise_figure":
        return _scalar(spectra.noise_figure_db)(
            spectra.integrate_band(grid, noise.output ** 2),
            spectra.integrate_band(grid, noise.source), network.solution.problem.temperature_k)
    return np.asarray(spectra.rms(grid, noise.input ** 2), dtype=float)


def _scalar(formula: Any) -> Any:
    """A scalar formula of :mod:`docgen.solve.spectra` applied sample by sample (``None``→NaN):
    one definition of SNR and noise figure for the noise section and the boards."""
    def apply(*arrays: Array) -> Array:
        return np.array([np.nan if (v := formula(*map(float, args))) is None else v
                         for args in zip(*np.broadcast_arrays(*arrays), strict=True)])
    return apply


@dataclass
class _Noise:
    """Noise densities of S boards on one grid, each ``(S, F)``: output and input-referred
    (V/√Hz), and the output PSD due to the signal's source resistance alone (V²/Hz)."""

    output: Array
    input: Array
    source: Array


def _densities(network: SmallSignal, freq: Array, input_part: str, output_net: str) -> _Noise:
    """The boards' noise densities.  One adjoint solve per frequency gives every source's
    transfer and the gain (the transfer from the signal's branch row)."""
    sources = noise_sources(network, freq)
    patterns = np.stack([source.pattern for source in sources])  # (P, S, K)
    psd = np.stack([source.psd for source in sources])  # (P, S, F)
    is_source = np.array([source.part == input_part for source in sources])
    probe = network.unit(network.row(output_net))
    branch = network.branch_row(input_part)
    total, own, gain = (np.full((network.samples, len(freq)), np.nan) for _ in range(3))
    for rows in _chunks(network.samples, len(freq), network.size):
        try:
            sensitivity = phasor.adjoint(network.G[rows], network.C[rows], freq, probe[rows])
        except np.linalg.LinAlgError:
            continue
        powers = np.abs(np.einsum("sfk,psk->psf", sensitivity, patterns[:, rows])) ** 2 \
            * psd[:, rows]
        total[rows] = powers.sum(axis=0)
        own[rows] = powers[is_source].sum(axis=0)
        gain[rows] = np.abs(sensitivity[..., branch])
    with np.errstate(divide="ignore", invalid="ignore"):
        return _Noise(np.sqrt(total), np.sqrt(total) / gain, own)


def finite_or_none(values: Array) -> list[float | None]:
    """Plain JSON values: floats, ``None`` for NaN and infinities."""
    return [float(v) if math.isfinite(v) else None for v in np.asarray(values, dtype=float)]
