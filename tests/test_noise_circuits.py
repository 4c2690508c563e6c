"""Noise of whole circuits through the pipeline, against the published formulas.

References: Johnson–Nyquist thermal noise 4kTR and Schottky shot noise 2qI (k and q from
scipy.constants); the Thevenin equivalent of a divider (circuit theory); the IEEE noise figure
definition F = N_out/N_out,source at T0 = 290 K; the diode's small-signal resistance
rd = n·VT/I (Sedra & Smith); base shot noise 2q·IB (Gray, Hurst, Lewis & Meyer, *Analysis and
Design of Analog Integrated Circuits*).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from response_helpers import curve, parallel, results, thermal_voltage
from scipy import constants

K, Q = constants.k, constants.e
T25 = 25.0 + constants.zero_Celsius
AUDIO = "noise band 20 Hz .. 20 kHz"


def test_series_resistor_noise_is_johnson_nyquist():
    # The output sees only R1 (the source is an AC short): √(4kTR), and over the band
    # √(4kTR·Δf) with unity gain.
    noise = results("""
VS  signal   1 mV 1 kHz : in gnd
R1  resistor 10k        : in out
""", bench=f"input VS\noutput out\n{AUDIO}")["noise"]
    density = curve(noise, "output_density_v_per_rthz")
    assert np.allclose(density, math.sqrt(4 * K * T25 * 10e3), rtol=1e-9)
    assert noise["input_rms_v"] == pytest.approx(math.sqrt(4 * K * T25 * 10e3 * (20e3 - 20)),
                                                 rel=1e-9)
    assert noise["band_hz"] == [20.0, 20e3]
    # Densities cover the whole response sweep; only the band is integrated.
    assert noise["freq_hz"][0] == 10.0 and noise["freq_hz"][-1] == 1e6
    assert 20.0 in noise["freq_hz"] and 20e3 in noise["freq_hz"]
    assert noise["contributors"][0]["part"] == "R1"


def test_divider_noise_is_its_thevenin_resistance():
    # A divider's output noise is the thermal noise of R1‖R2 (Thevenin, circuit theory), at the
    # bench temperature (here 60 °C).
    noise = results("""
VS  signal   1 mV 1 kHz : in gnd
R1  resistor 33k        : in out
R2  resistor 10k        : out gnd
""", bench=f"input VS\noutput out\nambient 60 °C\n{AUDIO}")["noise"]
    t = 60.0 + constants.zero_Celsius
    expected = math.sqrt(4 * K * t * parallel(33e3, 10e3))
    assert np.allclose(curve(noise, "output_density_v_per_rthz"), expected, rtol=1e-9)
    shares = {c["part"]: c["share"] for c in noise["contributors"]}
    # Each current 4kT/R sees the same R1‖R2, so the power shares go as 1/R: R2 has R1/(R1 + R2).
    assert shares["R2"] == pytest.approx(33 / 43, rel=1e-9)


def test_diode_shot_noise():
    # A current source drives a diode: its shot noise √(2qI) flows through rd = nVT/I
    # (Sedra & Smith), and the source resistance (1 MΩ behind a coupling capacitor) adds its
    # thermal noise through the divider rd/(Rs + rd).
    i, n, rs = 1e-3, 1.8, 1e6
    out = results("""
VS  signal    1 mV 1 kHz source=1M : s gnd
CS  capacitor 1m                     : s a
I1  current   1m                     : gnd a
D1  diode     sig                    : a gnd
""", models=f"sig diode saturation_current=1n ideality={n}",
        bench=f"input VS\noutput a\n{AUDIO}")
    rd = n * thermal_voltage() / (i + 1e-9)  # d/dV of Is(exp(V/nVT) − 1) at I (Shockley)
    shot = 2 * Q * i * rd**2
    source = 4 * K * T25 * rs * (rd / (rs + rd)) ** 2
    density = curve(out["noise"], "output_density_v_per_rthz")
    assert np.allclose(density, math.sqrt(shot + source), rtol=2e-3)


def test_noise_figure_of_noiseless_amplifier_is_zero_db():
    # An op-amp follower with no noise of its own: all output noise is the source's → F = 1
    # (IEEE definition).
    noise = results("""
VP  supply   15 V                : vp gnd
VN  supply   15 V                : gnd vn
VS  signal   10 mV 1 kHz source=1k : in gnd
U1  opamp    quiet               : in+=in in-=out out=out v+=vp v-=vn
""", models="quiet opamp open_loop_gain=1M gain_bandwidth=10M",
        bench=f"input VS\noutput out\n{AUDIO}")["noise"]
    assert noise["figure_db"] == pytest.approx(0.0, abs=1e-9)


def test_noise_figure_of_matched_termination_is_3_01_db():
    # A source of resistance R terminated in R at T0 = 290 K: F = 2, 3.01 dB (IEEE definition;
    # e.g. Pozar, *Microwave Engineering*, noise figure of a matched attenuator at T0).
    noise = results("""
VS  signal   10 mV 1 kHz source=50 : in gnd
RT  resistor 50                  : in gnd
""", bench=f"input VS\noutput in\nambient 16.85 °C\n{AUDIO}")["noise"]
    assert noise["figure_db"] == pytest.approx(10 * math.log10(2.0), abs=1e-9)
    assert noise["figure_at_signal_db"] == pytest.approx(10 * math.log10(2.0), abs=1e-9)


def test_noise_figure_undefined_without_source_resistance():
    noise = results("""
VS  signal   10 mV 1 kHz : in gnd
R1  resistor 1k          : in out
""", bench=f"input VS\noutput out\n{AUDIO}")["noise"]
    assert noise["figure_db"] is None and "source resistance" in noise["figure_reason"]


def test_base_shot_noise_dominates_from_high_source_resistance():
    # Referred to the source voltage, the base shot current √(2q·IB) flows through the source
    # resistance: exactly √(2q·IB)·Rs at the input (the base node divides signal and noise
    # alike).  With Rs = 1 MΩ and IB ≈ 10 µA it dwarfs 4kTRs and the collector shot noise
    # (estimated below 1 % in power here), so the input density matches within 1 %.
    out = results("""
VCC supply    15 V                          : vcc gnd
VS  signal    1 mV 1 kHz source=1M offset=10.7 : b gnd
RC  resistor  4k7                           : vcc c
Q1  npn       quiet                         : c=c b=b e=gnd
""", models="quiet npn saturation_current=10f beta=150",
        bench=f"input VS\noutput c\n{AUDIO}")
    ib = out["op"]["parts"]["Q1"]["ib_a"]
    noise = out["noise"]
    expected = math.sqrt(2 * Q * ib) * 1e6
    assert np.allclose(curve(noise, "input_density_v_per_rthz"), expected, rtol=0.01)
    top = noise["contributors"][0]
    assert (top["part"], top["mechanism"]) == ("Q1", "base shot") and top["share"] > 0.97


def test_snr_uses_the_signal_rms_and_band_noise():
    # SNR = 20·log10(Vsignal,rms·|H(fs)| / output noise rms): a 1 V peak signal through a 10 kΩ
    # resistor into an open output (unity gain) against √(4kTR·Δf).
    noise = results("""
VS  signal   1 V 1 kHz : in gnd
R1  resistor 10k       : in out
""", bench=f"input VS\noutput out\n{AUDIO}")["noise"]
    expected = 20 * math.log10((1 / math.sqrt(2)) / math.sqrt(4 * K * T25 * 10e3 * 19980))
    assert noise["snr_db"] == pytest.approx(expected, abs=1e-9)


def test_opamp_voltage_noise_with_flicker_corner():
    # A follower passes the op-amp's input voltage noise: en·√(1 + fc/f) (1/f corner, common
    # practice), the source being noiseless (0 Ω).
    noise = results("""
VP  supply   15 V        : vp gnd
VN  supply   15 V        : gnd vn
VS  signal   10 mV 1 kHz : in gnd
U1  opamp    noisy       : in+=in in-=out out=out v+=vp v-=vn
""", models="noisy opamp open_loop_gain=1M gain_bandwidth=100M voltage_noise_density=10n "
            "flicker_corner=100",
        bench=f"input VS\noutput out\n{AUDIO}")["noise"]
    freq = curve(noise, "freq_hz")
    assert np.allclose(curve(noise, "output_density_v_per_rthz"),
                       10e-9 * np.sqrt(1 + 100 / freq), rtol=1e-4)
