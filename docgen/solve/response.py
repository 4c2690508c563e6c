"""Small-signal frequency response: the pipeline's ``ac`` section.

Public API::

    freq = sweep(bench)                                   # the bench's log-spaced sweep (Hz)
    h = transfer(network, freq, input_part, output_net)  # (S, F) complex, V(out)/V(source)
    curves = port_curves(network, freq, input_part, output_net)  # gain, gain from the input
                                                          # net, input and output impedance
    analyse(ctx) -> dict                                  # the ``ac`` section

``network`` is a :class:`docgen.solve.linearise.SmallSignal` of S samples; every function solves
all samples and all frequencies in one batched ``numpy.linalg.solve`` (the spread analysis calls
:func:`transfer` with thousands of samples at a few frequencies).

Conventions (DEVELOPERS.md): the gain is from the signal's open-circuit voltage (before its
``source=`` resistance) to the output net with the bench load in place, in dB; an inverting
stage shows as a phase near ±180° (the phase is unwrapped and anchored to (−180°, 180°] at
midband, so an inverting stage reads +180°, or −179.9…° when a slight lead tips it over).
The input impedance is seen by the source into the input net (the signal's first net, after
its source resistance), with the load in place; the output impedance looks into the output
net with the load removed and the source zeroed (its resistance kept).  Midband, corners and
unity gain: :mod:`docgen.solve.curves`.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np

from docgen.diagnostics import AnalysisError, Span
from docgen.solve import curves, phasor
from docgen.solve.linearise import SmallSignal, nominal_network

Array = np.ndarray


def sweep(bench: Any) -> Array:
    """The response sweep: ``f_start .. f_stop``, ``points_per_decade`` log-spaced."""
    return curves.log_sweep(bench.f_start, bench.f_stop, bench.points_per_decade)


def _signal_solution(network: SmallSignal, freq: Array, input_part: str) -> Array:
    rhs = network.unit(network.branch_row(input_part))
    return phasor.solve(network.G, network.C, np.asarray(freq, dtype=float), rhs)


def _voltage(network: SmallSignal, x: Array, net: str) -> Array:
    row = network.row(net)
    return np.zeros(x.shape[:-1], dtype=complex) if row is None else x[..., row]


def transfer(network: SmallSignal, freq: Array, input_part: str, output_net: str) -> Array:
    """V(output)/V(source open circuit) for every sample and frequency: ``(S, F)`` complex."""
    return _voltage(network, _signal_solution(network, freq, input_part), output_net)


def port_curves(
    network: SmallSignal, freq: Array, input_part: str, output_net: str
) -> dict[str, Array]:
    """Gain, gain from the input net, input and output impedance: each ``(S, F)`` complex."""
    source = network.solution.circuit.device(input_part)
    x = _signal_solution(network, freq, input_part)
    out = _voltage(network, x, output_net)
    v_in = _voltage(network, x, source.nets[0]) - _voltage(network, x, source.nets[1])
    delivered = -x[..., network.branch_row(input_part)]  # the branch current flows into +
    with np.errstate(divide="ignore", invalid="ignore"):
        z_in = v_in / delivered
        from_input = out / v_in
    G, C = network.without_load()
    probe = network.unit(network.row(output_net))
    try:
        z_out = _voltage(network, phasor.solve(G, C, freq, probe), output_net)
    except np.linalg.LinAlgError:
        z_out = np.full(out.shape, np.nan, dtype=complex)
    return {"gain": out, "gain_from_input_net": from_input, "zin": z_in, "zout": z_out}


def _plain(values: Array) -> list[float | None]:
    """A JSON list: finite floats, ``None`` for infinities and NaN."""
    return [float(v) if math.isfinite(v) else None for v in np.asarray(values, dtype=float)]


def _number(value: float) -> float | None:
    value = float(value)
    return value if math.isfinite(value) else None


def endpoints(ctx: Any) -> tuple[str, str]:
    """The bench's input part and output net (the only signal part when the bench names none)."""
    circuit, bench = ctx.circuit, ctx.circuit.bench
    input_part = bench.input
    if input_part is None:
        signals = [d.name for d in circuit.devices if d.kind == "signal"]
        if len(signals) != 1:
            raise AnalysisError(circuit.diagnostic(
                _bench_span(circuit, "input"),
                "the bench names no input, so the response has no stimulus",
                "add a line 'input NAME' to the bench block, naming the signal part"))
        input_part = signals[0]
    if bench.output is None or bench.output == "gnd":
        raise AnalysisError(circuit.diagnostic(
            _bench_span(circuit, "output"),
            "the bench names no output net, so there is no response to report",
            "add a line 'output NET' to the bench block"))
    return input_part, bench.output


def _bench_span(circuit: Any, key: str) -> Span:
    """Where to point for a missing bench key: the key if given, else the bench block's fence."""
    span = circuit.bench.spans.get(key)
    if span is not None:
        return span
    for number, line in enumerate(circuit.lines, start=1):
        if line.lstrip().startswith(("```bench", "~~~bench")):
            return Span(number, line.index("bench") + 1, len("bench"))
    return Span(1, 1)


def singular(ctx: Any, input_part: str) -> AnalysisError:
    """The error for a small-signal network that cannot be solved at some frequency."""
    return AnalysisError(ctx.circuit.diagnostic(
        ctx.circuit.device(input_part).span,
        "the small-signal network is singular at some frequency of the sweep",
        "look for a net connected only through capacitors or current sources"))


def _dc_gain_db(network: SmallSignal, input_part: str, output_net: str) -> float | None:
    try:
        h = transfer(network, np.array([0.0]), input_part, output_net)[0, 0]
    except np.linalg.LinAlgError:
        return None
    return float(curves.magnitude_db(h))


def _impedance(curve: Array, index: int) -> tuple[float | None, float | None]:
    value = curve[index]
    if not np.isfinite(value):
        return None, None
    return _number(abs(value)), _number(math.degrees(np.angle(value)))


def analyse(ctx: Any) -> dict[str, Any]:
    """The ``ac`` section for the nominal design (see docs/results.md)."""
    input_part, output_net = endpoints(ctx)
    network = nominal_network(ctx)
    freq = sweep(ctx.circuit.bench)
    signal_hz = float(network.solution.problem.values[input_part]["frequency"][0])
    grid = np.append(freq, signal_hz)  # the signal frequency solved exactly, not interpolated
    try:
        ports = {k: v[0] for k, v in port_curves(network, grid, input_part, output_net).items()}
    except np.linalg.LinAlgError as exc:
        raise singular(ctx, input_part) from exc
    gain = ports["gain"]
    gain_db = curves.magnitude_db(gain[:-1])

    def evaluate_db(f: Array) -> Array:
        return curves.magnitude_db(transfer(network, f, input_part, output_net)[0])

    mid = curves.find_midband(freq, gain_db, evaluate_db)
    f_low, low_why = curves.find_corner(freq, gain_db, mid, "low", evaluate_db,
                                        _dc_gain_db(network, input_part, output_net))
    f_high, high_why = curves.find_corner(freq, gain_db, mid, "high", evaluate_db)
    unity, unity_why = curves.find_unity_gain(freq, gain_db, mid, evaluate_db)
    phase = curves.anchored_phase_deg(gain, mid.index)  # the signal point is unwrapped too
    zin, zin_phase = _impedance(ports["zin"], -1)
    zout, zout_phase = _impedance(ports["zout"], -1)
    return {
        "input": input_part,
        "output": output_net,
        "freq_hz": _plain(freq),
        "gain_db": _plain(gain_db),
        "phase_deg": _plain(phase[:-1]),
        "gain_from_input_net_db": _plain(curves.magnitude_db(ports["gain_from_input_net"][:-1])),
        "midband_gain_db": _number(mid.gain_db),
        "midband_freq_hz": _number(mid.freq_hz) if math.isfinite(mid.gain_db) else None,
        "midband_flat": mid.flat,
        "midband_note": mid.note if math.isfinite(mid.gain_db) else curves.NO_TRANSFER,
        "f_low_hz": f_low,
        "f_low_reason": low_why,
        "f_high_hz": f_high,
        "f_high_reason": high_why,
        "unity_gain_hz": unity,
        "unity_gain_reason": unity_why,
        "signal_freq_hz": signal_hz,
        "gain_at_signal_db": _number(curves.magnitude_db(gain[-1])),
        "phase_at_signal_deg": (_number(_phase_at_signal(phase, freq, signal_hz))
                                if gain[-1] != 0 else None),
        "zin_ohm": zin,
        "zin_phase_deg": zin_phase,
        "zin_reason": None if zin is not None else (
            "unbounded: no small-signal current flows from the source into the input net"),
        "zout_ohm": zout,
        "zout_phase_deg": zout_phase,
        "zout_reason": None if zout is not None else (
            "unbounded: with the load removed the output net has no small-signal path"),
        "zin_curve_ohm": _impedance_curve(ports["zin"][:-1]),
        "zout_curve_ohm": _impedance_curve(ports["zout"][:-1]),
    }


def _phase_at_signal(phase: Array, freq: Array, signal_hz: float) -> float:
    """The signal point's phase on the same unwrapping branch as its neighbours on the sweep."""
    nearest = int(np.argmin(np.abs(np.log(freq / signal_hz))))
    value = phase[-1]
    return float(value - 360.0 * round((value - phase[nearest]) / 360.0))


def _impedance_curve(curve: Array) -> dict[str, list[float | None]]:
    with np.errstate(invalid="ignore"):
        phase = np.degrees(np.angle(curve))
        return {"magnitude": _plain(np.abs(curve)), "phase_deg": _plain(phase)}
