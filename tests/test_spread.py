"""The spread analysis against outside references.

References, named beside each check:
- first-order propagation of uncertainty (JCGM 100:2008, *Guide to the expression of uncertainty
  in measurement*, §5.1.2) for a resistive divider's spread; a uniform ±t has variance t²/3, a
  normal with t at 3σ has (t/3)²;
- the difference of two independent uniforms has a triangular distribution (Papoulis,
  *Probability, Random Variables and Stochastic Processes*) for the divider's yield;
- the divider's normalised sensitivities from differentiating R2/(R1 + R2) by hand;
- VBE drift of about −2 mV/°C at constant current (common practice);
- IS(T) = IS·(T/T0)³·exp(q·Eg/k·(1/T0 − 1/T)) and IC = IS·exp(VBE/VT) (Gray, Hurst, Lewis &
  Meyer, *Analysis and Design of Analog Integrated Circuits*, from memory), constants from
  scipy.constants;
- the batch equals a loop of single solutions (one implementation, S = 1 is a batch of one).
"""

from __future__ import annotations

import json
import math

import numpy as np
import pytest
from scipy import constants
from solver_helpers import _BUILTINS, design_text, make_circuit

from docgen import pipeline
from docgen.elaborate import variations
from docgen.metric_values import evaluate
from docgen.metrics import parse
from docgen.reader import read_text
from docgen.report import render
from docgen.solve import board_metrics, sampling
from docgen.solve.operating_point import solve_op

STAGE = """
VA  supply    12 V 5%              : vcc gnd
VS  signal    10 mV 1 kHz source=470 : in gnd
CI  capacitor 4u7 10%              : in b1
R1  resistor  82k 1%               : vcc b1
R2  resistor  22k 1%               : b1 gnd
Q1  npn       generic-npn          : c=c1 b=b1 e=e1
RC  resistor  4k7 1%               : vcc c1
RE1 resistor  390 1%               : e1 e2
RE2 resistor  1k5 1%               : e2 gnd
CE  capacitor 100u 20%             : e2 gnd
CO  capacitor 1u 10%               : c1 out
"""
STAGE_BENCH = """
input VS
output out
load 100k
frequencies 1 Hz .. 100 MHz
noise band 20 Hz .. 20 kHz
boards 200
"""
DIVIDER = """
V1 supply   10 V     : top gnd
R1 resistor 10k 1%   : top mid
R2 resistor 5k 1%    : mid gnd
"""
TOLERANCE = 0.01
RATIO = 5.0 / 15.0


def solved(circuit: str, bench: str, models: str = "", require: str = "") -> dict:
    """Results of the pipeline up to the spread section and the checks."""
    text = design_text(circuit, models, bench)
    if require:
        text += "\n```require\n" + require.strip() + "\n```\n"
    design = read_text(text, "spread-test.md")
    return pipeline.run(design, _BUILTINS, only=frozenset({"op", "ac", "noise", "spread",
                                                             "checks"}))


@pytest.fixture(scope="module")
def stage() -> dict:
    return solved(STAGE, STAGE_BENCH, require="signal-to-noise ratio : > 10 dB\n"
                                               "noise figure : < 20 dB\n"
                                               "unity-gain frequency : > 1 MHz")


def test_batch_equals_a_loop_of_single_solutions() -> None:
    circuit = make_circuit(STAGE, bench=STAGE_BENCH)
    ports = ("VS", "out")
    metrics = board_metrics.headline(circuit, ports)
    overrides = sampling.draw(variations(circuit), 6, 5, "uniform", "stage.md")
    temperature = np.linspace(-20.0, 60.0, 6)
    nominal = solve_op(circuit)
    batch = board_metrics.evaluate(circuit, metrics, overrides, temperature, ports=ports,
                                   start=nominal)
    assert batch.converged.all()
    for i in range(6):
        single = board_metrics.evaluate(circuit, metrics,
                                        {k: v[i:i + 1] for k, v in overrides.items()},
                                        temperature[i:i + 1], ports=ports, start=nominal)
        for metric in metrics:
            np.testing.assert_allclose(batch.values[metric.key][i],
                                       single.values[metric.key][0], rtol=1e-9, atol=0,
                                       err_msg=metric.key)


@pytest.mark.parametrize(("text", "rtol"), [
    ("gain at 1 kHz", 1e-5), ("midband gain", 1e-5), ("low corner", 1e-5),
    ("high corner", 1e-5), ("unity-gain frequency", 1e-5), ("input impedance", 1e-5),
    ("output impedance", 1e-5),
    ("Q1 collector current", 1e-5), ("supply current", 1e-5),
    # the boards integrate noise on a coarser grid than the noise section (documented)
    ("input noise", 1e-3), ("signal-to-noise ratio", 1e-4), ("noise figure", 1e-3),
])
def test_the_nominal_board_reads_what_the_nominal_sections_read(stage: dict, text: str,
                                                                rtol: float) -> None:
    metric = parse(text)
    nominal = stage["spread"]["metrics"][metric.key]["nominal"]
    assert nominal == pytest.approx(evaluate(metric, stage).value, rel=rtol)


def test_stage_statistics_are_those_of_the_samples(stage: dict) -> None:
    spread = stage["spread"]
    assert spread["unsolved"] == 0 and spread["boards"] == 200
    for key, figures in spread["metrics"].items():
        values = np.array([v for v in spread["samples"][key] if v is not None])
        assert figures["solved"] == len(values) == 200
        # numpy is the reference for the summaries (6 significant figures published)
        assert figures["mean"] == pytest.approx(values.mean(), rel=1e-5, abs=1e-12)
        assert figures["percentiles"]["50"] == pytest.approx(np.median(values), rel=1e-5,
                                                             abs=1e-12)
        assert sum(figures["histogram"]["counts"]) == 200
        assert len(figures["histogram"]["edges"]) == len(figures["histogram"]["counts"]) + 1


def test_worst_case_reaches_beyond_the_monte_carlo_extremes(stage: dict) -> None:
    spread = stage["spread"]
    corner = spread["worst_case"]["Q1 collector current"]
    figures = spread["metrics"]["Q1 collector current"]
    assert corner["low"] <= figures["min"] and corner["high"] >= figures["max"]
    assert "Q1.beta" in corner["parameters"]  # 150..350 moves IC more than any 1 % part


@pytest.mark.parametrize(("distribution", "variance"), [
    ("uniform", TOLERANCE ** 2 / 3),        # uniform on ±t
    ("normal", (TOLERANCE / 3) ** 2),       # t at 3σ
])
def test_divider_ratio_spread_matches_propagated_variance(distribution: str,
                                                          variance: float) -> None:
    spread = solved(DIVIDER, f"output mid\nboards 4000\ndistribution {distribution}")["spread"]
    figures = spread["metrics"]["voltage at mid"]
    # V·r with r = R2/(R1 + R2): d r/r = (1 − r)(dR2/R2 − dR1/R1), two independent parts.
    sigma = 10.0 * RATIO * (1 - RATIO) * math.sqrt(2 * variance)
    assert figures["std"] == pytest.approx(sigma, rel=0.05)
    assert abs(figures["mean"] - 10.0 * RATIO) < 4 * sigma / math.sqrt(4000)


def test_divider_sensitivities_and_worst_case_are_the_formulas() -> None:
    spread = solved(DIVIDER, "output mid\nboards 50")["spread"]
    found = {row["parameter"]: row["sensitivity"] for row in spread["sensitivity"]["ranking"]
             if row["metric"] == "voltage at mid"}
    assert found["V1"] == pytest.approx(1.0, rel=1e-4)
    assert found["R2"] == pytest.approx(1 - RATIO, rel=1e-4)
    assert found["R1"] == pytest.approx(-(1 - RATIO), rel=1e-4)
    corner = spread["worst_case"]["voltage at mid"]
    low = 10.0 * 5e3 * 0.99 / (10e3 * 1.01 + 5e3 * 0.99)
    high = 10.0 * 5e3 * 1.01 / (10e3 * 0.99 + 5e3 * 1.01)
    assert corner["low"] == pytest.approx(low, rel=1e-5)
    assert corner["high"] == pytest.approx(high, rel=1e-5)
    assert corner["low_corner"] == pytest.approx({"R1": 10100.0, "R2": 4950.0})


def test_divider_yield_follows_the_triangular_distribution() -> None:
    # |dV/V| ≤ (1 − r)·t holds for |e2 − e1| ≤ t, e1, e2 uniform on ±t: probability 3/4.
    half = 10.0 * RATIO * (1 - RATIO) * TOLERANCE
    limit = f"voltage at mid : {10 * RATIO - half:.7f} V .. {10 * RATIO + half:.7f} V"
    results = solved(DIVIDER, "output mid\nboards 4000", require=limit)
    assert results["spread"]["yield"] == pytest.approx(0.75, abs=0.03)
    assert list(results["spread"]["yield_by_requirement"].values()) == [
        results["spread"]["yield"]]


def test_unsolved_boards_are_counted_reported_and_fail(monkeypatch: pytest.MonkeyPatch) -> None:
    real = board_metrics.solve_op

    def some_fail(*args, **kwargs):
        solution = real(*args, **kwargs)
        if solution.problem.samples > 100:
            solution.dc.converged[[40, 41]] = False  # two boards of the Monte Carlo rows
        return solution

    monkeypatch.setattr(board_metrics, "solve_op", some_fail)
    results = solved(DIVIDER, "output mid\nboards 300", require="voltage at mid : 0 V .. 10 V")
    spread = results["spread"]
    failed = [i for i, v in enumerate(spread["samples"]["voltage at mid"]) if v is None]
    assert spread["unsolved"] == 2 and spread["unsolved_boards"] == failed
    assert spread["metrics"]["voltage at mid"]["solved"] == 298
    assert spread["yield"] == pytest.approx(298 / 300)
    assert "2 boards did not solve" in render(results)


BIAS = """
VCC supply   12 V      : vcc gnd
R1  resistor 82k       : vcc b
R2  resistor 22k       : b gnd
Q1  npn      generic-npn : c=c b=b e=e
RC  resistor 4k7       : vcc c
RE  resistor 1k8       : e gnd
"""


def test_vbe_drifts_about_minus_two_millivolts_per_degree() -> None:
    results = solved(BIAS, "output c\nboards 10\nambient 25 °C (-20 °C .. 80 °C)")
    drift = results["spread"]["temperature"]["drift"]["Q1 base-emitter voltage"]["per_degree"]
    assert -2.5e-3 < drift < -1.5e-3  # common practice: ≈ −2 mV/°C
    assert f"{drift * 1e3:.4g} mV/°C".replace("-", "−") in render(results)


def test_collector_current_at_fixed_vbe_follows_the_junction_equations() -> None:
    circuit = """
VB supply 0.6 V : b gnd
VC supply 5 V   : c gnd
Q1 npn    tnpn  : c=c b=b e=gnd
"""
    models = "tnpn npn saturation_current=10f beta=100"
    temperature = solved(circuit, "boards 2\nambient 25 °C (-20 °C .. 80 °C)",
                         models)["spread"]["temperature"]
    kelvin = np.array(temperature["ambient_c"]) + constants.zero_Celsius
    t0 = 25.0 + constants.zero_Celsius
    vt = constants.k * kelvin / constants.e
    saturation = 10e-15 * (kelvin / t0) ** 3 * np.exp(
        constants.e * 1.11 / constants.k * (1 / t0 - 1 / kelvin))
    np.testing.assert_allclose(temperature["samples"]["Q1 collector current"],
                               saturation * np.exp(0.6 / vt), rtol=1e-5)


def test_resistor_tempco_moves_the_divider_as_written() -> None:
    circuit = DIVIDER.replace("10k 1%", "10k 1% tempco=1000ppm")
    temperature = solved(circuit, "output mid\nboards 2\nambient 25 °C (-40 °C .. 85 °C)"
                         )["spread"]["temperature"]
    ambient = np.array(temperature["ambient_c"])
    r1 = 10e3 * (1 + 1e-3 * (ambient - 25.0))
    np.testing.assert_allclose(temperature["samples"]["voltage at mid"],
                               10.0 * 5e3 / (r1 + 5e3), rtol=1e-5)
    assert ambient[0] == -40 and ambient[-1] == 85


def test_same_design_gives_identical_spread_results() -> None:
    first = solved(DIVIDER, "output mid\nboards 100\nambient 25 °C (0 °C .. 50 °C)")["spread"]
    second = solved(DIVIDER, "output mid\nboards 100\nambient 25 °C (0 °C .. 50 °C)")["spread"]
    assert json.dumps(first, sort_keys=True) == json.dumps(second, sort_keys=True)


def test_terminal_shows_spread_yield_and_sensitivities(stage: dict) -> None:
    text = render(stage)
    assert "Spread across 200 boards (uniform" in text
    assert "Largest sensitivities" in text


def test_spread_sections_validate_against_the_results_schema(stage: dict) -> None:
    """JSON Schema draft 2020-12 (open standard) via the jsonschema library."""
    import jsonschema

    from docgen.units import round_results

    with open("docgen/schema/results.schema.json", encoding="utf-8") as handle:
        validator = jsonschema.Draft202012Validator(json.load(handle))
    with_temperature = solved(BIAS, "output c\nboards 20\nambient 25 °C (0 °C .. 50 °C)")
    for results in (stage, with_temperature):
        validator.validate(json.loads(json.dumps(round_results(results))))
    broken = json.loads(json.dumps(round_results(with_temperature)))
    broken["spread"]["distribution"] = "triangular"
    with pytest.raises(jsonschema.ValidationError):
        validator.validate(broken)


def test_requirement_across_boards_reads_the_boards() -> None:
    """The verdict of an ``across boards`` requirement is judged on the spread's boards."""
    half = 10.0 * RATIO * (1 - RATIO) * TOLERANCE
    limit = (f"voltage at mid : {10 * RATIO - half:.7f} V .. {10 * RATIO + half:.7f} V "
             "across boards")
    results = solved(DIVIDER, "output mid\nboards 400", require=limit)
    verdict = results["checks"][0]
    assert verdict["verdict"] == "fail" and verdict["samples"] == 400
    assert verdict["yield"] == pytest.approx(results["spread"]["yield"])
    worst = min(results["spread"]["samples"]["voltage at mid"],
                key=lambda v: min(v - (10 * RATIO - half), 10 * RATIO + half - v))
    assert verdict["worst"] == pytest.approx(worst)


def test_each_boards_corner_is_its_own_rc_corner() -> None:
    """First-order low-pass: |H| is 3.01 dB down at f = 1/(2πRC) (any circuits textbook, e.g.
    Horowitz & Hill, *The Art of Electronics*); each board with its own drawn R and C."""
    circuit = ("VS signal 1 V 1 kHz : in gnd\nR1 resistor 1k 1% : in out\n"
               "C1 capacitor 100n 10% : out gnd")
    bench = "input VS\noutput out\nfrequencies 10 Hz .. 1 MHz\nboards 300\nseed 4"
    results = solved(circuit, bench)
    draws = sampling.draw(variations(make_circuit(circuit, bench=bench)), 300, 4, "uniform",
                          "spread-test.md")
    corner = 1 / (2 * math.pi * draws[("R1", "value")] * draws[("C1", "value")])
    # Midband is the largest gain over the sweep (DEVELOPERS.md): here the 10 Hz start, a hair
    # below DC, so the −3.01 dB point (half that power) sits at fc·√(1 + 2·(10 Hz/fc)²).
    expected = corner * np.sqrt(1 + 2 * (10.0 / corner) ** 2)
    np.testing.assert_allclose(results["spread"]["samples"]["high corner"], expected, rtol=1e-7)
    assert results["spread"]["samples"]["low corner"] == [None] * 300  # direct-coupled
