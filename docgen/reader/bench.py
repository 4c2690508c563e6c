"""The ``bench`` block: one ``key value`` per line, mapped onto :class:`docgen.design.Bench`.

Keys other analyses need later (``common mode``, ``step`` ...) are kept raw in ``Bench.extra``;
:data:`EXTRA_KEYS` is the one table of them, and a module that reads such a key adds its row.
"""

from __future__ import annotations

from collections.abc import Callable, Iterator
from contextlib import contextmanager
from dataclasses import fields as dataclass_fields
from typing import Any

from docgen.design import Bench, frozen_map
from docgen.diagnostics import Collector, Span, did_you_mean
from docgen.reader.common import report_quantity
from docgen.reader.lexer import SourceLine
from docgen.units import QuantityError, parse_percent, parse_temperature, parse_value

#: bench keys kept as raw text in ``Bench.extra`` -> what they mean (for the docs).
EXTRA_KEYS: dict[str, str] = {
    "common mode": "`VA VB`: the two signal or supply parts driving a differential input "
                   "(a 0 V supply holds an input), for the common-mode rejection; default none",
    "loop": "`U1` or `U1 Q3`: the op-amps or transistors whose loop gain is measured (return "
            "ratio of their controlled source); default every op-amp in negative feedback",
    "step": "`10 mV`: the height of the input step for the step response; default 10 mV at the "
            "output over the midband gain",
    "amplitudes": "`50 mV, 100 mV rms`: input amplitudes for the distortion table, separated "
                  "by commas, each peak unless followed by rms or pp; default none",
}

#: reads a value text into Bench fields.
Reader = Callable[[str], dict[str, Any]]


class BenchValueError(ValueError):
    """A bench value that does not read; ``offset`` points into the value text."""

    def __init__(self, message: str, hint: str | None = None, offset: int = 0, width: int = 0):
        super().__init__(message)
        self.message, self.hint, self.offset, self.width = message, hint, offset, width


def _name(text: str) -> dict[str, Any]:
    if len(text.split()) != 1:
        raise BenchValueError("expected one name", "e.g. 'input VS'")
    return {"value": text}


def _positive(text: str, unit: str, what: str) -> float:
    value = parse_value(text, unit, what).value
    if not value > 0:
        raise BenchValueError(f"{what} must be greater than zero")
    return value


@contextmanager
def _shifted(offset: int) -> Iterator[None]:
    """Move the offset of a value error raised inside by ``offset`` characters."""
    try:
        yield
    except QuantityError as exc:
        exc.offset += offset
        raise


def _span_of(text: str, unit: str, what: str) -> tuple[float, float]:
    low_text, dots, high_text = text.partition("..")
    if not dots:
        raise BenchValueError(f"{what} is a range 'low .. high'", "e.g. '10 Hz .. 1 MHz'")
    low = _positive(low_text, unit, what)
    with _shifted(len(low_text) + 2):
        high = _positive(high_text, unit, what)
    if not low < high:
        raise BenchValueError(f"{what}: the low end must be below the high end")
    return low, high


def _load(text: str) -> dict[str, Any]:
    for bar in ("||", "‖"):
        if bar in text:
            resistance, _, capacitance = text.partition(bar)
            with _shifted(len(resistance) + len(bar)):
                load_capacitance = _positive(capacitance, "F", "a load capacitance")
            return {"load_resistance": _positive(resistance, "Ω", "a load resistance"),
                    "load_capacitance": load_capacitance}
    return {"load_resistance": _positive(text, "Ω", "a load resistance")}


def _frequencies(text: str) -> dict[str, Any]:
    low, high = _span_of(text, "Hz", "the sweep")
    return {"f_start": low, "f_stop": high}


def _ambient(text: str) -> dict[str, Any]:
    if "(" in text:
        nominal_text, _, rest = text.partition("(")
        if not rest.rstrip().endswith(")"):
            raise BenchValueError("a range in brackets needs its ')'")
        nominal = parse_temperature(nominal_text)
        with _shifted(len(nominal_text) + 1):
            low, high = _temperature_range(rest.rstrip()[:-1])
    elif ".." in text:
        nominal = 25.0
        low, high = _temperature_range(text)
    else:
        return {"ambient": parse_temperature(text)}
    if not low <= nominal <= high:
        raise BenchValueError("the nominal ambient lies outside the range",
                              "write 'NOMINAL (LOW .. HIGH)', e.g. '40 °C (0 °C .. 85 °C)'")
    return {"ambient": nominal, "ambient_range": (low, high)}


def _temperature_range(text: str) -> tuple[float, float]:
    low_text, dots, high_text = text.partition("..")
    if not dots:
        raise BenchValueError("a temperature range is 'low .. high'", "e.g. '-20 °C .. 60 °C'")
    low = parse_temperature(low_text)
    with _shifted(len(low_text) + 2):
        high = parse_temperature(high_text)
    if not low < high:
        raise BenchValueError("the low end of the range must be below the high end")
    return low, high


def _integer(text: str, least: int, what: str) -> int:
    if not text.strip().isdigit() or int(text) < least:
        raise BenchValueError(f"{what} is a whole number of at least {least}")
    return int(text)


def _distribution(text: str) -> dict[str, Any]:
    if text not in ("uniform", "normal"):
        raise BenchValueError(f"unknown distribution '{text}'",
                              did_you_mean(text, ["uniform", "normal"]) or "uniform or normal")
    return {"distribution": text}


def _distortion(text: str) -> dict[str, Any]:
    limit = parse_percent(text)
    if not 0 < limit < 1:
        raise BenchValueError("a distortion limit lies between 0 % and 100 %")
    return {"distortion_limit": limit}


#: bench key -> (reader of its value, meaning) — the docs list this table.
KEYS: dict[str, tuple[Reader, str]] = {
    "input": (lambda t: {"input": _name(t)["value"]},
              "the `signal` part driving the stage; default none"),
    "output": (lambda t: {"output": _name(t)["value"]},
               "the net observed, against gnd; default none"),
    "load": (_load, "`47k` or `47k || 100p` (also `‖`): R, or R parallel C, from the output to "
             "gnd in every analysis; default no load"),
    "frequencies": (_frequencies, "the response sweep `low .. high`; default `10 Hz .. 1 MHz`"),
    "points per decade": (lambda t: {"points_per_decade": _integer(t, 2, "points per decade")},
                          "resolution of the sweep, a whole number ≥ 2; default 50"),
    "noise band": (lambda t: {"noise_band": _span_of(t, "Hz", "the noise band")},
                   "the band noise is integrated over, `low .. high`; default the sweep"),
    "ambient": (_ambient, "`25 °C`, `-20 °C .. 60 °C` or `40 °C (0 °C .. 85 °C)`: nominal "
                "ambient and optional range; default 25 °C, no range"),
    "boards": (lambda t: {"boards": _integer(t, 1, "boards")},
               "tolerance-analysis samples, a whole number ≥ 1; default 500"),
    "seed": (lambda t: {"seed": _integer(t, 0, "the seed")},
             "the tolerance-analysis seed, a whole number ≥ 0; default 1"),
    "distribution": (_distribution, "`uniform`, or `normal` with the tolerance at 3σ; "
                     "default uniform"),
    "distortion limit": (_distortion, "the THD that bounds the output-swing search, a "
                         "percentage; default 1 %"),
}


def all_keys() -> list[str]:
    """Every key a bench block accepts, longest first (for matching)."""
    return sorted([*KEYS, *EXTRA_KEYS], key=lambda k: (-len(k.split()), k))


def read_bench(lines: list[SourceLine], collector: Collector) -> Bench:
    """The bench block's settings over :class:`Bench` defaults."""
    values: dict[str, Any] = {}
    extra: dict[str, str] = {}
    spans: dict[str, Span] = {}
    for line in lines:
        if line.is_blank:
            continue
        _read_line(line, collector, values, extra, spans)
    known = {f.name for f in dataclass_fields(Bench)}
    settings = {k: v for k, v in values.items() if k in known}
    return Bench(**settings, extra=frozen_map(extra), spans=frozen_map(spans))


def _read_line(line: SourceLine, collector: Collector, values: dict[str, Any],
               extra: dict[str, str], spans: dict[str, Span]) -> None:
    words = line.words()
    key = _match_key([w.text for w in words])
    if key is None:
        span = Span(line.number, words[0].col, len(words[0].text))
        guess = " ".join(w.text for w in words[:2])
        hint = did_you_mean(guess, all_keys()) or did_you_mean(words[0].text, all_keys())
        collector.add(span, f"unknown bench key '{words[0].text}'",
                      hint=hint or f"bench keys: {', '.join(sorted(all_keys()))}")
        return
    count = len(key.split())
    key_span = Span(line.number, words[0].col, words[count - 1].end - words[0].col)
    if key in spans:
        collector.add(key_span, f"bench key '{key}' is given twice")
        return
    if len(words) == count:
        collector.add(key_span, f"bench key '{key}' needs a value")
        return
    value_col = words[count].col
    text = line.body[value_col - line.indent - 1:].strip()
    value_span = Span(line.number, value_col, len(text))
    spans[key] = value_span
    if key in EXTRA_KEYS:
        extra[key] = " ".join(text.split())  # single spaces, as neaten writes it
        return
    try:
        values.update(KEYS[key][0](text))
    except QuantityError as exc:
        report_quantity(collector, value_span, exc)
    except BenchValueError as exc:
        collector.add(value_span, exc.message, hint=exc.hint)


def _match_key(words: list[str]) -> str | None:
    for key in all_keys():
        parts = key.split()
        if words[: len(parts)] == parts:
            return key
    return None
