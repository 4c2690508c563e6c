"""Slew-rate limiting of op-amp output stages in the time march.

Public API::

    stepper = SlewingStepper(network, samples, stimulus, method="bdf2", tolerance=1e-4)

:class:`docgen.solve.integrate.Stepper` models an op-amp's dominant pole as
``τ·dw/dt + w = A0·vd`` on its output stage w.  A real op-amp's input stage can only deliver a
limited current into the capacitor that sets that pole, so dw/dt never exceeds the model's
``slew_rate`` (Sedra & Smith, *Microelectronic Circuits*, "slew rate", from memory).  Each step
is first solved with the linear pole; where the resulting |dw/dt| exceeds the slew rate the
step is solved again with that op-amp's w moving at exactly ±SR (its output stage a voltage
source for the step: w(n+1) from the integration rule with dw/dt = ±SR).  The step's own Newton
solution decides each time whether the op-amp slews, so the stage leaves slewing by itself.
"""

from __future__ import annotations

from dataclasses import dataclass, field, fields
from typing import Any

import numpy as np

from docgen.solve.integrate import Stepper, Stimulus, _Pole
from docgen.solve.linearise import SmallSignal

Array = np.ndarray

#: the output stage's gain while slewing: tiny, so E is the slewing voltage to within
#: 1e-9 × the change of the differential input over one step.
SLEWING_GAIN = 1e-9
#: slopes within this fraction above the slew rate count as not limited (rounding).
SLEW_SLACK = 1e-9


@dataclass(frozen=True)
class _SlewingPole(_Pole):
    """A dominant pole whose w moves at ±SR where ``mode["sign"]`` is non-zero."""

    slew: Array = field(default_factory=lambda: np.array([np.inf]))
    mode: dict[str, Any] = field(default_factory=dict)

    def effective(self, a: float, r: Array) -> tuple[Array, Array]:
        """The linear pole's (gain, offset), or the slewing voltage where the mode says so."""
        gain, offset = super().effective(a, r)
        sign = self.mode.get("sign")
        if sign is None:
            return gain, offset
        target = (sign * self.slew - r) / a  # w(n+1) with dw/dt = ±SR under the rule
        held = target / SLEWING_GAIN - self.mode["vd"]
        slewing = sign != 0
        return np.where(slewing, SLEWING_GAIN, gain), np.where(slewing, held, offset)


class SlewingStepper(Stepper):
    """A :class:`Stepper` whose op-amp output stages obey each model's ``slew_rate``."""

    def __init__(self, network: SmallSignal, samples: int, stimulus: Stimulus | None,
                 method: str = "trapezoidal", tolerance: float = 1e-4):
        super().__init__(network, samples, stimulus, method, tolerance)
        values = network.solution.problem.values
        self._poles = [
            _SlewingPole(*(getattr(pole, f.name) for f in fields(_Pole)),
                         slew=np.repeat(float(values[pole.name]["slew_rate"][0]), samples),
                         mode={})
            for pole in self._poles]
        self._signs = [np.zeros(samples) for _ in self._poles]

    def _differential(self, pole: _Pole) -> Array:
        x_full = np.concatenate([self.x, np.zeros((self.x.shape[0], 1))], axis=1)
        return x_full[:, pole.inputs[0]] - x_full[:, pole.inputs[1]]

    def _set_modes(self, signs: list[Array]) -> None:
        for pole, sign in zip(self._poles, signs, strict=True):
            pole.mode.clear()
            if np.any(sign != 0):
                pole.mode.update(sign=sign, vd=self._differential(pole))

    def _wanted_signs(self, signs: list[Array]) -> list[Array]:
        """Each pole's slewing sign after the step just taken: a linear pole faster than its
        slew rate starts slewing; a slewing pole whose linear drive has fallen below the slew
        rate (or reversed) stops."""
        slopes = self.history.dz[:, self.size:]
        z = self.history.z[:, self.size:]
        wanted = []
        for k, (pole, sign) in enumerate(zip(self._poles, signs, strict=True)):
            vd = self._differential(pole)
            drive = (pole.gain * (vd + pole.offset) - z[:, k]) / pole.tau
            start = np.abs(slopes[:, k]) > pole.slew * (1.0 + SLEW_SLACK)
            keep = sign * drive >= pole.slew
            wanted.append(np.where(sign != 0, np.where(keep, sign, 0.0),
                                   np.where(start, np.sign(slopes[:, k]), 0.0)))
        return wanted

    def _try(self, h: float) -> float:
        saved = (self.history, self.state, self.t, self.steps)
        signs = self._signs
        self._set_modes(signs)
        ratio = super()._try(h)
        if ratio > 1.0:
            return ratio
        wanted = self._wanted_signs(signs)
        if all(np.array_equal(a, b) for a, b in zip(wanted, signs, strict=True)):
            return ratio
        self.history, self.state, self.t, self.steps = saved  # solve the step again
        self._set_modes(wanted)
        ratio = super()._try(h)
        if ratio <= 1.0:
            self._signs = wanted
        return ratio
