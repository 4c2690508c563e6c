"""Responses with nothing honest to report say so: no invented corners, impedances or figures."""

from __future__ import annotations

from response_helpers import results
from solver_helpers import _BUILTINS, design_text

from docgen import pipeline
from docgen.reader import read_text


def test_output_on_a_supply_has_no_response_and_says_why():
    out = results("""
VB  supply   5 V                  : vb gnd
VS  signal   1 mV 1 kHz source=1k : in gnd
R1  resistor 1k                   : in vb
""", bench="input VS\noutput vb")
    ac, noise = out["ac"], out["noise"]
    assert ac["midband_gain_db"] is None and ac["f_low_hz"] is None and ac["f_high_hz"] is None
    assert "no signal reaches the output" in ac["f_high_reason"]
    assert noise["figure_db"] is None and "reaches the output" in noise["figure_reason"]
    assert noise["input_rms_v"] is None and noise["input_rms_reason"]


def test_missing_output_is_a_diagnostic_at_the_bench_block():
    text = design_text("""
VS  signal   1 mV 1 kHz : in gnd
R1  resistor 1k         : in gnd
""", bench="input VS")
    out = pipeline.run(read_text(text, "t.md"), _BUILTINS, only=frozenset({"op", "ac"}))
    (error,) = out["errors"]
    assert error["analysis"] == "ac" and "no output net" in error["message"]
    assert text.splitlines()[error["line"] - 1].startswith("```bench")
    assert "output NET" in error["hint"]


def test_input_impedance_of_an_opamp_input_is_unbounded():
    # The behavioural op-amp draws no small-signal input current: no number is made up.
    ac = results("""
VP  supply   15 V        : vp gnd
VN  supply   15 V        : gnd vn
VS  signal   10 mV 1 kHz : in gnd
U1  opamp    generic-opamp : in+=in in-=out out=out v+=vp v-=vn
""", bench="input VS\noutput out")["ac"]
    assert ac["zin_ohm"] is None and "no small-signal current" in ac["zin_reason"]
    assert ac["zout_ohm"] is not None and ac["zout_ohm"] < 1.0  # feedback lowers Ro = 75 Ω
