"""Step response: overshoot, rise time and settling time from the large-signal time march.

Public API::

    times, output = run_step(network, amplitude, duration, output_net)  # the transient core
    figures = step_figures(times, output, band=0.01)                    # measurements

The step is applied in series with the bench signal at t = 0+ and the circuit is integrated
from its operating point by :class:`docgen.solve.slewing.SlewingStepper` (the operating
point's own nonlinear equations, BDF2, op-amp outputs limited to their slew rate), its error
held to a small fraction of the output step.
Definitions (Ogata, *Modern Control Engineering*, from memory):

- the final value is the mean of the last 5 % of the window;
- overshoot: (peak − final)/final, in percent, 0 when the response never passes its final value;
- rise time: from 10 % to 90 % of the final value (first crossings, interpolated);
- settling time: from the step until the response last leaves final·(1 ± band), interpolated;
  ``None`` when it is still outside the band in the last 5 % of the window.
"""

from __future__ import annotations

from typing import Any

import numpy as np

from docgen.solve.integrate import StepFailure, run_grid
from docgen.solve.linearise import SmallSignal
from docgen.solve.slewing import SlewingStepper

Array = np.ndarray

#: the share of the window whose mean is the final value.
TAIL = 0.05
#: a relative excess over the final value smaller than this is rounding, not overshoot.
PRECISION = 1e-9
#: local error allowed per time step, as a fraction of the output step ...
RELATIVE_ERROR = 1e-5
#: ... relaxed tenfold at most this many times when the march cannot meet it.
RELAXATIONS = 3


def run_step(network: SmallSignal, amplitude: float, duration: float, output_net: str,
             points: int = 600, scale: float | None = None) -> tuple[Array, Array]:
    """Times (with t = 0 first) and the output's change from its operating point, in volts.

    :param scale: the expected size of the output step (V); the local error allowed per time
        step starts at :data:`RELATIVE_ERROR` of it (default: of the input step) and is relaxed
        tenfold, up to :data:`RELAXATIONS` times, where the per-step Newton solves of a
        nonlinear stage cannot honour it.
    :raises StepFailure: the march fails even at the loosest tolerance.
    """
    tolerance = RELATIVE_ERROR * abs(scale if scale else amplitude)
    for attempt in range(RELAXATIONS + 1):
        stepper = SlewingStepper(network, 1, lambda t: np.array([amplitude]), method="bdf2",
                                 tolerance=tolerance * 10.0**attempt)
        try:
            x = run_grid(stepper, duration / points, points)[:, 0, :]
            break
        except StepFailure:
            if attempt == RELAXATIONS:
                raise
    times = np.arange(1, points + 1) * duration / points
    row = network.row(output_net)
    start = 0.0 if row is None else float(network.solution.x[0, row])
    wave = np.zeros(len(times)) if row is None else x[:, row] - start
    return np.concatenate([[0.0], times]), np.concatenate([[0.0], wave])


def steepest_slope(times: Array, output: Array) -> float:
    """The largest |dv/dt| between neighbouring points of a waveform (V/s)."""
    return float(np.max(np.abs(np.diff(output) / np.diff(times))))


def _first_crossing(times: Array, y: Array, level: float) -> float | None:
    above = np.flatnonzero(y >= level)
    if not above.size or above[0] == 0:
        return None
    k = int(above[0])
    share = (level - y[k - 1]) / (y[k] - y[k - 1])
    return float(times[k - 1] + share * (times[k] - times[k - 1]))


def step_figures(times: Array, output: Array, band: float = 0.01) -> dict[str, Any]:
    """Overshoot, rise time and settling time of a step response (see the module docstring)."""
    tail = max(2, int(round(TAIL * len(times))))
    final = float(np.mean(output[-tail:]))
    figures: dict[str, Any] = {"final_v": final, "band": band, "overshoot_percent": None,
                               "rise_time_s": None, "settling_time_s": None, "reason": None}
    if final == 0.0 or not np.isfinite(final):
        figures["reason"] = "the output does not move in response to the step"
        return figures
    y = output / final
    excess = float(np.max(y)) - 1.0
    # below the solver's own precision a monotonic response reads exactly no overshoot
    figures["overshoot_percent"] = 100.0 * excess if excess > PRECISION else 0.0
    t10, t90 = _first_crossing(times, y, 0.1), _first_crossing(times, y, 0.9)
    if t10 is not None and t90 is not None:
        figures["rise_time_s"] = t90 - t10
    outside = np.flatnonzero(np.abs(y - 1.0) > band)
    if outside.size and outside[-1] >= len(y) - tail:
        figures["reason"] = "the output has not settled within the band by the end of the window"
    elif outside.size:
        k = int(outside[-1])
        edge = 1.0 + band * np.sign(y[k] - 1.0)
        share = (edge - y[k]) / (y[k + 1] - y[k]) if y[k + 1] != y[k] else 0.0
        figures["settling_time_s"] = float(times[k] + share * (times[k + 1] - times[k]))
    else:
        figures["settling_time_s"] = 0.0
    return figures
