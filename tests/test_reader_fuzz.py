"""The reader never crashes: generated and mutated pages give a Design or an InputError, and
every diagnostic points at a real line and column of the file (style.md lesson 8: robustness)."""

from __future__ import annotations

from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from reader_helpers import meaning

from docgen.diagnostics import Diagnostic, InputError
from docgen.neaten import neaten_text
from docgen.reader import read_text

DESIGNS = sorted((Path(__file__).parent.parent / "designs").rglob("*.md"))
SEEDS = [p.read_text(encoding="utf-8") for p in DESIGNS] + [
    (Path(__file__).parent / "fixtures" / "neaten" / "ragged.md").read_text(encoding="utf-8")]

NAMES = st.sampled_from(["R1", "C1", "Q1", "VS", "VB", "U1", "L1", "D1", "1x", "R1", "é", ""])
KINDS = st.sampled_from(["resistor", "capacitor", "inductor", "supply", "signal", "current",
                         "diode", "npn", "pnp", "njfet", "nmos", "opamp", "resistr", ""])
VALUES = st.sampled_from(["4k7", "2.2 kΩ", "1meg", "10 uF", "3 mV", "rms", "pp", "1 kHz", "R47",
                          "1%", "±5%", "0.25 W", "50 V", "source=1k", "tempco=100ppm",
                          "polarised=yes", "generic-npn", "(1..2)", "=", "..", "-", "1e999",
                          "nan", "inf", "∞", "µ", "K", "°C", "#", "\t", "0", "-0", ""])
NETS = st.sampled_from(["a", "b", "gnd", "c=a", "b=b", "e=gnd", "in+=x", "v-=gnd", "x=", "=",
                        ":", "out", "", "d=a", "g=b", "s=gnd"])
BENCH = st.sampled_from(["input VS", "output out", "load 10k || 1n", "load 1 MΩ ||",
                         "frequencies 1 Hz .. 1 kHz", "frequencies 1 kHz .. 1 Hz", "noise band",
                         "ambient 25 °C", "ambient -20 °C .. 60 °C", "ambient 30 C",
                         "ambient 90 °C (0 °C .. 40 °C", "boards 0", "seed -1",
                         "distribution normal", "distortion limit 1 %", "points per decade 1",
                         "step 1 V", "lod 1k", "", "# just a comment"])
REQUIRE = st.sampled_from(["gain at 1 kHz : 10 dB .. 20 dB", "x : < 1", ": > 2 V pp",
                           "y : ≈ 5 V ± 1 %", "z : ~ 1 +- 0.1 across all", "w :",
                           "v : 1 .. ", "u : > 1 A rms across nowhere", "t", "s : < 1 °"])
HEADER = st.sampled_from(["title: T", "status: approved", "status: aproved", "approved: x",
                          "approved: 2024-02-29", "tags: [a]", "- x", "  nested: 1", "key",
                          'summary: "a\\n"', "summary: 'q'", "replaced-by: other.md", ""])


@st.composite
def circuit_line(draw: st.DrawFn) -> str:
    words = [draw(NAMES), draw(KINDS), *draw(st.lists(VALUES, max_size=5))]
    if draw(st.booleans()):
        words.append(":")
    words += draw(st.lists(NETS, max_size=6))
    return " ".join(words)


@st.composite
def model_line(draw: st.DrawFn) -> str:
    params = draw(st.lists(st.sampled_from(["beta=100", "beta=-1", "bta=2", "beta=5 (1..3)",
                                            "early_voltage=80 V", "ideality=", "(2..3)",
                                            "saturation_current=1f (1a..2f)", "x"]),
                           max_size=4))
    return " ".join([draw(NAMES), draw(KINDS), *params])


def fenced(tag: str, lines: list[str], fence: str) -> str:
    return "\n".join([fence + tag, *lines, fence])


@st.composite
def pages(draw: st.DrawFn) -> str:
    parts = []
    if draw(st.booleans()):
        parts.append("\n".join(["---", *draw(st.lists(HEADER, max_size=4)), "---"]))
    fence = draw(st.sampled_from(["```", "~~~", "  ```", "> ```"]))
    blocks = draw(st.lists(st.sampled_from(["circuit", "models", "bench", "require", "prose",
                                            "python"]), max_size=5))
    for tag in blocks:
        if tag == "circuit":
            parts.append(fenced(tag, draw(st.lists(circuit_line(), max_size=6)), fence))
        elif tag == "models":
            parts.append(fenced(tag, draw(st.lists(model_line(), max_size=3)), fence))
        elif tag == "bench":
            parts.append(fenced(tag, draw(st.lists(BENCH, max_size=5)), fence))
        elif tag == "require":
            parts.append(fenced(tag, draw(st.lists(REQUIRE, max_size=4)), fence))
        else:
            parts.append(draw(st.sampled_from(["Some *prose*.", "- a list\n  - nested",
                                               "```python\nprint(1)", "<b>raw</b>"])))
    return "\n\n".join(parts) + draw(st.sampled_from(["", "\n", "\r\n"]))


@st.composite
def mutated(draw: st.DrawFn) -> str:
    text = draw(st.sampled_from(SEEDS))
    for _ in range(draw(st.integers(1, 6))):
        if not text:
            break
        where = draw(st.integers(0, len(text) - 1))
        action = draw(st.sampled_from(["delete", "insert", "replace", "cut", "duplicate"]))
        piece = draw(st.sampled_from([":", "=", "#", "..", "(", ")", "%", "\n", "```", "---",
                                      " ", "\t", "k", "M", "meg", "±", "µ", "R", "x", "\r",
                                      "\u00a0", "𝛀", "\x00"]))
        if action == "delete":
            text = text[:where] + text[where + 1:]
        elif action == "insert":
            text = text[:where] + piece + text[where:]
        elif action == "replace":
            text = text[:where] + piece + text[where + 1:]
        elif action == "cut":
            text = text[:where]
        else:
            end = min(len(text), where + draw(st.integers(1, 80)))
            text = text[:end] + text[where:end] + text[end:]
    return text


def assert_positions(text: str, diagnostics: tuple[Diagnostic, ...]) -> None:
    lines = text.splitlines() or [""]
    for d in diagnostics:
        assert 1 <= d.line <= len(lines), d.headline()
        assert 1 <= d.col <= len(lines[d.line - 1]) + 1, d.headline()
        assert d.span.width >= 1
        assert d.message
        d.render()


def read_checked(text: str) -> None:
    try:
        design = read_text(text, "fuzz.md")
    except InputError as exc:
        assert exc.diagnostics and any(d.severity == "error" for d in exc.diagnostics)
        assert_positions(text, exc.diagnostics)
        return
    assert_positions(text, design.warnings)
    neat = neaten_text(text, "fuzz.md")  # a readable page can always be neatened ...
    assert neaten_text(neat, "fuzz.md") == neat  # ... once for all
    assert meaning(read_text(neat, "fuzz.md")) == meaning(design)  # and keeps its meaning


@pytest.mark.slow
@settings(max_examples=1500, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(pages())
def test_generated_pages(text: str) -> None:
    read_checked(text)


@pytest.mark.slow
@settings(max_examples=1000, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(mutated())
def test_mutated_designs(text: str) -> None:
    read_checked(text)


@settings(max_examples=300, deadline=None)
@given(st.text(max_size=300))
def test_arbitrary_text(text: str) -> None:
    read_checked(text)
