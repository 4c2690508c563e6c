"""Periodic steady state of the circuit driven by a sine, for a batch of amplitudes at once.

Public API::

    run = steady_state(network, amplitudes, frequency)   # amplitudes (S,) V peak
    run.grid            # (N, S, M) unknowns over the last period, at t = (j + 1)·T/N
    run.reached, run.change, run.periods, run.method

Start: the small-signal steady state at t = 0 (:func:`small_signal_offset`; the bare operating point
for a sample driven past its linear range); the sine starts at phase 0.  Each period is marched on
a grid of N = :data:`POINTS` points (sub-steps as the error control needs), so the last period is
sampled uniformly and coherently for the FFT.  Steady state is declared per sample when no net
moved more than :data:`STEADY_CHANGE` of the largest peak-to-peak of any net between one period and
the next (measured, never assumed); the run stops when every sample is steady (after at least
:data:`MIN_PERIODS`) or after :data:`MAX_PERIODS`, and says which; a caller may mark samples whose
answer is already decided (``decided``) so the run need not wait for them.

Integration rule: trapezoidal; if its tell-tale ringing (energy at the grid's Nyquist rate,
alternating from point to point) appears in a period, the run switches to BDF2 (Gear) and
measures steady state afresh.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from docgen.solve import mna
from docgen.solve.integrate import METHODS, Stepper, run_grid
from docgen.solve.linearise import SmallSignal

Array = np.ndarray
Decided = Callable[[Array, Array], Array]

POINTS = 128
MIN_PERIODS = 2
MAX_PERIODS = 40
STEADY_CHANGE = 1e-3
#: a sample starts from its small-signal steady state when its linear peak on every node is
#: within this share of the supply span (see :func:`small_signal_offset`)
LINEAR_SHARE = 0.5
#: a net whose point-to-point alternating part exceeds this share of its peak-to-peak rings
RINGING = 1e-3


@dataclass
class PeriodicRun:
    """The last period of a sine-driven run (see the module docstring)."""

    network: SmallSignal
    grid: Array
    frequency: float
    amplitudes: Array
    reached: Array
    change: Array
    periods: int
    method: str
    steps: int
    rejected: int

    @property
    def times(self) -> Array:
        """``(N,)`` the grid times within the period, T/N .. T."""
        count = self.grid.shape[0]
        return np.arange(1, count + 1) / (count * self.frequency)

    @property
    def method_name(self) -> str:
        """The integration rule in words."""
        return METHODS[self.method]


def _alternating(grid: Array, nets: int) -> Array:
    """``(S,)`` the largest point-to-point alternating part of any net over its peak-to-peak."""
    voltages = grid[:, :, :nets]
    signs = (-1.0) ** np.arange(len(grid))
    alternating = np.abs(np.tensordot(signs, voltages, axes=(0, 0))) / len(grid)
    spread = np.ptp(voltages, axis=0)
    return np.max(alternating / np.maximum(spread, 1e-9), axis=-1, initial=0.0)


def steady_state(network: SmallSignal, amplitudes: Array, frequency: float,
                 points: int = POINTS, max_periods: int = MAX_PERIODS,
                 method: str = "trapezoidal", relative_tolerance: float = 1e-4,
                 decided: Decided | None = None) -> PeriodicRun:
    """March the circuit with a sine of each amplitude until the waveform repeats.

    :param relative_tolerance: the local error allowed per step, as a share of the supply span.
    :param decided: ``(last period, period before) -> (S,)`` true for samples whose answer is
        already known although they are still moving (a search that only asks "above or
        below a limit"); the run then stops when every other sample is steady.  ``reached``
        still tells which samples really were.
    """
    amplitudes = np.asarray(amplitudes, dtype=float)
    omega = 2.0 * math.pi * frequency
    tolerance = relative_tolerance * _supply_span(network)

    def drive(t: float) -> Array:
        return amplitudes * math.sin(omega * t)

    stepper = Stepper(network, len(amplitudes), drive, method=method, tolerance=tolerance,
                      offset=small_signal_offset(network, amplitudes, frequency))
    nets = len(network.solution.circuit.nets)
    period = 1.0 / frequency
    previous: Array | None = None
    change = np.full(len(amplitudes), np.inf)
    reached = np.zeros(len(amplitudes), dtype=bool)
    measured = 0
    count = 0
    for count in range(1, max_periods + 1):
        grid = run_grid(stepper, period / points, points)
        if stepper.method == "trapezoidal" and np.any(_alternating(grid, nets) > RINGING):
            stepper.restart("bdf2")  # trapezoidal rings here: damp with Gear's rule
            previous, measured = None, 0
            continue
        measured += 1
        if previous is not None:
            spread = np.max(np.ptp(grid[:, :, :nets], axis=0), axis=-1)
            moved = np.max(np.abs(grid[:, :, :nets] - previous[:, :, :nets]), axis=(0, 2))
            change = moved / np.maximum(spread, 1e-9)
            reached = change <= STEADY_CHANGE
            known = reached if decided is None else reached | decided(grid, previous)
            if count >= MIN_PERIODS and known.all():
                break
        previous = grid
    return PeriodicRun(network, grid, frequency, amplitudes, reached, change, count, stepper.method,
                       stepper.steps, stepper.rejected)


def small_signal_offset(network: SmallSignal, amplitudes: Array, frequency: float
                        ) -> Array | None:
    """How far the small-signal steady state is from the operating point at t = 0: A·Im(Ẑ) per
    amplitude A (the state there is z_op + A·Im(Ẑ)).

    The drive A·sin(ωt) = Im(A·e^(jωt)) gives x(t) = x_op + A·Im(Ẑ·e^(jωt)) in the linearised
    network, Ẑ its response to a unit phasor on the signal's branch.  Starting there instead of
    at the bare operating point leaves no start-up transient in a linear stage (a coupling
    capacitor's slow recharge would otherwise take many periods to die out) and a smaller one
    in a driven-hard stage; steady state is still measured, never assumed.  ``None`` without a
    signal source.
    """
    from docgen.solve import phasor

    signals = [d for d in network.solution.circuit.devices if d.kind == "signal"]
    if not signals:
        return None
    rhs = network.unit(network.branch_row(signals[0].name))[:1]
    try:
        response = phasor.solve(network.G[:1], network.C[:1], np.array([frequency]), rhs)
    except np.linalg.LinAlgError:
        return None
    shape = np.imag(response[0, 0])
    if not np.all(np.isfinite(shape)):
        return None
    amplitudes = np.asarray(amplitudes, dtype=float)
    # a sample driven past the rails is far from its linear response: it starts at the
    # operating point as before (a circuit of linear parts is linear at any amplitude)
    nodes = network.solution.problem.layout.node_count
    swing = amplitudes * np.max(np.abs(response[0, 0, :nodes]), initial=0.0)
    linear = (swing <= LINEAR_SHARE * _supply_span(network)) | all(
        d.kind in mna.LINEAR_KINDS for d in network.solution.circuit.devices)
    return np.where(linear, amplitudes, 0.0)[:, None] * shape[None, :]


def _supply_span(network: SmallSignal) -> float:
    """The span of the supply and ground voltages at the operating point (at least 1 V)."""
    rails = supply_rails(network)
    return max(rails[1] - rails[0], 1.0)


def supply_rails(network: SmallSignal) -> tuple[float, float]:
    """The lowest and highest voltage of ground and every supply's nets (V)."""
    solution = network.solution
    levels = [0.0]
    for device in solution.circuit.devices:
        if device.kind == "supply":
            levels += [float(solution.voltage(net)[0]) for net in device.nets]
    return min(levels), max(levels)
