"""Hard circuits: they converge, and what they converge to satisfies the physics.

Each answer is checked against an outside fact, named beside it: Kirchhoff's current law at
every net, symmetry, Ohm's law, the Shockley equation, or the op-amp stage's own feedback
condition.  The stepping test shows, with default settings, that plain Newton alone fails on
the circuit and gmin stepping rescues it.
"""

from __future__ import annotations

import numpy as np
import pytest
from solver_helpers import SINK, make_circuit, solve, v

from docgen.solve.devices import thermal_voltage
from docgen.solve.newton import SolveOptions
from docgen.solve.operating_point import dc_unstable, op_section, part_quantities, solve_op


def _kcl_ok(solution, tolerance=1e-9):
    for net in solution.circuit.nets:
        total = sum(solution.currents[d.name][0, t] for d in solution.circuit.devices
                    for t, n in enumerate(d.nets) if n == net)
        assert abs(total) < tolerance, net


def test_direct_coupled_feedback_pair_converges_to_an_active_point():
    # Two direct-coupled stages with overall DC feedback from Q2's emitter to Q1's base.
    s = solve("""
VC  supply   12 V        : vcc gnd
RF  resistor 100k        : e2 b1
R1  resistor 22k         : b1 gnd
Q1  npn      generic-npn : c=c1 b=b1 e=gnd
RC1 resistor 10k         : vcc c1
Q2  npn      generic-npn : c=c2 b=c1 e=e2
RC2 resistor 1k          : vcc c2
RE2 resistor 1k          : e2 gnd
""")
    _kcl_ok(s)
    for q in ("Q1", "Q2"):
        assert part_quantities(s, q)["region"][0] == "active"
    # hand analysis (common practice: VBE ≈ 0.65 V, β = 150 of the generic model): Q1's base
    # sits at one VBE and its base current IC1/β flows in RF, so
    # e2 = VBE·(1 + RF/R1) + RF·IC1/β with IC1 = (VCC − VBE − e2)/RC1 (Q2's VBE above e2)
    k = 100e3 / (150 * 10e3)
    hand = (0.65 * (1 + 100 / 22) + k * (12 - 0.65)) / (1 + k)
    assert v(s, "e2") == pytest.approx(hand, rel=0.05)


def test_differential_pair_with_mirror_tail_splits_its_current_equally():
    s = solve("""
VP  supply   12 V        : vp gnd
VN  supply   12 V        : gnd vn
RT  resistor 11k         : gnd ref
QR  npn      generic-npn : c=ref b=ref e=vn
QT  npn      generic-npn : c=tail b=ref e=vn
Q1  npn      generic-npn : c=c1 b=gnd e=tail
Q2  npn      generic-npn : c=c2 b=gnd e=tail
RC1 resistor 10k         : vp c1
RC2 resistor 10k         : vp c2
""")
    _kcl_ok(s)
    i1, i2 = (part_quantities(s, q)["ic_a"][0] for q in ("Q1", "Q2"))
    assert i1 == pytest.approx(i2, rel=1e-9)  # symmetry of the pair
    tail = part_quantities(s, "QT")["ic_a"][0]
    assert i1 + i2 + 2 * part_quantities(s, "Q1")["ib_a"][0] == pytest.approx(tail, rel=1e-9)


@pytest.mark.parametrize("vin", [-3.0, 3.0])
def test_schmitt_trigger_settles_on_the_rail_its_feedback_holds(vin):
    # Positive feedback: in+ = out/2. The settled state must be self-consistent: the output at
    # the limit whose sign makes in+ − in− keep it there (the comparator's own condition).
    s = solve(f"""
VP  supply   12 V          : vp gnd
VN  supply   12 V          : gnd vn
VI  supply   {vin} V       : in gnd
U1  opamp    generic-opamp : in+=p in-=in out=out v+=vp v-=vn
R1  resistor 10k           : out p
R2  resistor 10k           : p gnd
""")
    out = v(s, "out")
    assert abs(out) == pytest.approx(10.5, abs=0.05)  # 12 V − 1.5 V headroom (generic model)
    assert np.sign(v(s, "p") - v(s, "in")) == np.sign(out)
    assert bool(part_quantities(s, "U1")["output_limited"][0])


def test_anti_parallel_diodes_carry_the_current_one_way():
    # Shockley: the forward diode at V obeys I = IS(exp(V/nVT) − 1); the reverse one ≈ −IS.
    s = solve("""
V1  supply   5 V  : a gnd
R1  resistor 1k   : a d
D1  diode    dd   : d gnd
D2  diode    dd   : gnd d
""", models="dd diode saturation_current=1e-14")
    _kcl_ok(s, 1e-15)
    vd = v(s, "d")
    vt = float(thermal_voltage(298.15))
    forward = s.currents["D1"][0, 0]
    assert forward == pytest.approx(1e-14 * np.expm1(vd / vt), rel=1e-6)
    assert forward == pytest.approx((5 - vd) / 1e3, rel=1e-9)  # Ohm's law on R1
    assert s.currents["D2"][0, 0] == pytest.approx(-1e-14, abs=1e-11)




def test_plain_newton_fails_on_a_current_sink_and_stepping_rescues_it():
    # A voltage-controlled current sink (op-amp driving a MOSFET with a sense resistor):
    # from 0 V plain Newton does not settle within the default iteration cap.
    circuit = make_circuit(SINK)
    plain = solve_op(circuit, options=SolveOptions(gmin_stepping=False, source_stepping=False))
    assert not plain.converged[0]
    rescued = solve_op(circuit)
    assert rescued.converged[0]
    assert rescued.method[0] in ("gmin stepping", "source stepping")
    # Ohm's law on the sense resistor: the loop holds it at VR plus the model's 1 mV offset
    current = (1.0 + 1e-3) / 10.0
    assert v(rescued, "s") == pytest.approx(1.0 + 1e-3, rel=1e-4)
    assert v(rescued, "d") == pytest.approx(100 - current * 470, rel=1e-4)


def test_a_zener_clamp_at_high_voltage_converges_quickly():
    s = solve("""
V1  supply   200 V : vcc gnd
R1  resistor 10k   : vcc k
DZ  diode    z     : gnd k
""", models="z diode saturation_current=1e-14 breakdown_voltage=5.6")
    # at the documented 1 mA knee current plus its exponential: a little above 5.6 V
    assert 5.6 < v(s, "k") < 5.9
    assert int(s.dc.iterations[0]) < 30


LATCH = """
VC  supply   5 V         : vcc gnd
R1  resistor 1k          : vcc c1
R2  resistor 1k          : vcc c2
R3  resistor 10k         : c1 b2
R4  resistor 10k         : c2 b1
Q1  npn      generic-npn : c=c1 b=b1 e=gnd
Q2  npn      generic-npn : c=c2 b=b2 e=gnd
"""


def test_a_latch_balanced_between_its_states_is_flagged_unstable():
    # Small-signal theory: natural frequencies are eigenvalues of −C⁻¹G; if all were in the
    # left half-plane their product would have the sign (−1)^n, so det G < 0 means a real
    # growing mode for any positive capacitances (e.g. Chua, Desoer & Kuh, *Linear and
    # Nonlinear Circuits*, from memory).  A symmetric latch solved from 0 V lands on its
    # balance point, which no real latch can hold.
    s = solve(LATCH)
    assert v(s, "c1") == pytest.approx(v(s, "c2"), rel=1e-9)  # the symmetric balance point
    assert bool(dc_unstable(s)[0])
    assert op_section(s)["unstable"] is True


def test_schmitt_trigger_balance_points_are_flagged_unstable_and_rails_are_not():
    circuit = """
VP  supply   12 V         : vp gnd
VN  supply   12 V         : gnd vn
VI  supply   {vin} V      : in gnd
U1  opamp    ideal-ish    : in+=p in-=in out=out v+=vp v-=vn
R1  resistor 10k          : out p
R2  resistor 10k          : p gnd
"""
    models = "ideal-ish opamp open_loop_gain=1e5 output_headroom=1"
    poised = solve(circuit.format(vin=0), models=models)
    assert abs(v(poised, "out")) < 1e-6 and bool(dc_unstable(poised)[0])
    # inside the hysteresis band (|vin| < 5.5 V) three points solve the equations: both rails
    # and the balance out = 2·vin between them; whichever Newton finds, the flag must say
    # which kind it is
    inside = solve(circuit.format(vin=3), models=models)
    at_balance = abs(v(inside, "out") - 6.0) < 1e-3
    assert at_balance or abs(v(inside, "out")) == pytest.approx(11.0, abs=1e-3)
    assert bool(dc_unstable(inside)[0]) == at_balance
    # beyond the band only the low rail solves them: stable
    beyond = solve(circuit.format(vin=8), models=models)
    assert v(beyond, "out") == pytest.approx(-11.0, abs=1e-3)
    assert not bool(dc_unstable(beyond)[0])


@pytest.mark.parametrize("text", [
    SINK,
    """
VC  supply   15 V        : vcc gnd
R1  resistor 47k         : vcc b
R2  resistor 10k         : b gnd
RC  resistor 4k7         : vcc c
RE  resistor 1k          : e gnd
L1  inductor 1m          : c x
RX  resistor 10k         : x gnd
Q1  npn      generic-npn : c=c b=b e=e
""",
    """
VP  supply   12 V          : vp gnd
VN  supply   12 V          : gnd vn
VI  supply   0.1 V         : in gnd
RG  resistor 1k            : in m
RF  resistor 9k            : m out
U1  opamp    generic-opamp : in+=gnd in-=m out=out v+=vp v-=vn
""",
])
def test_stable_circuits_are_not_flagged(text):
    assert not bool(dc_unstable(solve(text))[0])
