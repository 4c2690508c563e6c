"""Which input amplitudes the ``transient`` analysis drives besides the bench sine.

- the bench ``amplitudes`` line: amplitudes separated by commas, each peak unless followed by
  ``rms`` or ``pp`` (``50 mV, 100 mV rms, 1 V pp``);
- the amplitude of every ``THD at …`` requirement, so ``docgen check`` can judge it.

:func:`swing_wanted` says whether the output-swing search runs: always for a full solve, and
for ``docgen check`` only when a requirement reads ``output swing``.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np

from docgen import metrics
from docgen.diagnostics import AnalysisError, Span
from docgen.units import QuantityError, parse_value

_SCALE = {"rms": math.sqrt(2.0), "pp": 0.5}


def parse_amplitudes(text: str) -> list[float]:
    """Peak volts of each comma-separated amplitude (``ValueError`` with the item on error)."""
    out = []
    for item in text.split(","):
        words = item.split()
        scale = _SCALE.get(words[-1], 1.0) if words else 1.0
        if words and words[-1] in _SCALE:
            words = words[:-1]
        try:
            value = parse_value(" ".join(words), "V", "an amplitude").value
        except QuantityError as exc:
            raise ValueError(f"'{item.strip()}': {exc}") from exc
        if not value > 0:
            raise ValueError(f"'{item.strip()}': an amplitude must be greater than zero")
        out.append(value * scale)
    return out


def _metrics(ctx: Any) -> list[metrics.Metric]:
    found = []
    for requirement in ctx.design.requirements:
        try:
            found.append(metrics.parse(requirement.metric))
        except metrics.MetricError:
            continue  # the requirements check reports it
    return found


def requested_amplitudes(ctx: Any) -> np.ndarray:
    """The extra amplitudes (V peak), sorted, without repeats."""
    bench = ctx.circuit.bench
    wanted: list[float] = []
    text = bench.extra.get("amplitudes")
    if text:
        try:
            wanted += parse_amplitudes(text)
        except ValueError as exc:
            span = bench.spans.get("amplitudes", Span(1, 1))
            raise AnalysisError(ctx.circuit.diagnostic(
                span, f"the bench amplitudes do not read: {exc}",
                "write amplitudes separated by commas, e.g. 'amplitudes 50 mV, 100 mV rms'")
            ) from exc
    wanted += [m.args["amplitude"] for m in _metrics(ctx) if m.form == "thd_at"]
    return np.array(sorted(set(wanted)), dtype=float)


def swing_wanted(ctx: Any) -> bool:
    """True when the output-swing search should run (see the module docstring)."""
    if ctx.only is None:
        return True
    return any(m.form == "output_swing" for m in _metrics(ctx))
