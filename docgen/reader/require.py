"""The ``require`` block: ``metric : limit [across boards|temperature|all]``.

The metric stays raw text with its span (the check stage owns the metric vocabulary); the limit
is read here.  Limits: ``< x``, ``> x``, ``x .. y``, ``≈ x ± t`` (or ``~ x +- t``; ``t`` may be a
percentage of ``x``).  Values are stored in SI units of the written unit, percentages as
fractions (``1 %`` → 0.01), decibels and degrees as written; ``V pp`` and ``V rms`` keep their
qualifier in :attr:`Limit.unit`.
"""

from __future__ import annotations

import re

from docgen.design import Limit, Requirement
from docgen.diagnostics import Collector, did_you_mean
from docgen.reader.common import report_quantity
from docgen.reader.lexer import SourceLine, read_lines
from docgen.units import QuantityError, parse_quantity

LIMIT_UNITS = ("", "dB", "Hz", "V", "A", "Ω", "W", "%", "°", "s", "°C", "F", "H", "V/√Hz")
ACROSS: dict[str, tuple[str, ...]] = {
    "boards": ("boards",),
    "temperature": ("temperature",),
    "all": ("boards", "temperature"),
}
_ACROSS_RE = re.compile(r"\s+across\s+(?P<what>\S+)\s*$")
_QUALIFIERS = ("pp", "rms")
_LIMIT_HINT = "a limit is '< x', '> x', 'x .. y' or '≈ x ± t'"


class LimitError(ValueError):
    """A limit that does not read; ``offset`` points into the limit text."""

    def __init__(self, message: str, hint: str | None = _LIMIT_HINT, offset: int = 0,
                 width: int = 0):
        super().__init__(message)
        self.message, self.hint, self.offset, self.width = message, hint, offset, width


def read_require(lines: list[SourceLine], collector: Collector) -> list[Requirement]:
    """Every requirement line of a require block."""
    return read_lines(lines, lambda line: _read_line(line, collector))


def _read_line(line: SourceLine, collector: Collector) -> Requirement | None:
    body = line.body
    colon = body.rfind(":")
    whole = line.span_at(len(body) - len(body.lstrip()), len(body.strip()))
    if colon < 0:
        collector.add(whole, "a requirement is 'metric : limit'",
                      hint="e.g. 'gain at 1 kHz : 18 dB .. 22 dB'")
        return None
    metric = body[:colon].strip()
    if not metric:
        collector.add(line.span_at(colon), "the metric before ':' is missing")
        return None
    metric_start = body.index(metric)
    metric_span = line.span_at(metric_start, len(metric))
    limit_text = body[colon + 1:]
    across: tuple[str, ...] = ()
    match = _ACROSS_RE.search(limit_text)
    if match:
        what = match["what"]
        if what not in ACROSS:
            collector.add(line.span_at(colon + 1 + match.start("what"), len(what)),
                          f"unknown 'across {what}'",
                          hint=did_you_mean(what, ACROSS) or "across boards, temperature or all")
            return None
        across = ACROSS[what]
        limit_text = limit_text[: match.start()]
    stripped = limit_text.strip()
    if not stripped:
        collector.add(line.span_at(colon), "the limit after ':' is missing", hint=_LIMIT_HINT)
        return None
    start = colon + 1 + limit_text.index(stripped)
    limit_span = line.span_at(start, len(stripped))
    try:
        limit = parse_limit(stripped)
    except LimitError as exc:
        report_quantity(collector, limit_span, exc)  # same fields as a QuantityError
        return None
    # whitespace inside the metric is one space, as neaten writes it
    return Requirement(" ".join(metric.split()), limit, across, whole, metric_span, limit_span)


def parse_limit(text: str) -> Limit:
    """Read a limit text (``< 20 Hz``, ``18 dB .. 22 dB``, ``≈ 5 V ± 2 %``)."""
    for signs, kind in ((("<=", "≤", "<"), "below"), ((">=", "≥", ">"), "above")):
        for sign in signs:
            if text.startswith(sign):
                value, unit = _value(text[len(sign):], len(sign))
                low, high = (None, value) if kind == "below" else (value, None)
                return Limit(kind, low, high, unit, text)
    for sign in ("≈", "~"):
        if text.startswith(sign):
            return _approx(text, len(sign))
    if ".." in text:
        return _between(text)
    raise LimitError(f"'{text}' is not a limit", offset=0, width=len(text))


def _between(text: str) -> Limit:
    low_text, _, high_text = text.partition("..")
    low, low_unit = _value(low_text, 0)
    high, high_unit = _value(high_text, len(low_text) + 2)
    unit = _same_unit(low_unit, high_unit, text)
    if not low <= high:
        raise LimitError("the low end of the range is above the high end", None, 0, len(text))
    return Limit("between", low, high, unit, text)


def _approx(text: str, start: int) -> Limit:
    body = text[start:]
    for sign in ("±", "+/-", "+-"):
        if sign in body:
            centre_text, _, spread_text = body.partition(sign)
            break
    else:
        raise LimitError("an approximate limit needs '± tolerance'", "e.g. '≈ 5 V ± 0.1 V'",
                         0, len(text))
    centre, unit = _value(centre_text, start)
    spread_offset = start + len(centre_text) + len(sign)
    if spread_text.strip().endswith("%") and unit != "%":
        spread = abs(centre) * _value(spread_text, spread_offset)[0]
    else:
        spread, spread_unit = _value(spread_text, spread_offset)
        unit = _same_unit(unit, spread_unit, text)
    if spread < 0:
        raise LimitError("a tolerance cannot be negative", None, spread_offset, len(spread_text))
    return Limit("approx", centre - spread, centre + spread, unit, text)


def _same_unit(first: str, second: str, text: str) -> str:
    if first and second and first != second:
        raise LimitError(f"the two ends are in different units ({first}, {second})", None,
                         0, len(text))
    return first or second


def _value(text: str, offset: int) -> tuple[float, str]:
    """(value in SI, unit) of one limit value; ``offset`` is its place in the limit text."""
    offset += len(text) - len(text.lstrip())
    text = text.strip()
    words = text.split()
    qualifier = ""
    if len(words) > 1 and words[-1] in _QUALIFIERS:
        qualifier = " " + words[-1]
        text = text[: text.rindex(words[-1])]
    try:
        quantity = parse_quantity(text)
    except QuantityError as exc:
        raise LimitError(exc.message, exc.hint, offset + exc.offset, exc.width) from None
    if quantity.unit not in LIMIT_UNITS:
        raise LimitError(f"'{quantity.unit}' is not a unit a requirement can use",
                         f"one of {', '.join(u for u in LIMIT_UNITS if u)}", offset, len(text))
    if qualifier and quantity.unit != "V":
        raise LimitError(f"'{qualifier.strip()}' goes with volts only", None, offset, len(text))
    value = quantity.value / 100.0 if quantity.unit == "%" else quantity.value
    return value, quantity.unit + qualifier
