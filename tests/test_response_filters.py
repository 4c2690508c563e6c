"""Passive and active filters: gain and phase over the whole sweep against scipy.signal.freqs
of the analytic transfer function, and corners against the closed forms named beside them."""

from __future__ import annotations

import math

import numpy as np
import pytest
from response_helpers import TWO_PI, curve, results
from scipy.signal import freqs

BENCH = """
input       VS
output      out
frequencies 10 Hz .. 1 MHz
"""


def reference(b, a, freq):
    """20·log10|H| and the phase in degrees of b(s)/a(s) (scipy.signal.freqs)."""
    _, h = freqs(b, a, worN=TWO_PI * np.asarray(freq))
    return 20 * np.log10(np.abs(h)), np.degrees(np.angle(h))


def check_curves(ac, b, a, db_tol=1e-9, phase_tol=1e-7):
    freq = curve(ac, "freq_hz")
    gain_db, phase_deg = reference(b, a, freq)
    assert np.allclose(curve(ac, "gain_db"), gain_db, rtol=0, atol=db_tol)
    # Both phases live in (−180°, 180°] here (no wrap inside these sweeps).
    assert np.allclose(curve(ac, "phase_deg"), phase_deg, rtol=0, atol=phase_tol)


def test_rc_low_pass():
    # H = 1/(1 + sRC) with R = source + series resistor (circuit theory); corner 1/(2πRC).
    r, c = 1.5e3 + 1e3, 47e-9
    ac = results("""
VS  signal    1 V 1 kHz source=1k5 : in gnd
R1  resistor  1k                   : in out
C1  capacitor 47n                  : out gnd
""", bench=BENCH)["ac"]
    check_curves(ac, [1.0], [r * c, 1.0])
    assert ac["f_high_hz"] == pytest.approx(1 / (TWO_PI * r * c), rel=1e-4)
    assert ac["f_low_hz"] is None and "direct-coupled" in ac["f_low_reason"]
    # −45° at the corner (single pole, circuit theory): the phase curve passes it there.
    assert np.interp(math.log10(ac["f_high_hz"]), np.log10(curve(ac, "freq_hz")),
                     curve(ac, "phase_deg")) == pytest.approx(-45.0, abs=0.05)


def test_rc_high_pass():
    # H = sRC/(1 + sRC), R the resistor to ground (source resistance 0); corner 1/(2πRC).
    r, c = 10e3, 100e-9
    ac = results("""
VS  signal    1 V 1 kHz : in gnd
C1  capacitor 100n      : in out
R1  resistor  10k       : out gnd
""", bench=BENCH)["ac"]
    check_curves(ac, [r * c, 0.0], [r * c, 1.0])
    assert ac["f_low_hz"] == pytest.approx(1 / (TWO_PI * r * c), rel=1e-6)
    assert ac["f_high_hz"] is None and "above the sweep stop" in ac["f_high_reason"]
    # The input impedance of a series RC: |R + 1/(jωC)| at the signal frequency.
    assert ac["zin_ohm"] == pytest.approx(abs(r + 1 / (1j * TWO_PI * 1e3 * c)), rel=1e-9)


def test_rlc_band_pass():
    # Series L–C into R, output across R: H = sRC/(s²LC + sRC + 1) (circuit theory), with
    # corners f0·(√(1 + 1/(4Q²)) ∓ 1/(2Q)), Q = √(L/C)/R (Nilsson & Riedel, Electric Circuits).
    l, c, r = 10e-3, 100e-9, 100.0
    ac = results("""
VS  signal    1 V 1 kHz : in gnd
L1  inductor  10m       : in mid
C1  capacitor 100n      : mid out
R1  resistor  100       : out gnd
""", bench=BENCH)["ac"]
    check_curves(ac, [r * c, 0.0], [l * c, r * c, 1.0], db_tol=1e-8, phase_tol=1e-6)
    f0, q = 1 / (TWO_PI * math.sqrt(l * c)), math.sqrt(l / c) / r
    root = math.sqrt(1 + 1 / (4 * q * q))
    assert ac["midband_freq_hz"] == pytest.approx(f0, rel=1e-6)
    assert ac["midband_gain_db"] == pytest.approx(0.0, abs=1e-9)
    assert ac["f_low_hz"] == pytest.approx(f0 * (root - 1 / (2 * q)), rel=1e-7)
    assert ac["f_high_hz"] == pytest.approx(f0 * (root + 1 / (2 * q)), rel=1e-7)
    assert ac["midband_flat"] is False and "peaks" in ac["midband_note"]


OPAMP_MODELS = """
near-ideal  opamp  open_loop_gain=1G gain_bandwidth=1e15 output_resistance=0
"""
SUPPLIES = """
VP  supply    15 V : vp gnd
VN  supply    15 V : gnd vn
"""


def test_sallen_key_low_pass_with_near_ideal_opamp():
    # Unity-gain Sallen–Key low-pass: H = 1/(s²·R1R2C1C2 + s·C2(R1 + R2) + 1), C1 from the
    # middle node to the output, C2 from the + input to ground (Sedra & Smith, active filters).
    r1, r2, c1, c2 = 10e3, 10e3, 22e-9, 10e-9
    ac = results(SUPPLIES + """
VS  signal    1 V 1 kHz : in gnd
R1  resistor  10k       : in mid
R2  resistor  10k       : mid p
C1  capacitor 22n       : mid out
C2  capacitor 10n       : p gnd
U1  opamp     near-ideal : in+=p in-=out out=out v+=vp v-=vn
""", models=OPAMP_MODELS, bench=BENCH)["ac"]
    # Open-loop gain 10⁹ (pole at 1 MHz): the loop error is below 1e-8 over the sweep.
    check_curves(ac, [1.0], [r1 * r2 * c1 * c2, c2 * (r1 + r2), 1.0], db_tol=1e-6,
                 phase_tol=1e-5)


def test_noninverting_closed_loop_bandwidth():
    # Single-pole op-amp in a non-inverting stage: bandwidth ≈ GBW/(1 + Rf/Rg) (Sedra & Smith);
    # the approximation neglects (1 + Rf/Rg)/A0, here 5e-5.
    ac = results(SUPPLIES + """
VS  signal    100 mV 1 kHz : in gnd
RF  resistor  9k           : out fb
RG  resistor  1k           : fb gnd
U1  opamp     single-pole  : in+=in in-=fb out=out v+=vp v-=vn
""", models="single-pole opamp open_loop_gain=200k gain_bandwidth=1M output_resistance=0",
        bench=BENCH)["ac"]
    assert ac["midband_gain_db"] == pytest.approx(20 * math.log10(10.0), abs=1e-3)
    assert ac["f_high_hz"] == pytest.approx(1e6 / 10.0, rel=1e-3)
    # The loop's unity-gain crossing of the closed-loop response lies above f_high.
    assert ac["unity_gain_hz"] > ac["f_high_hz"]
