"""A batch of S samples solves exactly like S single solves (one implementation for both).

Reference: the solver itself run one sample at a time — the property under test is that
batching changes nothing (to 1e-9), including samples that need stepping next to samples that
do not, and per-sample temperatures.
"""

from __future__ import annotations

import numpy as np
import pytest
from solver_helpers import SINK, make_circuit

from docgen.solve.operating_point import part_quantities, solve_op

CE = """
VC  supply   15 V        : vcc gnd
R1  resistor 47k         : vcc b
R2  resistor 10k         : b gnd
RC  resistor 4k7         : vcc c
RE  resistor 1k          : e gnd
Q1  npn      generic-npn : c=c b=b e=e
"""


def test_batch_equals_single_solves():
    circuit = make_circuit(CE)
    rng = np.random.default_rng(7)
    samples = 16
    overrides = {
        ("R1", "value"): 47e3 * rng.uniform(0.95, 1.05, samples),
        ("RC", "value"): 4.7e3 * rng.uniform(0.95, 1.05, samples),
        ("Q1", "beta"): rng.uniform(100, 300, samples),
        ("Q1", "saturation_current"): 1e-14 * rng.uniform(0.5, 2, samples),
    }
    temperature = rng.uniform(-20, 60, samples)
    batch = solve_op(circuit, overrides, temperature)
    assert batch.converged.all()
    for k in range(samples):
        single = solve_op(circuit, {key: val[k] for key, val in overrides.items()},
                          temperature[k])
        np.testing.assert_allclose(batch.voltages[k], single.voltages[0], rtol=1e-9, atol=1e-12)
        assert part_quantities(batch, "Q1")["ic_a"][k] == pytest.approx(
            part_quantities(single, "Q1")["ic_a"][0], rel=1e-9)


def test_batch_mixing_easy_and_hard_samples_matches_single_solves():
    # The current sink needs stepping at 470 Ω but not at 100 Ω: converged samples are frozen
    # while the others go on, so every sample ends where it would alone.
    circuit = make_circuit(SINK)
    loads = np.array([100.0, 470.0, 220.0, 470.0])
    batch = solve_op(circuit, {("RL", "value"): loads})
    assert batch.converged.all()
    assert len(set(batch.method.tolist())) > 1
    for k, load in enumerate(loads):
        single = solve_op(circuit, {("RL", "value"): load})
        np.testing.assert_allclose(batch.voltages[k], single.voltages[0], rtol=1e-9, atol=1e-9)


def test_override_lengths_must_agree():
    with pytest.raises(ValueError):
        solve_op(make_circuit(CE), {("R1", "value"): np.ones(3), ("R2", "value"): np.ones(4)})


def test_unknown_override_is_refused():
    with pytest.raises(KeyError):
        solve_op(make_circuit(CE), {("R9", "value"): 1.0})


def test_starting_from_the_nominal_point_gives_the_same_answer_in_fewer_iterations():
    circuit = make_circuit(CE)
    rng = np.random.default_rng(3)
    overrides = {("RC", "value"): 4.7e3 * rng.uniform(0.9, 1.1, 50),
                 ("Q1", "beta"): rng.uniform(100, 300, 50)}
    cold = solve_op(circuit, overrides)
    warm = solve_op(circuit, overrides, start=solve_op(circuit))
    assert warm.converged.all()
    np.testing.assert_allclose(warm.voltages, cold.voltages, rtol=1e-9, atol=1e-12)
    assert warm.dc.iterations.max() < cold.dc.iterations.min()


def test_variations_list_tolerances_and_model_ranges():
    from docgen.elaborate import variations

    circuit = make_circuit("""
VC  supply   15 V        : vcc gnd
R1  resistor 47k 1%      : vcc b
R2  resistor 10k         : b gnd
RC  resistor 4k7 5%      : vcc c
Q1  npn      generic-npn : c=c b=b e=gnd
""", bench="output c\nload 10k")
    found = {(v.part, v.name): v for v in variations(circuit)}
    assert found[("R1", "value")].low == pytest.approx(46.53e3)
    assert found[("RC", "value")].high == pytest.approx(4.935e3)
    assert ("R2", "value") not in found
    # generic-npn: beta=150 (100..300), early_voltage=100 (60..150) (docgen/builtin/generic.md)
    assert (found[("Q1", "beta")].low, found[("Q1", "beta")].high) == (100.0, 300.0)
    assert found[("Q1", "early_voltage")].origin == "model range"
    assert not any(v.part.startswith("bench") for v in found.values())
