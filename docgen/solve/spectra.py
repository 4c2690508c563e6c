"""Noise spectra: the published source densities, integration over a band, SNR, noise figure.

Pure numpy functions in SI units; densities are one-sided power spectral densities (V²/Hz or
A²/Hz) unless a name says ``_rthz`` (V/√Hz).

- thermal (Johnson–Nyquist) noise of a resistance R at T: current PSD 4kT/R (voltage 4kTR);
- shot noise of a DC current I: current PSD 2q|I| (Schottky);
- FET channel noise: current PSD 8kT·gm/3 (the long-channel square-law value, e.g. Gray, Hurst,
  Lewis & Meyer, *Analysis and Design of Analog Integrated Circuits*);
- 1/f (flicker) noise as a corner fc: the white PSD times (1 + fc/f) (common practice).

Band integration treats the PSD as a power law between neighbouring frequencies (a straight
line on log–log axes), which is exact for white and 1/f noise on any grid.
"""

from __future__ import annotations

import math
from collections.abc import Mapping

import numpy as np

from docgen.solve.physical import BOLTZMANN, ELEMENTARY_CHARGE, ZERO_CELSIUS

#: the reference temperature of the IEEE noise figure definition, 290 K.
REFERENCE_TEMPERATURE_K = 290.0


def kelvin(celsius: float) -> float:
    """°C → K."""
    return celsius + ZERO_CELSIUS


def thermal_current_psd(resistance: float | np.ndarray, temperature_k: float) -> np.ndarray:
    """Johnson–Nyquist current noise of a resistance: 4kT/R in A²/Hz."""
    return 4.0 * BOLTZMANN * temperature_k / np.asarray(resistance, dtype=float)


def shot_current_psd(current: float | np.ndarray) -> np.ndarray:
    """Shot noise of a DC current: 2q|I| in A²/Hz."""
    return 2.0 * ELEMENTARY_CHARGE * np.abs(np.asarray(current, dtype=float))


def channel_current_psd(transconductance: float | np.ndarray, temperature_k: float) -> np.ndarray:
    """FET channel noise in saturation: 8kT·gm/3 in A²/Hz."""
    return 8.0 * BOLTZMANN * temperature_k * np.abs(transconductance) / 3.0


def flicker_factor(freq: np.ndarray, corner_hz: float) -> np.ndarray:
    """1 + fc/f: the factor a 1/f corner applies to a white density (1 when fc = 0)."""
    return 1.0 + corner_hz / np.asarray(freq, dtype=float)


def integrate_band(freq: np.ndarray, psd: np.ndarray) -> np.ndarray:
    """∫ psd df over the grid (last axis), taking the PSD as a power law between points.

    On each interval the PSD is S1·(f/f1)^α with α from its two ends; the integral of that is
    closed-form.  Intervals where either end is zero fall back to the trapezoid rule.
    """
    freq = np.asarray(freq, dtype=float)
    psd = np.asarray(psd, dtype=float)
    f1, f2 = freq[:-1], freq[1:]
    s1, s2 = psd[..., :-1], psd[..., 1:]
    trapezoid = 0.5 * (s1 + s2) * (f2 - f1)
    positive = (s1 > 0) & (s2 > 0)
    ratio = f2 / f1
    with np.errstate(divide="ignore", invalid="ignore"):
        alpha = np.log(np.where(positive, s2 / s1, 1.0)) / np.log(ratio)
        rise = alpha + 1.0
        near_one_over_f = np.abs(rise) < 1e-9
        power_law = np.where(
            near_one_over_f,
            s1 * f1 * np.log(ratio),
            s1 * f1 / np.where(near_one_over_f, 1.0, rise) * (ratio**rise - 1.0),
        )
    return np.sum(np.where(positive, power_law, trapezoid), axis=-1)


def rms(freq: np.ndarray, psd: np.ndarray) -> np.ndarray:
    """The rms value of a noise with PSD ``psd`` over the grid: √∫ psd df."""
    return np.sqrt(integrate_band(freq, psd))


def snr_db(signal_rms: float, noise_rms: float) -> float | None:
    """20·log10(signal/noise), or ``None`` when there is no noise to compare with."""
    if noise_rms <= 0.0 or signal_rms <= 0.0:
        return None
    return 20.0 * math.log10(signal_rms / noise_rms)


def noise_figure_db(
    total_output_power: float, source_output_power: float, source_temperature_k: float
) -> float | None:
    """IEEE noise figure from output noise powers (over a band, or per hertz for a spot figure).

    F = (output noise) / (the part of it due to the source resistance at T0 = 290 K).  The
    circuit is analysed with the source resistance at the bench temperature, so its share is
    rescaled to T0 and everything else (the amplifier's own noise, at its own temperature) is
    kept: F = 1 + (total − source)/(source·T0/T).
    """
    if source_output_power <= 0.0:
        return None
    source_at_reference = source_output_power * REFERENCE_TEMPERATURE_K / source_temperature_k
    added = max(total_output_power - source_output_power, 0.0)
    return 10.0 * math.log10(1.0 + added / source_at_reference)


def rank_contributors(powers: Mapping[tuple[str, str], float]) -> list[dict[str, object]]:
    """Contributors sorted by output noise power, largest first, with their share of the total.

    ``powers`` maps ``(part, mechanism)`` to that source's output noise power over the band.
    Ties are broken by name so the order is deterministic.
    """
    total = sum(powers.values())
    ordered = sorted(powers.items(), key=lambda item: (-item[1], item[0]))
    return [
        {
            "part": part,
            "mechanism": mechanism,
            "output_rms_v": math.sqrt(power),
            "share": min(power / total, 1.0) if total > 0 else 0.0,
        }
        for (part, mechanism), power in ordered
    ]
