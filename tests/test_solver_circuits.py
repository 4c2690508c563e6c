"""Whole circuits against the textbook hand analysis and exact formulas.

Sources beside each check: Sedra & Smith, *Microelectronic Circuits* (divider bias, current
mirror, JFET and MOSFET square law; from memory), Black's feedback formula A/(1 + Aβ) for the
op-amp stages (any control or electronics textbook), and "common practice" where a rule of
thumb (VBE ≈ 0.6–0.7 V, IE ≈ IC) is the reference.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from solver_helpers import solve, v

from docgen.solve.operating_point import part_quantities

CE_STAGE = """
VC  supply   {vcc} V       : vcc gnd
R1  resistor 47k           : vcc b
R2  resistor 10k           : b gnd
RC  resistor 4k7           : vcc c
RE  resistor 1k            : e gnd
Q1  {kind}   {model}       : c=c b=b e=e
"""
BJT = ("saturation_current=10f beta=150 beta_reverse=2 early_voltage=100")


def test_divider_biased_common_emitter_matches_the_hand_method():
    # Sedra & Smith divider bias: IE = (VTH − VBE)/(RE + RTH/(β+1)); with VBE between 0.6 and
    # 0.7 V (common practice) the solved IE must fall inside the bracket it gives.
    s = solve(CE_STAGE.format(vcc=15, kind="npn", model="q"), models=f"q npn {BJT}")
    q = {k: float(val[0]) for k, val in part_quantities(s, "Q1").items() if k != "region"}
    vth, rth, beta = 15 * 10 / 57, 47e3 * 10e3 / 57e3, 150.0
    bracket = [(vth - vbe) / (1e3 + rth / (beta + 1)) for vbe in (0.7, 0.6)]
    assert bracket[0] < q["ie_a"] < bracket[1]
    assert 0.6 < q["vbe_v"] < 0.7
    assert q["ic_a"] == pytest.approx(q["ie_a"], rel=0.01)  # IE ≈ IC (common practice)
    assert v(s, "c") == pytest.approx(15 - q["ic_a"] * 4.7e3, rel=1e-9)  # Ohm's law
    assert part_quantities(s, "Q1")["region"][0] == "active"


def test_pnp_stage_mirrors_the_npn_stage_exactly():
    # Mirror symmetry: a pnp with the same parameters on a negative supply gives every node
    # voltage negated (Ebers–Moll is odd under a sign change of all voltages and currents).
    npn = solve(CE_STAGE.format(vcc=15, kind="npn", model="q"), models=f"q npn {BJT}")
    pnp = solve(CE_STAGE.format(vcc=-15, kind="pnp", model="q"), models=f"q pnp {BJT}")
    for net in ("b", "c", "e"):
        assert v(pnp, net) == pytest.approx(-v(npn, net), rel=1e-9)
    n, p = part_quantities(npn, "Q1"), part_quantities(pnp, "Q1")
    for key in ("ic_a", "ib_a", "ie_a", "vbe_v", "vce_v"):
        assert p[key][0] == pytest.approx(n[key][0], rel=1e-9)


def test_current_mirror_ratio():
    # Sedra & Smith: IO/IREF = 1/(1 + 2/β) for a two-transistor mirror without Early effect.
    s = solve("""
VC  supply   10 V   : vcc gnd
RR  resistor 9k3    : vcc x
Q1  npn      q      : c=x b=x e=gnd
Q2  npn      q      : c=out b=x e=gnd
VO  supply   5 V    : out gnd
""", models="q npn saturation_current=10f beta=100")
    i_ref = s.currents["RR"][0, 0]
    i_out = part_quantities(s, "Q2")["ic_a"][0]
    assert i_out / i_ref == pytest.approx(1 / (1 + 2 / 100), rel=1e-6)


OPAMP = "ideal-ish opamp open_loop_gain={gain} output_headroom=1 output_resistance=0"


@pytest.mark.parametrize("gain", [1e5, 1e7])
@pytest.mark.parametrize(("rf", "rg"), [(9e3, 1e3), (47e3, 4.7e3), (1e3, 1e6)])
def test_non_inverting_stage(gain, rf, rg):
    # Black's formula G = A/(1 + Aβ), β = Rg/(Rf + Rg); → 1 + Rf/Rg as A → ∞ (textbook).
    s = solve(f"""
VP  supply   15 V   : vp gnd
VN  supply   15 V   : gnd vn
VI  supply   0.1 V  : in gnd
U1  opamp    ideal-ish : in+=in in-=fb out=out v+=vp v-=vn
RF  resistor {rf!r} : out fb
RG  resistor {rg!r} : fb gnd
""", models=OPAMP.format(gain=gain))
    beta = rg / (rf + rg)
    assert v(s, "out") / 0.1 == pytest.approx(gain / (1 + gain * beta), rel=1e-9)
    assert v(s, "out") / 0.1 == pytest.approx(1 + rf / rg, rel=20 / gain)


@pytest.mark.parametrize(("rf", "rg"), [(10e3, 1e3), (2.2e3, 22e3)])
def test_inverting_stage(rf, rg):
    # Inverting: G = −(Rf/Rg)/(1 + (1 + Rf/Rg)/A) → −Rf/Rg as A → ∞ (textbook).
    gain = 1e6
    s = solve(f"""
VP  supply   15 V   : vp gnd
VN  supply   15 V   : gnd vn
VI  supply   0.2 V  : in gnd
RG  resistor {rg!r} : in m
RF  resistor {rf!r} : m out
U1  opamp    ideal-ish : in+=gnd in-=m out=out v+=vp v-=vn
""", models=OPAMP.format(gain=gain))
    exact = -(rf / rg) / (1 + (1 + rf / rg) / gain)
    assert v(s, "out") / 0.2 == pytest.approx(exact, rel=1e-9)
    assert v(s, "out") / 0.2 == pytest.approx(-rf / rg, rel=1e-4)


def test_opamp_output_stops_at_its_supply_minus_headroom():
    s = solve("""
VP  supply   12 V   : vp gnd
VN  supply   12 V   : gnd vn
VI  supply   2 V    : in gnd
U1  opamp    ideal-ish : in+=in in-=fb out=out v+=vp v-=vn
RF  resistor 9k    : out fb
RG  resistor 1k    : fb gnd
""", models=OPAMP.format(gain=1e5))
    assert v(s, "out") == pytest.approx(11.0, abs=1e-3)  # 12 V minus 1 V headroom
    assert bool(part_quantities(s, "U1")["output_limited"][0])


def test_jfet_source_follower_matches_the_square_law():
    # Sedra & Smith: ID = IDSS(1 − VGS/VP)², VGS = −ID·RS; solved in closed form (quadratic).
    idss, vp, rs = 6e-3, 2.0, 1e3
    s = solve(f"""
VD  supply   15 V   : vdd gnd
RG  resistor 1M     : g gnd
J1  njfet    j      : d=vdd g=g s=s
RS  resistor {rs!r} : s gnd
""", models=f"j njfet drain_saturation_current={idss!r} pinch_off_voltage={vp!r}")
    # VS = x: x/RS = IDSS(1 − x/VP)² → (IDSS/VP²)x² − (2·IDSS/VP + 1/RS)x + IDSS = 0
    a, b, c = idss / vp**2, -(2 * idss / vp + 1 / rs), idss
    roots = [(-b - math.sqrt(b * b - 4 * a * c)) / (2 * a),
             (-b + math.sqrt(b * b - 4 * a * c)) / (2 * a)]
    expected = min(r for r in roots if 0 < r < vp)  # the root with the channel open
    assert v(s, "s") == pytest.approx(expected, rel=1e-7)
    assert part_quantities(s, "J1")["region"][0] == "saturation"


def test_mosfet_source_follower_matches_the_square_law():
    # ID = K(VGS − VT)², VGS = VG − ID·RS (Sedra & Smith square law, λ = 0), closed form.
    k, vt, rs, vg = 0.05, 2.0, 100.0, 6.0
    s = solve(f"""
VD  supply   12 V   : vdd gnd
VG  supply   {vg} V : g gnd
M1  nmos     m      : d=vdd g=g s=s
RS  resistor {rs}   : s gnd
""", models=f"m nmos transconductance_coefficient={k} threshold_voltage={vt}")
    # overdrive u: k·u²·RS + u − (VG − VT) = 0
    u = (-1 + math.sqrt(1 + 4 * k * rs * (vg - vt))) / (2 * k * rs)
    assert v(s, "s") == pytest.approx(vg - vt - u, rel=1e-7)


def test_pmos_follower_mirrors_the_nmos_one():
    models = "m nmos transconductance_coefficient=0.05 channel_length_modulation=0.01\n" \
             "mp pmos transconductance_coefficient=0.05 channel_length_modulation=0.01"
    circuit = """
VD  supply   {v} V   : vdd gnd
VG  supply   {g} V   : g gnd
M1  {kind}   {model} : d=vdd g=g s=s
RS  resistor 100     : s gnd
"""
    n = solve(circuit.format(v=12, g=6, kind="nmos", model="m"), models=models)
    p = solve(circuit.format(v=-12, g=-6, kind="pmos", model="mp"), models=models)
    assert v(p, "s") == pytest.approx(-v(n, "s"), rel=1e-9)
    assert part_quantities(p, "M1")["id_a"][0] == pytest.approx(
        part_quantities(n, "M1")["id_a"][0], rel=1e-9)


def test_power_balances_supplies_against_every_part():
    # Tellegen's theorem: the power delivered by the sources equals the power absorbed.
    s = solve(CE_STAGE.format(vcc=15, kind="npn", model="generic-npn"))
    absorbed = sum(float(part_quantities(s, d.name)["power_w"][0])
                   for d in s.circuit.devices if d.kind != "supply")
    delivered = -float(part_quantities(s, "VC")["power_w"][0])
    assert absorbed == pytest.approx(delivered, rel=1e-9)


def test_kirchhoff_current_law_holds_at_every_net():
    s = solve(CE_STAGE.format(vcc=15, kind="npn", model="generic-npn"))
    for net in s.circuit.nets:
        total = sum(s.currents[d.name][0, t] for d in s.circuit.devices
                    for t, n in enumerate(d.nets) if n == net)
        assert abs(total) < 1e-12
    assert np.isfinite(s.x).all()
