"""Reading a response curve: corners, midband, unity gain and phase, on analytic transfer functions.

Every reference is computed by ``scipy.signal.freqs`` from the analytic transfer function, and
every expected corner comes from the textbook closed form named beside it.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.signal import freqs

from docgen.solve.curves import (
    CORNER_DROP_DB,
    anchored_phase_deg,
    find_corner,
    find_midband,
    find_unity_gain,
    log_sweep,
    magnitude_db,
)

TWO_PI = 2.0 * math.pi


def response(b, a, freq):
    """H(j2πf) of the polynomial transfer function b(s)/a(s) (scipy.signal.freqs)."""
    return freqs(b, a, worN=TWO_PI * np.asarray(freq))[1]


def evaluator(b, a):
    return lambda f: magnitude_db(response(b, a, f))


def test_corner_drop_is_half_power():
    # 3.01 dB is 10·log10(2): half the power (definition of the −3 dB corner).
    assert pytest.approx(10 * math.log10(2), abs=1e-12) == CORNER_DROP_DB


@pytest.mark.parametrize("refine", [True, False])
@pytest.mark.parametrize("fc", [37.0, 1234.5, 150e3])
def test_first_order_low_pass_corner(fc, refine):
    # Single-pole RC low-pass H = 1/(1 + s/ωc), |H|² = 1/(1 + (f/fc)²) (any circuit-theory text).
    # Midband is the largest |H| in the sweep, m = |H(f_start)|, so the corner solves
    # |H|² = m²/2: f = fc·√(2/m² − 1), which is fc itself when the sweep starts far below it.
    b, a = [1.0], [1.0 / (TWO_PI * fc), 1.0]
    freq = log_sweep(10.0, 1e6, 50)
    gain = magnitude_db(response(b, a, freq))
    mid = find_midband(freq, gain)
    assert mid.flat and mid.at_edge == "start"
    f_high, why = find_corner(freq, gain, mid, "high", evaluator(b, a) if refine else None)
    assert why is None
    m_squared = 1.0 / (1.0 + (10.0 / fc) ** 2)
    expected = fc * math.sqrt(2.0 / m_squared - 1.0)
    # Grid refinement gives the corner to solver precision; interpolation to well under 0.1 %.
    assert f_high == pytest.approx(expected, rel=1e-9 if refine else 1e-3)
    f_low, why_low = find_corner(freq, gain, mid, "low", evaluator(b, a), dc_gain_db=0.0)
    assert f_low is None and "direct-coupled" in why_low


def test_first_order_high_pass_corner_and_no_high_corner():
    # H = s/(s + ωc), |H|² = f²/(f² + fc²); with m = |H(f_stop)| the corner solves |H|² = m²/2:
    # f = fc·m/√(2 − m²).  Flat to the sweep stop, so no high corner.
    fc = 480.0
    b, a = [1.0, 0.0], [1.0, TWO_PI * fc]
    freq = log_sweep(10.0, 1e6, 20)
    gain = magnitude_db(response(b, a, freq))
    mid = find_midband(freq, gain)
    f_low, _ = find_corner(freq, gain, mid, "low", evaluator(b, a), dc_gain_db=-math.inf)
    m_squared = 1e12 / (1e12 + fc**2)
    assert f_low == pytest.approx(fc * math.sqrt(m_squared / (2 - m_squared)), rel=1e-9)
    f_high, why = find_corner(freq, gain, mid, "high", evaluator(b, a))
    assert f_high is None and "above the sweep stop" in why


def test_low_corner_below_sweep_is_reported_not_invented():
    # Coupling corner at 2 Hz, sweep from 10 Hz: gain within 3 dB at the sweep start.
    b, a = [1.0, 0.0], [1.0, TWO_PI * 2.0]
    freq = log_sweep(10.0, 1e5, 50)
    gain = magnitude_db(response(b, a, freq))
    mid = find_midband(freq, gain)
    f_low, why = find_corner(freq, gain, mid, "low", evaluator(b, a), dc_gain_db=-math.inf)
    assert f_low is None and "below the sweep start" in why


def test_rising_at_sweep_stop_has_no_midband():
    # High-pass with its corner above the sweep: the gain is still rising at the stop.
    b, a = [1.0, 0.0], [1.0, TWO_PI * 5e6]
    freq = log_sweep(10.0, 1e6, 50)
    gain = magnitude_db(response(b, a, freq))
    mid = find_midband(freq, gain)
    assert not mid.flat and mid.at_edge == "stop" and "rising" in mid.note
    f_low, why = find_corner(freq, gain, mid, "low", evaluator(b, a))
    assert f_low is None and "widen the sweep" in why


@pytest.mark.parametrize("q", [0.3, 2.0, 25.0])
def test_band_pass_corners(q):
    # Second-order band-pass H = (ω0/Q)s/(s² + (ω0/Q)s + ω0²); its −3 dB corners are
    # f0·(√(1 + 1/(4Q²)) ∓ 1/(2Q)) (e.g. Nilsson & Riedel, Electric Circuits, band-pass filters).
    f0 = 10e3
    w0 = TWO_PI * f0
    b, a = [w0 / q, 0.0], [1.0, w0 / q, w0**2]
    freq = log_sweep(10.0, 1e7, 50)
    gain = magnitude_db(response(b, a, freq))
    mid = find_midband(freq, gain, evaluator(b, a))
    # The refined peak is the resonance itself: unity gain at f0.
    assert mid.freq_hz == pytest.approx(f0, rel=1e-6)
    assert mid.gain_db == pytest.approx(0.0, abs=1e-9)
    f_low, _ = find_corner(freq, gain, mid, "low", evaluator(b, a), dc_gain_db=-math.inf)
    f_high, _ = find_corner(freq, gain, mid, "high", evaluator(b, a))
    root = math.sqrt(1 + 1 / (4 * q * q))
    assert f_low == pytest.approx(f0 * (root - 1 / (2 * q)), rel=1e-8)
    assert f_high == pytest.approx(f0 * (root + 1 / (2 * q)), rel=1e-8)
    # A sharp resonance has no flat midband and says so.
    assert mid.flat == (q < 1.0)
    if q > 1.0:
        assert "peaks" in mid.note


def test_unity_gain_of_single_pole_amplifier():
    # A(s) = A0/(1 + s/ωp): |A| = 1 at f = fp·√(A0² − 1) (solve |A|² = 1 by hand).
    a0, fp = 2e5, 5.0
    b, a = [a0], [1.0 / (TWO_PI * fp), 1.0]
    freq = log_sweep(1.0, 1e8, 50)
    gain = magnitude_db(response(b, a, freq))
    mid = find_midband(freq, gain)
    f_unity, why = find_unity_gain(freq, gain, mid, evaluator(b, a))
    assert why is None
    assert f_unity == pytest.approx(fp * math.sqrt(a0**2 - 1), rel=1e-9)


def test_unity_gain_absent_for_attenuator():
    freq = log_sweep(10.0, 1e5, 10)
    gain = np.full(freq.shape, -6.0)
    f_unity, why = find_unity_gain(freq, gain, find_midband(freq, gain))
    assert f_unity is None and "never rises above 0 dB" in why


def test_inverting_stage_phase_reads_plus_180_at_midband():
    # −A/(1 + s/ωc): np.angle gives ±180° at low frequency; anchoring picks +180°, then the pole
    # adds up to −90° (phase of a single pole, circuit-theory texts).
    fc = 1e4
    b, a = [-100.0], [1.0 / (TWO_PI * fc), 1.0]
    freq = log_sweep(10.0, 1e7, 50)
    h = response(b, a, freq)
    phase = anchored_phase_deg(h, find_midband(freq, magnitude_db(h)).index)
    assert phase[0] == pytest.approx(180.0 - math.degrees(math.atan(10.0 / fc)), abs=1e-9)
    assert phase[-1] == pytest.approx(180.0 - math.degrees(math.atan(1e7 / fc)), abs=1e-9)


@settings(max_examples=60, deadline=None)
@given(
    gain=st.floats(-1e3, 1e3).filter(lambda g: abs(g) > 1e-3),
    poles=st.integers(0, 4),
    fc=st.floats(100.0, 1e5),
    anchor=st.integers(0, 199),
)
def test_anchored_phase_property(gain, poles, fc, anchor):
    # Property: the anchored phase differs from numpy's principal angle by whole turns, lies in
    # (−180°, 180°] at the anchor, and never jumps by more than 180° between sweep points.
    freq = log_sweep(10.0, 1e7, 200 / 6)
    a = np.poly1d([1.0 / (TWO_PI * fc), 1.0]) ** poles
    h = response([gain], a.coeffs, freq)
    anchor = min(anchor, len(freq) - 1)
    phase = anchored_phase_deg(h, anchor)
    assert -180.0 < phase[anchor] <= 180.0
    turns = (phase - np.degrees(np.angle(h))) / 360.0
    assert np.allclose(turns, np.round(turns), atol=1e-9)
    assert np.all(np.abs(np.diff(phase)) < 180.0)


def test_log_sweep_ends_and_density():
    freq = log_sweep(10.0, 1e6, 50)
    assert freq[0] == 10.0 and freq[-1] == 1e6
    assert len(freq) == 5 * 50 + 1
    assert np.allclose(np.diff(np.log10(freq)), 0.02)
