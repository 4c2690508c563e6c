"""The ``transient`` section of whole stages through the pipeline: small-signal agreement,
swing limits of a common-emitter stage (common practice), clipping, power, determinism."""

from __future__ import annotations

import json
import math
from importlib import resources

import jsonschema
import pytest
from response_helpers import parallel
from solver_helpers import _BUILTINS, design_text

from docgen import pipeline
from docgen.reader import read_text

SCHEMA = json.loads(resources.files("docgen").joinpath("schema/results.schema.json")
                    .read_text(encoding="utf-8"))
SECTIONS = frozenset({"op", "ac", "noise", "transient"})

# Common-emitter stage, emitter resistor unbypassed (gain ≈ −RC‖RL/RE ≈ −3.2), output
# AC-coupled into RL.  Bias: base divider 10k/2k2 from 12 V, IC ≈ 1.4 mA.
CE = """
VCC supply 12 V : vcc gnd
VS signal {amplitude} 1 kHz source=50 : src gnd
CI capacitor 100u : src b
R1 resistor 10k : vcc b
R2 resistor 2k2 : b gnd
Q1 npn generic-npn : c=c b=b e=e
RC resistor 4k7 : vcc c
RE resistor 1k : e gnd
CO capacitor 100u : c out
"""
# The same stage with RE bypassed: VE stays at its bias while the output swings, as the
# common-practice swing limits assume (gain ≈ −gm·RC‖RL ≈ −170).
BYPASSED = CE + "CE capacitor 1m : e gnd\n"
BENCH = "input VS\noutput out\nload 10k\nfrequencies 10 Hz .. 100 kHz"


def _results(amplitude: str, require: str = "", circuit: str = CE) -> dict:
    text = design_text(circuit.format(amplitude=amplitude), bench=BENCH)
    if require:
        text += "\n```require\n" + require + "\n```\n"
    out = pipeline.run(read_text(text, "test.md"), _BUILTINS, only=SECTIONS)
    assert not out["errors"], out["errors"]
    return out


def test_small_amplitude_fundamental_gain_matches_small_signal_midband():
    # Linearisation is the small-amplitude limit of the large-signal solution: at 10 mV the
    # transient's fundamental gain must agree with the ac midband gain within 0.1 dB.
    out = _results("10 mV")
    transient, ac = out["transient"], out["ac"]
    assert transient["steady_state"]["reached"]
    assert transient["fundamental_gain_db"] == pytest.approx(ac["midband_gain_db"], abs=0.1)
    assert transient["fundamental_gain_db"] == pytest.approx(ac["gain_at_signal_db"], abs=0.02)
    assert transient["thd_percent"] < 0.1  # a degenerated stage at 30 mV pp out is clean
    assert transient["clipping"] == []
    assert len(transient["time_s"]) == len(transient["output_v"]) <= 400


@pytest.mark.slow
def test_common_emitter_swing_limits_follow_the_load_lines():
    # Common practice for an AC-coupled load: the output rises until the transistor cuts off,
    # min(VCC − VC, IC·(RC‖RL)) above its rest point, and falls until it saturates,
    # VC − VE − VCE(sat) below it (VCE(sat) ≈ 0.2 V).  Both are first-order estimates (the
    # coupling capacitor shifts a little while the stage clips), so 15 % is allowed.
    out = _results("1 mV", "output swing : > 1 V", BYPASSED)
    op, transient = out["op"], out["transient"]
    vc, ve = op["nets"]["c"], op["nets"]["e"]
    ic = op["parts"]["Q1"]["ic_a"]
    positive = min(12.0 - vc, ic * parallel(4.7e3, 10e3))
    negative = vc - ve - 0.2
    jsonschema.validate(json.loads(json.dumps(out)), SCHEMA)
    assert transient["headroom_pos_v"] == pytest.approx(positive, rel=0.15)
    assert transient["headroom_neg_v"] == pytest.approx(negative, rel=0.15)
    events = {(e.get("part"), e["what"]) for e in transient["overdrive_clipping"]}
    assert {("Q1", "cut-off"), ("Q1", "saturation")} <= events
    # the swing within 1 % THD cannot exceed twice the smaller limit by much, and is positive
    assert 0 < transient["max_swing_vpp"] < positive + negative
    limit_amplitude = transient["swing_limit_amplitude_v"]
    gain = 10 ** (out["ac"]["gain_at_signal_db"] / 20)
    assert transient["max_swing_vpp"] == pytest.approx(2 * gain * limit_amplitude, rel=0.1)


def test_average_power_matches_the_operating_point_at_small_amplitude():
    # At a small signal the cycle-average power of each resistor is its bias power plus
    # (v_rms)²/R of the signal across it, a tiny addition (Joule's law).
    out = _results("10 mV")
    average, op = out["transient"]["power_w"], out["op"]["parts"]
    for part in ("R1", "R2", "RC", "RE", "Q1"):
        assert average[part] == pytest.approx(op[part]["power_w"], rel=2e-3)
    # Tellegen's theorem: what the sources deliver, the parts and the bench load absorb
    output = out["transient"]["output_v"]
    load = sum(v * v for v in output) / len(output) / 10e3
    absorbed = sum(w for name, w in average.items() if name not in ("VCC", "VS")) + load
    assert absorbed == pytest.approx(-average["VCC"] - average["VS"], rel=1e-6)


def test_transient_section_is_deterministic_and_fits_the_schema():
    first, second = _results("20 mV"), _results("20 mV")
    assert first["transient"] == second["transient"]
    jsonschema.validate(json.loads(json.dumps(first)), SCHEMA)


def test_bench_amplitudes_and_thd_requirements_are_driven():
    text = design_text(CE.format(amplitude="10 mV"),
                       bench=BENCH + "\namplitudes 50 mV, 0.2 V rms")
    text += "\n```require\nTHD at 0.1 V : < 5 %\n```\n"
    out = pipeline.run(read_text(text, "test.md"), _BUILTINS, only=SECTIONS)
    rows = out["transient"]["amplitudes"]
    assert [r["amplitude_v"] for r in rows] == pytest.approx([0.05, 0.1, 0.2 * math.sqrt(2)])
    levels = [r["thd_percent"] for r in rows]
    assert levels == sorted(levels)  # distortion grows with the drive


def test_terminal_report_shows_the_large_signal_figures():
    from docgen.report import render

    out = _results("20 mV")
    text = render(out)
    assert "Large signal at 20 mV peak, 1 kHz" in text
    assert f"{out['transient']['thd_percent']:.4g} %" in text
    assert "trapezoidal rule" in text


@pytest.mark.parametrize("text, message", [
    ("50 mV, banana", "'banana'"),
    ("50 mV, -1 V", "greater than zero"),
    ("0.1 A", "'0.1 A'"),
])
def test_bad_bench_amplitudes_are_reported_at_their_line(text, message):
    page = design_text(CE.format(amplitude="10 mV"), bench=BENCH + f"\namplitudes {text}")
    out = pipeline.run(read_text(page, "test.md"), _BUILTINS, only=SECTIONS)
    errors = [e for e in out["errors"] if e["analysis"] == "transient"]
    assert len(errors) == 1 and message in errors[0]["message"]
    line = page.splitlines()[errors[0]["line"] - 1]
    assert line.startswith("amplitudes")
    assert "transient" not in out


def test_clipping_spans_name_start_and_end_phases_and_join_across_the_period_end():
    from docgen.solve.transient import _spans

    flags = [False] * 8
    flags[2:4] = [True, True]  # grid points 2, 3 → phases 3/8 and 4/8 of a turn
    assert _spans(flags, {"part": "Q1"}) == [
        {"part": "Q1", "phase_deg": 135.0, "phase_end_deg": 180.0}]
    wrapped = [True, False, False, False, False, False, True, True]  # 7/8, 8/8 and 1/8
    assert _spans(wrapped, {}) == [{"phase_deg": 315.0, "phase_end_deg": 45.0}]
    assert _spans([True] * 4, {}) == [{"phase_deg": 0.0, "phase_end_deg": 360.0}]
    assert _spans([False] * 4, {}) == []
