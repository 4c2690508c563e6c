"""The random streams of the spread analysis: distributions and stability.

References: the Kolmogorov–Smirnov test of scipy.stats (``kstest``) against the stated
distribution (uniform within the tolerance; normal with the tolerance at 3σ).
"""

from __future__ import annotations

import os
import subprocess
import sys

import numpy as np
import pytest
from scipy import stats
from solver_helpers import make_circuit

from docgen.elaborate import Variation, variations
from docgen.solve import sampling

RESISTOR = Variation("R1", "value", 1000.0, 950.0, 1050.0, "tolerance")
BETA = Variation("Q1", "beta", 150.0, 100.0, 300.0, "model range")


@pytest.mark.parametrize("varied", [RESISTOR, BETA])
def test_uniform_draws_pass_kolmogorov_smirnov(varied: Variation) -> None:
    values = sampling.draw([varied], 5000, 7, "uniform", "d.md")[(varied.part, varied.name)]
    assert values.min() >= varied.low and values.max() <= varied.high
    # scipy.stats.uniform(loc, scale) is uniform on [loc, loc + scale].
    result = stats.kstest(values, "uniform", args=(varied.low, varied.high - varied.low))
    assert result.pvalue > 0.01


@pytest.mark.parametrize("varied", [RESISTOR, BETA])
def test_normal_draws_pass_kolmogorov_smirnov_with_tolerance_at_three_sigma(
        varied: Variation) -> None:
    values = sampling.draw([varied], 5000, 7, "normal", "d.md")[(varied.part, varied.name)]
    middle, sigma = (varied.low + varied.high) / 2, (varied.high - varied.low) / 6
    assert stats.kstest(values, "norm", args=(middle, sigma)).pvalue > 0.01
    # ... and not uniform: the test can tell the two apart at this size.
    uniform = stats.kstest(values, "uniform", args=(varied.low, varied.high - varied.low))
    assert uniform.pvalue < 1e-6


def test_each_value_has_its_own_stream() -> None:
    draws = sampling.draw([RESISTOR, BETA], 2000, 1, "uniform", "d.md")
    unit_r = (draws[("R1", "value")] - 950) / 100
    unit_b = (draws[("Q1", "beta")] - 100) / 200
    assert abs(np.corrcoef(unit_r, unit_b)[0, 1]) < 0.1


def test_adding_a_part_leaves_the_other_parts_draws_unchanged() -> None:
    before = make_circuit("V1 supply 10 V 5% : a gnd\nR1 resistor 10k 1% : a m\n"
                          "R2 resistor 10k 1% : m gnd")
    after = make_circuit("V1 supply 10 V 5% : a gnd\nR0 resistor 1k 5% : a x\n"
                         "R1 resistor 10k 1% : x m\nR2 resistor 10k 1% : m gnd\n"
                         "R3 resistor 2k 2% : m gnd")
    old = sampling.draw(variations(before), 300, 1, "uniform", "amp.md")
    new = sampling.draw(variations(after), 300, 1, "uniform", "amp.md")
    for key, values in old.items():
        np.testing.assert_array_equal(new[key], values)
    assert len(new) == len(old) + 2


def test_more_boards_keep_the_first_boards() -> None:
    few = sampling.draw([RESISTOR], 50, 3, "normal", "d.md")[("R1", "value")]
    many = sampling.draw([RESISTOR], 500, 3, "normal", "d.md")[("R1", "value")]
    np.testing.assert_array_equal(many[:50], few)


def test_seed_design_and_part_change_the_stream_but_folders_do_not() -> None:
    base = sampling.unit_draws("designs/amp.md", "R1", "value", 1, 20)
    assert not np.array_equal(base, sampling.unit_draws("designs/amp.md", "R1", "value", 2, 20))
    assert not np.array_equal(base, sampling.unit_draws("designs/other.md", "R1", "value", 1, 20))
    assert not np.array_equal(base, sampling.unit_draws("designs/amp.md", "R2", "value", 1, 20))
    np.testing.assert_array_equal(base, sampling.unit_draws("/elsewhere/amp.md", "R1", "value",
                                                            1, 20))


def test_streams_do_not_depend_on_the_interpreter_hash_salt() -> None:
    code = ("from docgen.solve.sampling import unit_draws; "
            "print(repr(unit_draws('a.md', 'R1', 'value', 1, 3).tolist()))")
    outputs = set()
    for salt in ("1", "2"):
        env = {**os.environ, "PYTHONHASHSEED": salt}
        outputs.add(subprocess.run([sys.executable, "-c", code], env=env, check=True,
                                   capture_output=True, text=True).stdout)
    assert len(outputs) == 1


def test_unknown_distribution_is_refused() -> None:
    with pytest.raises(ValueError, match="distribution"):
        sampling.unit_draws("a.md", "R1", "value", 1, 3, "triangular")  # type: ignore[arg-type]
