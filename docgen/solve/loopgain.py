"""Loop gain as the return ratio of a controlled source (Bode's method), and its margins.

Public API::

    source = controlled_source(network, part)    # the dependent source of an op-amp/transistor
    t = return_ratio(network, source, freq)      # (S, F) complex return ratio T(jω)
    loops = feedback_loops(network, named)       # the parts whose loop is analysed
    margins(freq, t, evaluate) -> dict           # crossover, phase margin, gain margin

Method (Bode, *Network Analysis and Feedback Amplifier Design*, 1945; also Gray, Hurst, Lewis &
Meyer, *Analysis and Design of Analog Integrated Circuits*, "return ratio", from memory): in the
small-signal network at the operating point, one controlled source ``k·(v_a − v_b)`` is made
independent — its dependence on the controlling voltage is removed from the matrix and a unit
source of the same kind takes its place, with every independent source zeroed.  The value the
controlling voltage then produces, ``k·(v_a − v_b)``, is the returned signal, and the return
ratio is ``T = −returned / injected``.  The bias is never disturbed (the network is the
linearisation at the real operating point) and every loading is kept, so T is exact for the
chosen source.  For negative feedback T is positive at low frequency.

The controlled sources: an op-amp's output stage (``w·(1 + jω/ωp) = A·(v+ − v−)`` on its pole
row, :mod:`docgen.solve.linearise`), a bipolar transistor's ``gm·vb'e`` from collector to
emitter (inner base), a FET's ``gm·vgs`` from drain to source.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

from docgen.solve import curves, phasor
from docgen.solve.linearise import SmallSignal, opamp_gain_at
from docgen.solve.operating_point import part_quantities

Array = np.ndarray

#: the part kinds whose controlled source the loop analysis can break.
LOOP_KINDS = ("opamp", "npn", "pnp", "njfet", "pjfet", "nmos", "pmos")

#: an op-amp is taken to be in negative feedback when its return ratio at the lowest sweep
#: frequency has a positive real part and a magnitude above this (docgen's own criterion).
AUTO_LOOP_LEAST = 1.0


@dataclass(frozen=True)
class ControlledSource:
    """One dependent source of the small-signal network.

    The source enters the equations as ``coefficient · gain · (v[control_plus] −
    v[control_minus])`` on each of its ``rows``; a row or column of ``None`` is ground.
    """

    part: str
    gain: Array  # (S,)
    rows: tuple[tuple[int | None, float], ...]
    control_plus: int | None
    control_minus: int | None


def controlled_source(network: SmallSignal, part: str) -> ControlledSource:
    """The controlled source of ``part`` (op-amp, bipolar transistor or FET)."""
    solution = network.solution
    device = solution.circuit.device(part)
    local = solution.problem.layout.local[part]
    size = solution.problem.layout.size

    def row(index: int) -> int | None:
        return None if index == size else index

    if device.kind == "opamp":
        gain = opamp_gain_at(solution, part).d_dvd
        return ControlledSource(part, gain, ((network.pole_row(part), -1.0),),
                                row(local[0]), row(local[1]))
    gm = part_quantities(solution, part)["gm_s"]
    if device.kind in ("npn", "pnp"):
        base = local[3] if part in solution.problem.layout.internal else local[1]
        return ControlledSource(part, gm, ((row(local[0]), 1.0), (row(local[2]), -1.0)),
                                row(base), row(local[2]))
    if device.kind in ("njfet", "pjfet", "nmos", "pmos"):
        return ControlledSource(part, gm, ((row(local[0]), 1.0), (row(local[2]), -1.0)),
                                row(local[1]), row(local[2]))
    raise ValueError(f"part {part} ({device.kind}) has no controlled source")


def _opened(network: SmallSignal, source: ControlledSource) -> tuple[Array, Array]:
    """G without the source's dependence, and the right-hand side of a unit injection."""
    G = network.G.copy()
    rhs = np.zeros((network.samples, network.size))
    for row, coefficient in source.rows:
        if row is None:
            continue
        if source.control_plus is not None:
            G[:, row, source.control_plus] -= coefficient * source.gain
        if source.control_minus is not None:
            G[:, row, source.control_minus] += coefficient * source.gain
        rhs[:, row] = -coefficient
    return G, rhs


def _control_voltage(x: Array, source: ControlledSource) -> Array:
    plus = x[..., source.control_plus] if source.control_plus is not None else 0.0
    minus = x[..., source.control_minus] if source.control_minus is not None else 0.0
    return plus - minus


def return_ratio(network: SmallSignal, source: ControlledSource, freq: Array) -> Array:
    """T(jω) = −k·v_control / (unit injection), ``(S, F)`` complex, all frequencies at once.

    The network's independent sources are already zero in G and C (supplies and the signal
    are shorts keeping their internal resistance; current sources are open).
    """
    G, rhs = _opened(network, source)
    x = phasor.solve(G, network.C, np.asarray(freq, dtype=float), rhs)
    return -source.gain[:, None] * _control_voltage(x, source)


def feedback_loops(network: SmallSignal, named: Sequence[str], freq: Array) -> list[str]:
    """The parts whose loops are analysed: the ones named, else every op-amp in negative
    feedback (its return ratio at the lowest frequency has a positive real part and a
    magnitude above 1: the loop opposes a change at low frequency)."""
    if named:
        return list(named)
    found = []
    for device in network.solution.circuit.of_kind("opamp"):
        t = return_ratio(network, controlled_source(network, device.name), freq[:1])[0, 0]
        if t.real > 0.0 and abs(t) > AUTO_LOOP_LEAST:
            found.append(device.name)
    return found


def _first(flags: Array, start: int) -> int | None:
    hits = np.flatnonzero(flags[start:])
    return int(hits[0]) + start if hits.size else None


def margins(freq: Array, t: Array, evaluate: Callable[[Array], Array]) -> dict[str, Any]:
    """Crossover, phase margin and gain margin of a return ratio over a log sweep.

    - phase: unwrapped, anchored to (−180°, 180°] where |T| is largest;
    - crossover: the last frequency where |T| falls through 0 dB (refined on the exact T);
    - phase margin: 180° + the phase of T there;
    - gain margin: −|T| in dB where the phase first reaches −180° above the largest |T|
      (``None`` when the phase never gets there in the sweep: unbounded in the model).
    ``evaluate(f)`` returns T at any frequencies (1-D complex).
    """
    gain_db = curves.magnitude_db(t)
    peak = int(np.argmax(gain_db))
    phase = curves.anchored_phase_deg(t, peak)
    out: dict[str, Any] = {"crossover_hz": None, "phase_margin_deg": None,
                           "gain_margin_db": None, "phase_crossover_hz": None}
    if gain_db[peak] <= 0.0:
        out["crossover_reason"] = "the loop gain stays below 0 dB over the sweep"
    elif gain_db[-1] >= 0.0:
        out["crossover_reason"] = (f"above the loop sweep's stop ({freq[-1]:.4g} Hz): the loop "
                                   "gain is still above 0 dB")
    else:
        above = np.flatnonzero(gain_db >= 0.0)
        k = int(above[-1])
        crossover = curves.crossing(freq[k], freq[k + 1], 0.0, gain_db[k], gain_db[k + 1],
                                    lambda f: curves.magnitude_db(evaluate(f)))
        out["crossover_hz"] = crossover
        out["phase_margin_deg"] = 180.0 + _phase_near(evaluate, crossover, freq, phase)
        out["crossover_reason"] = None
    below = _first(phase <= -180.0, peak)
    if below is None or below == 0:
        out["gain_margin_reason"] = "the loop phase does not reach −180° in the sweep"
        return out
    f_180 = _phase_crossing(freq, phase, below, evaluate)
    out["phase_crossover_hz"] = f_180
    out["gain_margin_db"] = -float(curves.magnitude_db(evaluate(np.array([f_180]))[0]))
    out["gain_margin_reason"] = None
    return out


def _phase_near(evaluate: Callable[[Array], Array], f: float, freq: Array, phase: Array
                ) -> float:
    """The phase of T at ``f`` on the same unwrapping branch as the nearest sweep point."""
    value = math.degrees(float(np.angle(evaluate(np.array([f]))[0])))
    nearest = phase[int(np.argmin(np.abs(np.log(freq / f))))]
    return value - 360.0 * round((value - nearest) / 360.0)


def _phase_crossing(freq: Array, phase: Array, index: int,
                    evaluate: Callable[[Array], Array]) -> float:
    """Where the unwrapped phase passes −180° between sweep points ``index−1`` and ``index``
    (bisection in log f on the exact T)."""
    low, high = math.log10(freq[index - 1]), math.log10(freq[index])
    for _ in range(40):
        middle = 0.5 * (low + high)
        f = 10.0 ** middle
        if _phase_near(evaluate, f, freq, phase) > -180.0:
            low = middle
        else:
            high = middle
    return 10.0 ** (0.5 * (low + high))
