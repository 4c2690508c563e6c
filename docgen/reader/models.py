"""The ``models`` block: ``NAME KIND parameter=value [(low..high)] ...``, checked against
:mod:`docgen.params`."""

from __future__ import annotations

from docgen.design import ModelDef, ModelParam, frozen_map
from docgen.diagnostics import Collector, Span, did_you_mean
from docgen.params import MODEL_KINDS, ParamSpec
from docgen.reader.common import MODEL_NAME, check_head, report_quantity
from docgen.reader.lexer import SourceLine, Word, read_lines
from docgen.units import QuantityError, parse_value


def read_models(lines: list[SourceLine], collector: Collector, source: str) -> list[ModelDef]:
    """Every model line of a models block; ``source`` names the page that defines them."""
    return read_lines(lines, lambda line: _read_model(line, collector, source))


def _read_model(line: SourceLine, collector: Collector, source: str) -> ModelDef | None:
    words = line.words()
    if len(words) < 2:
        collector.add(line.span_at(0, len(line.body.strip())),
                      "a model line is 'NAME KIND parameter=value ...'",
                      hint="e.g. 'my-npn npn beta=200 (120..300)'")
        return None
    name, kind = words[0], words[1]
    ok = check_head(line.number, name, kind, collector, MODEL_NAME, MODEL_KINDS, "model")
    if ok is None:
        return None
    params = _read_params(line, collector, words[2:], MODEL_KINDS[kind.text])
    if params is None or not ok:
        return None
    return ModelDef(name.text, kind.text, frozen_map(params),
                    Span(line.number, name.col, len(name.text)), source)


def _groups(words: list[Word]) -> list[tuple[list[Word], list[Word]]]:
    """Split words into (value words, range words) per ``key=value`` setting."""
    groups: list[tuple[list[Word], list[Word]]] = []
    in_range = False
    for word in words:
        if in_range or (word.text.startswith("(") and groups):
            groups[-1][1].append(word)
            in_range = not word.text.endswith(")")
        elif "=" in word.text or not groups:
            groups.append(([word], []))
        else:
            groups[-1][0].append(word)
    return groups


def _read_params(line: SourceLine, collector: Collector, words: list[Word],
                 specs: dict[str, ParamSpec]) -> dict[str, ModelParam] | None:
    params: dict[str, ModelParam] = {}
    ok = True
    for value_words, range_words in _groups(words):
        result = _read_param(line, collector, value_words, range_words, specs, params)
        if result is None:
            ok = False
        else:
            params[result[0]] = result[1]
    return params if ok else None


def _read_param(line: SourceLine, collector: Collector, value_words: list[Word],
                range_words: list[Word], specs: dict[str, ParamSpec],
                seen: dict[str, ModelParam]) -> tuple[str, ModelParam] | None:
    first = value_words[0]
    key, eq, value_text = first.text.partition("=")
    key_span = Span(line.number, first.col, max(1, len(key)))
    if not eq:
        collector.add(Span(line.number, first.col, len(first.text)),
                      f"expected 'parameter=value', found '{first.text}'")
        return None
    if key not in specs:
        collector.add(key_span, f"unknown model parameter '{key}'",
                      hint=did_you_mean(key, specs) or "see the parameter table in docs/format.md")
        return None
    if key in seen:
        collector.add(key_span, f"'{key}' is set twice")
        return None
    spec = specs[key]
    text = " ".join([value_text] + [w.text for w in value_words[1:]])
    value_span = Span(line.number, first.col + len(key) + 1,
                      max(1, value_words[-1].end - first.col - len(key) - 1))
    value = _number(collector, text, spec, value_span)
    if value is None:
        return None
    low = high = None
    if range_words:
        bounds = _read_range(line, collector, range_words, spec, value)
        if bounds is None:
            return None
        low, high = bounds
    return key, ModelParam(value, low, high, key_span)


def _number(collector: Collector, text: str, spec: ParamSpec, span: Span) -> float | None:
    try:
        value = parse_value(text, spec.unit, f"'{spec.name}'").value
    except QuantityError as exc:
        report_quantity(collector, span, exc)
        return None
    if spec.positive and not value > 0:
        collector.add(span, f"'{spec.name}' must be greater than zero")
        return None
    return value


def _read_range(line: SourceLine, collector: Collector, words: list[Word], spec: ParamSpec,
                value: float) -> tuple[float, float] | None:
    span = Span(line.number, words[0].col, words[-1].end - words[0].col)
    text = " ".join(w.text for w in words)
    if not (text.startswith("(") and text.endswith(")") and ".." in text):
        collector.add(span, f"a range is written '(low..high)', not '{text}'",
                      hint="e.g. '(120..300)'")
        return None
    low_text, _, high_text = text[1:-1].partition("..")
    low = _number(collector, low_text, spec, span)
    high = _number(collector, high_text, spec, span)
    if low is None or high is None:
        return None
    if not low <= value <= high:
        collector.add(span, f"the range {text} does not contain the value of '{spec.name}'",
                      hint="the nominal value lies between the low and the high end")
        return None
    return low, high
