"""Device equations: constants, closed forms, temperature and the derivatives Newton relies on.

References are named beside each check: scipy.constants (CODATA/SI 2019 exact constants), the
Lambert-W closed form of a diode with a series resistor (Banwell & Jayakumar, Electronics
Letters 2000, from memory; ``scipy.special.lambertw``, ``mpmath.lambertw`` beyond float
range), Sedra & Smith *Microelectronic Circuits* for the small-signal bipolar figures, and
central finite differences (numerical analysis) for every analytic derivative.
"""

from __future__ import annotations

import mpmath
import numpy as np
import pytest
from scipy import constants
from scipy.special import lambertw
from solver_helpers import solve, v

from docgen.solve import devices

T25 = constants.zero_Celsius + 25.0


def test_thermal_voltage_matches_kt_over_q():
    # kT/q at 25 °C = 25.693 mV (SI 2019 exact k and q; references.md)
    assert float(devices.thermal_voltage(T25)) == pytest.approx(25.693e-3, abs=5e-7)
    assert float(devices.thermal_voltage(300.0)) == pytest.approx(
        constants.k * 300.0 / constants.e, rel=1e-15)


@pytest.mark.parametrize(("saturation", "ideality", "series", "volts"), [
    (1e-14, 1.0, 1e3, 5.0),
    (2e-9, 1.8, 470.0, 1.2),
    (1e-12, 1.3, 10.0, 0.9),
    (1e-15, 1.0, 1e5, 30.0),
])
def test_diode_with_series_resistor_matches_lambert_w(saturation, ideality, series, volts):
    # I = (nVT/R)·W((IS·R/(nVT))·exp((V + IS·R)/(nVT))) − IS  (Banwell & Jayakumar 2000,
    # from memory), evaluated with scipy.special.lambertw; the part's own series resistance
    # and an external resistor share R.
    solution = solve(f"""
V1 supply {volts} V         : a gnd
R1 resistor {series / 2}   : a k
D1 diode  test-diode        : k gnd
""", models=f"test-diode diode saturation_current={saturation} ideality={ideality} "
            f"series_resistance={series / 2}")
    n_vt = ideality * float(devices.thermal_voltage(T25))
    log_arg = np.log(saturation * series / n_vt) + (volts + saturation * series) / n_vt
    if log_arg < 600:
        w = lambertw(np.exp(log_arg)).real
    else:  # beyond float range: the same W in arbitrary precision (mpmath, sympy's backend)
        w = float(mpmath.lambertw(mpmath.exp(log_arg)).real)
    expected = n_vt / series * w - saturation
    current = solution.currents["D1"][0, 0]
    # 1 pS of junction conductance (documented) is far below this tolerance
    assert current == pytest.approx(expected, rel=1e-8)


def test_diode_slope_is_about_60_mv_per_decade():
    # VT·ln 10 = 59.2 mV per decade at 25 °C (physics; "60 mV per decade", common practice)
    v_decade = []
    for amps in ("100u", "1m"):
        s = solve(f"""
I1 current {amps} : gnd a
D1 diode test-diode : a gnd
R1 resistor 1G : a gnd
""", models="test-diode diode saturation_current=1e-14")
        v_decade.append(v(s, "a"))
    assert v_decade[1] - v_decade[0] == pytest.approx(59.16e-3, abs=0.05e-3)


def test_junction_voltage_falls_about_2_mv_per_kelvin():
    # VBE falls about 2 mV/°C at constant current (common practice; references.md)
    circuit = """
I1 current 1m : gnd a
D1 diode test-diode : a gnd
R1 resistor 1G : a gnd
"""
    cold = v(solve(circuit, models="test-diode diode saturation_current=1e-14",
                   temperature=25.0), "a")
    hot = v(solve(circuit, models="test-diode diode saturation_current=1e-14",
                  temperature=75.0), "a")
    assert (hot - cold) / 50.0 == pytest.approx(-2.0e-3, abs=0.4e-3)


def test_saturation_current_doubles_roughly_every_5_kelvin():
    # Silicon IS roughly doubles every 5 K near room temperature (common practice; Horowitz &
    # Hill, from memory): accept 4..7 K per doubling.
    ratio = devices.saturation_current_at(1e-14, T25 + 10.0, 1.11, 3.0, 1.0) / 1e-14
    per_doubling = 10.0 / np.log2(float(ratio))
    assert 4.0 < per_doubling < 7.0


def test_bipolar_small_signal_figures_follow_the_textbook():
    # gm = IC/VT, rπ = β/gm, ro = VA/IC (Sedra & Smith), at a forward-active point.
    vt = float(devices.thermal_voltage(T25))
    beta, va, i_sat = 200.0, 80.0, 1e-15
    vbe, vce = np.array([0.65]), np.array([5.0])
    r = devices.bipolar(vbe, vbe - vce, i_sat, beta, 1.0, va, vt)
    d_dvbe = r.d_dvbe[0] + r.d_dvbc[0]  # at constant vCE
    gm, g_pi, g_out = d_dvbe[0], d_dvbe[1], -r.d_dvbc[0][0]
    ic = r.ic[0]
    assert gm == pytest.approx(ic / vt, rel=1e-6)
    assert 1 / g_pi == pytest.approx(beta * (1 + vce[0] / va) / gm, rel=1e-6)
    # ro = VA/IC' with IC' the current without the Early factor (Sedra & Smith)
    assert 1 / g_out == pytest.approx(va / (ic / (1 + vce[0] / va)), rel=1e-6)


def _finite_difference(func, x, h):
    return (func(x + h) - func(x - h)) / (2 * h)


@pytest.mark.parametrize("vbe", [0.3, 0.6, 0.7, -2.0])
@pytest.mark.parametrize("vbc", [-5.0, 0.2, 0.65])
def test_bipolar_derivatives_match_finite_differences(vbe, vbc):
    args = (1e-14, 150.0, 2.0, 60.0, 0.0257)
    base = devices.bipolar(np.array([vbe]), np.array([vbc]), *args)
    h = 1e-7
    for which, analytic in ((0, base.d_dvbe), (1, base.d_dvbc)):
        def currents(x, which=which):
            u = [np.array([vbe]), np.array([vbc])]
            u[which] = u[which] + x
            r = devices.bipolar(u[0], u[1], *args)
            return np.array([r.ic[0], r.ib[0], r.ie[0]])
        numeric = _finite_difference(currents, 0.0, h)
        assert analytic[0] == pytest.approx(numeric, rel=1e-4, abs=1e-12)


@pytest.mark.parametrize("vgs", [-1.0, 0.5, 2.5, 4.0])
@pytest.mark.parametrize("vds", [-3.0, -0.2, 0.3, 1.0, 6.0])
def test_square_law_derivatives_match_finite_differences(vgs, vds):
    k, vth, lam = 0.05, 1.0, 0.02
    r = devices.square_law(np.array([vgs]), np.array([vds]), k, vth, lam)
    h = 1e-7
    gm = _finite_difference(lambda x: devices.square_law(np.array([vgs + x]), np.array([vds]),
                                                         k, vth, lam).current[0], 0.0, h)
    gds = _finite_difference(lambda x: devices.square_law(np.array([vgs]), np.array([vds + x]),
                                                          k, vth, lam).current[0], 0.0, h)
    assert r.gm[0] == pytest.approx(gm, rel=1e-5, abs=1e-9)
    assert r.gds[0] == pytest.approx(gds, rel=1e-5, abs=1e-9)


def test_square_law_matches_the_textbook_saturation_formula():
    # JFET in saturation: ID = IDSS·(1 − VGS/VP)² (Sedra & Smith), with K = IDSS/VP², Vth = VP
    idss, vp = 8e-3, -2.5
    r = devices.square_law(np.array([-1.0]), np.array([10.0]), idss / vp**2, vp, 0.0)
    # (the documented 1 pS across the channel adds 10 pA here)
    assert r.current[0] == pytest.approx(idss * (1 - (-1.0) / vp) ** 2, rel=1e-8)


@pytest.mark.parametrize("vd", [-1.0, -1e-4, 0.0, 2e-5, 1e-3, 3.0])
def test_opamp_output_derivatives_match_finite_differences(vd):
    args = (np.array([12.0]), np.array([-12.0]), 1e5, 1.5)
    e = devices.opamp_output(np.array([vd]), *args)
    h = 1e-9
    numeric = _finite_difference(
        lambda x: devices.opamp_output(np.array([vd + x]), *args).voltage[0], 0.0, h)
    assert e.d_dvd[0] == pytest.approx(numeric, rel=1e-4, abs=1e-6)


def test_opamp_output_is_linear_inside_and_limited_outside():
    e = devices.opamp_output(np.array([1e-5, 1.0, -1.0]), np.array([12.0] * 3),
                             np.array([-12.0] * 3), 1e5, 1.5)
    assert e.voltage[0] == pytest.approx(1.0, rel=1e-9)  # A0·vd well inside the range
    assert e.voltage[1] == pytest.approx(10.5, abs=1e-6)  # v+ minus headroom
    assert e.voltage[2] == pytest.approx(-10.5, abs=1e-6)


def test_exponential_never_overflows():
    value, slope = devices.limited_exp(np.array([1e4]))
    assert np.isfinite(value).all() and np.isfinite(slope).all()


def test_junction_limiting_damps_large_forward_steps_only():
    n_vt, crit = np.array([0.0257]), np.array([0.7])
    assert devices.limit_junction(np.array([5.0]), np.array([0.6]), n_vt, crit)[0] < 0.8
    assert devices.limit_junction(np.array([0.5]), np.array([0.4]), n_vt, crit)[0] == 0.5
    assert devices.limit_junction(np.array([-20.0]), np.array([0.6]), n_vt, crit)[0] == -20.0


def test_beta_rises_about_half_a_percent_per_kelvin():
    # Common practice: a silicon transistor's β rises by roughly 0.5–1 %/K near room
    # temperature; the generic model's exponent 1.5 must land in that band.
    from solver_helpers import _BUILTINS

    exponent = _BUILTINS["generic-npn"].params["beta_temperature_exponent"].value
    ratio = float(devices.beta_at(1.0, T25 + 10.0, exponent))
    assert 0.005 <= (ratio - 1.0) / 10.0 <= 0.01


def test_resistor_tempco_shifts_a_divider():
    # R(T) = R25·(1 + α·(T − 25 °C)) for a linear tempco α (IEC 60115-1 defines the
    # temperature coefficient this way, from memory): +1000 ppm/K on the top resistor at 75 °C
    # makes it 5 % larger.
    circuit = """
V1  supply   10 V                 : a gnd
R1  resistor 1k tempco=1000ppm    : a b
R2  resistor 1k                   : b gnd
"""
    hot = solve(circuit, temperature=75.0)
    assert v(hot, "b") == pytest.approx(10 * 1e3 / (1e3 + 1.05e3), rel=1e-12)
