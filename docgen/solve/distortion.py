"""Harmonic distortion of a periodic waveform: pure functions over uniformly sampled periods.

Public API::

    amplitudes = harmonic_amplitudes(samples, periods=1)   # peak V of order 0, 1, 2, ...
    thd(samples, periods=1) -> fraction
    harmonic_table(samples, periods=1, highest=9) -> [{order, amplitude_v, relative_db}]

The samples must cover a whole number of periods on a uniform grid that does not repeat the
first point (coherent sampling): every harmonic then falls exactly on an FFT bin, so there is
no window and no leakage.  The last axis is time; any leading axes (amplitudes, nets) are
batched.  THD = √(Σ harmonics²)/fundamental over every harmonic strictly below the Nyquist
frequency (DEVELOPERS.md).
"""

from __future__ import annotations

from typing import Any

import numpy as np

Array = np.ndarray


def harmonic_amplitudes(samples: Array, periods: int = 1) -> Array:
    """Peak amplitude of each harmonic order 0 (the mean), 1, 2, ... below Nyquist.

    :param samples: ``(..., N)`` values over ``periods`` whole periods, uniformly spaced.
    :returns: ``(..., K)`` with K the number of orders whose bin lies below N/2.
    """
    samples = np.asarray(samples, dtype=float)
    count = samples.shape[-1]
    spectrum = np.fft.rfft(samples, axis=-1)
    orders = np.arange(int(np.ceil(count / (2.0 * periods))))  # order·periods < count/2
    amplitudes = 2.0 * np.abs(spectrum[..., orders * periods]) / count
    amplitudes[..., 0] /= 2.0  # the mean is not doubled
    return amplitudes


def thd(samples: Array, periods: int = 1) -> Array:
    """Total harmonic distortion as a fraction (NaN where the fundamental is zero)."""
    amplitudes = harmonic_amplitudes(samples, periods)
    harmonics = np.sqrt(np.sum(amplitudes[..., 2:] ** 2, axis=-1))
    fundamental = amplitudes[..., 1]
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.where(fundamental > 0, harmonics / fundamental, np.nan)


def thd_plus_noise(distortion: float, fundamental_v: float, noise_rms_v: float) -> float:
    """THD+N as a fraction: √(Σ harmonics² + 2·noise_rms²)/fundamental, all as peak values.

    The harmonics and fundamental are peak amplitudes; a noise rms counts as a peak amplitude
    of √2 times it (equal power).
    """
    harmonics = distortion * fundamental_v
    return float(np.sqrt(harmonics ** 2 + 2.0 * noise_rms_v ** 2) / fundamental_v)


def harmonic_table(samples: Array, periods: int = 1, highest: int = 9) -> list[dict[str, Any]]:
    """Rows ``{order, amplitude_v, relative_db}`` for orders 1..highest of one waveform
    (``relative_db`` is relative to the fundamental; ``None`` for a zero harmonic)."""
    amplitudes = harmonic_amplitudes(np.asarray(samples, dtype=float), periods)
    fundamental = float(amplitudes[1]) if amplitudes.size > 1 else 0.0
    rows = []
    for order in range(1, min(highest, amplitudes.size - 1) + 1):
        amplitude = float(amplitudes[order])
        relative = (20.0 * np.log10(amplitude / fundamental)
                    if amplitude > 0 and fundamental > 0 else None)
        rows.append({"order": order, "amplitude_v": amplitude,
                     "relative_db": None if relative is None else float(relative)})
    return rows
