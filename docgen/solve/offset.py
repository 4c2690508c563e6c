"""Output offset budget: the output's DC error from op-amp offsets, bias currents and tolerances.

Public API::

    budget = offset_budget(circuit, output_net, options=None)   # the ``feedback.offset`` dict

Every contribution is one sample of one batched operating-point solve (the real nonlinear
equations, :func:`docgen.solve.operating_point.solve_op`):

- sample 0 is the *ideal* circuit: every op-amp's input offset voltage, bias current and offset
  current set to zero, every part at its nominal value;
- one sample per op-amp error source (``input_offset_voltage``, ``input_bias_current``,
  ``input_offset_current``) with that source alone at its model value: its contribution is the
  output's change from the ideal;
- one sample with all error sources at their values (the nominal output offset; it equals the
  sum when the circuit is linear);
- two samples per toleranced part, at the two ends of its tolerance (every error source at
  its value): the change from the all-sources sample, its worse end taken.

Worst case (linear worst-case analysis, common practice): the sum of each contribution's largest
magnitude, an op-amp source taken at the end of its model range farthest from zero (its nominal
value when the model gives no range; a bias current's sign fixed by the model, so its worst is
its largest magnitude as given).
"""

from __future__ import annotations

from typing import Any

import numpy as np

from docgen.elaborate import Circuit
from docgen.solve.operating_point import solve_op

ERROR_SOURCES = ("input_offset_voltage", "input_bias_current", "input_offset_current")

_UNIT = {"input_offset_voltage": "V", "input_bias_current": "A", "input_offset_current": "A"}


def _worst_value(circuit: Circuit, part: str, name: str) -> float:
    device = circuit.device(part)
    low, high = device.spreads.get(name, (device.values[name], device.values[name]))
    return max((low, high, device.values[name]), key=abs)


def offset_budget(circuit: Circuit, output_net: str, options: Any = None) -> dict[str, Any]:
    """The output offset budget of ``circuit`` at ``output_net`` (see the module docstring)."""
    opamps = [d.name for d in circuit.of_kind("opamp")]
    sources = [(part, name) for part in opamps for name in ERROR_SOURCES]
    toleranced = [d for d in circuit.devices if d.tolerance and not d.bench]
    # rows: ideal, each source nominal, each source worst, all nominal, each tolerance end (2×)
    count = 2 + 2 * len(sources) + 2 * len(toleranced)
    overrides: dict[tuple[str, str], np.ndarray] = {}
    base = 2 + 2 * len(sources)
    for k, (part, name) in enumerate(sources):
        nominal = circuit.device(part).values[name]
        values = np.zeros(count)
        values[1 + k] = nominal
        values[1 + len(sources) + k] = _worst_value(circuit, part, name)
        values[1 + 2 * len(sources):] = nominal  # the all-sources sample and the tolerances
        overrides[(part, name)] = values
    for k, device in enumerate(toleranced):
        values = np.full(count, device.values["value"])
        values[base + 2 * k] *= 1.0 - device.tolerance
        values[base + 2 * k + 1] *= 1.0 + device.tolerance
        overrides[(device.name, "value")] = values
    # the temperature array fixes the batch size when nothing is overridden
    solution = solve_op(circuit, overrides, np.full(count, circuit.temperature_c),
                        options=options)
    out = solution.voltage(output_net)
    converged = solution.converged
    change = out - out[0]
    actual = out[base - 1]
    rows = []
    for k, (part, name) in enumerate(sources):
        rows.append({"part": part, "source": name, "unit": _UNIT[name],
                     "value": float(circuit.device(part).values[name]),
                     "output_v": _number(change[1 + k], converged[1 + k]),
                     "worst_output_v": _number(abs(change[1 + len(sources) + k]),
                                               converged[1 + len(sources) + k])})
    for k, device in enumerate(toleranced):
        ends = out[base + 2 * k: base + 2 * k + 2] - actual
        ok = bool(converged[base + 2 * k: base + 2 * k + 2].all())
        rows.append({"part": device.name, "source": "tolerance", "unit": "",
                     "value": float(device.tolerance), "output_v": None,
                     "worst_output_v": _number(np.max(np.abs(ends)), ok)})
    worst = [r["worst_output_v"] for r in rows]
    total = change[base - 1]
    return {
        "output": output_net,
        "ideal_output_v": _number(out[0], converged[0]),
        "output_offset_v": _number(total, converged[base - 1]),
        "sum_of_sources_v": float(sum(r["output_v"] or 0.0 for r in rows[: len(sources)])),
        "worst_case_v": None if any(w is None for w in worst) else float(sum(worst)),
        "contributions": rows,
        "unsolved": int(np.count_nonzero(~converged)),
    }


def _number(value: Any, ok: Any = True) -> float | None:
    value = float(value)
    return value if bool(ok) and np.isfinite(value) else None
