"""The ``circuit`` block: ``NAME KIND [VALUE] [TOLERANCE] [RATING] [key=value ...] : NETS``."""

from __future__ import annotations

import math

from docgen.design import Part, frozen_map
from docgen.diagnostics import Collector, Span, did_you_mean
from docgen.kinds import KINDS
from docgen.reader.common import MODEL_NAME, PART_NAME, article, check_head
from docgen.reader.connections import read_connections
from docgen.reader.lexer import Field, SourceLine, group_fields, read_lines
from docgen.reader.part import PartBuilder
from docgen.units import QuantityError, parse_percent, parse_ppm, parse_value

_POSITIVE_KINDS = {"resistor", "capacitor", "inductor"}
_AMPLITUDE = {"rms": math.sqrt(2.0), "pp": 0.5}


def read_circuit(lines: list[SourceLine], collector: Collector) -> list[Part]:
    """Every part line of a circuit block (errors go to ``collector``)."""
    return read_lines(lines, lambda line: _read_part(line, collector))



def _read_part(line: SourceLine, collector: Collector) -> Part | None:
    colon = line.body.find(":")
    words = line.words(0, colon if colon >= 0 else None)
    if colon < 0:
        collector.add(line.span_at(len(line.body)), "a part line needs ':' before its "
                      "connections", hint="e.g. 'R1 resistor 4k7 : a b'")
        return None
    if len(words) < 2:
        collector.add(line.span_at(0, len(line.body.strip()) or 1),
                      "a part line starts with a name and a kind",
                      hint="e.g. 'R1 resistor 4k7 : a b'")
        return None
    name, kind_word = words[0], words[1]
    ok = check_head(line.number, name, kind_word, collector, PART_NAME, KINDS, "part")
    if ok is None:
        return None
    builder = PartBuilder(line, collector, name, kind_word.text)
    builder.spans["kind"] = Span(line.number, kind_word.col, len(kind_word.text))
    _read_fields(builder, group_fields(words[2:]))
    terminals = read_connections(builder, line.words(colon + 1), line.span_at(colon))
    if not (ok and builder.ok) or terminals is None:
        return None
    return Part(name.text, builder.kind, builder.value, builder.value_text, builder.model,
                builder.tolerance, builder.rating, frozen_map(builder.params), terminals,
                Span(line.number, name.col, len(name.text)), frozen_map(builder.spans))


def _read_fields(builder: PartBuilder, fields: list[Field]) -> None:
    positional = [f for f in fields if "=" not in f.words[0].text]
    for field in fields:
        if "=" in field.words[0].text:
            _read_param(builder, field)
    if builder.spec.value_unit is None:
        _read_model(builder, positional)
    else:
        _read_values(builder, positional)


def _read_model(builder: PartBuilder, fields: list[Field]) -> None:
    line = builder.line.number
    kind = builder.kind
    if not fields:
        builder.error(builder.spans["kind"], f"{article(kind)} part needs a model name",
                      hint=f"e.g. 'generic-{builder.spec.model_kind}', or a model of your own "
                      "in a models block")
        return
    first, *rest = fields
    if not MODEL_NAME.match(first.text) or len(first.words) > 1:
        builder.error(first.span(line), f"'{first.text}' is not a model name",
                      hint="a model name starts with a letter")
        return
    builder.model = first.text
    builder.spans["model"] = first.span(line)
    for extra in rest:
        builder.error(extra.span(line), f"unexpected '{extra.text}' after the model name",
                      hint=f"{article(kind)} takes only a model name before the ':'")


def _read_values(builder: PartBuilder, fields: list[Field]) -> None:
    line = builder.line.number
    if not fields:
        builder.error(builder.spans["kind"], f"{article(builder.kind)} part needs a value",
                      hint=f"e.g. '{_example(builder.kind)}'")
        return
    _read_main_value(builder, fields[0])
    rest = fields[1:]
    if builder.kind == "signal":
        if not rest or rest[0].text.endswith("%"):
            builder.error(fields[0].span(line), "a signal needs a frequency after its amplitude",
                          hint="e.g. 'VS signal 10 mV 1 kHz : in gnd'")
        else:
            _read_frequency(builder, rest[0])
            rest = rest[1:]
    for field in rest:
        if field.text.endswith("%"):
            _read_tolerance(builder, field)
        else:
            _read_rating(builder, field)


def _example(kind: str) -> str:
    unit = KINDS[kind].value_unit
    return {"Ω": "4k7", "F": "100n", "H": "10m", "A": "1 mA"}.get(unit or "", f"1 {unit}")


def _read_main_value(builder: PartBuilder, field: Field) -> None:
    line = builder.line.number
    span = field.span(line)
    words = [w.text for w in field.words]
    factor = 1.0
    if builder.kind == "signal" and len(words) > 1 and words[-1] in _AMPLITUDE:
        factor = _AMPLITUDE[words[-1]]
        words = words[:-1]
    text = " ".join(words)
    what = f"{article(builder.kind)}'s value"
    try:
        value = parse_value(text, builder.spec.value_unit or "", what).value * factor
    except QuantityError as exc:
        builder.quantity_error(span, exc)
        return
    builder.spans["value"] = span
    if builder.kind in _POSITIVE_KINDS and not value > 0:
        builder.error(span, f"{article(builder.kind)}'s value must be greater than zero")
    elif builder.kind == "signal" and value < 0:
        builder.error(span, "a signal's amplitude cannot be negative",
                      hint="swap the two nets to invert it")
    builder.value = value
    builder.value_text = field.text


def _read_frequency(builder: PartBuilder, field: Field) -> None:
    span = field.span(builder.line.number)
    try:
        frequency = parse_value(field.text, "Hz", "a signal's frequency").value
    except QuantityError as exc:
        builder.quantity_error(span, exc)
        return
    if not frequency > 0:
        builder.error(span, "a signal's frequency must be greater than zero")
    builder.params["frequency"] = frequency
    builder.spans["frequency"] = span


def _read_tolerance(builder: PartBuilder, field: Field) -> None:
    span = field.span(builder.line.number)
    if builder.tolerance is not None:
        builder.error(span, "a second tolerance", hint="write one tolerance per part")
        return
    try:
        tolerance = parse_percent(field.text)
    except QuantityError as exc:
        builder.quantity_error(span, exc)
        return
    if not 0 <= tolerance < 1:
        builder.error(span, "a tolerance lies between 0 % and 100 %")
    builder.tolerance = tolerance
    builder.spans["tolerance"] = span


def _read_rating(builder: PartBuilder, field: Field) -> None:
    span = field.span(builder.line.number)
    unit = builder.spec.rating_unit
    if unit is None:
        builder.error(span, f"unexpected '{field.text}': {article(builder.kind)} has no rating",
                      hint=_rating_hint(builder.kind))
        return
    if builder.rating is not None:
        builder.error(span, f"unexpected '{field.text}' after the rating")
        return
    if len(field.words) == 1 and field.text[-1].isdigit():
        builder.error(span, f"a rating is written with its unit ({unit})",
                      hint=f"e.g. '{field.text} {unit}'")
        return
    try:
        rating = parse_value(field.text, unit, f"{article(builder.kind)}'s rating").value
    except QuantityError as exc:
        builder.quantity_error(span, exc)
        return
    if not rating > 0:
        builder.error(span, "a rating must be greater than zero")
    builder.rating = rating
    builder.spans["rating"] = span


def _rating_hint(kind: str) -> str | None:
    if kind == "signal":
        return "a signal is 'AMPLITUDE [rms|pp] FREQUENCY [source=R]'"
    return "settings are written as key=value"


def _read_param(builder: PartBuilder, field: Field) -> None:
    line = builder.line.number
    first = field.words[0]
    key, _, _ = first.text.partition("=")
    text = field.text.split("=", 1)[1]
    key_span = Span(line, first.col, max(1, len(key)))
    allowed = builder.spec.params
    if key not in allowed:
        hint = did_you_mean(key, allowed) or (
            f"{article(builder.kind)} takes {', '.join(allowed)}" if allowed
            else f"{article(builder.kind)} takes no settings")
        builder.error(key_span, f"unknown setting '{key}' for {article(builder.kind)}", hint=hint)
        return
    if key in builder.params:
        builder.error(key_span, f"'{key}' is set twice")
        return
    value_span = Span(line, first.col + len(key) + 1,
                      max(1, field.words[-1].end - first.col - len(key) - 1))
    value = _param_value(builder, key, allowed[key], text, value_span)
    if value is not None:
        builder.params[key] = value
        builder.spans[key] = key_span


def _param_value(builder: PartBuilder, key: str, unit: str, text: str,
                 span: Span) -> float | None:
    if unit == "flag":
        if text in ("yes", "no"):
            return 1.0 if text == "yes" else 0.0
        builder.error(span, f"'{key}' is 'yes' or 'no', not '{text}'")
        return None
    try:
        if unit == "ppm/K":
            return parse_ppm(text)
        value = parse_value(text, unit, f"'{key}'").value
    except QuantityError as exc:
        builder.quantity_error(span, exc)
        return None
    if key in ("resistance", "source") and value < 0:
        builder.error(span, f"'{key}' cannot be negative")
        return None
    return value
