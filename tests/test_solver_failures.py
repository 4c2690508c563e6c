"""Circuits that cannot be solved: each message names the right nets and parts, at their line.

The reference is the circuit itself (which net is floating, which sources form a loop): each
case is built so exactly one answer is right.  Line numbers count from the page built by
``solver_helpers.design_text`` (the first circuit line is line 6).
"""

from __future__ import annotations

import numpy as np
import pytest
from solver_helpers import SINK, make_circuit

from docgen.diagnostics import AnalysisError, CircuitError
from docgen.elaborate import elaborate
from docgen.reader import read_text
from docgen.solve.newton import SolveOptions
from docgen.solve.operating_point import require_converged, solve_op

FIRST_LINE = 6


def _error(circuit: str, models: str = "") -> CircuitError:
    with pytest.raises(CircuitError) as caught:
        solve_op(make_circuit(circuit, models))
    return caught.value


def test_net_reached_only_through_capacitors_is_floating():
    error = _error("""
V1  supply    5 V  : vcc gnd
R1  resistor  1k   : vcc a
C1  capacitor 1u   : a x
C2  capacitor 1u   : x gnd
""")
    (d,) = error.diagnostics
    assert "'x'" in d.message and "no DC path to gnd" in d.message
    assert "capacitor C1" in d.message and "capacitor C2" in d.message
    assert d.line == FIRST_LINE + 2 and d.path == "test.md"
    assert d.hint and "resistor" in d.hint


def test_fet_gate_behind_a_coupling_capacitor_is_floating():
    error = _error("""
V1  supply    12 V          : vdd gnd
VS  signal    1 mV 1 kHz    : s gnd
C1  capacitor 100n          : s g
J1  njfet     generic-njfet : d=vdd g=g s=src
RS  resistor  1k            : src gnd
""")
    (d,) = error.diagnostics
    assert "'g'" in d.message and "the gate of J1" in d.message and "capacitor C1" in d.message


def test_opamp_input_behind_a_capacitor_is_floating():
    error = _error("""
VP  supply    12 V          : vp gnd
VN  supply    12 V          : gnd vn
VS  signal    1 mV 1 kHz    : s gnd
C1  capacitor 1u            : s p
U1  opamp     generic-opamp : in+=p in-=out out=out v+=vp v-=vn
""")
    (d,) = error.diagnostics
    assert "'p'" in d.message and "op-amp U1 (in+ pin)" in d.message


def test_two_supplies_in_parallel_form_a_loop():
    error = _error("""
V1  supply    5 V  : a gnd
V2  supply    3 V  : a gnd
R1  resistor  1k   : a gnd
""")
    (d,) = error.diagnostics
    assert "loop of voltage sources" in d.message
    assert "supply V1" in d.message and "supply V2" in d.message
    assert d.line == FIRST_LINE + 1  # reported at the part that closes the loop
    assert "resistance=" in (d.hint or "")


def test_an_inductor_across_a_supply_is_a_loop_unless_it_has_resistance():
    error = _error("""
V1  supply    5 V  : a gnd
L1  inductor  1m   : a gnd
""")
    assert "inductor L1" in error.diagnostics[0].message
    solution = solve_op(make_circuit("""
V1  supply    5 V              : a gnd
L1  inductor  1m resistance=2  : a gnd
"""))
    assert solution.currents["L1"][0, 0] == pytest.approx(2.5)


def test_current_sources_in_series_have_nowhere_to_send_their_current():
    error = _error("""
V1  supply    5 V   : vcc gnd
R1  resistor  1k    : vcc gnd
I1  current   1m    : vcc x
I2  current   2m    : x gnd
""")
    (d,) = error.diagnostics
    assert "'x'" in d.message and "current sources I1 and I2" in d.message
    assert d.line == FIRST_LINE + 2


def test_current_source_into_a_capacitor_alone():
    error = _error("""
I1  current   1m    : gnd x
C1  capacitor 1u    : x gnd
""")
    assert "current source I1" in error.diagnostics[0].message
    assert "capacitor C1" in error.diagnostics[0].message


def test_every_problem_of_a_circuit_is_reported_at_once():
    error = _error("""
V1  supply    5 V  : a gnd
V2  supply    3 V  : a gnd
C1  capacitor 1u   : a x
C2  capacitor 1u   : x gnd
""")
    assert len(error.diagnostics) == 2


def test_missing_and_wrong_kind_models_name_the_part():
    design = read_text("""---
title: t
---

```circuit
V1  supply  5 V          : a gnd
R1  resistor 1k          : a b
Q1  npn     generic-npm  : c=a b=b e=gnd
Q2  npn     generic-pnp  : c=a b=b e=gnd
```
""", "t.md")
    from solver_helpers import _BUILTINS

    with pytest.raises(CircuitError) as caught:
        elaborate(design, _BUILTINS)
    first, second = caught.value.diagnostics
    assert "Q1" in first.message and "generic-npm" in first.message
    assert first.hint == "did you mean 'generic-npn'?"
    assert "Q2" in second.message and "pnp model" in second.message


def test_non_convergence_names_the_part_and_what_was_tried():
    circuit = make_circuit(SINK)
    solution = solve_op(circuit, options=SolveOptions(gmin_stepping=False,
                                                      source_stepping=False))
    with pytest.raises(AnalysisError) as caught:
        require_converged(solution)
    (d,) = caught.value.diagnostics
    assert "did not converge" in d.message and "tried newton" in d.message
    named = [name for name in ("U1", "M1", "RS", "RL") if name in d.message]
    assert named, d.message
    assert d.line in {FIRST_LINE + 3, FIRST_LINE + 4, FIRST_LINE + 5, FIRST_LINE + 6}
    assert np.isfinite(solution.x).all() or not solution.converged[0]


@pytest.mark.parametrize("stepping", [False, True])
def test_a_singular_sample_is_reported_not_turned_into_nan(stepping):
    # A batch where, in sample 1, both resistors at net b are open (infinite): nothing fixes
    # b's voltage, so that sample's matrix is singular; sample 0 still solves.
    circuit = make_circuit("""
V1  supply    5 V   : a gnd
R1  resistor  1k    : a b
R2  resistor  1k    : b gnd
""")
    options = SolveOptions(gmin_stepping=stepping, source_stepping=stepping)
    solution = solve_op(circuit, overrides={("R1", "value"): [1e3, np.inf],
                                            ("R2", "value"): [1e3, np.inf]}, options=options)
    assert solution.converged.tolist() == [True, False]
    assert solution.voltage("b")[0] == pytest.approx(2.5)
    assert np.isfinite(solution.x).all()
    with pytest.raises(AnalysisError) as caught:
        require_converged(solution, sample=1)
    (d,) = caught.value.diagnostics
    assert "net 'b'" in d.message and "singular" in d.message
    assert d.line == FIRST_LINE + 1


def test_a_signal_source_without_source_resistance_across_a_supply_is_a_loop():
    error = _error("""
V1  supply    5 V        : a gnd
VS  signal    1 mV 1 kHz : a gnd
R1  resistor  1k         : a gnd
""")
    (d,) = error.diagnostics
    assert "signal VS" in d.message and "supply V1" in d.message and "net" in d.message
    # with a source resistance it is an ordinary circuit
    solution = solve_op(make_circuit("""
V1  supply    5 V                 : a gnd
VS  signal    1 mV 1 kHz source=50 : a gnd
R1  resistor  1k                  : a gnd
"""))
    assert solution.voltage("a")[0] == pytest.approx(5.0)
    assert solution.currents["VS"][0, 0] == pytest.approx(5.0 / 50)
