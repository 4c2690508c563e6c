"""Time stepping of the full nonlinear circuit: ``f(x, t) + C·dx/dt = 0``, batched over samples.

Public API::

    stepper = Stepper(network, samples=S, stimulus=lambda t: (S,) volts, method="trapezoidal")
    stepper.advance(t_end)              # march to t_end (lands exactly on it)
    stepper.x, stepper.t                # unknowns (S, M) at the current time
    record = run_grid(stepper, step, count)   # x at count grid points spaced step apart

There is one model of every device.  ``f`` is the operating point's own equations
(:func:`docgen.solve.mna.assemble`, Newton–Raphson with the same junction limiting through
:func:`docgen.solve.newton.newton`); ``C`` is the reactive matrix of the small-signal network
(:mod:`docgen.solve.linearise`: capacitors, inductors as −L on their branch row, diode junction
capacitance, bipolar Cπ and Cμ and FET Cgs, Cgd taken at the operating point, so they stay
constant through the cycle).  An op-amp's dominant pole acts on its output stage:
``τ·dw/dt + w = E(v)`` with the output branch ``v_out + Ro·i = w``, where E is the DC model's
(limited) output-stage voltage; w is eliminated per step, so no unknown is added.

The stimulus is a voltage added in series with the bench ``signal`` source (on top of its
``offset``).  Integration rules (each a published linear multistep method):

- ``trapezoidal``: dx/dt(n+1) = 2/h·(x(n+1) − x(n)) − dx/dt(n); second order, A-stable, but
  its stiff modes do not decay (they alternate sign), so it can ring after a sharp corner;
- ``bdf2``: Gear's second-order backward differentiation formula with variable step
  (L-stable: stiff modes are damped);
- the first step after a start uses backward Euler.

Local error control: an Adams–Bashforth predictor against the corrector (Milne's device)
estimates the local truncation error of the node voltages; a step whose error exceeds
``tolerance`` (V) or whose Newton iterations fail is halved, down to ``2**-12`` of the grid step.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, replace

import numpy as np

from docgen.solve import mna
from docgen.solve.devices import OUTPUT_KNEE
from docgen.solve.linearise import SmallSignal
from docgen.solve.newton import SolveOptions, newton

Array = np.ndarray
Stimulus = Callable[[float], Array]

METHODS = {"trapezoidal": "trapezoidal rule", "bdf2": "BDF2 (Gear's second-order method)"}
#: Milne's device: local error ≈ this factor × (corrector − predictor), the predictor being
#: the quadratic through the last three solutions (its error is h³ times the third derivative
#: against the rule's own 1/12 of that for trapezoidal, 2/9 for BDF2).
ERROR_FACTOR = {"euler": 0.5, "trapezoidal": 1.0 / 13.0, "bdf2": 2.0 / 11.0}
#: Newton per step: looser than the operating point's tolerances (a time step is re-solved
#: next step anyway), tight enough that the waveform error is set by the step, not Newton.
STEP_OPTIONS = SolveOptions(relative_tolerance=1e-6, voltage_tolerance=1e-6,
                            current_tolerance=1e-9, max_iterations=25)
SMALLEST_FRACTION = 2.0 ** -12
#: Newton's absolute tolerances per step are at least this share of the local error allowed
NEWTON_SHARE = 1e-3


class StepFailure(RuntimeError):
    """The step could not be completed even at the smallest step size."""


@dataclass
class _History:
    """Everything the multistep rules need about the past, for z = [x, w]."""

    z: Array
    dz: Array
    z_prev: Array | None = None
    dz_prev: Array | None = None
    h_prev: float | None = None
    z_older: Array | None = None
    h_older: float | None = None


def _extrapolate(history: _History, h: float) -> Array:
    """The quadratic through the last three solutions, at the next time (lower order while
    fewer are known).  Values, not derivatives: a stiff node's derivative under the
    trapezoidal rule alternates from step to step, its value does not."""
    if history.z_prev is None or history.h_prev is None:
        return history.z
    if history.z_older is None or history.h_older is None:
        return history.z + h / history.h_prev * (history.z - history.z_prev)
    # Lagrange weights at t(n+1) for the nodes t(n), t(n−1), t(n−2) (times relative to t(n))
    t1, t2 = -history.h_prev, -history.h_prev - history.h_older
    w0 = (h - t1) * (h - t2) / (t1 * t2)
    w1 = h * (h - t2) / (t1 * (t1 - t2))
    w2 = h * (h - t1) / (t2 * (t2 - t1))
    return w0 * history.z + w1 * history.z_prev + w2 * history.z_older


def derivative_rule(method: str, h: float, history: _History) -> tuple[float, Array]:
    """``(a, r)`` with dz/dt(n+1) ≈ a·z(n+1) + r for the given rule."""
    z = history.z
    if method == "euler" or history.h_prev is None and method == "bdf2":
        return 1.0 / h, -z / h
    if method == "trapezoidal":
        return 2.0 / h, -2.0 / h * z - history.dz
    ratio = h / history.h_prev
    a = (1.0 + 2.0 * ratio) / ((1.0 + ratio) * h)
    r = (-(1.0 + ratio) * z + ratio ** 2 / (1.0 + ratio) * history.z_prev) / h
    return a, r


class Stepper:
    """March one circuit (S samples at once) through time from its operating point.

    :param network: the small-signal network at the operating point (its first sample is the
        start for every sample: capacitors charged at their bias voltages).
    :param samples: S, e.g. one per input amplitude.
    :param stimulus: ``t -> (S,)`` volts in series with the signal source (``None``: no drive).
    :param overrides: ``(part, value name) -> (S,)`` values per sample (rarely needed).
    :param method: ``trapezoidal`` or ``bdf2``.
    :param tolerance: the local error allowed per step on a node voltage (V).
    :param offset: added to the operating point's state ``z = [x, w]`` at t = 0,
        ``(S, M + poles)``, where a better start is known (default: none).
    """

    def __init__(self, network: SmallSignal, samples: int, stimulus: Stimulus | None,
                 method: str = "trapezoidal", tolerance: float = 1e-4,
                 offset: Array | None = None):
        if method not in METHODS:
            raise ValueError(f"unknown integration rule '{method}'")
        solution = network.solution
        problem = solution.problem.subset(np.zeros(samples, dtype=int))
        self.problem, self._base = _split_linear(problem)
        layout = problem.layout
        self.size = layout.size
        self.node_count = layout.node_count
        self.capacitance = np.broadcast_to(network.C[:1, : self.size, : self.size],
                                           (samples, self.size, self.size))
        self._poles = _poles(network, samples)
        # the error is judged on the voltages of nodes with a capacitance (the states): an
        # algebraic node follows its drive exactly, and its derivative is never used
        reactive = np.any(network.C[0, : self.node_count, : self.size] != 0, axis=1)
        self._states = np.flatnonzero(reactive)
        self.stimulus = stimulus
        signals = [d for d in solution.circuit.devices if d.kind == "signal"]
        self._signal_row = layout.branch[signals[0].name] if signals else None
        self.method = method
        self.tolerance = tolerance
        # Newton need not resolve a step much finer than the step's own error allowance: a
        # thousandth of it (never looser than STEP_OPTIONS), which spares a coarse search run
        # a third iteration on most steps
        loosen = max(1.0, NEWTON_SHARE * tolerance / STEP_OPTIONS.voltage_tolerance)
        self._options = replace(STEP_OPTIONS,
                                voltage_tolerance=loosen * STEP_OPTIONS.voltage_tolerance,
                                current_tolerance=loosen * STEP_OPTIONS.current_tolerance)
        self.t = 0.0
        x0 = np.repeat(solution.x[:1], samples, axis=0)
        self.state: dict[str, Array] = {}
        z0 = self._with_poles(x0)
        if offset is not None:
            z0 = z0 + offset
        self.history = _History(z0, np.zeros((samples, self._width)))
        self.steps = 0
        self.rejected = 0
        self.newton_iterations = 0
        self._h_try: float | None = None

    @property
    def _width(self) -> int:
        return self.size + len(self._poles)

    @property
    def x(self) -> Array:
        """The unknowns ``(S, M)`` at the current time."""
        return self.history.z[:, : self.size]

    def restart(self, method: str | None = None) -> None:
        """Forget the derivative history (the next step is backward Euler), e.g. on a switch
        of rule."""
        self.method = method or self.method
        self.history = _History(self.history.z, np.zeros_like(self.history.z))
        self._h_try = None

    def _with_poles(self, x: Array, settings: list[tuple[Array, Array]] | None = None) -> Array:
        """``z = [x, w]``: the unknowns and each op-amp's pole state."""
        if not self._poles:
            return x.copy()
        x_full = mna.pad(x)
        settings = settings or [(p.gain, p.offset) for p in self._poles]
        w = [p.w(x_full, *setting) for p, setting in zip(self._poles, settings, strict=True)]
        return np.concatenate([x, np.stack(w, -1)], -1)

    def advance(self, t_end: float, largest: float | None = None) -> None:
        """Step from ``self.t`` to exactly ``t_end``, halving steps where the error demands."""
        span = t_end - self.t
        largest = span if largest is None else largest
        while t_end - self.t > 1e-12 * span:
            if self._h_try is None:  # a start: a short backward-Euler step keeps its error small
                self._h_try = largest / 16.0
            h = min(self._h_try, largest, t_end - self.t)
            if t_end - self.t - h < 1e-9 * span:
                h = t_end - self.t
            ratio = self._try(h)
            if ratio <= 1.0:
                grow = 2.0 if ratio < 1e-3 else min(2.0, 0.9 * ratio ** (-1.0 / 3.0))
                self._h_try = max(h * grow, h) if ratio < 0.5 else h
                continue
            self.rejected += 1
            self._h_try = h / 2.0
            if h / 2.0 < SMALLEST_FRACTION * largest:
                raise StepFailure(f"the time step fell below {SMALLEST_FRACTION * largest:.3g} s "
                                  f"at t = {self.t:.6g} s")

    def _try(self, h: float) -> float:
        """Attempt one step of length h; accept it and return error/tolerance (≤ 1), or leave
        the state unchanged and return a ratio above 1."""
        history = self.history
        method = "euler" if history.h_prev is None else self.method
        a, r = derivative_rule(method, h, history)
        predicted = _extrapolate(history, h)
        t_new = self.t + h
        drive = None if self.stimulus is None else np.asarray(self.stimulus(t_new), float)
        augment = self._augment(a, r, drive)
        settings = [p.effective(a, r[:, self.size + k]) for k, p in enumerate(self._poles)]
        for pole, (gain, offset) in zip(self._poles, settings, strict=True):
            values = self.problem.values[pole.name]
            values["open_loop_gain"], values["input_offset_voltage"] = gain, offset
        # Newton starts from the predictor: extrapolating with the derivative instead can land
        # volts away on a node without capacitance, and Newton's step cap then crawls
        start = predicted[:, : self.size]
        attempt = newton(self.problem, start, self.state, self._options, augment=augment)
        self.newton_iterations += int(attempt.iterations.max())
        if not attempt.converged.all():
            return np.inf
        z_new = self._with_poles(attempt.x, settings)
        nodes = self._states
        error = 0.0  # no predictor yet: the first step is judged by Newton alone
        if history.z_older is not None and nodes.size:
            error = ERROR_FACTOR[method] * np.max(np.abs(z_new[:, nodes] - predicted[:, nodes]))
        ratio = error / self.tolerance
        if ratio > 1.0:
            return ratio
        dz_new = a * z_new + r
        self.history = _History(z_new, dz_new, history.z, history.dz, h, history.z_prev,
                                history.h_prev)
        self.state = attempt.state
        self.t = t_new
        self.steps += 1
        return ratio

    def _augment(self, a: float, r: Array, drive: Array | None
                 ) -> Callable[[Array, Array], tuple[Array, Array]]:
        size = self.size
        history_current = np.einsum("sij,sj->si", self.capacitance, r[:, :size])

        base_matrix = self._base[0] + a * self.capacitance
        base_rhs = self._base[1] - history_current

        def augment(matrix: Array, rhs: Array) -> tuple[Array, Array]:
            matrix = matrix + base_matrix
            rhs = rhs + base_rhs
            if drive is not None and self._signal_row is not None:
                rhs[:, self._signal_row] += drive
            return matrix, rhs

        return augment


#: parts whose equations are linear and fixed: stamped once per run, not per Newton iteration.
LINEAR_KINDS = ("resistor", "capacitor", "inductor", "current")


def _split_linear(problem: mna.Problem) -> tuple[mna.Problem, tuple[Array, Array]]:
    """The problem of the parts stamped per iteration (nonlinear parts and the sources that
    set Newton's step cap) and the constant ``(matrix, rhs)`` of all the others."""
    circuit = problem.circuit
    linear = replace(circuit, devices=tuple(d for d in circuit.devices
                                            if d.kind in LINEAR_KINDS))
    rest = replace(circuit, devices=tuple(d for d in circuit.devices
                                          if d.kind not in LINEAR_KINDS))
    zeros = np.zeros((problem.samples, problem.layout.size))
    matrix, rhs, _, _ = mna.assemble(replace(problem, circuit=linear), zeros, {})
    return replace(problem, circuit=rest), (matrix, rhs)


@dataclass(frozen=True)
class _Pole:
    """An op-amp's dominant pole: τ·dw/dt + w = A0·(vd + Vos), the output stage E = L(w)."""

    name: str
    inputs: tuple[int, int]
    gain: Array
    offset: Array
    tau: Array
    low: Array
    high: Array

    def effective(self, a: float, r: Array) -> tuple[Array, Array]:
        """(gain, offset) that make the DC model's output stage see w = (A0·vd − τ·r)/(1 + τa)."""
        return self.gain / (1.0 + self.tau * a), self.offset - self.tau * r / self.gain

    def w(self, x_full: Array, gain: Array, offset: Array) -> Array:
        """w at the solution, held within a little of the output's range (a real gain stage
        saturates there, so it does not wind up far beyond the rails while clipping)."""
        vd = x_full[:, self.inputs[0]] - x_full[:, self.inputs[1]]
        margin = 10.0 * OUTPUT_KNEE
        return np.clip(gain * (vd + offset), self.low - margin, self.high + margin)


def _poles(network: SmallSignal, samples: int) -> list[_Pole]:
    """Each op-amp's pole, τ from the network's pole row, its output range at the operating
    point."""
    solution = network.solution
    poles = []
    x_full = mna.pad(solution.x[:1])
    for name, row in network.poles.items():
        local = solution.problem.layout.local[name]
        values = solution.problem.values[name]

        def first(array: Array) -> Array:
            return np.repeat(np.asarray(array, dtype=float)[:1], samples)

        headroom = first(values["output_headroom"])
        poles.append(_Pole(name, (local[0], local[1]), first(values["open_loop_gain"]),
                           first(values["input_offset_voltage"]), first(network.C[:, row, row]),
                           first(x_full[:, local[4]]) + headroom,
                           first(x_full[:, local[3]]) - headroom))
    return poles


def run_grid(stepper: Stepper, step: float, count: int) -> Array:
    """March ``count`` grid steps of length ``step``; return x at each grid point
    ``(count, S, M)`` (sub-steps in between are taken as the error control needs)."""
    out = np.empty((count, *stepper.x.shape))
    t0 = stepper.t
    for k in range(count):
        stepper.advance(t0 + (k + 1) * step, largest=step)
        out[k] = stepper.x
    return out


def step_response(network: SmallSignal, amplitude: float, duration: float, points: int = 400,
                  method: str = "bdf2") -> tuple[Array, Array]:
    """The unknowns after an input step of ``amplitude`` volts at t = 0+ (for settling).

    :returns: times ``(points,)`` and unknowns ``(points, M)`` on a uniform grid.
    """
    stepper = Stepper(network, 1, lambda t: np.array([amplitude]), method=method)
    grid = run_grid(stepper, duration / points, points)
    return np.arange(1, points + 1) * duration / points, grid[:, 0, :]
