"""Transistor and op-amp stages: small-signal figures against the textbook hand formulas.

References: Sedra & Smith, *Microelectronic Circuits* (hybrid-π: gm = IC/VT, rπ = β/gm,
ro = VA/IC; common-emitter gain −gm·(RC‖ro‖RL); degenerated gain −α·RC/(re + RE) with
re = VT/IE; input resistance R1‖R2‖(β+1)(re + RE); emitter-follower output resistance
re + Rs/(β+1); the Miller approximation of the high corner), with VT from scipy.constants.
Each hand formula is evaluated at the operating point docgen reports (IC, IE), so the test
checks the small-signal analysis, not the bias.
"""

from __future__ import annotations

import pytest
from response_helpers import TWO_PI, parallel, results, thermal_voltage

BETA = 150.0
# A transistor without the parasitics the hand formulas ignore (no rb, no capacitances, no
# Early effect unless a test adds it).
PLAIN = f"plain npn saturation_current=10f beta={BETA:g}"
BENCH = """
input       VS
output      c
frequencies 10 Hz .. 1 MHz
"""


def test_common_emitter_gain_is_minus_gm_times_rc_ro_rl():
    # −gm·(RC‖ro‖RL) (Sedra & Smith); the emitter is grounded, the base biased from VCC through
    # RB and driven through a large coupling capacitor, the source has no resistance.
    out = results("""
VCC supply    12 V       : vcc gnd
VS  signal    1 mV 1 kHz : s gnd
CI  capacitor 1m         : s b
RB  resistor  1M5        : vcc b
RC  resistor  4k7        : vcc c
Q1  npn       early      : c=c b=b e=gnd
""", models=PLAIN.replace("plain", "early") + " early_voltage=100",
        bench=BENCH + "load 10k")
    q1, ac = out["op"]["parts"]["Q1"], out["ac"]
    gm = q1["ic_a"] / thermal_voltage()
    ro = 100.0 / q1["ic_a"]  # VA/IC; the Ebers–Moll form gives (VA + VCE)/IC, 0.2 % apart here
    expected = gm * parallel(4.7e3, ro, 10e3)
    assert 10 ** (ac["midband_gain_db"] / 20) == pytest.approx(expected, rel=5e-3)
    # Inverting: the phase reads ±180° at midband (anchored to (−180°, 180°]: a hair of lead
    # from the coupling capacitor shows as −179.99…°).
    mid = ac["freq_hz"].index(min(ac["freq_hz"], key=lambda f: abs(f - ac["midband_freq_hz"])))
    assert abs(ac["phase_deg"][mid]) == pytest.approx(180.0, abs=0.5)


DEGENERATED = """
VCC supply    15 V       : vcc gnd
VS  signal    1 mV 1 kHz : s gnd
CI  capacitor 1m         : s b
R1  resistor  {r1}       : vcc b
R2  resistor  {r2}       : b gnd
RC  resistor  {rc}       : vcc c
RE  resistor  {re}       : e gnd
Q1  npn       plain      : c=c b=b e=e
"""


DIVIDER_STAGE = {"r1": "82k", "r2": "18k", "rc": "4k7", "re": "1k"}


@pytest.mark.parametrize("values", [DIVIDER_STAGE,
                                    {"r1": "82k", "r2": "8k2", "rc": "2k2", "re": "220"}])
def test_degenerated_common_emitter_gain(values):
    # −α·RC/(re + RE) with re = VT/IE (Sedra & Smith, ro neglected: no Early effect here);
    # the rule of thumb −RC/RE holds within 10 % when RE ≫ re (common practice).
    r_c = {"4k7": 4.7e3, "2k2": 2.2e3}[values["rc"]]
    r_e = {"1k": 1e3, "220": 220.0}[values["re"]]
    out = results(DEGENERATED.format(**values), models=PLAIN, bench=BENCH)
    q1, ac = out["op"]["parts"]["Q1"], out["ac"]
    alpha = BETA / (BETA + 1)
    r_emitter = thermal_voltage() / q1["ie_a"]
    gain = 10 ** (ac["midband_gain_db"] / 20)
    assert gain == pytest.approx(alpha * r_c / (r_emitter + r_e), rel=2e-3)
    if r_e >= 20 * r_emitter:
        assert gain == pytest.approx(r_c / r_e, rel=0.10)


def test_input_impedance_of_divider_biased_stage():
    # R1‖R2‖(β+1)(re + RE) (Sedra & Smith), at the 1 kHz signal where the 1 mF coupling
    # capacitor's reactance (0.16 Ω) is negligible.
    out = results(DEGENERATED.format(**DIVIDER_STAGE), models=PLAIN, bench=BENCH)
    q1, ac = out["op"]["parts"]["Q1"], out["ac"]
    r_emitter = thermal_voltage() / q1["ie_a"]
    expected = parallel(82e3, 18e3, (BETA + 1) * (r_emitter + 1e3))
    assert ac["zin_ohm"] == pytest.approx(expected, rel=1e-3)
    assert ac["signal_freq_hz"] == 1e3


def test_emitter_follower_output_impedance():
    # re + Rs/(β+1) (Sedra & Smith): the base is biased through the source resistance (the
    # signal's offset) and the emitter current is set by an ideal current source (open for AC),
    # so nothing else loads the emitter.
    out = results("""
VCC supply    10 V                        : vcc gnd
VEE supply    10 V                        : gnd vee
VS  signal    10 mV 1 kHz source=10k offset=0 : b gnd
Q1  npn       plain                       : c=vcc b=b e=e
IE  current   1m                          : e vee
""", models=PLAIN, bench="input VS\noutput e\nfrequencies 10 Hz .. 1 MHz")
    q1, ac = out["op"]["parts"]["Q1"], out["ac"]
    expected = thermal_voltage() / q1["ie_a"] + 10e3 / (BETA + 1)
    assert ac["zout_ohm"] == pytest.approx(expected, rel=1e-3)
    # Gain RE'/(re + RE') with RE' infinite → the emitter follows the base: ≈ 0 dB from the
    # input net (Sedra & Smith).
    assert ac["gain_from_input_net_db"][0] == pytest.approx(0.0, abs=0.01)


def test_coupling_capacitor_low_corner():
    # 1/(2πC(Rs + Rin)) with Rin = RB‖rπ, rπ = β/gm (Sedra & Smith); the coupling capacitor is
    # the only capacitance, so the corner is exactly that single pole.
    out = results("""
VCC supply    12 V              : vcc gnd
VS  signal    1 mV 1 kHz source=2k : s gnd
CI  capacitor 1u                : s b
RB  resistor  1M5               : vcc b
RC  resistor  4k7               : vcc c
Q1  npn       plain             : c=c b=b e=gnd
""", models=PLAIN, bench=BENCH)
    q1, ac = out["op"]["parts"]["Q1"], out["ac"]
    r_pi = BETA / (q1["ic_a"] / thermal_voltage())
    expected = 1 / (TWO_PI * 1e-6 * (2e3 + parallel(1.5e6, r_pi)))
    assert ac["f_low_hz"] == pytest.approx(expected, rel=2e-3)
    assert ac["f_high_hz"] is None and "above the sweep stop" in ac["f_high_reason"]


def test_common_emitter_high_corner_against_miller():
    # Miller: Cin = Cπ + Cμ(1 + gm·RL'), f_H ≈ 1/(2π·(Rs‖RB‖rπ)·Cin), with
    # Cπ + Cμ = gm/(2π fT) (Sedra & Smith).  The approximation ignores the collector node's
    # own time constant Cμ·RL' and the right-half-plane zero, so it overestimates f_H; here that
    # time constant is a few % of the input one, so we accept 10 %.
    out = results("""
VCC supply    12 V               : vcc gnd
VS  signal    1 mV 1 kHz source=1k : s gnd
CI  capacitor 1m                 : s b
RB  resistor  1M5                : vcc b
RC  resistor  2k2                : vcc c
Q1  npn       fast               : c=c b=b e=gnd
""", models="fast npn saturation_current=10f beta=150 transition_frequency=300M "
             "base_collector_capacitance=2p",
        bench="input VS\noutput c\nfrequencies 10 Hz .. 100 MHz")
    q1, ac = out["op"]["parts"]["Q1"], out["ac"]
    gm = q1["ic_a"] / thermal_voltage()
    c_mu = 2e-12
    c_pi = gm / (TWO_PI * 300e6) - c_mu
    c_in = c_pi + c_mu * (1 + gm * 2.2e3)
    r_source = parallel(1e3, 1.5e6, BETA / gm)
    miller = 1 / (TWO_PI * r_source * c_in)
    assert ac["f_high_hz"] == pytest.approx(miller, rel=0.10)
    assert ac["f_high_hz"] < miller  # the neglected time constants only lower the corner


def test_pnp_mirror_of_a_stage_has_the_same_response():
    # Ebers–Moll is odd-symmetric under a change of polarity: the pnp stage on a negative supply
    # with the same model values has the npn stage's small-signal response and noise.
    stage = DEGENERATED.format(**DIVIDER_STAGE).replace("CI  capacitor 1m", "CI  capacitor 1u")
    extra = " transition_frequency=300M base_collector_capacitance=3p"
    npn = results(stage, models=PLAIN + extra, bench=BENCH)
    mirrored = (stage.replace("15 V       : vcc gnd", "15 V       : gnd vcc")
                .replace("npn       plain", "pnp       plain"))
    pnp = results(mirrored, models=PLAIN.replace(" npn ", " pnp ") + extra, bench=BENCH)
    for key in ("midband_gain_db", "f_low_hz", "f_high_hz", "zin_ohm", "zout_ohm"):
        if npn["ac"][key] is None:  # e.g. a corner beyond the sweep: the same null, same reason
            reason = key.replace("_hz", "_reason")
            assert pnp["ac"][key] is None and pnp["ac"][reason] == npn["ac"][reason], key
        else:
            assert pnp["ac"][key] == pytest.approx(npn["ac"][key], rel=1e-6), key
    assert pnp["noise"]["input_rms_v"] == pytest.approx(npn["noise"]["input_rms_v"], rel=1e-6)
