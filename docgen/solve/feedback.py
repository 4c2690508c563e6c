"""The ``feedback`` section: loop gain and margins, step response, PSRR, CMRR, output offset
and op-amp limits (docs/results.md lists every key).

Public API::

    analyse(ctx) -> dict     # the pipeline's section for the nominal design

Each part has its module: :mod:`docgen.solve.loopgain` (return ratio of a controlled source,
Bode), :mod:`docgen.solve.step` (the large-signal step through the transient core),
:mod:`docgen.solve.rejection` (PSRR and CMRR) and :mod:`docgen.solve.offset` (the offset
budget).  This module picks the loops and stimuli from the bench and assembles the section.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np

from docgen.diagnostics import AnalysisError, Span
from docgen.solve import curves, loopgain, rejection
from docgen.solve.integrate import StepFailure
from docgen.solve.linearise import SmallSignal, nominal_network
from docgen.solve.offset import offset_budget
from docgen.solve.response import endpoints, sweep
from docgen.solve.step import run_step, steepest_slope, step_figures
from docgen.units import QuantityError, parse_value

Array = np.ndarray

#: the loop sweep runs this many times past the bench sweep's stop (crossovers sit high).
LOOP_SWEEP_EXTENSION = 1000.0
#: the step window spans this many time constants 1/(2π f) of the loop's speed.
STEP_WINDOW = 60.0
#: default step: this output change (V) over the midband gain (a small step).
STEP_OUTPUT_V = 0.01
#: grid points of the large step (its slope needs fewer than the small step's ringing).
SLEW_POINTS = 300
#: settling band of the step response (1 %).
SETTLING_BAND = 0.01


def analyse(ctx: Any) -> dict[str, Any]:
    """The ``feedback`` section for the nominal design."""
    input_part, output_net = endpoints(ctx)
    network = nominal_network(ctx)
    bench = ctx.circuit.bench
    freq = sweep(bench)
    section: dict[str, Any] = {"freq_hz": _plain(freq)}
    section.update(_loops(ctx, network, freq))
    section.update(_rejection(ctx, network, freq, input_part, output_net))
    offset = offset_budget(ctx.circuit, output_net, ctx.options.get("solve_options"))
    section["offset"] = offset
    section["output_offset_v"] = offset["output_offset_v"]
    section["opamps"] = _opamp_limits(network, input_part)
    section["step"] = _step(ctx, network, output_net, section)
    section["slew_step"] = _slew_step(ctx, network, output_net, section)
    section["overshoot_percent"] = section["step"].get("overshoot_percent")
    section["settling_time_s"] = section["step"].get("settling_time_s")
    return section


# ----------------------------------------------------------------------------- loops


def _named_loops(ctx: Any, network: SmallSignal) -> list[str]:
    text = ctx.circuit.bench.extra.get("loop")
    if not text:
        return []
    span = ctx.circuit.bench.spans.get("loop", Span(1, 1))
    names = text.replace(",", " ").split()
    for name in names:
        try:
            kind = ctx.circuit.device(name).kind
        except KeyError:
            kind = None
        if kind not in loopgain.LOOP_KINDS:
            what = "no part" if kind is None else f"a {kind}"
            raise AnalysisError(ctx.circuit.diagnostic(
                span, f"'loop' names {name}, which is {what}; the loop is measured at an "
                "op-amp or a transistor", "name the op-amp or transistor inside the loop"))
    return names


def _loops(ctx: Any, network: SmallSignal, freq: Array) -> dict[str, Any]:
    bench = ctx.circuit.bench
    loop_freq = curves.log_sweep(bench.f_start, bench.f_stop * LOOP_SWEEP_EXTENSION,
                                 bench.points_per_decade)
    parts = loopgain.feedback_loops(network, _named_loops(ctx, network), loop_freq)
    loops = []
    for part in parts:
        source = loopgain.controlled_source(network, part)

        def evaluate(f: Array, source: Any = source) -> Array:
            return loopgain.return_ratio(network, source, f)[0]

        t = evaluate(loop_freq)
        found = loopgain.margins(loop_freq, t, evaluate)
        peak = int(np.argmax(np.abs(t)))
        loops.append({"part": part, "gain_db": _plain(curves.magnitude_db(t)),
                      "phase_deg": _plain(curves.anchored_phase_deg(t, peak)),
                      "dc_loop_gain_db": _number(curves.magnitude_db(t[0])),
                      "negative_feedback": bool(t[0].real > 0.0), **found})
    out: dict[str, Any] = {"loop_freq_hz": _plain(loop_freq), "loops": loops,
                           "loop_method": "return ratio of the controlled source (Bode)"}
    first = loops[0] if loops else {}
    out["loop_part"] = first.get("part")
    out["loop_gain_db"] = first.get("gain_db")
    out["loop_phase_deg"] = first.get("phase_deg")
    for key in ("crossover_hz", "phase_margin_deg", "gain_margin_db"):
        out[key] = first.get(key)
    if not loops:
        out["loop_reason"] = ("no loop: the bench names none and no op-amp is in negative "
                              "feedback (add 'loop PART' to the bench)")
    return out


# ------------------------------------------------------------------------ rejection


def _rejection(ctx: Any, network: SmallSignal, freq: Array, input_part: str, output_net: str
               ) -> dict[str, Any]:
    values = network.solution.problem.values[input_part]
    signal_hz = float(values["frequency"][0])
    grid = np.append(freq, signal_hz)
    ratio, leak = rejection.supply_rejection(network, grid, input_part, output_net)
    psrr = {name: _plain(_db(r[0, :-1])) for name, r in ratio.items()}
    at_signal = [float(_db(r[0, -1])) for r in ratio.values()]
    out: dict[str, Any] = {
        "psrr_db": psrr,
        "psrr": {name: {"freq_hz": _plain(freq), "psrr_db": curve,
                        "supply_gain_db": _plain(_db(leak[name][0, :-1]))}
                 for name, curve in psrr.items()},
        "psrr_at_signal_db": _number(min(at_signal)) if at_signal else None,
        "cmrr_db": None, "cmrr_inputs": None, "cmrr_at_signal_db": None,
    }
    text = ctx.circuit.bench.extra.get("common mode")
    if text:
        inputs = rejection.common_mode_parts(ctx.circuit, text)
        ad, acm = rejection.differential_gains(network, inputs, grid, output_net)
        with np.errstate(divide="ignore", invalid="ignore"):
            cmrr = _db(np.abs(ad[0]) / np.abs(acm[0]))
        out.update({"cmrr_db": _plain(cmrr[:-1]), "cmrr_inputs": list(inputs),
                    "cmrr_at_signal_db": _number(cmrr[-1]),
                    "differential_gain_db": _plain(_db(np.abs(ad[0, :-1]))),
                    "common_mode_gain_db": _plain(_db(np.abs(acm[0, :-1])))})
    return out


# ------------------------------------------------------------------------- op-amps


def _opamp_limits(network: SmallSignal, input_part: str) -> dict[str, Any]:
    """Slew rate, full-power bandwidth and input/output range of each op-amp at the bench
    signal (its peak from the small-signal transfer at the signal frequency)."""
    solution = network.solution
    values_in = solution.problem.values[input_part]
    amplitude, signal_hz = float(values_in["value"][0]), float(values_in["frequency"][0])
    out = {}
    for device in solution.circuit.of_kind("opamp"):
        values = {k: float(v[0]) for k, v in solution.problem.values[device.name].items()}
        pins = {t: float(solution.voltage(n)[0]) for t, n in zip(device.terminals, device.nets,
                                                                 strict=True)}
        peaks = {t: amplitude * abs(_transfer(network, input_part, n, signal_hz))
                 for t, n in zip(device.terminals[:3], device.nets[:3], strict=True)}
        slew = values["slew_rate"]
        low_out = pins["v-"] + values["output_headroom"]
        high_out = pins["v+"] - values["output_headroom"]
        low_in = pins["v-"] + values["input_headroom"]
        high_in = pins["v+"] - values["input_headroom"]
        wave_in = (pins["in+"] - peaks["in+"], pins["in+"] + peaks["in+"])
        wave_out = (pins["out"] - peaks["out"], pins["out"] + peaks["out"])
        needed = 2.0 * math.pi * signal_hz * peaks["out"]
        out[device.name] = {
            "slew_rate_v_per_s": _number(slew),
            "output_peak_v": peaks["out"],
            "signal_slope_v_per_s": needed,
            "slew_limited": bool(needed > slew),
            "full_power_bandwidth_hz": (_number(slew / (2.0 * math.pi * peaks["out"]))
                                        if peaks["out"] > 0 else None),
            "input_range_v": [low_in, high_in],
            "input_common_mode_v": pins["in+"],
            "input_in_range": low_in <= pins["in+"] <= high_in,
            "input_in_range_over_signal": low_in <= wave_in[0] and wave_in[1] <= high_in,
            "output_range_v": [low_out, high_out],
            "output_in_range": low_out <= pins["out"] <= high_out,
            "output_in_range_over_signal": low_out <= wave_out[0] and wave_out[1] <= high_out,
            "quiescent_current_a": values["supply_current"],
        }
    return out


def _transfer(network: SmallSignal, input_part: str, net: str, f: float) -> complex:
    row = network.row(net)
    if row is None:
        return 0.0
    h = rejection.branch_transfers(network, [input_part], np.array([f]), net)
    return complex(h[0, 0, 0])


# ---------------------------------------------------------------------------- step


def _step_amplitude(ctx: Any) -> float:
    bench = ctx.circuit.bench
    text = bench.extra.get("step")
    if text:
        try:
            return parse_value(text, "V", "the step").value
        except QuantityError as exc:
            raise AnalysisError(ctx.circuit.diagnostic(
                bench.spans.get("step", Span(1, 1)), f"the bench step does not read: {exc}",
                "write the step's height as a voltage, e.g. 'step 10 mV'")) from exc
    gain_db = (ctx.results.get("ac") or {}).get("midband_gain_db")
    gain = 10.0 ** (gain_db / 20.0) if gain_db is not None else 1.0
    return STEP_OUTPUT_V / max(gain, 1e-6)


def _speed_hz(ctx: Any, section: dict[str, Any]) -> float | None:
    ac = ctx.results.get("ac") or {}
    for value in (section.get("crossover_hz"), ac.get("f_high_hz"), ac.get("unity_gain_hz")):
        if value:
            return float(value)
    return None


def _step(ctx: Any, network: SmallSignal, output_net: str, section: dict[str, Any]
          ) -> dict[str, Any]:
    speed = _speed_hz(ctx, section)
    if speed is None:
        return {"reason": "not computed: neither a loop crossover nor an upper corner sets the "
                "time scale of the step"}
    amplitude = _step_amplitude(ctx)
    duration = STEP_WINDOW / (2.0 * math.pi * speed)
    gain_db = (ctx.results.get("ac") or {}).get("midband_gain_db")
    scale = amplitude * 10.0 ** (gain_db / 20.0) if gain_db is not None else amplitude
    try:
        times, wave = run_step(network, amplitude, duration, output_net, scale=scale)
    except StepFailure as exc:
        return {"amplitude_v": amplitude, "duration_s": duration,
                "reason": f"not computed: the time march failed ({exc})"}
    figures = step_figures(times, wave, SETTLING_BAND)
    return {"amplitude_v": amplitude, "duration_s": duration, "time_s": _plain(times),
            "output_v": _plain(wave), "method": "BDF2 time march of the operating point's "
            "equations", **figures}


def _slew_step(ctx: Any, network: SmallSignal, output_net: str, section: dict[str, Any]
               ) -> dict[str, Any] | None:
    """A large step (half the narrowest op-amp output range at the output) through the
    slew-limited time march: the output's steepest slope against the slew rate."""
    limited = {name: figures for name, figures in section["opamps"].items()
               if figures["slew_rate_v_per_s"] is not None}
    speed = _speed_hz(ctx, section)
    if not limited or speed is None:
        return None
    slew = min(figures["slew_rate_v_per_s"] for figures in limited.values())
    span = min(figures["output_range_v"][1] - figures["output_range_v"][0]
               for figures in limited.values())
    gain_db = (ctx.results.get("ac") or {}).get("midband_gain_db")
    gain = 10.0 ** (gain_db / 20.0) if gain_db is not None else 1.0
    height = 0.5 * span
    duration = max(STEP_WINDOW / (2.0 * math.pi * speed), 3.0 * height / slew)
    try:
        times, wave = run_step(network, height / gain, duration, output_net, SLEW_POINTS,
                               scale=height)
    except StepFailure:
        return None
    return {"amplitude_v": height / gain, "duration_s": duration, "slew_rate_v_per_s": slew,
            "steepest_slope_v_per_s": steepest_slope(times, wave),
            "time_s": _plain(times), "output_v": _plain(wave)}


# --------------------------------------------------------------------------- helpers


def _db(ratio: Any) -> Array:
    with np.errstate(divide="ignore"):
        return 20.0 * np.log10(np.abs(np.asarray(ratio)))


def _plain(values: Any) -> list[float | None]:
    return [float(v) if math.isfinite(v) else None for v in np.asarray(values, dtype=float)]


def _number(value: Any) -> float | None:
    value = float(value)
    return value if math.isfinite(value) else None
