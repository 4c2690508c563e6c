"""Value text in and out (docgen.units) against the SI Brochure and IEC 60062."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from docgen.units import (
    QuantityError,
    format_eng,
    parse_percent,
    parse_ppm,
    parse_quantity,
    parse_temperature,
    parse_value,
    round_results,
    round_sig,
)

# SI prefixes and their factors: SI Brochure, 9th edition (BIPM), table 7.  "u" is the common
# ASCII stand-in for µ (common practice).
SI_PREFIXES = [
    ("f", 1e-15), ("p", 1e-12), ("n", 1e-9), ("u", 1e-6), ("µ", 1e-6), ("m", 1e-3),
    ("k", 1e3), ("M", 1e6), ("G", 1e9), ("T", 1e12),
]


@pytest.mark.parametrize(("prefix", "factor"), SI_PREFIXES)
def test_si_prefixes(prefix: str, factor: float) -> None:
    assert parse_quantity(f"1{prefix}").value == factor
    assert parse_quantity(f"3.3 {prefix}V").value == pytest.approx(3.3 * factor, rel=1e-15)


def test_prefixes_are_case_sensitive() -> None:
    # SI Brochure: m is milli, M is mega.
    assert parse_quantity("1m").value == 1e-3
    assert parse_quantity("1M").value == 1e6


# The letter-and-digit code of IEC 60062 (from memory): the letter stands for the decimal point
# and the multiplier; R is the unit multiplier.
IEC_60062 = [
    ("R47", 0.47), ("4R7", 4.7), ("2R2", 2.2), ("47R", 47.0), ("4k7", 4700.0),
    ("1M5", 1.5e6), ("4n7", 4.7e-9), ("2u2", 2.2e-6), ("2µ2", 2.2e-6), ("1k5", 1500.0),
    ("6p8", 6.8e-12), ("3m3", 3.3e-3), ("1G2", 1.2e9),
]


@pytest.mark.parametrize(("text", "value"), IEC_60062)
def test_iec_60062_code(text: str, value: float) -> None:
    assert parse_quantity(text).value == pytest.approx(value, rel=1e-15)


# Written forms with units (the SI symbols; "ohm" as the spelled-out unit name).
WITH_UNITS = [
    ("2.2 kΩ", 2200.0, "Ω"), ("2.2kohm", 2200.0, "Ω"), ("2.2 kohm", 2200.0, "Ω"),
    ("100 nF", 1e-7, "F"), ("1 kHz", 1e3, "Hz"), ("5 mV", 5e-3, "V"), ("0.25 W", 0.25, "W"),
    ("10 uH", 1e-5, "H"), ("3 dB", 3.0, "dB"), ("25 °C", 25.0, "°C"), ("25 degC", 25.0, "°C"),
    ("4k7 Ω", 4700.0, "Ω"), ("1e3", 1000.0, ""), ("-3m", -3e-3, ""), ("−5 V", -5.0, "V"),
    (".5", 0.5, ""), ("2 s", 2.0, "s"),
]


@pytest.mark.parametrize(("text", "value", "unit"), WITH_UNITS)
def test_values_with_units(text: str, value: float, unit: str) -> None:
    quantity = parse_quantity(text)
    assert quantity.value == pytest.approx(value, rel=1e-15)
    assert quantity.unit == unit


@pytest.mark.parametrize(("text", "message", "hint"), [
    ("1meg", "'meg' is not an SI prefix", "did you mean '1M'?"),
    ("1MEG", "'MEG' is not an SI prefix", "did you mean '1M'?"),
    ("2.2Meg", "'Meg' is not an SI prefix", "did you mean '2.2M'?"),
    ("3 C", "'C' is the coulomb", "did you mean '3 °C'?"),
    ("3 xyz", "unknown unit 'xyz'", None),
    ("abc", "'abc' is not a number", "a value starts with a number, e.g. '4.7k' or '4k7'"),
    ("3 mdB", "'dB' does not take an SI prefix", "write '3 dB'"),
    ("4.7U", "'U' is not an SI prefix", "did you mean '4.7u'?"),
    ("4Vpp", "unknown unit 'Vpp'", "write '4 V pp'"),
    ("2 mVrms", "unknown unit 'mVrms'", "write '2 mV rms'"),
])
def test_errors(text: str, message: str, hint: str | None) -> None:
    with pytest.raises(QuantityError) as caught:
        parse_quantity(text)
    assert message in caught.value.message
    assert caught.value.hint == hint


def test_error_offset_points_at_the_bad_letters() -> None:
    with pytest.raises(QuantityError) as caught:
        parse_quantity("47meg")
    assert (caught.value.offset, caught.value.width) == (2, 3)


def test_unit_that_does_not_fit() -> None:
    with pytest.raises(QuantityError) as caught:
        parse_value("10 uF", "Ω", "a resistor's value")
    assert caught.value.message == "unit 'F' does not fit a resistor's value (expected Ω)"
    assert (caught.value.offset, caught.value.width) == (3, 2)  # under "uF"
    assert parse_value("4k7", "Ω").unit == "Ω"  # a bare value takes the expected unit


def test_capital_k_on_a_resistor_hints_kilo() -> None:
    with pytest.raises(QuantityError) as caught:
        parse_value("4.7K", "Ω", "a resistor's value")
    assert caught.value.hint == "kilo is a lower-case 'k'"


def test_temperatures() -> None:
    # 0 °C = 273.15 K by the definition of the degree Celsius (SI Brochure).
    assert parse_temperature("25 °C") == 25.0
    assert parse_temperature("298.15 K") == pytest.approx(25.0, abs=1e-12)
    assert parse_temperature("-20 degC") == -20.0
    for bad in ("25", "25 C", "25 V"):
        with pytest.raises(QuantityError):
            parse_temperature(bad)


@pytest.mark.parametrize(("text", "fraction"), [
    ("1%", 0.01), ("±1%", 0.01), ("± 5 %", 0.05), ("+-0.5%", 0.005), ("10 %", 0.1),
])
def test_percentages(text: str, fraction: float) -> None:
    assert parse_percent(text) == pytest.approx(fraction, rel=1e-15)


def test_ppm() -> None:
    # 1 ppm = 1e-6 (parts per million, by definition).
    assert parse_ppm("100ppm") == pytest.approx(1e-4, rel=1e-15)
    assert parse_ppm("50 ppm/K") == pytest.approx(5e-5, rel=1e-15)
    with pytest.raises(QuantityError):
        parse_ppm("100 V")


# Engineering notation: exponent a multiple of 3 with its SI prefix (SI Brochure); the minus
# sign U+2212 as typesetting practice (ISO 80000-1) has it.
FORMATTED = [
    (4700.0, "Ω", 3, "4.7 kΩ"), (2.2e-6, "F", 3, "2.2 µF"), (-3.0, "dB", 3, "−3 dB"),
    (-3.01, "dB", 3, "−3.01 dB"), (1.0, "V", 3, "1 V"), (0.0, "V", 3, "0 V"),
    (999.95, "Hz", 3, "1 kHz"), (12345.0, "Hz", 3, "12.3 kHz"), (-0.001234, "A", 3, "−1.23 mA"),
    (25.0, "°C", 3, "25 °C"), (4700.0, "", 3, "4.7k"), (1e-18, "A", 3, "1e-18 A"),
    (1.5e9, "Hz", 2, "1.5 GHz"), (47e-12, "F", 3, "47 pF"), (100e-9, "F", 3, "100 nF"),
    (float("inf"), "Ω", 3, "∞ Ω"), (None, "V", 3, "n/a"), (12.5, "%", 3, "12.5 %"),
]


@pytest.mark.parametrize(("value", "unit", "digits", "text"), FORMATTED)
def test_format_eng(value: float | None, unit: str, digits: int, text: str) -> None:
    assert format_eng(value, unit, digits) == text


@given(st.floats(min_value=1e-14, max_value=1e14), st.booleans())
def test_format_then_parse_round_trips(value: float, negative: bool) -> None:
    value = -value if negative else value
    back = parse_quantity(format_eng(value, "V", digits=6))
    assert back.unit == "V"
    assert back.value == pytest.approx(value, rel=1e-5)


@given(st.floats(allow_nan=False, allow_infinity=False, min_value=-1e300, max_value=1e300))
def test_round_sig_matches_numpy(value: float) -> None:
    # numpy's positional formatter with fractional=False rounds to significant digits.
    expected = float(np.format_float_positional(value, precision=6, unique=False,
                                                fractional=False, trim="k"))
    assert round_sig(value, 6) == pytest.approx(expected, rel=1e-12, abs=0)


def test_round_sig_edges() -> None:
    assert round_sig(0.0) == 0.0
    assert math.isinf(round_sig(math.inf))
    assert math.isnan(round_sig(math.nan))
    assert round_sig(1 / 3) == 0.333333
    assert round_sig(123456789.0) == 123457000.0


def test_round_results_walks_everything() -> None:
    data = {"a": 1 / 3, "b": [2 / 3, (1.0, 7)], "c": np.float64(1 / 7), "d": np.arange(2) / 3,
            "e": "text", "f": True, "g": None, "h": np.int64(5),
            "i": [math.inf, -math.inf, math.nan, np.float64("nan")]}
    rounded = round_results(data)
    assert rounded == {"a": 0.333333, "b": [0.666667, [1.0, 7]], "c": 0.142857,
                       "d": [0.0, 0.333333], "e": "text", "f": True, "g": None, "h": 5,
                       "i": [None, None, None, None]}
    assert type(rounded["c"]) is float and type(rounded["h"]) is int
