"""THD and harmonics from the coherent FFT (docgen.solve.distortion) against Fourier series."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from docgen.solve.distortion import harmonic_amplitudes, harmonic_table, thd, thd_plus_noise

N = 8192
PHASE = 2 * math.pi * (np.arange(N) + 0.5) / N  # midpoints: no sample sits on a jump


def test_square_wave_thd_is_48_3_percent():
    # Fourier series of a square wave: odd harmonics 4/(πk), THD = √(π²/8 − 1) = 48.3 %
    # (any table of Fourier series, e.g. Kreyszig, Advanced Engineering Mathematics, §11.1).
    # The sampled wave's harmonics above Nyquist fold back onto odd orders, so the sampled THD
    # sits within 0.1 % of the series value at 8192 points.
    square = np.sign(np.sin(PHASE))
    assert thd(square) == pytest.approx(math.sqrt(math.pi ** 2 / 8 - 1), rel=1e-3)
    assert thd(square) == pytest.approx(0.483, abs=5e-4)


def test_triangle_wave_thd_is_12_1_percent():
    # Triangle: odd harmonics 8/(π²k²), THD = √(π⁴/96 − 1) = 12.1 % (Fourier series, as above).
    triangle = 2 / math.pi * np.arcsin(np.sin(PHASE))
    assert thd(triangle) == pytest.approx(math.sqrt(math.pi ** 4 / 96 - 1), rel=1e-4)
    assert thd(triangle) == pytest.approx(0.121, abs=5e-4)


def test_square_wave_harmonics_follow_4_over_pi_k():
    amplitudes = harmonic_amplitudes(np.sign(np.sin(PHASE)))
    for order in (1, 3, 5, 7, 9):
        assert amplitudes[order] == pytest.approx(4 / (math.pi * order), rel=1e-3)
    assert np.all(amplitudes[[2, 4, 6, 8]] < 1e-9)  # even harmonics vanish (half-wave symmetry)


def test_pure_sine_has_no_distortion_and_mean_is_order_zero():
    wave = 0.7 + 2.5 * np.sin(PHASE[:256] * N / 256)
    amplitudes = harmonic_amplitudes(wave)
    assert amplitudes[0] == pytest.approx(0.7)
    assert amplitudes[1] == pytest.approx(2.5)
    assert thd(wave) < 1e-12


def test_table_relative_levels_of_a_constructed_wave():
    # 1 V fundamental, 10 mV second (−40 dB) and 1 mV third (−60 dB): THD = √(0.01² + 0.001²)
    t = np.arange(512) / 512
    wave = (np.sin(2 * np.pi * t) + 0.01 * np.sin(4 * np.pi * t + 0.3)
            + 0.001 * np.cos(6 * np.pi * t))
    rows = harmonic_table(wave)
    assert [r["order"] for r in rows] == list(range(1, 10))
    assert rows[1]["relative_db"] == pytest.approx(-40.0, abs=1e-9)
    assert rows[2]["relative_db"] == pytest.approx(-60.0, abs=1e-9)
    assert rows[3]["relative_db"] is None or rows[3]["relative_db"] < -200
    assert thd(wave) == pytest.approx(math.hypot(0.01, 0.001), rel=1e-9)


def test_several_periods_give_the_same_harmonics():
    t = np.arange(3 * 200) / 200  # three whole periods, 200 points each
    wave = np.sin(2 * np.pi * t) + 0.05 * np.sin(2 * np.pi * 5 * t)
    assert thd(wave, periods=3) == pytest.approx(0.05, rel=1e-9)
    assert harmonic_amplitudes(wave, periods=3)[5] == pytest.approx(0.05, rel=1e-9)


def test_harmonics_stop_below_nyquist():
    # 16 points per period: orders 0..7 only; the Nyquist bin (order 8) is left out
    assert harmonic_amplitudes(np.sin(2 * np.pi * np.arange(16) / 16)).shape == (8,)
    assert harmonic_amplitudes(np.zeros(17)).shape == (9,)


def test_thd_plus_noise_adds_noise_power():
    # 1 V peak fundamental (0.707 V rms), no harmonics, 7.07 mV rms noise: THD+N = 1 %
    assert thd_plus_noise(0.0, 1.0, 0.01 / math.sqrt(2)) == pytest.approx(0.01)
    assert thd_plus_noise(0.03, 1.0, 0.0) == pytest.approx(0.03)


@settings(max_examples=50, deadline=None)
@given(st.lists(st.floats(0.0, 1.0), min_size=9, max_size=9), st.integers(32, 300))
def test_thd_of_random_harmonic_mixtures(levels, points):
    # Parseval: THD is the root sum of squares of the harmonic levels (fundamental 1).
    t = np.arange(points) / points
    orders = [k for k in range(2, 11) if k < points / 2]
    wave = np.sin(2 * np.pi * t) + sum(levels[k - 2] * np.cos(2 * np.pi * k * t + k)
                                       for k in orders)
    expected = math.sqrt(sum(levels[k - 2] ** 2 for k in orders))
    assert thd(wave) == pytest.approx(expected, rel=1e-9, abs=1e-12)
