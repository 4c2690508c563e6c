"""Requirement verdicts: limit kinds, margins, review status, and verdicts over the spread.

The expected margins follow from the definitions in docs/format.md (distance to the nearest
limit; fraction of that limit's magnitude) worked by hand; the sine rms to peak-to-peak factor
2√2 is the textbook relation for a sinusoid.
"""

from __future__ import annotations

import math

import pytest

from docgen.check.requirements import margin, read, verdicts, yield_of
from docgen.design import Design, Header, Part, Requirement
from docgen.diagnostics import Span
from docgen.reader.require import parse_limit


def _design(lines: list[tuple[str, str, tuple[str, ...]]], status: str = "draft") -> Design:
    """A page whose require block lines start on file line 10."""
    requirements, source = [], ["x"] * 9
    for i, (metric, limit, across) in enumerate(lines):
        text = f"{metric} : {limit}"
        source.append(text)
        limit_col = len(metric) + 4
        requirements.append(Requirement(
            metric, parse_limit(limit), across, Span(10 + i, 1, len(text)),
            Span(10 + i, 1, len(metric)), Span(10 + i, limit_col, len(limit))))
    parts = (Part("Q1", "npn", None, None, "m", None, None, {}, (("c", "c1"), ("b", "b1"),
                                                                  ("e", "gnd")), Span(1, 1)),
             Part("RL1", "resistor", 1e3, "1k", None, None, None, {}, (("p", "c1"), ("n", "b1")),
                  Span(1, 1)))
    return Design("d.md", "design", Header(title="t", status=status), parts=parts,
                  requirements=tuple(requirements), source="\n".join(source))


RESULTS = {
    "op": {"nets": {"c1": 7.5}, "parts": {"Q1": {"ic_a": 1.2e-3}, "RL1": {"power_w": 0.1}}},
    "ac": {"midband_gain_db": 20.5, "f_low_hz": 15.0, "f_high_hz": None,
           "f_high_reason": "above the sweep"},
    "transient": {"max_swing_vpp": 6.0, "thd_percent": 0.8},
}

# (metric, limit, verdict, margin, margin fraction)
LIMIT_CASES = [
    ("Q1 collector current", "< 2 mA", "pass", 0.8e-3, 0.4),
    ("Q1 collector current", "< 1 mA", "fail", -0.2e-3, -0.2),
    ("Q1 collector current", "> 1 mA", "pass", 0.2e-3, 0.2),
    ("Q1 collector current", "0.5 mA .. 2 mA", "pass", 0.7e-3, 0.7 / 0.5),
    ("Q1 collector current", "1.5 mA .. 2 mA", "fail", -0.3e-3, -0.2),
    ("voltage at c1", "≈ 7 V ± 10 %", "pass", 0.2, 0.2 / 7.7),
    ("voltage at c1", "~ 8 V +- 0.2 V", "fail", -0.3, -0.3 / 7.8),
    ("midband gain", "18 dB .. 22 dB", "pass", 1.5, 1.5 / 22),
    ("low corner", "< 20 Hz", "pass", 5.0, 0.25),
    ("THD", "< 1 %", "pass", 0.002, 0.2),
    ("output swing", "> 4 V pp", "pass", 2.0, 0.5),
    # 2 V rms of a sine is 2·2√2 = 5.657 V pp
    ("output swing", "> 2 V rms", "pass", 6.0 - 4 * math.sqrt(2), (6 - 4 * math.sqrt(2)) /
     (4 * math.sqrt(2))),
]


@pytest.mark.parametrize("metric, limit, outcome, distance, fraction", LIMIT_CASES)
def test_limit_kinds_and_margins(metric, limit, outcome, distance, fraction) -> None:
    (row,) = verdicts(_design([(metric, limit, ())]), RESULTS)
    assert row["verdict"] == outcome
    assert row["margin"] == pytest.approx(distance, rel=1e-9)
    assert row["margin_fraction"] == pytest.approx(fraction, rel=1e-9)
    assert (row["line"], row["col"]) == (10, 1)
    assert row["limit"] == limit


def test_margin_with_a_zero_limit_has_no_fraction() -> None:
    assert margin(0.5, None, 0.0) == (-0.5, None)


def test_not_computed_says_why_and_is_a_warning() -> None:
    (row,) = verdicts(_design([("high corner", "> 20 kHz", ())], "approved"), RESULTS)
    assert row["verdict"] == "not computed" and "above the sweep" in row["reason"]
    assert row["severity"] == "warning"
    (row,) = verdicts(_design([("input noise", "< 1 uV", ())]), RESULTS)
    assert "'noise'" in row["reason"]


@pytest.mark.parametrize("status, expected", [("approved", "error"), ("review", "error"),
                                              ("draft", "warning"), ("retired", "warning")])
def test_review_status_sets_the_severity(status: str, expected: str) -> None:
    (row,) = verdicts(_design([("Q1 collector current", "< 1 mA", ())], status), RESULTS)
    assert row["verdict"] == "fail" and row["severity"] == expected
    (row,) = verdicts(_design([("Q1 collector current", "< 2 mA", ())], status), RESULTS)
    assert row["severity"] is None


def test_across_boards_uses_the_worst_board_and_reports_yield() -> None:
    results = dict(RESULTS, spread={"samples": {
        "Q1 collector current": [1.0e-3, 1.9e-3, 2.1e-3, None]}})
    (row,) = verdicts(_design([("Q1 collector current", "0.5 mA .. 2 mA", ("boards",))]),
                      results)
    assert row["verdict"] == "fail"
    assert row["worst"] == 2.1e-3
    assert row["margin"] == pytest.approx(-0.1e-3)
    assert row["yield"] == pytest.approx(0.5)  # the unsolved board counts as failing
    assert row["unsolved"] == 1 and "did not solve" in row["reason"]
    assert row["nominal"] == 1.2e-3


def test_across_all_joins_boards_and_temperature() -> None:
    results = dict(RESULTS, spread={
        "samples": {"Q1 collector current": [1.0e-3, 1.5e-3]},
        "temperature": {"ambient_c": [-20, 60], "samples": {"Q1 collector current":
                                                            [0.8e-3, 1.6e-3]}}})
    (row,) = verdicts(_design([("Q1 collector current", "0.9 mA .. 2 mA", ("boards",
                                                                          "temperature"))]),
                      results)
    assert row["verdict"] == "fail" and row["worst"] == 0.8e-3 and row["yield"] == 0.75


def test_across_without_spread_says_the_analysis_is_missing() -> None:
    (row,) = verdicts(_design([("Q1 collector current", "< 2 mA", ("boards",))], "approved"),
                      RESULTS)
    assert row["verdict"] == "not computed"
    assert "spread analysis is not available" in row["reason"]
    assert row["severity"] == "warning"


# (metric, limit, column, message words)
BAD_CASES = [
    ("gain at 1 kHx", "> 3 dB", 9, "frequency"),
    ("Q1 colector current", "< 1 mA", 4, "'colector'"),
    ("RL2 power", "< 1 W", 1, "did you mean 'RL1'"),
    ("RL1 collector current", "< 1 W", 1, "a resistor has no collector current"),
    ("voltage at c2", "< 1 V", 1, "no net called 'c2'"),
    ("low corner", "< 20 dB", 14, "the limit is in dB but 'low corner' is in Hz"),
    ("THD", "< 0.01", 7, "in a plain number but 'THD' is in %"),
]


@pytest.mark.parametrize("metric, limit, col, message", BAD_CASES)
def test_bad_requirements_are_diagnostics(metric: str, limit: str, col: int, message: str):
    design = _design([("low corner", "< 20 Hz", ()), (metric, limit, ())])
    checked, problems = read(design)
    assert len(checked) == 1 and len(problems) == 1
    assert (problems[0].line, problems[0].col) == (11, col)
    assert message in problems[0].message
    rows = verdicts(design, RESULTS)
    assert rows[1]["verdict"] == "invalid" and rows[1]["severity"] == "error"


def test_yield_over_boards_for_the_spread_analysis() -> None:
    """Board 1 meets both, board 2 fails the current, board 3 did not solve: 1 of 3."""
    design = _design([("Q1 collector current", "0.5 mA .. 2 mA", ()),
                      ("voltage at c1", "> 7 V", ())])
    overall, each = yield_of(design, {"Q1 collector current": [1e-3, 2.5e-3, None],
                                      "voltage at c1": [7.5, 7.2, 7.1]})
    assert overall == pytest.approx(1 / 3)
    assert each == {"Q1 collector current : 0.5 mA .. 2 mA": pytest.approx(1 / 3),
                    "voltage at c1 : > 7 V": 1.0}
    assert yield_of(design, {}) == (None, {})


def test_across_boards_end_to_end_against_the_triangular_distribution(tmp_path) -> None:
    """A 10 V divider of two 1 % resistors, uniform tolerances (the bench default), solved by
    the real spread analysis.  V − 5 V ≈ 2.5 V·(δ2 − δ1); the difference of two uniform ±1 %
    draws is triangular on ±2 %, so P(|V − 5| > 40 mV) = ((0.02 − 0.016)/0.02)² = 4 % and the
    yield is 96 % (sum of uniform variables, any probability textbook); every board lies within
    5 V ± 50 mV (the resistors' extremes)."""
    from docgen import pipeline
    from docgen.check.gate import sections_for
    from docgen.record import load_record

    (tmp_path / "d.md").write_text(
        "---\ntitle: divider\nstatus: approved\napproved: 2026-01-05\n---\n\n```circuit\n"
        "VA supply 10 V : vcc gnd\nR1 resistor 1k 1% 0.25 W : vcc mid\n"
        "R2 resistor 1k 1% 0.25 W : mid gnd\n```\n\n```bench\nboards 2000\n```\n\n"
        "```require\nvoltage at mid : 4.96 V .. 5.04 V across boards\n```\n", encoding="utf-8")
    record = load_record(str(tmp_path))
    design = record.designs[0]
    results = pipeline.run(design, record.models_for(design), only=sections_for(design))
    (row,) = results["checks"]
    assert row["samples"] == 2000 and row["unsolved"] == 0
    assert row["yield"] == pytest.approx(0.96, abs=0.015)  # 3σ of a binomial over 2000 boards
    assert row["verdict"] == "fail" and row["severity"] == "error"
    assert 4.95 - 1e-9 <= row["worst"] <= 5.05 + 1e-9 and row["margin"] < 0
    assert row["nominal"] == pytest.approx(5.0, rel=1e-9)
    assert results["spread"]["yield"] == pytest.approx(row["yield"])
