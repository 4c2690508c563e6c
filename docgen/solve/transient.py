"""The ``transient`` section: the bench sine in the time domain, its distortion, clipping,
the largest output swing within the distortion limit, and each part's average power.

Public API::

    analyse(ctx) -> dict             # the pipeline's section (docs/results.md)
    bench_steady_state(ctx) -> PeriodicRun   # the bench sine alone (for the benchmark)

How (each step reuses the one set of device equations, see :mod:`docgen.solve.integrate`):

1. One batched run (:func:`docgen.solve.periodic.steady_state`) drives the bench amplitude,
   the bench ``amplitudes`` list and the amplitudes of ``THD at …`` requirements: every
   amplitude is one sample of the same time march.
2. THD of each from the FFT of its last period (:mod:`docgen.solve.distortion`).
3. The swing search, when a requirement reads it: a second batched run (coarser grid, looser
   step error) of a ladder of amplitudes from 1/300 of to the full supply span over the
   small-signal gain brackets the amplitude where THD crosses the bench distortion limit; one
   more batched run of three amplitudes inside the bracket narrows it, and the amplitude and
   the output's peak-to-peak are interpolated (log THD against log amplitude) between the two
   samples either side.  These runs do not wait for a sample that was over three times the
   limit two periods running (its answer is known; ``swing_steady`` says whether every sample
   settled), except the deepest ladder sample: the headroom and the overdrive clipping come
   from its waveform.
4. Clipping: over the last period, where a transistor leaves its bias region (or its current
   falls below 5 % of its bias value: cut-off), an op-amp's output stage reaches its limit,
   or the output comes within 1 % of the supply span of a rail.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from typing import Any

import numpy as np

from docgen.diagnostics import AnalysisError
from docgen.solve import mna
from docgen.solve.devices import OUTPUT_KNEE
from docgen.solve.distortion import harmonic_table, thd, thd_plus_noise
from docgen.solve.integrate import StepFailure
from docgen.solve.linearise import SmallSignal, nominal_network
from docgen.solve.newton import DcResult
from docgen.solve.operating_point import OpSolution, part_quantities
from docgen.solve.periodic import PeriodicRun, steady_state, supply_rails
from docgen.solve.response import endpoints
from docgen.solve.transient_amplitudes import requested_amplitudes, swing_wanted

Array = np.ndarray

LADDER = 7
REFINE = 3
#: the swing search needs THD near the limit to a few per cent of itself, not the bench run's
#: precision: a coarser grid, a looser step error and fewer periods keep it affordable
SWING_SETTINGS = {"points": 64, "max_periods": 6, "relative_tolerance": 3e-3}
#: a ladder sample this many times over the distortion limit in two periods running is above
#: it, whatever its remaining drift
FAR_ABOVE = 3.0
RAIL_MARGIN = 0.01
CUT_OFF_SHARE = 0.05
NORMAL_REGION = {"npn": "active", "pnp": "active", "njfet": "saturation", "pjfet": "saturation",
                 "nmos": "saturation", "pmos": "saturation"}


def bench_steady_state(ctx: Any) -> PeriodicRun:
    """The steady state at the bench amplitude alone (what the benchmark times)."""
    input_part, _ = endpoints(ctx)
    network = nominal_network(ctx)
    values = network.solution.problem.values[input_part]
    return steady_state(network, values["value"][:1], float(values["frequency"][0]))


def analyse(ctx: Any) -> dict[str, Any]:
    """The ``transient`` section for the nominal design (see docs/results.md)."""
    input_part, output_net = endpoints(ctx)
    network = nominal_network(ctx)
    values = network.solution.problem.values[input_part]
    amplitude, frequency = float(values["value"][0]), float(values["frequency"][0])
    requested = requested_amplitudes(ctx)
    gain = _small_signal_gain(ctx)
    low, high = supply_rails(network)
    ladder = np.array([])
    if swing_wanted(ctx) and gain > 0:
        top = (high - low) / gain
        ladder = np.geomspace(top / 300.0, top, LADDER)
    run = _run(ctx, network, np.concatenate([[amplitude], requested]), frequency)
    output = _net_wave(run, output_net)
    distortion = thd(output.T)
    section = _bench_figures(ctx, run, output, amplitude, distortion, input_part)
    section["amplitudes"] = [_amplitude_row(run, output, k) for k in range(1, 1 + len(requested))]
    try:
        section.update(_swing(ctx, network, frequency, ladder, output_net))
    except AnalysisError as exc:  # the bench figures stand without the swing
        section.update({"max_swing_vpp": None, "swing_limit_amplitude_v": None,
                        "headroom_pos_v": None, "headroom_neg_v": None,
                        "swing_reason": exc.diagnostics[0].message})
    section["clipping"] = clipping_events(run, network, output_net, 0)
    return section


def _run(ctx: Any, network: SmallSignal, amplitudes: Array, frequency: float,
         **settings: Any) -> PeriodicRun:
    try:
        return steady_state(network, amplitudes, frequency, **settings)
    except StepFailure as exc:
        circuit = ctx.circuit
        device = circuit.device(endpoints(ctx)[0])
        raise AnalysisError(circuit.diagnostic(
            device.span, f"the time-domain solution failed: {exc}",
            "a part may switch faster than the signal period resolves; check the circuit "
            "near that time")) from exc


def _net_wave(run: PeriodicRun, net: str) -> Array:
    """``(N, S)`` the voltage of ``net`` over the last period."""
    circuit = _circuit_of(run)
    return run.grid[:, :, circuit.net_index[net]] if net != "gnd" else \
        np.zeros(run.grid.shape[:2])


def _circuit_of(run: PeriodicRun) -> Any:
    return run.network.solution.circuit


def _small_signal_gain(ctx: Any) -> float:
    """|gain| at the signal frequency from the ``ac`` section (V/V), 0 if unknown."""
    gain_db = (ctx.results.get("ac") or {}).get("gain_at_signal_db")
    if gain_db is None:
        return 0.0
    return 10.0 ** (float(gain_db) / 20.0)


def _bench_figures(ctx: Any, run: PeriodicRun, output: Array, amplitude: float,
                   distortion: Array, input_part: str) -> dict[str, Any]:
    wave = output[:, 0]
    table = harmonic_table(wave)
    fundamental = table[0]["amplitude_v"] if table else 0.0
    values = run.network.solution.problem.values[input_part]
    drive = float(values["offset"][0]) + amplitude * np.sin(2 * math.pi * run.frequency *
                                                           run.times)
    noise = (ctx.results.get("noise") or {}).get("output_rms_v")
    thd_n = None
    if noise is not None and fundamental > 0 and math.isfinite(float(distortion[0])):
        thd_n = 100.0 * thd_plus_noise(float(distortion[0]), fundamental, float(noise))
    return {
        "method": run.method_name,
        "points_per_period": int(run.grid.shape[0]),
        "frequency_hz": run.frequency,
        "amplitude_v": amplitude,
        "time_s": [float(t) for t in run.times],
        "output_v": [float(v) for v in wave],
        "input_v": [float(v) for v in drive],
        "output_mean_v": float(np.mean(wave)),
        "output_vpp": float(np.ptp(wave)),
        "fundamental_gain_db": (20.0 * math.log10(fundamental / amplitude)
                                if fundamental > 0 and amplitude > 0 else None),
        "thd_percent": _percent(distortion[0]),
        "thd_n_percent": thd_n,
        "harmonics": table,
        "steady_state": {"reached": bool(run.reached[0]), "periods": int(run.periods),
                         "change": _finite(run.change[0]),
                         "steps": int(run.steps), "rejected_steps": int(run.rejected)},
        "power_w": average_power(run, 0),
    }


def _percent(fraction: Any) -> float | None:
    value = float(fraction)
    return 100.0 * value if math.isfinite(value) else None


def _finite(value: Any) -> float | None:
    value = float(value)
    return value if math.isfinite(value) else None


def _amplitude_row(run: PeriodicRun, output: Array, sample: int) -> dict[str, Any]:
    return {"amplitude_v": float(run.amplitudes[sample]),
            "thd_percent": _percent(thd(output[:, sample])),
            "output_vpp": float(np.ptp(output[:, sample])),
            "steady": bool(run.reached[sample])}


# ------------------------------------------------------------------------- swing search


def _swing(ctx: Any, network: SmallSignal, frequency: float, ladder: Array, output_net: str
           ) -> dict[str, Any]:
    limit = ctx.circuit.bench.distortion_limit
    empty = {"max_swing_vpp": None, "swing_limit_amplitude_v": None, "headroom_pos_v": None,
             "headroom_neg_v": None, "distortion_limit_percent": 100.0 * limit}
    if ladder.size == 0:
        return {**empty, "swing_reason": "not searched (no requirement reads it, or the "
                "small-signal gain is unknown)"}
    decided = _far_above(network, output_net, limit)
    run = _run(ctx, network, ladder, frequency, decided=_except_last(decided), **SWING_SETTINGS)
    output = _net_wave(run, output_net)
    amplitudes, levels, swings = ladder, thd(output.T), np.ptp(output, axis=0)
    quiescent = float(network.solution.voltage(output_net)[0])
    deepest = output[:, -1]
    found = {"headroom_pos_v": float(np.max(deepest) - quiescent),
             "headroom_neg_v": float(quiescent - np.min(deepest)),
             "headroom_amplitude_v": float(ladder[-1]),
             "overdrive_clipping": clipping_events(run, network, output_net, ladder.size - 1),
             "swing_steady": bool(run.reached.all()), "swing_periods": int(run.periods)}
    above = np.flatnonzero(levels >= limit)
    if above.size == 0:
        return {**empty, **found, "swing_reason": "THD stays below the limit up to "
                f"{ladder[-1]:.3g} V (the supply span over the gain)"}
    if above[0] == 0:
        return {**empty, **found, "swing_reason": "THD exceeds the limit already at "
                f"{ladder[0]:.3g} V"}
    k = int(above[0])
    inner = np.geomspace(amplitudes[k - 1], amplitudes[k], REFINE + 2)[1:-1]
    refine = _run(ctx, network, inner, frequency, decided=decided, **SWING_SETTINGS)
    inner_out = _net_wave(refine, output_net)
    found["swing_steady"] = found["swing_steady"] and bool(refine.reached.all())
    amplitudes = np.concatenate([amplitudes[k - 1:k], inner, amplitudes[k:k + 1]])
    levels = np.concatenate([levels[k - 1:k], thd(inner_out.T), levels[k:k + 1]])
    swings = np.concatenate([swings[k - 1:k], np.ptp(inner_out, axis=0), swings[k:k + 1]])
    j = int(np.flatnonzero(levels >= limit)[0])
    amplitude, swing = _interpolate(amplitudes[j - 1:j + 1], levels[j - 1:j + 1],
                                    swings[j - 1:j + 1], limit)
    return {**empty, **found, "max_swing_vpp": swing, "swing_limit_amplitude_v": amplitude,
            "swing_reason": None}


def _far_above(network: SmallSignal, output_net: str, limit: float
               ) -> Callable[[Array, Array], Array]:
    """Samples whose THD was over :data:`FAR_ABOVE` times the limit in both of the last two
    periods: the search only asks "above the limit or not", and an overdriven stage's slow
    bias drift (its coupling capacitors recharging) would otherwise set the run's length."""
    column = network.solution.circuit.net_index.get(output_net)

    def decided(grid: Array, previous: Array) -> Array:
        if column is None:  # the output is ground: nothing to decide
            return np.zeros(grid.shape[1], dtype=bool)
        return ((thd(grid[:, :, column].T) >= FAR_ABOVE * limit)
                & (thd(previous[:, :, column].T) >= FAR_ABOVE * limit))

    return decided


def _except_last(decided: Callable[[Array, Array], Array]) -> Callable[[Array, Array], Array]:
    """``decided`` for every sample but the last: the deepest ladder sample gives the headroom
    and the overdrive clipping, which need its settled waveform, not just its THD."""
    def rule(grid: Array, previous: Array) -> Array:
        known = decided(grid, previous)
        known[-1] = False
        return known

    return rule


def _interpolate(amplitudes: Array, levels: Array, swings: Array, limit: float
                 ) -> tuple[float, float]:
    """Amplitude and swing where THD = limit, linear in log THD against log amplitude."""
    logs = np.log(np.maximum(levels, 1e-300))
    share = float((math.log(limit) - logs[0]) / (logs[1] - logs[0])) if logs[1] > logs[0] else 1.0
    share = min(max(share, 0.0), 1.0)
    log_amplitude = (1 - share) * math.log(amplitudes[0]) + share * math.log(amplitudes[1])
    return math.exp(log_amplitude), float((1 - share) * swings[0] + share * swings[1])


# ------------------------------------------------------------- per-point part figures


def _as_solution(run: PeriodicRun, sample: int) -> OpSolution:
    """The last period of one sample as an operating-point solution with one sample per
    time point, so the operating point's own part figures (regions, power) apply."""
    base = run.network.solution
    count = run.grid.shape[0]
    problem = base.problem.subset(np.zeros(count, dtype=int))
    x = np.ascontiguousarray(run.grid[:, sample, :])
    ones = np.ones(count, dtype=bool)
    dc = DcResult(x, ones, np.zeros(count, dtype=int), np.zeros(count, dtype=int),
                  np.full(count, -1), ~ones)
    return OpSolution(base.circuit, problem, dc, mna.device_currents(problem, x))


def average_power(run: PeriodicRun, sample: int) -> dict[str, float]:
    """Each part's power absorbed, averaged over the last period (W; supplies negative)."""
    solution = _as_solution(run, sample)
    return {d.name: float(np.mean(part_quantities(solution, d.name)["power_w"]))
            for d in solution.circuit.devices if not d.bench and d.kind != "capacitor"}


def clipping_events(run: PeriodicRun, network: SmallSignal, output_net: str, sample: int
                    ) -> list[dict[str, Any]]:
    """Where, over the last period, a part leaves its bias region or the output meets a rail.

    Each event: ``part`` or ``net``, ``what``, ``phase_deg`` (of the drive sine, where it
    starts) and ``phase_end_deg``.
    """
    solution = _as_solution(run, sample)
    bias = network.solution
    events: list[dict[str, Any]] = []
    for device in solution.circuit.devices:
        normal = NORMAL_REGION.get(device.kind)
        if normal is not None:
            quiescent = str(part_quantities(bias, device.name)["region"][0])
            if quiescent != normal:
                continue  # biased outside its normal region on purpose (a switch, a clamp)
            regions = _regions(solution, bias, device.name)
            for region in sorted(set(regions.tolist()) - {normal}):
                events += _spans(regions == region, {"part": device.name, "what": region})
        elif device.kind == "opamp":
            events += _spans(_opamp_limited(solution, device),
                             {"part": device.name, "what": "output at its limit"})
    low, high = supply_rails(network)
    margin = RAIL_MARGIN * max(high - low, 1.0)
    if output_net != "gnd":
        wave = solution.voltage(output_net)
        quiescent = float(bias.voltage(output_net)[0])
        # a rail the output rests on (an AC-coupled output at gnd) is not one it can clip on
        if quiescent < high - 2 * margin:
            events += _spans(wave >= high - margin, {"net": output_net,
                                                     "what": "at the upper rail"})
        if quiescent > low + 2 * margin:
            events += _spans(wave <= low + margin, {"net": output_net,
                                                    "what": "at the lower rail"})
    return sorted(events, key=lambda e: (e["phase_deg"], str(e.get("part", e.get("net")))))


def _regions(solution: OpSolution, bias: OpSolution, name: str) -> Array:
    """The operating point's region names at each point, with ``cut-off`` also where the
    main current has fallen below :data:`CUT_OFF_SHARE` of its bias value (a junction still
    above the region threshold can carry next to nothing when the signal pulls it back)."""
    figures = part_quantities(solution, name)
    key = "ic_a" if "ic_a" in figures else "id_a"
    quiescent = abs(float(part_quantities(bias, name)[key][0]))
    low = np.abs(figures[key]) < CUT_OFF_SHARE * quiescent
    return np.where(low, "cut-off", figures["region"])


def _opamp_limited(solution: OpSolution, device: Any) -> Array:
    """``(N,)`` true where the op-amp's output is within its headroom (plus the model's knee)
    of a supply pin.  (The DC model's own flag compares A0·vd with the range, which does not
    hold in the time domain, where the dominant pole sits between them.)"""
    pins = solution.terminal_voltages(device)
    reach = solution.problem.values[device.name]["output_headroom"] + 3.0 * OUTPUT_KNEE
    return (pins[:, 2] >= pins[:, 3] - reach) | (pins[:, 2] <= pins[:, 4] + reach)


def _spans(flags: Array, what: dict[str, Any]) -> list[dict[str, Any]]:
    """One event per run of true flags over the period (a run across the period's end joins
    its start)."""
    flags = np.asarray(flags, dtype=bool)
    count = flags.size
    if not flags.any():
        return []
    if flags.all():
        return [{**what, "phase_deg": 0.0, "phase_end_deg": 360.0}]
    first = int(np.argmin(flags))  # start scanning at a point that is not flagged
    rolled = np.roll(flags, -first)
    edges = np.diff(rolled.astype(int))
    starts = np.flatnonzero(edges == 1) + 1
    ends = np.flatnonzero(edges == -1) + 1
    if ends.size < starts.size:
        ends = np.append(ends, count)
    out = []
    for start, end in zip(starts, ends, strict=True):
        # grid point j is at phase 360·(j + 1)/N
        out.append({**what, "phase_deg": 360.0 * float((start + first) % count + 1) / count,
                    "phase_end_deg": 360.0 * float((end - 1 + first) % count + 1) / count})
    return out
