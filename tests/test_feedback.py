"""The feedback analysis against outside references: loop gain, margins, step, PSRR, CMRR.

Each check names its reference beside it.  The designs are run through the real pipeline
(reader → elaborate → operating point → ac → feedback).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from response_helpers import thermal_voltage
from scipy import optimize, signal
from solver_helpers import _BUILTINS, design_text, make_circuit

from docgen import pipeline
from docgen.reader import read_text
from docgen.solve import rejection
from docgen.solve.linearise import linearise
from docgen.solve.operating_point import part_quantities, solve_op
from docgen.solve.step import step_figures

TWO_PI = 2.0 * math.pi

#: an op-amp with a single pole and no error sources: A(s) = A0/(1 + s/ωp), ωp = 2π·GBW/A0.
CLEAN = "clean opamp open_loop_gain=100k gain_bandwidth=1M"
A0, GBW = 1e5, 1e6
F_POLE = GBW / A0


def feedback(circuit: str, models: str = "", bench: str = "") -> dict:
    """The feedback section of a design made of the given blocks (analysis errors raise)."""
    design = read_text(design_text(circuit, models, bench), "test.md")
    out = pipeline.run(design, _BUILTINS, only=frozenset({"op", "ac", "feedback"}))
    assert not out["errors"], out["errors"]
    return out["feedback"]


def two_pole(capacitance: str) -> str:
    """A follower whose loop has a second pole: the op-amp drives R1 into C1, in− reads C1."""
    return f"""
VP  supply    15 V     : vp gnd
VN  supply    15 V     : gnd vn
VS  signal    10 mV 1 kHz : in gnd
U1  opamp     clean    : in+=in in-=x out=o v+=vp v-=vn
R1  resistor  1k       : o x
C1  capacitor {capacitance} : x gnd
"""


BENCH_X = "input VS\noutput x\nfrequencies 10 Hz .. 10 MHz"


def test_two_pole_loop_crossover_and_phase_margin_match_the_analytic_values():
    """T(jω) = A0/((1 + jf/f1)(1 + jf/f2)) with f1 = GBW/A0 and f2 = 1/(2πRC) (the follower's
    β = 1): |T| = 1 solved by scipy.optimize.brentq; phase margin 180° − atan(fc/f1) −
    atan(fc/f2) (Gray, Hurst, Lewis & Meyer, *Analysis and Design of Analog Integrated
    Circuits*, ch. 9, from memory)."""
    section = feedback(two_pole("1n"), CLEAN, BENCH_X)
    f2 = 1.0 / (TWO_PI * 1e3 * 1e-9)

    def loop(f):
        return A0 / ((1 + 1j * f / F_POLE) * (1 + 1j * f / f2))

    crossover = optimize.brentq(lambda f: abs(loop(f)) - 1.0, 1e3, 1e8, xtol=1e-6)
    margin = 180.0 - math.degrees(math.atan(crossover / F_POLE) + math.atan(crossover / f2))
    assert section["loop_part"] == "U1"
    assert section["crossover_hz"] == pytest.approx(crossover, rel=1e-6)
    assert section["phase_margin_deg"] == pytest.approx(margin, abs=1e-4)
    assert section["gain_margin_db"] is None  # two poles: the phase never reaches −180°
    freq = np.array(section["loop_freq_hz"])
    expected = 20 * np.log10(np.abs(loop(freq)))
    np.testing.assert_allclose(section["loop_gain_db"], expected, atol=1e-6)


def test_noninverting_stage_loop_gain_is_a_beta_crossing_at_gbw_beta():
    """Non-inverting stage, single-pole op-amp: T = A(jω)·β with β = Rg/(Rf + Rg), crossover
    ≈ GBW·β (Sedra & Smith, *Microelectronic Circuits*, op-amp frequency response, from
    memory; exact within 1/(2(A0β)²))."""
    circuit = """
VP  supply   15 V  : vp gnd
VN  supply   15 V  : gnd vn
VS  signal   10 mV 1 kHz : in gnd
U1  opamp    clean : in+=in in-=fb out=out v+=vp v-=vn
RF  resistor 9k    : out fb
RG  resistor 1k    : fb gnd
"""
    section = feedback(circuit, CLEAN, "input VS\noutput out\nfrequencies 10 Hz .. 10 MHz")
    beta = 1e3 / 10e3
    freq = np.array(section["loop_freq_hz"])
    a_beta = A0 * beta / (1 + 1j * freq / F_POLE)
    np.testing.assert_allclose(section["loop_gain_db"], 20 * np.log10(np.abs(a_beta)),
                               atol=1e-6)
    np.testing.assert_allclose(section["loop_phase_deg"], np.degrees(np.angle(a_beta)),
                               atol=1e-6)
    assert section["crossover_hz"] == pytest.approx(GBW * beta, rel=1e-6)
    assert section["phase_margin_deg"] == pytest.approx(90.0, abs=0.01)


def test_named_transistor_loop_is_the_emitter_degeneration_return_ratio():
    """Return ratio of gm in an emitter-degenerated stage: a unit current from collector to
    emitter develops RE‖(rπ + RB) at the emitter, so T = gm·(RE‖(rπ + RB))·rπ/(rπ + RB)
    (hand small-signal analysis; Gray, Hurst, Lewis & Meyer, return ratio, from memory)."""
    circuit = """
VC  supply   12 V   : vc gnd
VS  signal   1 mV 1 kHz : s gnd
VB  supply   2 V    : bias gnd
RB  resistor 10k    : bias b
Q1  npn      plain  : c=c b=b e=e
RC  resistor 4k7    : vc c
RE  resistor 1k     : e s
"""
    models = "plain npn saturation_current=10f beta=150"
    section = feedback(circuit, models, "input VS\noutput c\nloop Q1")
    solution = solve_op(make_circuit(circuit, models, "input VS\noutput c"))
    gm = float(part_quantities(solution, "Q1")["gm_s"][0])
    r_pi = 150.0 / gm
    rb, re = 10e3, 1e3
    expected = gm * (re * (r_pi + rb) / (re + r_pi + rb)) * r_pi / (r_pi + rb)
    assert section["loop_part"] == "Q1"
    assert section["loops"][0]["negative_feedback"] is True
    assert 10 ** (section["loops"][0]["dc_loop_gain_db"] / 20) == pytest.approx(expected,
                                                                                rel=1e-6)


@pytest.mark.parametrize("zeta", [0.3, 0.6])
def test_step_overshoot_matches_the_second_order_damping_relation(zeta):
    """The follower with a second pole closes to a pure second-order system:
    ωn² = p1·p2·(1 + A0), ζ = (p1 + p2)/(2ωn); overshoot e^(−πζ/√(1−ζ²)) (Ogata, *Modern
    Control Engineering*, from memory).  Through the large-signal time march (BDF2); 0.1
    percentage point allows the time discretisation."""
    p1 = TWO_PI * F_POLE
    # ζ(p2) rises monotonically with p2 here: solve for the p2 that gives ζ
    p2 = optimize.brentq(lambda p: (p1 + p) / (2 * math.sqrt(p1 * p * (1 + A0))) - zeta,
                         1e3, 1e9)
    capacitance = 1.0 / (p2 * 1e3)
    section = feedback(two_pole(f"{capacitance:.9g}"), CLEAN, BENCH_X)
    expected = 100 * math.exp(-math.pi * zeta / math.sqrt(1 - zeta**2))
    assert section["step"]["overshoot_percent"] == pytest.approx(expected, abs=0.1)
    assert section["overshoot_percent"] == section["step"]["overshoot_percent"]


def test_step_figures_of_a_second_order_response_from_scipy():
    """Measurements on scipy.signal.step of ωn²/(s² + 2ζωn s + ωn²): overshoot
    e^(−πζ/√(1−ζ²)); the 1 % settling time lies within the exponential envelope bound
    −ln(0.01·√(1−ζ²))/(ζωn) (Ogata, from memory); rise time 10–90 % of a lightly damped
    system below the peak time π/ωd."""
    zeta, omega = 0.4, 1.0
    times = np.linspace(0, 60, 60001)
    _, y = signal.step(([omega**2], [1, 2 * zeta * omega, omega**2]), T=times)
    figures = step_figures(times, y, 0.01)
    damped = omega * math.sqrt(1 - zeta**2)
    assert figures["overshoot_percent"] == pytest.approx(
        100 * math.exp(-math.pi * zeta / math.sqrt(1 - zeta**2)), abs=1e-3)
    envelope = -math.log(0.01 * math.sqrt(1 - zeta**2)) / (zeta * omega)
    assert 0.5 * envelope < figures["settling_time_s"] <= envelope
    assert 0 < figures["rise_time_s"] < math.pi / damped


CE_STAGE = """
VC  supply   12 V   : vc gnd
VS  signal   1 mV 1 kHz : s gnd
R1  resistor 47k    : vc b
R2  resistor 10k    : b s
Q1  npn      plain  : c=c b=b e=e
RC  resistor 4k7    : vc c
RE  resistor 1k     : e gnd
"""


def test_psrr_of_a_resistively_biased_common_emitter_stage_matches_the_hand_analysis():
    """Hand small-signal analysis (hybrid-π, Sedra & Smith, from memory): the base sees the
    divider's Thevenin source; a source v_x into the base gives ib = v_x/(RTH + rπ + (β+1)RE),
    and the collector moves by −β·RC·ib.  The supply enters through R1 (v_th = R2/(R1+R2)) and
    directly through RC (+1); the signal through R2 (v_th = R1/(R1+R2)).  PSRR = |A_signal| /
    |A_supply|."""
    models = "plain npn saturation_current=10f beta=150"
    section = feedback(CE_STAGE, models, "input VS\noutput c")
    solution = solve_op(make_circuit(CE_STAGE, models, "input VS\noutput c"))
    ic = float(part_quantities(solution, "Q1")["ic_a"][0])
    beta = 150.0
    gm = ic / thermal_voltage()  # gm = IC/VT (Sedra & Smith)
    r_pi = beta / gm
    r1, r2, rc, re = 47e3, 10e3, 4.7e3, 1e3
    r_th = r1 * r2 / (r1 + r2)
    per_volt = beta * rc / (r_th + r_pi + (beta + 1) * re)
    a_signal = -per_volt * r1 / (r1 + r2)
    a_supply = 1.0 - per_volt * r2 / (r1 + r2)
    expected = 20 * math.log10(abs(a_signal) / abs(a_supply))
    np.testing.assert_allclose(section["psrr_db"]["VC"], expected, atol=1e-4)
    assert section["psrr_at_signal_db"] == pytest.approx(expected, abs=1e-4)


DIFF_PAIR = """
VC  supply   12 V   : vc gnd
VE  supply   12 V   : gnd ve
VA  signal   1 mV 1 kHz : a gnd
VB  supply   0 V    : b gnd
Q1  npn      plain  : c=c1 b=a e=t
Q2  npn      plain  : c=c2 b=b e=t
RC1 resistor 5k     : vc c1
RC2 resistor 5k1    : vc c2
RT  resistor 100k   : t ve
"""


def _pair_numbers():
    circuit = make_circuit(DIFF_PAIR, "plain npn saturation_current=10f beta=400",
                           "input VA\noutput c2")
    solution = solve_op(circuit)
    gm = float(part_quantities(solution, "Q1")["ic_a"][0]) / thermal_voltage()
    return linearise(solution), gm


def test_cmrr_of_a_mismatched_differential_pair_matches_the_textbook_expression():
    """Differential output, collector resistors RC and RC + ΔRC, tail resistance REE:
    CMRR ≈ 2·gm·REE·RC/ΔRC (Sedra & Smith, *Microelectronic Circuits*, differential pair with
    mismatched loads, from memory).  The textbook drops 1/β and 1/(2gm·REE) against 1;
    here those are 0.25 % and 0.6 %, so 1 % is allowed."""
    network, gm = _pair_numbers()
    ad, acm = rejection.differential_gains(network, ("VA", "VB"), np.array([100.0]),
                                           ("c1", "c2"))
    cmrr = abs(ad[0, 0]) / abs(acm[0, 0])
    expected = 2 * gm * 100e3 * 5.05e3 / 100.0
    assert cmrr == pytest.approx(expected, rel=0.01)


def test_single_ended_cmrr_of_a_differential_pair_end_to_end():
    """Single-ended output at one collector: Ad = gm·RC/2 and Acm = −gm·RC/(1 + 2gm·REE/α),
    so CMRR = (1 + 2gm·REE/α)/2 ≈ gm·REE (Sedra & Smith, from memory; α = β/(β+1))."""
    section = feedback(DIFF_PAIR, "plain npn saturation_current=10f beta=400",
                       "input VA\noutput c2\ncommon mode VA VB")
    _, gm = _pair_numbers()
    alpha = 400.0 / 401.0
    expected = 20 * math.log10((1 + 2 * gm * 100e3 / alpha) / 2)
    assert section["cmrr_inputs"] == ["VA", "VB"]
    assert section["cmrr_at_signal_db"] == pytest.approx(expected, abs=0.01)
    np.testing.assert_allclose(section["cmrr_db"], expected, atol=0.01)


NONINVERTING = """
VP  supply   15 V  : vp gnd
VN  supply   15 V  : gnd vn
VS  signal   10 mV 1 kHz source=10k : in gnd
U1  opamp    errors : in+=in in-=fb out=out v+=vp v-=vn
RF  resistor 90k 1% : out fb
RG  resistor 10k 1% : fb gnd
"""
ERRORS = ("errors opamp open_loop_gain=1G gain_bandwidth=1M input_offset_voltage=1m (-3m..3m) "
          "input_bias_current=100n input_offset_current=20n")


def test_output_offset_is_vos_times_noise_gain_plus_bias_current_terms():
    """Vout = Vos·(1 + Rf/Rg) − Ib+·Rs·(1 + Rf/Rg) + Ib−·Rf with Ib± = Ib ± Ios/2 (Horowitz &
    Hill, *The Art of Electronics*, op-amp offsets, from memory).  A0 = 10⁹ makes the ideal
    formula exact to 1e-8."""
    section = feedback(NONINVERTING, ERRORS, "input VS\noutput out")
    offset = section["offset"]
    gain = 1 + 90e3 / 10e3
    ib_p, ib_n, rs, rf = 110e-9, 90e-9, 10e3, 90e3
    expected = 1e-3 * gain - ib_p * rs * gain + ib_n * rf
    assert section["output_offset_v"] == pytest.approx(expected, rel=1e-6)
    rows = {row["source"]: row for row in offset["contributions"] if row["part"] == "U1"}
    assert rows["input_offset_voltage"]["output_v"] == pytest.approx(1e-3 * gain, rel=1e-6)
    assert rows["input_bias_current"]["output_v"] == pytest.approx(100e-9 * (rf - rs * gain),
                                                                   rel=1e-6)
    assert rows["input_offset_current"]["output_v"] == pytest.approx(
        -10e-9 * rs * gain - 10e-9 * rf, rel=1e-6)
    # worst case: Vos at the far end of its range; each resistor's 1 % moves the noise gain
    tolerance = {row["part"]: row["worst_output_v"] for row in offset["contributions"]
                 if row["source"] == "tolerance"}
    assert rows["input_offset_voltage"]["worst_output_v"] == pytest.approx(3e-3 * gain,
                                                                           rel=1e-6)
    worst_terms = [3e-3 * gain, abs(100e-9 * (rf - rs * gain)), 10e-9 * (rs * gain + rf)]
    assert offset["worst_case_v"] == pytest.approx(sum(worst_terms) + sum(tolerance.values()),
                                                   rel=1e-6)
    # RF up 1 %: Vos and Ib+ terms scale with 1 + 1.01·Rf/Rg, the Ib− term with 1.01·Rf
    rf_up = (1e-3 - ib_p * rs) * (1 + 1.01 * 9) + ib_n * rf * 1.01
    assert tolerance["RF"] == pytest.approx(abs(rf_up - expected), rel=1e-4)


SLOW_STAGE = """
VP  supply   15 V  : vp gnd
VN  supply   15 V  : gnd vn
VS  signal   0.1 V 10 kHz : in gnd
U1  opamp    slow : in+=in in-=fb out=out v+=vp v-=vn
RF  resistor 9k    : out fb
RG  resistor 1k    : fb gnd
"""
SLOW = "slow opamp open_loop_gain=1G gain_bandwidth=10M slew_rate=0.5M output_headroom=1"


def test_slew_limited_large_step_ramps_at_the_slew_rate():
    """A large step through the time march: the output ramps no faster than the slew rate
    and reaches it (0.5 V/µs, the model's value; Sedra & Smith, "slew rate", from memory),
    while the small step of the same stage is not slew-limited (its steepest slope is set by
    the closed-loop bandwidth: 10 mV·2π·1 MHz = 63 kV/s per the single pole)."""
    section = feedback(SLOW_STAGE, SLOW, "input VS\noutput out")
    large = section["slew_step"]
    assert large["slew_rate_v_per_s"] == 0.5e6
    # the output range is ±14 V: a 14 V step at the output, 28 µs of slewing
    assert large["amplitude_v"] * 10 == pytest.approx(14.0, rel=1e-3)
    assert large["steepest_slope_v_per_s"] == pytest.approx(0.5e6, rel=1e-6)
    times, wave = np.array(large["time_s"]), np.array(large["output_v"])
    ramp = (wave > 2.0) & (wave < 10.0)
    slope = np.polyfit(times[ramp], wave[ramp], 1)[0]
    assert slope == pytest.approx(0.5e6, rel=1e-6)
    assert section["step"]["overshoot_percent"] == pytest.approx(0.0, abs=1e-6)


def test_full_power_bandwidth_is_slew_rate_over_two_pi_peak():
    """Full-power bandwidth = SR/(2π·Vpeak) (Sedra & Smith, from memory), at the output peak
    the bench signal produces: 0.1 V through a gain of 10 whose single-pole closed-loop
    bandwidth is GBW/10 = 1 MHz, so 1 V/√(1 + (10 kHz/1 MHz)²) (Sedra & Smith, from memory)."""
    limits = feedback(SLOW_STAGE, SLOW, "input VS\noutput out")["opamps"]["U1"]
    peak = 1.0 / math.sqrt(1 + (10e3 / 1e6) ** 2)
    assert limits["output_peak_v"] == pytest.approx(peak, rel=1e-6)
    assert limits["full_power_bandwidth_hz"] == pytest.approx(0.5e6 / (TWO_PI * peak), rel=1e-6)
    # 2π·10 kHz·1 V = 62.8 kV/s < 0.5 V/µs: not slew-limited
    assert limits["slew_limited"] is False
    assert limits["output_range_v"] == [-14.0, 14.0]


def _errors(bench: str) -> tuple[list[dict], int]:
    """The feedback analysis' errors and the design line number of the bench's last line."""
    text = design_text(CE_STAGE, "plain npn saturation_current=10f", bench)
    last = bench.splitlines()[-1]
    line = text.splitlines().index(last) + 1
    out = pipeline.run(read_text(text, "test.md"), _BUILTINS,
                       only=frozenset({"op", "ac", "feedback"}))
    return [e for e in out["errors"] if e["analysis"] == "feedback"], line


def test_bench_errors_point_at_the_line():
    """A loop at a resistor, or a common-mode line naming one part, is an error at that bench
    line and value."""
    [error], line = _errors("input VS\noutput c\nloop RC")
    assert "op-amp or a transistor" in error["message"]
    assert (error["line"], error["col"]) == (line, 6)
    [error], line = _errors("input VS\noutput c\ncommon mode VS")
    assert "two input parts" in error["message"]
    assert (error["line"], error["col"]) == (line, 13)


def test_results_validate_and_requirements_read_the_section():
    """The pipeline's results validate against the project's JSON Schema (jsonschema),
    and requirements on phase margin, PSRR and offset reach verdicts from this section.  The
    follower's phase margin is 90° within 0.01° (single pole; Sedra & Smith, from memory)."""
    import json
    from pathlib import Path

    import jsonschema

    require = """
phase margin          : > 45°
PSRR at 100 Hz        : > 60 dB
output offset         : < 1 mV
"""
    follower = """
VP  supply   15 V  : vp gnd
VN  supply   15 V  : gnd vn
VS  signal   10 mV 1 kHz source=1k : in gnd
U1  opamp    clean : in+=in in-=out out=out v+=vp v-=vn
"""
    design_page = design_text(follower, CLEAN, "input VS\noutput out") + \
        "\n```require\n" + require.strip() + "\n```\n"
    out = pipeline.run(read_text(design_page, "test.md"), _BUILTINS,
                       only=frozenset({"op", "ac", "noise", "feedback", "checks"}))
    schema = json.loads(Path("docgen/schema/results.schema.json").read_text())
    jsonschema.validate(json.loads(json.dumps(out, allow_nan=False)), schema)
    verdicts = {c["metric"]: c for c in out["checks"]}
    assert verdicts["phase margin"]["value"] == pytest.approx(90.0, abs=0.01)
    assert verdicts["phase margin"]["verdict"] == "pass"
    assert verdicts["output offset"]["verdict"] == "pass"
    # the op-amp model has no supply dependence: no PSRR figure, said so
    assert verdicts["PSRR at 100 Hz"]["value"] is None
    from docgen.report import render

    text = render(out)
    assert "phase margin" in text and "90 °" in text
    assert "Output offset budget at out" in text


def test_capacitive_bench_load_adds_the_output_pole_to_the_loop():
    """A follower with output resistance Ro driving the bench load RL‖CL: the loop gains a
    pole at 1/(2π·(Ro‖RL)·CL) and the divider RL/(Ro + RL), so T = A0·RL/(Ro + RL) /
    ((1 + jf/f1)(1 + jf/f2)) (Horowitz & Hill, *The Art of Electronics*, capacitive loads,
    from memory); crossover by scipy.optimize.brentq."""
    circuit = """
VP  supply   15 V  : vp gnd
VN  supply   15 V  : gnd vn
VS  signal   10 mV 1 kHz : in gnd
U1  opamp    driver : in+=in in-=out out=out v+=vp v-=vn
"""
    models = CLEAN.replace("clean", "driver") + " output_resistance=100"
    section = feedback(circuit, models, "input VS\noutput out\nload 10k || 10n")
    ro, rl, cl = 100.0, 10e3, 10e-9
    f2 = 1.0 / (TWO_PI * (ro * rl / (ro + rl)) * cl)

    def loop(f):
        return A0 * rl / (ro + rl) / ((1 + 1j * f / F_POLE) * (1 + 1j * f / f2))

    crossover = optimize.brentq(lambda f: abs(loop(f)) - 1.0, 1e3, 1e8, xtol=1e-6)
    margin = 180.0 + math.degrees(np.angle(loop(crossover)))
    assert section["crossover_hz"] == pytest.approx(crossover, rel=1e-6)
    assert section["phase_margin_deg"] == pytest.approx(margin, abs=1e-4)
