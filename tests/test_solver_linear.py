"""Linear networks: the solver against exact and independent solutions.

References: sympy solves Kirchhoff's current law symbolically (exact rational arithmetic);
the property test builds the nodal conductance matrix independently and solves it with
``numpy.linalg.solve`` (Kirchhoff's laws, any circuit-analysis textbook).
"""

from __future__ import annotations

import numpy as np
import pytest
import sympy
from hypothesis import given, settings
from hypothesis import strategies as st
from solver_helpers import make_circuit, solve, v

from docgen.solve.operating_point import solve_op


def test_bridge_with_two_supplies_and_a_current_source_matches_sympy():
    solution = solve("""
VA  supply   12 V       : a gnd
VB  supply   5 V        : gnd m
R1  resistor 1k         : a x
R2  resistor 2k2        : x y
R3  resistor 4k7        : x gnd
R4  resistor 330        : y m
R5  resistor 10k        : a y
I1  current  1m         : y x
""")
    x, y = sympy.symbols("x y")
    a, m = sympy.Integer(12), sympy.Integer(-5)
    r = {k: sympy.Integer(val) for k, val in
         {"R1": 1000, "R2": 2200, "R3": 4700, "R4": 330, "R5": 10000}.items()}
    i1 = sympy.Rational(1, 1000)  # flows through I1 from y to x: leaves y, enters x
    kcl = [
        (x - a) / r["R1"] + (x - y) / r["R2"] + x / r["R3"] - i1,
        (y - x) / r["R2"] + (y - m) / r["R4"] + (y - a) / r["R5"] + i1,
    ]
    exact = sympy.solve(kcl, [x, y])
    assert v(solution, "x") == pytest.approx(float(exact[x]), rel=1e-9)
    assert v(solution, "y") == pytest.approx(float(exact[y]), rel=1e-9)
    assert v(solution, "m") == pytest.approx(-5.0, rel=1e-12)


def test_supply_internal_resistance_and_inductor_winding_resistance_match_sympy():
    solution = solve("""
VA  supply   9 V resistance=2 : a gnd
L1  inductor 10m resistance=3 : a b
R1  resistor 10               : b gnd
C1  capacitor 1u              : b gnd
""")
    current = sympy.Rational(9, 2 + 3 + 10)  # Ohm's law around the one loop
    assert v(solution, "b") == pytest.approx(float(current * 10), rel=1e-12)
    assert v(solution, "a") == pytest.approx(float(9 - 2 * current), rel=1e-12)
    parts = solution.currents
    assert parts["L1"][0, 0] == pytest.approx(float(current), rel=1e-12)


def test_signal_source_sits_at_its_offset_behind_its_source_resistance():
    solution = solve("""
VS  signal   1 mV 1 kHz source=1k offset=2 : s gnd
R1  resistor 3k                              : s gnd
""")
    assert v(solution, "s") == pytest.approx(2.0 * 3 / 4, rel=1e-12)  # divider, exact


def _nodal_reference(n_nodes, resistors, sources, supply_node, supply_volts):
    """Node voltages by an independent nodal analysis: fixed supply node eliminated."""
    g = np.zeros((n_nodes + 1, n_nodes + 1))
    i = np.zeros(n_nodes + 1)
    for a, b, r in resistors:
        for p, q in ((a, b), (b, a)):
            g[p, p] += 1 / r
            g[p, q] -= 1 / r
    for a, b, amps in sources:  # current flows through the source from a to b
        i[a] -= amps
        i[b] += amps
    unknown = [k for k in range(1, n_nodes + 1) if k != supply_node]
    rhs = i[unknown] - g[np.ix_(unknown, [supply_node])][:, 0] * supply_volts
    solved = np.linalg.solve(g[np.ix_(unknown, unknown)], rhs)
    out = {supply_node: supply_volts}
    out.update(dict(zip(unknown, solved, strict=True)))
    return out


@st.composite
def resistor_networks(draw):
    n = draw(st.integers(2, 6))
    resistors = []
    for k in range(1, n + 1):  # a tree plus a leg to ground: connected, no dangling net
        parent = draw(st.integers(0, k - 1))
        resistors.append((k, parent, draw(st.floats(10, 1e6))))
        resistors.append((k, 0, draw(st.floats(10, 1e6))))
    for _ in range(draw(st.integers(0, 6))):
        a, b = draw(st.integers(0, n)), draw(st.integers(0, n))
        if a != b:
            resistors.append((a, b, draw(st.floats(10, 1e6))))
    sources = []
    for _ in range(draw(st.integers(0, 3))):
        a, b = draw(st.integers(0, n)), draw(st.integers(0, n))
        if a != b:
            sources.append((a, b, draw(st.floats(-1e-2, 1e-2))))
    supply = draw(st.integers(1, n)), draw(st.floats(-50, 50))
    return n, resistors, sources, supply


def _net(k):
    return "gnd" if k == 0 else f"n{k}"


@settings(max_examples=60, deadline=None)
@given(resistor_networks())
def test_random_resistor_networks_agree_with_a_direct_linear_solve(network):
    n, resistors, sources, (supply_node, volts) = network
    lines = [f"V1 supply {volts!r} V : {_net(supply_node)} gnd"]
    lines += [f"R{k} resistor {r!r} : {_net(a)} {_net(b)}"
              for k, (a, b, r) in enumerate(resistors)]
    lines += [f"I{k} current {amps!r} A : {_net(a)} {_net(b)}"
              for k, (a, b, amps) in enumerate(sources)]
    solution = solve_op(make_circuit("\n".join(lines)))
    assert solution.converged.all()
    reference = _nodal_reference(n, resistors, sources, supply_node, volts)
    scale = max(1.0, max(abs(x) for x in reference.values()))
    for node, expected in reference.items():
        if _net(node) in solution.circuit.net_index:
            assert v(solution, _net(node)) == pytest.approx(expected, abs=1e-9 * scale)
