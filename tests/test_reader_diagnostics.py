"""Every reader diagnostic: its line, column (under the offending token) and message.

Each case edits one line of a valid page.  The expected column is where the named token stands
in the edited line (found in the fixture text itself), so a case says *what* the caret points
at, not a number computed by docgen.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from docgen.diagnostics import Diagnostic, InputError
from docgen.reader import read_text
from docgen.record import load_record

BASE = """\
---
title: Test stage
status: draft
---

Some prose.

```circuit
VB  supply    12 V                     : vcc gnd
VS  signal    10 mV 1 kHz source=600   : in gnd
C1  capacitor 1u 10% 25 V              : in b
R1  resistor  100k 1% 0.25 W           : vcc b
R2  resistor  22k 1%                   : b gnd
RC  resistor  4k7 1%                   : vcc out
RE  resistor  1k 1%                    : e gnd
Q1  npn       generic-npn              : c=out b=b e=e
```

```bench
input   VS
output  out
load    10k
```

```require
gain at 1 kHz : 10 dB .. 14 dB
```
"""
LINES = BASE.splitlines()


def edited(line: int, text: str) -> str:
    """BASE with 1-based ``line`` replaced by ``text``."""
    lines = list(LINES)
    lines[line - 1] = text
    return "\n".join(lines) + "\n"


def diagnostics(text: str) -> list[Diagnostic]:
    try:
        design = read_text(text, "t.md")
    except InputError as exc:
        return list(exc.diagnostics)
    return list(design.warnings)


def test_base_page_is_clean() -> None:
    design = read_text(BASE, "t.md")
    assert design.kind == "design" and design.warnings == ()


# (line, new text, token the caret must sit under, message fragment, hint fragment or None)
# A token ending in "@last" is searched from the right.
CASES = [
    # circuit: kinds, values, units
    (12, "R1  resistr  100k : vcc b", "resistr", "unknown part kind 'resistr'",
     "did you mean 'resistor'?"),
    (12, "R1  resistor 10 uF : vcc b", "uF", "unit 'F' does not fit a resistor's value "
     "(expected Ω)", None),
    (12, "R1  resistor 1meg : vcc b", "meg", "'meg' is not an SI prefix", "did you mean '1M'?"),
    (12, "R1  resistor 2MEG : vcc b", "MEG", "'MEG' is not an SI prefix", "did you mean '2M'?"),
    (12, "R1  resistor 4.7K : vcc b", "K", "unit 'K' does not fit", "kilo is a lower-case 'k'"),
    (12, "R1  resistor abc : vcc b", "abc", "'abc' is not a number", None),
    (12, "R1  resistor : vcc b", "resistor", "a resistor part needs a value", "e.g. '4k7'"),
    (12, "R1  resistor 0 : vcc b", "0", "a resistor's value must be greater than zero", None),
    (12, "R1  resistor 100k 150% : vcc b", "150%", "a tolerance lies between", None),
    (12, "R1  resistor 100k 1% 2% : vcc b", "2%", "a second tolerance", None),
    (12, "R1  resistor 100k 1% 0.25 : vcc b", "0.25", "a rating is written with its unit",
     "e.g. '0.25 W'"),
    (12, "R1  resistor 100k 1% 25 V : vcc b", "V", "unit 'V' does not fit a resistor's rating",
     None),
    (10, "VS  signal 10 mV 1 kHz 5 W : in gnd", "5 W", "a signal has no rating", None),
    (10, "VS  signal 10 mV : in gnd", "10 mV", "a signal needs a frequency", None),
    (10, "VS  signal 10 mV 1 kV : in gnd", "kV", "unit 'V' does not fit a signal's frequency",
     None),
    (12, "R1  resistor 100k colour=red : vcc b", "colour", "unknown setting 'colour'",
     "a resistor takes tempco"),
    (10, "VS  signal 10 mV 1 kHz sorce=600 : in gnd", "sorce", "unknown setting 'sorce'",
     "did you mean 'source'?"),
    (11, "C1  capacitor 1u polarised=maybe : in b", "maybe", "'polarised' is 'yes' or 'no'",
     None),
    (12, "R1  resistor 100k tempco=100 V : vcc b", "100 V", "is not a temperature coefficient",
     None),
    (12, "R1  resistor 100k source=1k : vcc b", "source", "unknown setting 'source'", None),
    # circuit: names and connections
    (12, "1R  resistor 100k : vcc b", "1R", "'1R' is not a part name", None),
    (12, "R1 : vcc b", "R1", "a part line starts with a name and a kind", None),
    (12, "R1  resistor 100k vcc b", None, "a part line needs ':'", None),
    (12, "R1  resistor 100k : vcc b gnd", "gnd", "a resistor connects to 2 nets, not 3", None),
    (12, "R1  resistor 100k : vcc", ":", "a resistor connects to 2 nets, not 1", None),
    (12, "R1  resistor 100k : p=vcc n=b", "p=vcc", "a resistor connects by position", None),
    (12, "R1  resistor 100k : vcc b$", "b$", "'b$' is not a net name", None),
    (16, "Q1  npn generic-npn : c=out b=b", ":", "Q1 leaves terminal(s) e unconnected",
     "c=... b=... e=..."),
    (16, "Q1  npn generic-npn : c=out b=b x=e", "x", "an npn has no terminal 'x'", None),
    (16, "Q1  npn generic-npn : c=out b=b e=e c=out", "c=out@last",
     "terminal 'c' is connected twice", None),
    (16, "Q1  npn generic-npn : out b e", "out", "an npn names each terminal", None),
    (16, "Q1  npn : c=out b=b e=e", "npn", "an npn part needs a model name", "generic-npn"),
    (16, "Q1  npn generic-npn 4k7 : c=out b=b e=e", "4k7", "unexpected '4k7' after the model",
     None),
    # whole design
    (13, "R1  resistor  22k 1% : b gnd", "R1", "part name 'R1' is used twice",
     "first used on line 12"),
    (13, "R2  resistor  22k 1% : b b", "R2", "every terminal of R2 is on net 'b'", None),
    (15, "RE  resistor  1k 1% : ex gnd", "ex", "net 'ex' touches only one terminal (RE)", None),
    (20, "input   VB", "VB", "bench input 'VB' is a supply, not a signal", "'VS'"),
    (20, "input   VX", "VX", "bench input 'VX' is not a part", "'VS'"),
    (21, "output  outt", "outt", "bench output 'outt' is not a net", "did you mean 'out'?"),
    # bench
    (22, "lod     10k", "lod", "unknown bench key 'lod'", "did you mean 'load'?"),
    (22, "noise bnd 20 Hz .. 20 kHz", "noise", "unknown bench key 'noise'",
     "did you mean 'noise band'?"),
    (22, "load    10 uF", "uF", "unit 'F' does not fit a load resistance", None),
    (22, "load    10k || 5 V", "V@last", "does not fit a load capacitance", None),
    (22, "load", "load", "bench key 'load' needs a value", None),
    (22, "output  out", "output@last", "bench key 'output' is given twice", None),
    (22, "ambient 25 C", "C", "'C' is the coulomb", "did you mean '25 °C'?"),
    (22, "ambient 25", "25", "a temperature needs its unit", "write '25 °C'"),
    (22, "ambient 30 °C (40 °C .. 60 °C)", "30", "the nominal ambient lies outside the range",
     None),
    (22, "ambient 40 °C .. 60 °C", "40", "the nominal ambient lies outside the range",
     "NOMINAL (LOW .. HIGH)"),
    (22, "frequencies 1 MHz .. 10 Hz", "1 MHz", "the low end must be below the high end", None),
    (22, "frequencies 10 Hz", "10 Hz", "is a range 'low .. high'", None),
    (22, "distribution gaussian", "gaussian", "unknown distribution 'gaussian'", None),
    (22, "boards many", "many", "boards is a whole number", None),
    (22, "distortion limit 200 %", "200 %", "a distortion limit lies between", None),
    # require
    (26, "gain at 1 kHz 10 dB", "gain", "a requirement is 'metric : limit'", None),
    (26, "gain at 1 kHz : about 10 dB", "about", "'about 10 dB' is not a limit", None),
    (26, "gain at 1 kHz : < 10 furlongs", "furlongs", "unknown unit 'furlongs'", None),
    (26, "gain at 1 kHz : > 10 dB across bords", "bords", "unknown 'across bords'",
     "did you mean 'boards'?"),
    (26, "gain at 1 kHz : 14 dB .. 10 dB", "14", "the low end of the range is above", None),
    (26, "gain at 1 kHz : 10 dB .. 14 V", "10", "different units (dB, V)", None),
    (26, "gain at 1 kHz : ≈ 12 dB", "≈", "an approximate limit needs '± tolerance'", None),
    (26, "gain at 1 kHz :", ":", "the limit after ':' is missing", None),
    (26, " : < 3 dB", ":", "the metric before ':' is missing", None),
    (26, "swing : > 4 A pp", "4", "'pp' goes with volts only", None),
    # header
    (3, "status: aproved", "aproved", "unknown status 'aproved'", "did you mean 'approved'?"),
    (3, "status: approved", "approved", "status is approved but no approval date",
     "approved: YYYY-MM-DD"),
    (3, "approved: 2024-02-30", "2024-02-30", "'2024-02-30' is not a date", "YYYY-MM-DD"),
    (3, "approved: 18/03/2024", "18/03/2024", "is not a date", None),
    (3, "stauts: draft", "stauts", "unknown header key 'stauts'", "did you mean 'status'?"),
    (3, "- item", "-", "lists are not supported", None),
    (3, "  status: draft", " ", "nesting is not supported", "not YAML"),
    (3, "tags: [a, b]", "[a, b]", "lists and mappings are not supported", None),
    (3, 'summary: "a\\tb"', '"', "quoted text with escapes is not supported", None),
    (3, "summary: |", "|", "is YAML syntax", None),
    (3, "just words", "just", "expected 'key: value'", None),
    (3, "title: Again", "title", "header key 'title' is given twice", None),
    (2, "owner: Ada", None, "a design page needs a title", None),
]


def _column(text: str, token: str | None) -> int:
    if token is None:
        return -1
    if token.endswith("@last"):
        return text.rindex(token[: -len("@last")]) + 1
    return text.index(token) + 1


@pytest.mark.parametrize(("line", "text", "token", "message", "hint"), CASES,
                         ids=[c[3][:40] for c in CASES])
def test_diagnostic(line: int, text: str, token: str | None, message: str,
                    hint: str | None) -> None:
    found = diagnostics(edited(line, text))
    matching = [d for d in found if message in d.message]
    assert matching, f"no diagnostic with {message!r}; got {[d.headline() for d in found]}"
    d = matching[0]
    if message == "a design page needs a title":
        assert (d.line, d.col) == (1, 1)
    elif token is None:  # points just after the line's content
        assert (d.line, d.col) == (line, len(text.rstrip()) + 1)
    else:
        assert (d.line, d.col) == (line, _column(text, token))
    if hint is not None:
        assert d.hint is not None and hint in d.hint
    rendered = d.render()
    assert rendered.startswith(f"t.md:{d.line}:{d.col}: {d.severity}: ")
    assert "^" in rendered.splitlines()[2]


def test_all_errors_of_a_file_are_reported_together() -> None:
    text = edited(12, "R1  resistr 100k : vcc b").replace("lo" + "ad    10k", "lod 10k")
    text = text.replace("status: draft", "status: drat")
    found = diagnostics(text)
    assert [d.line for d in found] == [3, 12, 22]


def test_unknown_header_key_is_a_warning_only() -> None:
    design = read_text(edited(3, "stauts: draft"), "t.md")
    assert [d.severity for d in design.warnings] == ["warning"]


def test_header_never_closed() -> None:
    text = "---\ntitle: x\n\n```circuit\nR1 resistor 1k : a gnd\n```\n"
    found = diagnostics(text)
    assert (found[0].line, found[0].col) == (1, 1)
    assert "never closed" in found[0].message


def test_no_gnd_net() -> None:
    found = diagnostics(BASE.replace("gnd", "ground"))
    d = next(d for d in found if "'gnd'" in d.message)
    assert (d.line, d.col) == (8, 1)  # the circuit fence
    assert d.hint == "did you mean 'ground'?"


def test_second_circuit_block() -> None:
    text = BASE + "\n```circuit\nR9 resistor 1k : a gnd\n```\n"
    found = diagnostics(text)
    d = next(d for d in found if "second circuit block" in d.message)
    assert (d.line, d.col) == (len(LINES) + 2, 1)


MODEL_CASES = [
    ("my-npn npn bta=200", "bta", "unknown model parameter 'bta'", "did you mean 'beta'?"),
    ("my-npn npn beta=400 (120..300)", "(120..300)", "does not contain the value", None),
    ("my-npn npn beta=-5", "-5", "'beta' must be greater than zero", None),
    ("my-npn nppn beta=200", "nppn", "unknown model kind 'nppn'", "did you mean 'npn'?"),
    ("my-npn npn beta=200 beta=300", "beta@last", "'beta' is set twice", None),
    ("my-npn npn early_voltage=80 F", "F", "unit 'F' does not fit 'early_voltage'", None),
    ("my-npn npn beta=200 (120 300)", "(120", "a range is written '(low..high)'", None),
    ("my-npn npn beta", "beta", "expected 'parameter=value'", None),
    ("my-npn", "my-npn", "a model line is 'NAME KIND", None),
]


@pytest.mark.parametrize(("text", "token", "message", "hint"), MODEL_CASES,
                         ids=[c[2][:40] for c in MODEL_CASES])
def test_model_diagnostic(text: str, token: str, message: str, hint: str | None) -> None:
    page = f"Models.\n\n```models\n{text}\n```\n"
    found = diagnostics(page)
    matching = [d for d in found if message in d.message]
    assert matching, [d.headline() for d in found]
    assert (matching[0].line, matching[0].col) == (4, _column(text, token))
    if hint:
        assert hint in (matching[0].hint or "")


def test_duplicate_model_on_one_page() -> None:
    found = diagnostics("```models\na npn beta=1\nb npn beta=2\na pnp beta=3\n```\n")
    assert [(d.line, d.col, d.message) for d in found] == [
        (4, 1, "model name 'a' is used twice")]


def _record_diagnostics(tmp_path: Path, files: dict[str, str]) -> list[Diagnostic]:
    for name, text in files.items():
        (tmp_path / name).write_text(text, encoding="utf-8")
    return list(load_record(tmp_path).all_diagnostics)


def test_unknown_model(tmp_path: Path) -> None:
    line = "Q1  npn       generic-nnp              : c=out b=b e=e"
    found = _record_diagnostics(tmp_path, {"d.md": edited(16, line)})
    assert [(d.line, d.col, d.message, d.hint) for d in found] == [
        (16, line.index("generic-nnp") + 1, "unknown model 'generic-nnp'",
         "did you mean 'generic-npn'?")]


def test_model_of_the_wrong_kind(tmp_path: Path) -> None:
    line = "Q1  npn       generic-pnp              : c=out b=b e=e"
    found = _record_diagnostics(tmp_path, {"d.md": edited(16, line)})
    assert len(found) == 1
    assert (found[0].line, found[0].col) == (16, line.index("generic-pnp") + 1)
    assert found[0].message == "model 'generic-pnp' is a pnp model, but Q1 is an npn"


def test_duplicate_model_across_library_pages(tmp_path: Path) -> None:
    found = _record_diagnostics(tmp_path, {
        "a.md": "```models\nshared npn beta=100\n```\n",
        "b.md": "text\n\n```models\nshared npn beta=200\n```\n",
    })
    assert [(d.path.rsplit("/", 1)[-1], d.line, d.col) for d in found] == [("b.md", 4, 1)]
    assert "also defined in" in found[0].message and found[0].message.endswith("a.md")


def test_empty_circuit_block() -> None:
    found = diagnostics("---\ntitle: t\n---\n\n```circuit\n# nothing yet\n```\n")
    assert [(d.line, d.col, d.message) for d in found] == [
        (5, 1, "the circuit block has no parts")]


def test_second_bench_block_and_blocks_on_a_note_page() -> None:
    found = diagnostics(BASE + "\n```bench\nboards 10\n```\n")
    assert [(d.line, d.col, d.message) for d in found] == [
        (len(LINES) + 2, 1, "a second bench block")]
    note = "Notes.\n\n```bench\nboards 10\n```\n\n```require\ngain : > 1 dB\n```\n"
    warnings = diagnostics(note)
    assert [(d.line, d.severity) for d in warnings] == [(3, "warning"), (7, "warning")]
    assert all("ignored" in d.message for d in warnings)


def test_infinite_parameter_hint() -> None:
    (d,) = diagnostics("```models\nm npn early_voltage=inf\n```\n")
    assert (d.line, d.col) == (2, len("m npn early_voltage=") + 1)
    assert d.hint is not None and "leave the setting out" in d.hint
