"""Midband and corners of many boards at once, from a coarse sweep of each board's gain.

Public API::

    found = midband_and_corners(freq, gain_db, evaluate_db, unity=True)  # {form: (S,)}

``gain_db`` is ``(S, F)`` on the shared coarse grid ``freq``; ``evaluate_db(log_f)`` returns
each board's gain (dB) at its own frequency ``10**log_f[s]`` (one batched solve per call).
The definitions are those of :mod:`docgen.solve.curves` for one board: midband is the largest
gain (narrowed between the sweep neighbours of the largest sweep point by golden-section search
when it is interior), a corner is where the gain crosses 3.01 dB below midband nearest the peak
on its side (NaN where the sweep has no crossing), narrowed by regula falsi (Illinois) in
(log f, dB).  Every step works on all boards together: no loop over boards.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np

from docgen.solve import curves

Array = np.ndarray

#: Golden-section steps narrowing the peak's bracket (0.4 decade × 0.618^16 ≈ 2e-4 decade; the
#: peak's value is flat to second order there).
PEAK_ROUNDS = 16
#: Regula falsi rounds narrowing each corner's bracket (superlinear: 8 agree with the ``ac``
#: section's corner to about 1e-12 on the demo stages).
CORNER_ROUNDS = 8


def midband_and_corners(freq: Array, gain_db: Array, evaluate_db: Any, unity: bool = False
                        ) -> dict[str, Array]:
    """``midband_gain`` (dB), ``low_corner``, ``high_corner`` and, with ``unity``,
    ``unity_gain`` (Hz: the first 0 dB crossing above midband, NaN where midband is not above
    0 dB), each ``(S,)`` (see the module docstring)."""
    peak_index = np.argmax(np.where(np.isnan(gain_db), -np.inf, gain_db), axis=1)
    peak_f, peak_g = _refine_peaks(freq, gain_db, peak_index, evaluate_db)
    level = peak_g - curves.CORNER_DROP_DB
    found = {
        "midband_gain": peak_g,
        "low_corner": _corners(freq, gain_db, peak_index, peak_f, peak_g, level, -1,
                               evaluate_db),
        "high_corner": _corners(freq, gain_db, peak_index, peak_f, peak_g, level, 1,
                                evaluate_db),
    }
    if unity:
        crossing = _corners(freq, gain_db, peak_index, peak_f, peak_g, np.zeros_like(peak_g), 1,
                            evaluate_db)
        found["unity_gain"] = np.where(peak_g > curves.UNITY_MARGIN_DB, crossing, np.nan)
    return found


def _refine_peaks(freq: Array, gain: Array, index: Array, evaluate_db: Any
                  ) -> tuple[Array, Array]:
    """Each board's largest gain: golden-section search between its sweep neighbours where
    the largest sweep point is interior (never below the sweep's own value)."""
    rows = np.arange(len(index))
    best_f, best_g = freq[index].astype(float), gain[rows, index]
    interior = (index > 0) & (index < len(freq) - 1)
    if not interior.any():
        return best_f, best_g
    log_f = np.log10(freq)
    a = log_f[np.clip(index - 1, 0, None)]
    b = log_f[np.clip(index + 1, None, len(freq) - 1)]
    ratio = (math.sqrt(5.0) - 1.0) / 2.0
    c, d = b - ratio * (b - a), a + ratio * (b - a)
    gain_c, gain_d = evaluate_db(c), evaluate_db(d)
    for _ in range(PEAK_ROUNDS):
        left = gain_c > gain_d  # the peak lies in [a, d]
        a, b = np.where(left, a, c), np.where(left, d, b)
        c_new = np.where(left, b - ratio * (b - a), d)
        d_new = np.where(left, c, a + ratio * (b - a))
        probe = np.where(left, c_new, d_new)
        gain_probe = evaluate_db(probe)
        gain_c, gain_d = (np.where(left, gain_probe, gain_d), np.where(left, gain_c, gain_probe))
        c, d = c_new, d_new
    top = np.maximum(gain_c, gain_d)
    top_f = np.where(gain_c >= gain_d, c, d)
    better = interior & (top > best_g)
    return np.where(better, 10.0 ** top_f, best_f), np.where(better, top, best_g)


def _corners(freq: Array, gain: Array, peak_index: Array, peak_f: Array, peak_g: Array,
             level: Array, step: int, evaluate_db: Any) -> Array:
    """The −3.01 dB crossing nearest the peak on one side (NaN where the sweep has none).

    The sweep brackets the crossing; regula falsi with the Illinois modification (in log f
    against dB) narrows each board's bracket, one frequency per board per round.
    """
    count = len(freq)
    positions = np.arange(count)
    side = positions < peak_index[:, None] if step < 0 else positions > peak_index[:, None]
    below = side & (gain < level[:, None])
    has = below.any(axis=1)
    if step < 0:
        outer = np.where(has, count - 1 - np.argmax(below[:, ::-1], axis=1), 0)
    else:
        outer = np.where(has, np.argmax(below, axis=1), 0)
    inner = np.clip(outer - step, 0, count - 1)
    rows = np.arange(len(peak_index))
    log_in = np.log10(np.where(inner == peak_index, peak_f, freq[inner]))
    res_in = np.where(inner == peak_index, peak_g, gain[rows, inner]) - level  # ≥ 0
    log_out, res_out = np.log10(freq[outer]), gain[rows, outer] - level  # < 0
    previous = np.zeros(len(rows), dtype=bool)  # the inner end moved last round
    started = False
    for _ in range(CORNER_ROUNDS):
        with np.errstate(divide="ignore", invalid="ignore"):
            guess = log_out + res_out / (res_out - res_in) * (log_in - log_out)
        guess = np.where(np.isfinite(guess), guess, 0.5 * (log_in + log_out))
        # inside the bracket (and on it where the sweep has no crossing: nothing to find)
        guess = np.where(has, np.clip(guess, np.minimum(log_in, log_out),
                                      np.maximum(log_in, log_out)), log_in)
        res = evaluate_db(guess) - level
        above = res >= 0
        # Illinois: when the same end moves twice running, halve the other end's residual.
        again = (above == previous) & started
        res_out = np.where(above, np.where(again, 0.5 * res_out, res_out), res)
        res_in = np.where(above, res, np.where(again, 0.5 * res_in, res_in))
        log_out, log_in = np.where(above, log_out, guess), np.where(above, guess, log_in)
        previous, started = above, True
    with np.errstate(divide="ignore", invalid="ignore"):
        final = log_out + res_out / (res_out - res_in) * (log_in - log_out)
    final = np.where(np.isfinite(final), final, 0.5 * (log_in + log_out))
    return np.where(has, 10.0 ** final, np.nan)
