"""The metric vocabulary: parsing, diagnostics and reading values from a results dict.

Reference values come from outside the project: scipy.signal.freqs for a single-pole response,
and closed-form integrals of white and 1/f noise densities (calculus).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import signal

from docgen.metric_values import band_rms, evaluate, samples
from docgen.metrics import FORMS, MetricError, parse, sections_needed, unknown_names

# (text, form, canonical key, unit)
PARSE_CASES = [
    ("gain at 1 kHz", "gain_at", "gain at 1000 Hz", "dB"),
    ("gain at 1kHz", "gain_at", "gain at 1000 Hz", "dB"),
    ("phase at 20 kHz", "phase_at", "phase at 20000 Hz", "°"),
    ("midband gain", "midband_gain", "midband gain", "dB"),
    ("low corner", "low_corner", "low corner", "Hz"),
    ("input impedance at 100 Hz", "zin_at", "input impedance at 100 Hz", "Ω"),
    ("voltage at c1", "net_voltage", "voltage at c1", "V"),
    ("Q1 collector current", "part:collector current", "Q1 collector current", "A"),
    ("Q1   collector-emitter   voltage", "part:collector-emitter voltage",
     "Q1 collector-emitter voltage", "V"),
    ("RL1 power", "part:power", "RL1 power", "W"),
    ("VB current", "part:current", "VB current", "A"),
    ("U1 supply current", "part:supply current", "U1 supply current", "A"),
    ("supply current", "supply_current", "supply current", "A"),
    ("input noise 20 Hz .. 20 kHz", "input_noise_band", "input noise 20 Hz .. 20000 Hz", "V"),
    ("input noise density at 1 kHz", "input_noise_density", "input noise density at 1000 Hz",
     "V/√Hz"),
    # 100 mV rms is 141.421 mV peak (√2, sine)
    ("THD at 100 mV rms", "thd_at", "THD at 0.141421 V", "%"),
    ("THD at 1 V pp", "thd_at", "THD at 0.5 V", "%"),
    ("THD", "thd", "THD", "%"),
    ("PSRR at 100 Hz", "psrr_at", "PSRR at 100 Hz", "dB"),
    ("drift of Q1 collector current", "drift", "drift of Q1 collector current", "A"),
    ("drift of gain at 1 kHz", "drift", "drift of gain at 1000 Hz", "dB"),
    ("yield", "yield", "yield", "%"),
]


@pytest.mark.parametrize("text, form, key, unit", PARSE_CASES)
def test_parse(text: str, form: str, key: str, unit: str) -> None:
    metric = parse(text)
    assert (metric.form, metric.key, metric.unit) == (form, key, unit)


# (text, column, words in the message, words in the hint)
ERROR_CASES = [
    ("gian at 1 kHz", 1, "'gian'", "gain"),
    ("midband gane", 9, "'gane'", "gain"),
    ("Q1 colector current", 4, "'colector'", "collector"),
    ("gain at 1 KHz", 9, "frequency", "1kHz"),
    ("gain at 1 MEGHz", 9, "frequency", "1MHz"),
    ("THD at", 7, "ends too early", None),
    ("Q1 current please", 12, "'please'", "remove"),
    ("drift of drift of yield", 10, "nested", None),
    ("", 1, "empty", "gain at 1 kHz"),
    ("SNR", 1, "'SNR'", "signal-to-noise ratio"),
    ("Q1 Ic", 4, "'Ic'", "collector current"),
]


@pytest.mark.parametrize("text, col, message, hint", ERROR_CASES)
def test_parse_errors_point_at_the_word(text: str, col: int, message: str, hint: str | None):
    with pytest.raises(MetricError) as caught:
        parse(text)
    assert caught.value.col == col
    assert message in caught.value.message
    if hint:
        assert hint in (caught.value.hint or "")


def test_every_form_has_an_example_that_parses_to_it() -> None:
    filled = {f.pattern.replace("{freq}", "1 kHz").replace("{net}", "out")
              .replace("{part}", "Q1").replace("{band}", "20 Hz .. 20 kHz")
              .replace("{amplitude}", "10 mV").replace("{metric}", "midband gain"): f.name
              for f in FORMS}
    for text, name in filled.items():
        assert parse(text).form == name, text


def test_unknown_names_and_wrong_kind() -> None:
    parts = {"Q1": "npn", "RL1": "resistor"}
    assert unknown_names(parse("Q1 collector current"), parts, ["c1"]) == []
    assert "did you mean 'RL1'" in unknown_names(parse("RL2 power"), parts, [])[0]
    assert "a resistor has no collector current" in unknown_names(
        parse("RL1 collector current"), parts, [])[0]
    assert "no net called 'c2'" in unknown_names(parse("voltage at c2"), parts, ["c1"])[0]


def test_sections_needed() -> None:
    metrics = [parse("Q1 collector current"), parse("input noise")]
    assert sections_needed(metrics) == {"op", "ac", "noise"}
    assert sections_needed([parse("drift of voltage at c1")]) == {"op", "spread", "ac"}
    assert sections_needed(["THD", "gian"]) == {"op", "transient"}  # bad text is skipped


def test_sections_needed_for_requirements() -> None:
    from docgen.design import Limit, Requirement
    from docgen.diagnostics import Span

    def requirement(text: str, across: tuple[str, ...] = ()) -> Requirement:
        return Requirement(text, Limit("below", None, 1.0), across, Span(1, 1), Span(1, 1),
                           Span(1, 1))

    assert sections_needed([requirement("voltage at c1")]) == {"op"}
    assert sections_needed([requirement("voltage at c1", ("boards",))]) == {"op", "spread",
                                                                            "ac"}


def _single_pole_results(fc: float) -> dict:
    """A results dict whose ac curve is a first-order low-pass, from scipy.signal.freqs."""
    freq = np.logspace(1, 6, 251)
    _, h = signal.freqs([1.0], [1 / (2 * math.pi * fc), 1.0], worN=2 * math.pi * freq)
    return {"ac": {"freq_hz": freq.tolist(), "gain_db": (20 * np.log10(abs(h))).tolist(),
                   "phase_deg": np.degrees(np.angle(h)).tolist(), "f_high_hz": fc,
                   "f_low_hz": None, "f_low_reason": "direct-coupled: no low corner"}}


@pytest.mark.parametrize("f", [1e3, 3.3e3, 47e3])
def test_gain_and_phase_interpolate_the_curve(f: float) -> None:
    """Against scipy.signal.freqs of H(s) = 1/(1 + s/ωc) evaluated exactly at f."""
    fc = 10e3
    results = _single_pole_results(fc)
    _, h = signal.freqs([1.0], [1 / (2 * math.pi * fc), 1.0], worN=[2 * math.pi * f])
    assert evaluate(parse(f"gain at {f} Hz"), results).value == pytest.approx(
        20 * math.log10(abs(h[0])), abs=0.01)
    assert evaluate(parse(f"phase at {f} Hz"), results).value == pytest.approx(
        math.degrees(np.angle(h[0])), abs=0.05)


def test_missing_values_say_why() -> None:
    results = _single_pole_results(10e3)
    low = evaluate(parse("low corner"), results)
    assert low.value is None and "direct-coupled" in low.reason
    outside = evaluate(parse("gain at 10 MHz"), results)
    assert outside.value is None and "outside the computed sweep" in outside.reason
    noise = evaluate(parse("input noise"), results)
    assert noise.value is None and "'noise'" in noise.reason


def test_band_noise_white_and_flicker() -> None:
    """White density d: rms = d·√(f2 − f1); density² = K/f: rms² = K·ln(f2/f1) (calculus)."""
    freq = np.logspace(0, 6, 301)
    white = np.full_like(freq, 4e-9)
    assert band_rms(freq, white, 20, 20e3) == pytest.approx(4e-9 * math.sqrt(19980), rel=1e-4)
    k = 1e-16
    flicker = np.sqrt(k / freq)
    assert band_rms(freq, flicker, 10, 1e4) == pytest.approx(math.sqrt(k * math.log(1e3)),
                                                              rel=1e-3)


def test_band_noise_reads_the_computed_band_when_it_matches() -> None:
    results = {"noise": {"band_hz": [20.0, 20e3], "input_rms_v": 1.5e-6,
                         "freq_hz": [10.0, 1e5], "input_density_v_per_rthz": [1e-8, 1e-8]}}
    assert evaluate(parse("input noise 20 Hz .. 20 kHz"), results).value == 1.5e-6
    other = evaluate(parse("input noise 100 Hz .. 10 kHz"), results).value
    assert other == pytest.approx(1e-8 * math.sqrt(9900), rel=1e-4)


def test_part_supply_and_percent_readers() -> None:
    results = {
        "op": {"nets": {"c1": 7.5}, "parts": {"Q1": {"ic_a": 1e-3}, "RL1": {"power_w": 8e-3}},
               "supplies": {"VB": {"current_a": 1.2e-3, "power_w": 0.018},
                            "VN": {"current_a": 1.0e-3, "power_w": 0.015}}},
        "transient": {"thd_percent": 2.5, "amplitudes": [{"amplitude_v": 0.1,
                                                          "thd_percent": 0.4}]},
    }
    assert evaluate(parse("Q1 collector current"), results).value == 1e-3
    assert evaluate(parse("VB current"), results).value == 1.2e-3
    assert evaluate(parse("supply power"), results).value == pytest.approx(0.033)
    assert evaluate(parse("voltage at c1"), results).value == 7.5
    assert evaluate(parse("THD"), results).value == pytest.approx(0.025)
    assert evaluate(parse("THD at 100 mV"), results).value == pytest.approx(0.004)
    missing = evaluate(parse("THD at 200 mV"), results)
    assert missing.value is None and "amplitudes" in missing.reason
    assert "no part called 'Q2'" in evaluate(parse("Q2 collector current"), results).reason


def test_drift_and_samples_read_the_spread_sections() -> None:
    results = {"spread": {"samples": {"Q1 collector current": [1e-3, 1.1e-3, None]},
                          "temperature": {"ambient_c": [-20, 25, 60],
                                          "samples": {"Q1 collector current":
                                                      [0.9e-3, 1e-3, 1.2e-3]}}}}
    metric = parse("Q1 collector current")
    assert evaluate(parse("drift of Q1 collector current"), results).value == pytest.approx(
        0.3e-3)
    assert samples(metric, results, "boards")[0] == [1e-3, 1.1e-3, None]
    assert samples(metric, results, "temperature")[0] == [0.9e-3, 1e-3, 1.2e-3]
    values, reason = samples(parse("midband gain"), results, "boards")
    assert values is None and "midband gain" in reason


# Words of the vocabulary plus noise, so generated texts come close to real metrics.
_WORDS = sorted({w for f in FORMS for w in f.words if not w.startswith("{")}
                | {"Q1", "c1", "1", "kHz", "20", "Hz", "..", "mV", "rms", "pp", "at", "1k", "-",
                   "µ", "%", "é", "\t"})


@given(st.lists(st.sampled_from(_WORDS), max_size=8).map(" ".join) | st.text(max_size=40))
@settings(max_examples=600, deadline=None)
def test_parse_raises_only_metric_errors_with_a_real_column(text: str) -> None:
    """Property: any text either parses or raises MetricError pointing inside (or just after)
    the text; never another exception."""
    try:
        metric = parse(text)
    except MetricError as exc:
        assert 1 <= exc.col <= len(text) + 1
        return
    assert parse(metric.key).key == metric.key  # the canonical spelling reads back the same


def test_rejection_reads_the_worst_supply_and_skips_missing_points() -> None:
    results = {"feedback": {"freq_hz": [100.0, 1000.0],
                            "psrr_db": {"VP": [80.0, 60.0], "VN": [None, None],
                                        "VA": [70.0, 65.0]},
                            "cmrr_db": [None, 50.0]}}
    assert evaluate(parse("PSRR at 1 kHz"), results).value == pytest.approx(60.0)
    assert evaluate(parse("PSRR at 100 Hz"), results).value == pytest.approx(70.0)
    missing = evaluate(parse("CMRR at 100 Hz"), results)
    assert missing.value is None and "no value at 100 Hz" in missing.reason
