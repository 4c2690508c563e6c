"""Noise arithmetic: source densities, band integration, SNR, noise figure, ranking.

References: scipy.constants for k and q; Johnson–Nyquist 4kTR and Schottky 2qI (any noise
text, e.g. Horowitz & Hill, *The Art of Electronics*, noise chapter); the IEEE noise figure
definition F = total output noise / output noise due to the source at 290 K; closed-form
integrals of white and 1/f densities (calculus).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import constants
from scipy.integrate import quad

from docgen.solve.curves import log_sweep
from docgen.solve.spectra import (
    channel_current_psd,
    flicker_factor,
    integrate_band,
    kelvin,
    noise_figure_db,
    rank_contributors,
    rms,
    shot_current_psd,
    snr_db,
    thermal_current_psd,
)


@pytest.mark.parametrize("resistance", [50.0, 1e3, 1e6])
def test_thermal_noise_of_resistor(resistance):
    # Johnson–Nyquist: vn = √(4kTR) per √Hz; 1 kΩ at 290 K is about 4.0 nV/√Hz (from memory).
    t = 290.0
    voltage_psd = thermal_current_psd(resistance, t) * resistance**2
    assert math.sqrt(voltage_psd) == pytest.approx(
        math.sqrt(4 * constants.k * t * resistance), rel=1e-12)
    if resistance == 1e3:
        assert math.sqrt(voltage_psd) == pytest.approx(4.0e-9, rel=0.01)


def test_shot_noise():
    # Schottky: in = √(2qI); 1 mA gives about 17.9 pA/√Hz (from memory).
    assert math.sqrt(shot_current_psd(1e-3)) == pytest.approx(
        math.sqrt(2 * constants.e * 1e-3), rel=1e-12)
    assert math.sqrt(shot_current_psd(-1e-3)) == pytest.approx(17.9e-12, rel=0.01)


def test_channel_noise():
    # Long-channel FET: 8kT·gm/3 (Gray, Hurst, Lewis & Meyer).
    assert channel_current_psd(5e-3, 300.0) == pytest.approx(
        8 * constants.k * 300.0 * 5e-3 / 3, rel=1e-12)


def test_white_noise_rms_over_band():
    # ∫ S df over [f1, f2] for constant S is S·(f2 − f1) exactly, on any grid.
    freq = log_sweep(20.0, 20e3, 7)
    assert rms(freq, np.full(freq.shape, 4e-18)) == pytest.approx(
        math.sqrt(4e-18 * (20e3 - 20.0)), rel=1e-12)


def test_flicker_noise_integral():
    # S(f) = S0·(1 + fc/f) integrates to S0·((f2 − f1) + fc·ln(f2/f1)) (calculus).
    s0, fc, f1, f2 = 1e-16, 100.0, 1.0, 1e5
    freq = log_sweep(f1, f2, 10)
    got = integrate_band(freq, s0 * flicker_factor(freq, fc))
    assert got == pytest.approx(s0 * ((f2 - f1) + fc * math.log(f2 / f1)), rel=1e-3)


@settings(max_examples=40, deadline=None)
@given(st.floats(-3.0, 2.0), st.floats(0.5, 4.0))
def test_power_law_integral_matches_quadrature(alpha, decades):
    # Property: a pure power law is integrated exactly; reference scipy.integrate.quad.
    freq = log_sweep(10.0, 10.0 * 10**decades, 5)
    psd = 1e-15 * (freq / 10.0) ** alpha
    reference, _ = quad(lambda f: 1e-15 * (f / 10.0) ** alpha, freq[0], freq[-1],
                        limit=200, epsrel=1e-12)
    assert integrate_band(freq, psd) == pytest.approx(reference, rel=1e-6)


def test_integration_handles_zero_density():
    freq = np.array([1.0, 2.0, 3.0])
    assert integrate_band(freq, np.array([0.0, 2.0, 2.0])) == pytest.approx(1.0 + 2.0)


def test_snr():
    assert snr_db(1.0, 1e-3) == pytest.approx(60.0)
    assert snr_db(1.0, 0.0) is None


def test_noise_figure_noiseless_amplifier_is_zero_db():
    # IEEE definition: only the source contributes → F = 1 → 0 dB, at any source temperature
    # (the source's own share is rescaled, nothing is added).
    assert noise_figure_db(3e-12, 3e-12, 290.0) == pytest.approx(0.0, abs=1e-12)
    assert noise_figure_db(3e-12, 3e-12, kelvin(25.0)) == pytest.approx(0.0, abs=1e-12)


def test_noise_figure_matched_termination_is_3_01_db():
    # A matched resistive termination at T0 doubles the output noise: F = 2 → 3.01 dB
    # (IEEE definition; the classic textbook case, e.g. Pozar, *Microwave Engineering*).
    assert noise_figure_db(2.0, 1.0, 290.0) == pytest.approx(10 * math.log10(2), abs=1e-12)


def test_noise_figure_rescales_source_to_t0():
    # Termination at 25 °C with the source at 25 °C: added noise kT, source noise referred to
    # T0 = 290 K: F = 1 + T/T0 (IEEE definition with the termination at the bench temperature).
    t = kelvin(25.0)
    assert noise_figure_db(2.0, 1.0, t) == pytest.approx(10 * math.log10(1 + t / 290.0))


def test_ranking_is_ordered_and_shares_sum_to_one():
    ranked = rank_contributors({("R1", "thermal"): 1.0, ("Q1", "base shot"): 3.0,
                                ("R2", "thermal"): 1.0})
    assert [r["part"] for r in ranked] == ["Q1", "R1", "R2"]
    assert sum(r["share"] for r in ranked) == pytest.approx(1.0)
    assert ranked[0]["output_rms_v"] == pytest.approx(math.sqrt(3.0))
