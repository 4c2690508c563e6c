"""Hand estimates: the expression language, its safety, and the comparison with solved values.

References: thermal voltage kT/q from scipy.constants (CODATA / SI 2019); resistors in parallel
1/(1/R1 + 1/R2) and the degenerated common-emitter gain −RC/RE (Sedra & Smith, *Microelectronic
Circuits*, from memory); dB = 20·log10|ratio| (IEC 60027-3 definition of the decibel for
voltage ratios, from memory).
"""

from __future__ import annotations

import math
import types

import pytest
import scipy.constants as sc
from hypothesis import given, settings
from hypothesis import strategies as st

from docgen.check import estimates, expressions
from docgen.check.expressions import ExpressionError
from docgen.design import Block, Design, Header, ModelDef, ModelParam, Part
from docgen.diagnostics import Span


def _part(name: str, kind: str, value: float | None, model: str | None = None) -> Part:
    return Part(name, kind, value, None, model, None, None, {}, (), Span(1, 1))


def _design(lines: list[str]) -> Design:
    """A design page with an estimate block; the block's first content line is file line 3."""
    source = "# page\n```estimate\n" + "\n".join(lines) + "\n```\n"
    parts = (_part("RL1", "resistor", 8200.0), _part("RD", "resistor", 1800.0),
             _part("VB", "supply", 15.0), _part("Q1", "npn", None, "bench-npn"))
    models = (ModelDef("bench-npn", "npn", {"beta": ModelParam(200.0)}, Span(1, 1), "page"),)
    return Design("page.md", "design", Header(title="t"), parts=parts, models=models,
                  blocks=(Block("estimate", "\n".join(lines) + "\n", 3),), source=source)


def _value(text: str, results: dict | None = None) -> float:
    design = _design([f"midband gain ≈ {text}"])
    read, problems = estimates.read(design, {})
    assert problems == [], problems
    return estimates.value_of(design, {}, results or {}, read[0])


VALUE_CASES = [
    ("-RL1/RD", -8200 / 1800),                       # −RC/RE
    ("parallel(RL1, RD)", 1 / (1 / 8200 + 1 / 1800)),  # resistors in parallel
    ("parallel(1k, 1k, 1k)", 1000 / 3),
    ("2^3^2", 2 ** 9),                                # right-associative power
    ("-2^2", -4.0),
    ("(1 + 2) × 3 − 4 / 2", 7.0),
    ("4k7 + 2R2", 4702.2),                            # IEC 60062 codes
    ("1e-3 * 2", 2e-3),
    ("Q1.beta", 200.0),
    ("Q1.early_voltage", math.inf),
    ("sqrt(16) + log10(1000) + abs(-1)", 8.0),
    ("dB(-10)", 20.0),
    ("max(1, 5, 3) - min(2, 4)", 3.0),
    ("VB * 10%", 1.5),
]


@pytest.mark.parametrize("text, expected", VALUE_CASES)
def test_values(text: str, expected: float) -> None:
    if math.isinf(expected):  # the neutral default of a parameter the model omits
        with pytest.raises(ExpressionError, match="out of range"):
            _value(text)
        return
    assert _value(text) == pytest.approx(expected, rel=1e-12)


def test_thermal_voltage_matches_scipy_constants() -> None:
    """VT = kT/q at 25 °C = 25.693 mV (scipy.constants, CODATA)."""
    expected = sc.k * (25 + sc.zero_Celsius) / sc.e
    assert _value("VT") == pytest.approx(expected, rel=1e-12)
    assert expected == pytest.approx(25.693e-3, abs=1e-6)


def test_metric_in_brackets_reads_the_results() -> None:
    results = {"op": {"parts": {"Q1": {"ic_a": 1.3e-3}}, "temperature_c": 25.0}}
    assert _value("VT / [Q1 collector current]", results) == pytest.approx(
        sc.k * 298.15 / sc.e / 1.3e-3, rel=1e-9)


MALICIOUS = [
    "__import__('os').system('true')",
    "Q1.__class__",
    "Q1.__class__.__mro__",
    "().__class__",
    "'a' * 10",
    "open('x')",
    "eval('1')",
    "exec('x=1')",
    "lambda: 1",
    "RL1; import os",
    "10 ^ 10 ^ 10",
    "9 ^ 999999999",
    "1e308 * 1e308",
    "(" * 500 + "1" + ")" * 500,
    "-" * 300 + "1",
    "2" + "^2" * 150,
    "1" + "+1" * 400,
    "sqrt(-1)",
    "1 / 0",
    "RL1.value",
    "x" * 1000,
]


@pytest.mark.parametrize("text", MALICIOUS)
def test_malicious_input_is_rejected_cleanly(text: str, monkeypatch: pytest.MonkeyPatch) -> None:
    """Hostile expressions raise ExpressionError (a diagnostic), never run code or hang."""
    calls = []
    monkeypatch.setattr("builtins.__import__", _spy(calls), raising=True)
    design = _design([f"midband gain ≈ {text}"])
    read, problems = estimates.read(design, {})
    monkeypatch.undo()
    if problems:
        assert problems[0].line == 3 and problems[0].col >= 16
        assert calls == []
        return
    with pytest.raises(ExpressionError):
        estimates.value_of(design, {}, {}, read[0])


def _spy(calls: list) -> types.FunctionType:
    real = __builtins__["__import__"] if isinstance(__builtins__, dict) else __import__

    def spy(name, *args, **kwargs):  # noqa: ANN001, ANN202 - the builtin's signature
        if name in ("os", "subprocess", "sys"):
            calls.append(name)
        return real(name, *args, **kwargs)
    return spy


ERROR_CASES = [
    # (line, column in the file, message words, hint words)
    ("gain at 1 kHz ≈ -RL2/RD", 18, "unknown name 'RL2'", "RL1"),
    ("gain at 1 kHz ≈ -RL1/", 22, "expected a number", None),
    ("gain at 1 kHz ≈ Q1", 17, "has no value", "Q1.beta"),
    ("gain at 1 kHz ≈ Q1.betta", 20, "no parameter 'betta'", "beta"),
    ("gain at 1 kHz ≈ paralel(RL1, RD)", 17, "unknown function", "parallel"),
    ("gain at 1 kHz ≈ 2 ** 3", 20, "expected a number", "^"),
    ("gian at 1 kHz ≈ 1", 1, "'gian'", "gain"),
    ("gain at 1 kHz -RL1/RD", 1, "metric ≈ expression", None),
    ("gain at 1 kHz ≈ [Q1 colector current]", 21, "'colector'", "collector"),
    ("gain at 1 kHz ≈ sqrt(1, 2)", 17, "takes 1 argument", None),
]


@pytest.mark.parametrize("line, col, message, hint", ERROR_CASES)
def test_diagnostics_point_at_the_place(line: str, col: int, message: str, hint: str | None):
    _, problems = estimates.read(_design(["# a comment line", line]), {})
    assert len(problems) == 1
    problem = problems[0]
    assert (problem.line, problem.col) == (4, col), problem.render()
    assert message in problem.message
    if hint:
        assert hint in (problem.hint or "")


def test_gain_estimate_is_compared_as_a_ratio() -> None:
    """−RL1/RD = −4.556 (13.17 dB); solved 12.5 dB is 4.217 V/V: error (4.556/4.217 − 1)."""
    design = _design(["gain at 1 kHz ≈ -RL1/RD", "Q1 collector current ≈ 1m"])
    results = {"ac": {"signal_freq_hz": 1000.0, "gain_at_signal_db": 12.5},
               "op": {"parts": {"Q1": {"ic_a": 1.25e-3}}}}
    ctx = types.SimpleNamespace(design=design, library={}, results=results)
    gain, current = estimates.analyse(ctx)
    assert gain["estimate"] == pytest.approx(20 * math.log10(8200 / 1800))
    assert gain["error_percent"] == pytest.approx((8200 / 1800 / 10 ** (12.5 / 20) - 1) * 100)
    assert gain["ratio"] is True and gain["line"] == 3
    assert current["error_percent"] == pytest.approx(-20.0)


def test_missing_solution_is_reported_not_invented() -> None:
    design = _design(["input noise ≈ 1u"])
    ctx = types.SimpleNamespace(design=design, library={}, results={})
    (row,) = estimates.analyse(ctx)
    assert row["solved"] is None and row["error_percent"] is None
    assert "noise" in row["reason"]


def test_parser_builds_no_python_objects_beyond_tuples() -> None:
    tree = expressions.parse("parallel(RL1, 2k) ^ 2 - [voltage at c1]")
    stack = [tree]
    while stack:
        node = stack.pop()
        assert isinstance(node, tuple)
        stack.extend(x for x in node if isinstance(x, tuple))


def test_end_to_end_through_the_pipeline(tmp_path) -> None:
    """A divider solved by the real solver against the divider formula VA·R2/(R1 + R2)
    (Ohm's law); the results validate against the project's JSON Schema (jsonschema)."""
    import json
    from importlib import resources

    import jsonschema

    from docgen import pipeline
    from docgen.record import load_record

    (tmp_path / "d.md").write_text(
        "---\ntitle: divider\n---\n\n```circuit\nVA supply 10 V : vcc gnd\n"
        "R1 resistor 3k 1% 0.25 W : vcc mid\nR2 resistor 1k 1% 0.25 W : mid gnd\n```\n\n"
        "```estimate\nvoltage at mid ≈ VA * R2 / (R1 + R2)\nR1 power ≈ (VA - [voltage at mid])^2"
        " / R1\nvoltage at mid ≈ VA / 2   # a wrong guess\n```\n", encoding="utf-8")
    record = load_record(str(tmp_path))
    design = record.designs[0]
    results = pipeline.run(design, record.models_for(design),
                           only=frozenset({"op", "estimates"}))
    divider, power, guess = results["estimates"]
    assert divider["estimate"] == pytest.approx(2.5) and abs(divider["error_percent"]) < 1e-6
    assert power["estimate"] == pytest.approx(7.5 ** 2 / 3000)
    assert abs(power["error_percent"]) < 1e-6
    assert guess["error_percent"] == pytest.approx(100.0, rel=1e-6)  # 5 V against 2.5 V
    assert (guess["line"], guess["col"]) == (14, 1)
    schema = json.loads(resources.files("docgen").joinpath("schema/results.schema.json")
                        .read_text(encoding="utf-8"))
    jsonschema.validate(json.loads(json.dumps(results)), schema)


_PIECES = ["RL1", "RD", "Q1", ".", "beta", "(", ")", "[", "]", "+", "-", "*", "/", "^", ",",
           "parallel", "sqrt", "dB", "1", "4k7", "1e300", "0", "VT", "midband gain", "_", "'",
           "≈", " "]


@given(st.lists(st.sampled_from(_PIECES), max_size=25).map("".join) | st.text(max_size=60))
@settings(max_examples=600, deadline=None)
def test_any_text_reads_or_gives_a_diagnostic(text: str) -> None:
    """Property: an estimate line never raises anything but a diagnostic (or, when it reads,
    ExpressionError on evaluation), and every diagnostic points inside the line."""
    line = f"midband gain ≈ {text}"
    if len(line.splitlines()) != 1 or "#" in line or "`" in line:
        return  # one block line; a line break, comment or fence would start something else
    design = _design([line])
    read, problems = estimates.read(design, {})
    for problem in problems:
        assert problem.line == 3 and 1 <= problem.col <= len(line) + 1
    for estimate in read:
        try:
            estimates.value_of(design, {}, {}, estimate)
        except ExpressionError as exc:
            assert 1 <= exc.col <= len(line) + 1
