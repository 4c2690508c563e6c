"""Newton–Raphson for the batched DC system, with gmin stepping and source stepping.

Public API::

    result = solve_dc(problem, options=SolveOptions())

One implementation serves one circuit (S = 1) and a batch of S samples: every iteration
assembles ``(S, M, M)`` matrices and solves them with one ``numpy.linalg.solve``.  Each sample
converges on its own; a converged sample is frozen while the others keep iterating.

Strategy (each stage only for the samples the previous one left unconverged):

1. plain Newton from 0 V with junction-voltage limiting;
2. gmin stepping: a conductance from every node to ground, from 10 mS down a decade at a time
   to none, each step starting from the previous solution;
3. source stepping: every independent source ramped from 0 to its value with an adaptive step
   (halved on failure, grown on success).

``SolveOptions`` turns stages off (a test can show plain Newton alone fails on a circuit the
stepping rescues) and sets tolerances.  ``DcResult.method`` tells per sample which stage
succeeded; ``DcResult.unsettled`` names, for each failed sample, the unknown that moved most in
the last iteration (the equation that would not settle).
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field

import numpy as np

from docgen.solve.mna import Problem, assemble, assemble_linear

Array = np.ndarray

METHODS = ("newton", "gmin stepping", "source stepping")


@dataclass(frozen=True)
class SolveOptions:
    """Tolerances and strategy of the DC solver.

    :param relative_tolerance: a step is converged when every unknown moved less than this
        fraction of its size plus the absolute tolerance.
    :param voltage_tolerance: absolute tolerance on node voltages (V).
    :param current_tolerance: absolute tolerance on branch currents (A).
    :param max_iterations: Newton iterations allowed per attempt (each stepping point is one).
    :param gmin_stepping: allow gmin stepping when plain Newton fails.
    :param source_stepping: allow source stepping when gmin stepping fails too.
    """

    relative_tolerance: float = 1e-9
    voltage_tolerance: float = 1e-9
    current_tolerance: float = 1e-12
    max_iterations: int = 100
    gmin_stepping: bool = True
    source_stepping: bool = True
    gmin_start: float = 1e-2
    source_min_step: float = 1e-4


@dataclass
class DcResult:
    """The DC solution of every sample.

    :param x: unknowns ``(S, M)`` (the last iterate where a sample did not converge).
    :param converged: ``(S,)`` booleans.
    :param method: ``(S,)`` index into :data:`METHODS` of the stage that converged (−1: none).
    :param iterations: ``(S,)`` Newton iterations spent in total.
    :param unsettled: ``(S,)`` index of the unknown that moved most in the last iteration of a
        failed sample (−1 where converged).
    :param singular: ``(S,)`` true where the matrix was singular in the last attempt.
    """

    x: Array
    converged: Array
    method: Array
    iterations: Array
    unsettled: Array
    singular: Array
    attempts: list[str] = field(default_factory=list)


@dataclass
class _Attempt:
    x: Array
    state: dict[str, Array]
    converged: Array
    iterations: Array
    unsettled: Array
    singular: Array


def _solve_batch(matrix: Array, rhs: Array) -> tuple[Array, Array]:
    """Solve every sample; singular samples get NaN and a flag instead of stopping the batch."""
    try:
        return np.linalg.solve(matrix, rhs[..., None])[..., 0], np.zeros(len(rhs), dtype=bool)
    except np.linalg.LinAlgError:
        sign, _ = np.linalg.slogdet(matrix)
        singular = sign == 0
        safe = np.where(singular[:, None, None], np.eye(matrix.shape[-1]), matrix)
        x = np.linalg.solve(safe, rhs[..., None])[..., 0]
        x[singular] = np.nan
        return x, singular


def voltage_span(problem: Problem) -> Array:
    """``(S,)`` the largest node-voltage change allowed in one Newton step.

    Twice the sum of the supply voltages (at least 1 V): a linearisation far from the solution
    (a device off, an op-amp stage at its limit) can ask for thousands of volts; a step that
    long is scaled back along its own direction.  A node that really must move further (a
    current source into a large resistor) still gets there in a few steps.
    """
    total = np.zeros(problem.samples)
    for device in problem.circuit.devices:
        if device.kind == "supply":
            total += np.abs(problem.values[device.name]["value"])
        elif device.kind == "signal":
            total += np.abs(problem.values[device.name]["offset"])
    return np.maximum(2.0 * total, 1.0)


def _damp(x: Array, x_new: Array, node_count: int, span: Array) -> tuple[Array, Array]:
    """Scale each sample's step so no node voltage moves more than ``span``."""
    longest = np.max(np.abs(x_new[:, :node_count] - x[:, :node_count]), axis=1, initial=0.0)
    factor = np.minimum(1.0, span / np.maximum(longest, 1e-300))
    return x + factor[:, None] * (x_new - x), factor < 1.0


def newton(
    problem: Problem,
    x0: Array,
    state0: dict[str, Array],
    options: SolveOptions,
    source_scale: Array | float = 1.0,
    node_gmin: Array | float = 0.0,
    augment: Callable[[Array, Array], tuple[Array, Array]] | None = None,
) -> _Attempt:
    """Newton–Raphson iterations from ``x0`` until each sample converges or the cap is hit.

    :param augment: adds terms to each assembled ``(matrix, rhs)`` before the solve (the
        transient's companion stamps of capacitors and inductors, and its stimulus).
    """
    samples = problem.samples
    x, state = x0.copy(), {k: v.copy() for k, v in state0.items()}
    done = np.zeros(samples, dtype=bool)
    iterations = np.zeros(samples, dtype=int)
    node_count = problem.layout.node_count
    span = problem.remember("span", lambda: voltage_span(problem))
    linear = assemble_linear(problem, source_scale, node_gmin)
    absolute = problem.remember(("absolute tolerance", options.voltage_tolerance,
                                 options.current_tolerance), lambda: np.where(
        np.arange(problem.layout.size) < node_count, options.voltage_tolerance,
        options.current_tolerance))
    step = allowed = np.ones((samples, problem.layout.size))
    bad = np.zeros(samples, dtype=bool)
    for _ in range(options.max_iterations):
        active = ~done
        matrix, rhs, new_state, limited = assemble(problem, x, state, source_scale, node_gmin,
                                                   linear=linear)
        if augment is not None:
            matrix, rhs = augment(matrix, rhs)
        x_new, bad = _solve_batch(matrix, rhs)
        broken = bad | ~np.all(np.isfinite(x_new), axis=1)
        x_new = np.where(broken[:, None], x, x_new)
        x_new, damped = _damp(x, x_new, node_count, span)
        limited = limited | damped
        step = np.abs(x_new - x)
        allowed = options.relative_tolerance * np.maximum(np.abs(x_new), np.abs(x)) + absolute
        settled = np.all(step <= allowed, axis=1) & ~limited & ~broken
        iterations += active
        x = np.where(active[:, None], x_new, x)
        for name, value in new_state.items():
            old = state.get(name, value)
            state[name] = np.where(active.reshape((-1,) + (1,) * (value.ndim - 1)), value, old)
        done |= settled & active
        if done.all():
            break
    # a sample still unconverged was active in the last iteration: its figures are that one's
    unsettled = np.where(done, -1, np.argmax(step / allowed, axis=1))
    return _Attempt(x, state, done, iterations, unsettled, bad & ~done)


def _merge(into: _Attempt, part: _Attempt, index: Array) -> None:
    into.x[index] = part.x
    for name, value in part.state.items():
        into.state.setdefault(name, np.zeros((len(into.x),) + value.shape[1:]))[index] = value
    into.converged[index] = part.converged
    into.iterations[index] += part.iterations
    into.unsettled[index] = part.unsettled
    into.singular[index] = part.singular


def _gmin_stepping(problem: Problem, options: SolveOptions) -> _Attempt:
    samples, size = problem.samples, problem.layout.size
    attempt = newton(problem, np.zeros((samples, size)), {}, options,
                     node_gmin=options.gmin_start)
    gmin = options.gmin_start
    alive = attempt.converged.copy()
    total = attempt.iterations.copy()
    while gmin > 1e-13 and alive.any():
        gmin = gmin / 10.0 if gmin > 1e-12 else 0.0
        index = np.flatnonzero(alive)
        sub = problem.subset(index)
        step = newton(sub, attempt.x[index], {k: v[index] for k, v in attempt.state.items()},
                      options, node_gmin=gmin)
        _merge(attempt, step, index)
        total[index] += step.iterations
        alive[index] = step.converged
        if gmin == 0.0:
            break
    attempt.iterations = total
    attempt.converged = alive & (gmin == 0.0)
    return attempt


def _source_stepping(problem: Problem, options: SolveOptions) -> _Attempt:
    samples, size = problem.samples, problem.layout.size
    x = np.zeros((samples, size))
    state: dict[str, Array] = {}
    scale = np.zeros(samples)
    step = np.full(samples, 0.1)
    iterations = np.zeros(samples, dtype=int)
    failed = np.zeros(samples, dtype=bool)
    last = _Attempt(x, state, np.zeros(samples, bool), iterations, np.full(samples, -1),
                    np.zeros(samples, bool))
    first = newton(problem, x, state, options, source_scale=0.0)
    x, state = first.x, first.state
    failed |= ~first.converged
    iterations += first.iterations
    while True:
        going = (scale < 1.0) & ~failed
        if not going.any():
            break
        index = np.flatnonzero(going)
        target = np.minimum(scale[index] + step[index], 1.0)
        sub = problem.subset(index)
        trial = newton(sub, x[index], {k: v[index] for k, v in state.items()}, options,
                       source_scale=target)
        iterations[index] += trial.iterations
        ok = trial.converged
        good, bad = index[ok], index[~ok]
        x[good] = trial.x[ok]
        for name, value in trial.state.items():
            state.setdefault(name, np.zeros((samples,) + value.shape[1:]))[good] = value[ok]
        scale[good] = target[ok]
        step[good] *= 1.5
        step[bad] /= 2.0
        failed[bad[step[bad] < options.source_min_step]] = True
        last.unsettled[bad] = trial.unsettled[~ok]
        last.singular[bad] = trial.singular[~ok]
    converged = (scale >= 1.0) & ~failed
    last.x, last.state, last.converged, last.iterations = x, state, converged, iterations
    last.unsettled = np.where(converged, -1, last.unsettled)
    return last


def solve_dc(problem: Problem, options: SolveOptions | None = None,
             start: Array | None = None) -> DcResult:
    """Solve the DC operating point of every sample of ``problem``.

    :param start: an initial guess ``(M,)`` or ``(S, M)`` for plain Newton (for example the
        nominal solution when solving tolerance samples); the stepping stages still start
        from 0 V.
    Never raises for non-convergence: the caller decides what a failed sample means (the
    operating point reports it as an error; the spread analysis counts it as a failing board).
    """
    options = options or SolveOptions()
    samples, size = problem.samples, problem.layout.size
    x0 = np.zeros((samples, size)) if start is None else \
        np.broadcast_to(np.asarray(start, dtype=float), (samples, size)).copy()
    result = newton(problem, x0, {}, options)
    method = np.where(result.converged, 0, -1)
    attempts = ["newton"]
    stages = [(options.gmin_stepping, _gmin_stepping, 1),
              (options.source_stepping, _source_stepping, 2)]
    for allowed, stage, code in stages:
        failing = np.flatnonzero(~result.converged)
        if not allowed or failing.size == 0:
            continue
        attempts.append(METHODS[code])
        rescue = stage(problem.subset(failing), options)
        rescued = rescue.converged
        keep = failing[rescued]
        result.x[keep] = rescue.x[rescued]
        result.converged[keep] = True
        method[keep] = code
        result.iterations[failing] += rescue.iterations
        lost = failing[~rescued]
        result.unsettled[lost] = np.where(rescue.unsettled[~rescued] >= 0,
                                          rescue.unsettled[~rescued], result.unsettled[lost])
        result.singular[lost] = rescue.singular[~rescued]
        result.unsettled[keep] = -1
        result.singular[keep] = False
    return DcResult(result.x, result.converged, method, result.iterations, result.unsettled,
                    result.singular, attempts)
