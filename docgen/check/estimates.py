"""Hand estimates: ``estimate`` blocks, shown beside the solved value with the error in %.

One line per estimate: ``METRIC ≈ EXPRESSION`` (``~`` is accepted for ``≈``).  The expression
(:mod:`docgen.check.expressions`) may use part values by name (``RL1``), model parameters of a
part's model (``Q1.beta``), any metric in square brackets (``[Q1 collector current]``), the
constants ``VT`` (thermal voltage kT/q at the bench ambient) and ``pi``.

For a metric in dB (gains) an expression that is not wrapped in ``dB(...)`` is a ratio in V/V
(``-RL1/RD``); it is shown in dB and compared by magnitude, so the error in % is the error of
the ratio.  The pipeline section ``estimates`` is a list of plain dicts (see docs/results.md).
"""

from __future__ import annotations

import math
import re
from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

from docgen.check import expressions
from docgen.check.expressions import ExpressionError
from docgen.design import Design, ModelDef
from docgen.diagnostics import Diagnostic, Span, did_you_mean
from docgen.metric_values import evaluate as evaluate_metric
from docgen.metrics import Metric, MetricError
from docgen.metrics import parse as parse_metric
from docgen.params import MODEL_KINDS, defaults
from docgen.reader.lexer import SourceLine, source_lines

TAG = "estimate"
# k and q are exact in the SI since 2019 (SI Brochure, BIPM).
BOLTZMANN = 1.380649e-23
ELEMENTARY_CHARGE = 1.602176634e-19
_SEPARATOR = re.compile(r"≈|~=|~")


@dataclass(frozen=True, slots=True)
class Estimate:
    """One read estimate line: the metric, the expression tree and where both are."""

    metric: Metric
    text: str
    tree: tuple
    line: SourceLine
    metric_col: int
    expression_col: int


def block_lines(design: Design, tag: str) -> list[SourceLine]:
    """The lines of every block tagged ``tag`` in the page, with file positions."""
    file_lines = design.source.splitlines()
    out: list[SourceLine] = []
    for block in design.blocks:
        if block.tag == tag:
            out.extend(source_lines(file_lines, block.first_line - 1, block.text))
    return out


def diagnostic(design: Design, line: SourceLine, col: int, width: int, message: str,
               hint: str | None = None, severity: str = "error") -> Diagnostic:
    """A diagnostic at file column ``col`` of ``line``."""
    span = Span(line.number, col, max(1, width))
    return Diagnostic(design.path, span, severity, message, hint, line.text)  # type: ignore[arg-type]


def read(design: Design, library: Mapping[str, ModelDef] | None = None
         ) -> tuple[list[Estimate], list[Diagnostic]]:
    """Every estimate of the page, and a diagnostic for each line that does not read.

    Names are checked against the design (parts, model parameters, metrics) so that a typo is
    reported by ``docgen check`` before anything is solved.
    """
    estimates, problems = [], []
    for line in block_lines(design, TAG):
        if line.is_blank:
            continue
        try:
            estimate = _read_line(line)
            _check_names(design, library or {}, estimate.tree)
        except ExpressionError as exc:  # always a _LineError: its column is a file column
            problems.append(diagnostic(design, line, exc.col, exc.width, exc.message, exc.hint))
            continue
        estimates.append(estimate)
    return estimates, problems


class _LineError(ExpressionError):
    """An error whose column is already a file column."""


def _read_line(line: SourceLine) -> Estimate:
    body = line.body
    separator = _SEPARATOR.search(body)
    start = len(body) - len(body.lstrip())
    if separator is None:
        raise _LineError("an estimate is 'metric ≈ expression'", line.indent + start + 1,
                         len(body.strip()), "e.g. 'gain at 1 kHz ≈ -RL1/RD'")
    metric_text = body[:separator.start()]
    metric_col = line.indent + start + 1
    try:
        metric = parse_metric(metric_text.strip())
    except MetricError as exc:
        raise _LineError(exc.message, metric_col + exc.col - 1, exc.width, exc.hint) from None
    expression = body[separator.end():]
    expression_col = line.indent + separator.end() + 1
    try:
        tree = expressions.parse(expression)
    except ExpressionError as exc:
        raise _LineError(exc.message, expression_col + exc.col - 1, exc.width, exc.hint) from None
    shifted = _shift(tree, expression_col - 1)
    return Estimate(metric, expression.strip(), shifted, line, metric_col, expression_col)


def _shift(node: tuple, by: int) -> tuple:
    """The tree with every column moved to file columns."""
    kind = node[0]
    if kind in ("name", "param", "metric"):
        return (*node[:-1], node[-1] + by)
    if kind == "neg":
        return ("neg", _shift(node[1], by))
    if kind == "call":
        return ("call", node[1], tuple(_shift(a, by) for a in node[2]), node[3] + by)
    if kind == "bin":
        return ("bin", node[1], _shift(node[2], by), _shift(node[3], by), node[4] + by)
    return node


def _walk(node: tuple):
    yield node
    children = node[2] if node[0] == "call" else node[2:4] if node[0] == "bin" else (
        node[1:2] if node[0] == "neg" else ())
    for child in children:
        yield from _walk(child)


CONSTANTS = ("VT", "pi")


def metrics_in(estimate: Estimate) -> list[Metric]:
    """The metrics an estimate's expression reads in ``[...]``."""
    return [parse_metric(node[1]) for node in _walk(estimate.tree) if node[0] == "metric"]


def _check_names(design: Design, library: Mapping[str, ModelDef], tree: tuple) -> None:
    names = {p.name: p for p in design.parts}
    for node in _walk(tree):
        if node[0] == "name" and node[1] not in names and node[1] not in CONSTANTS:
            raise _LineError(f"unknown name '{node[1]}'", node[2], len(node[1]),
                             did_you_mean(node[1], [*names, *CONSTANTS]) or
                             "names are part names or the constants VT and pi")
        if node[0] == "name" and node[1] in names and names[node[1]].value is None:
            raise _LineError(f"'{node[1]}' has no value; it is a {names[node[1]].kind}",
                             node[2], len(node[1]), f"use a model parameter, e.g. {node[1]}.beta")
        if node[0] == "param":
            _model_parameter(design, library, node)
        if node[0] == "metric":
            try:
                parse_metric(node[1])
            except MetricError as exc:
                raise _LineError(exc.message, node[2] + exc.col - 1, exc.width, exc.hint) from None


def _model_parameter(design: Design, library: Mapping[str, ModelDef], node: tuple) -> float:
    part_name, param, col = node[1], node[2], node[3]
    part = next((p for p in design.parts if p.name == part_name), None)
    if part is None or part.model is None:
        raise _LineError(f"'{part_name}' is not a part with a model", col - len(part_name) - 1,
                         len(part_name), "model parameters are written PART.parameter, e.g. "
                         "Q1.beta")
    model = next((m for m in design.models if m.name == part.model), None)
    model = model or library.get(part.model)
    kind = model.kind if model else part.kind
    known = MODEL_KINDS.get(kind, {})
    if param not in known:
        raise _LineError(f"a {kind} model has no parameter '{param}'", col, len(param),
                         did_you_mean(param, known))
    if model and param in model.params:
        return model.params[param].value
    return defaults(kind)[param]


def thermal_voltage(celsius: float) -> float:
    """kT/q at a temperature in °C."""
    return BOLTZMANN * (celsius + 273.15) / ELEMENTARY_CHARGE


def value_of(design: Design, library: Mapping[str, ModelDef], results: Mapping[str, Any],
             estimate: Estimate) -> float:
    """The estimate's value (raises :class:`ExpressionError` with file columns)."""
    parts = {p.name: p for p in design.parts}
    op = results.get("op") or {}
    celsius = op.get("temperature_c", design.bench.ambient)

    def lookup(node: tuple) -> float:
        if node[0] == "name":
            if node[1] in parts:
                return float(parts[node[1]].value)
            return thermal_voltage(celsius) if node[1] == "VT" else math.pi
        if node[0] == "param":
            return _model_parameter(design, library, node)
        value = evaluate_metric(parse_metric(node[1]), results)
        if value.value is None:
            raise _LineError(f"[{node[1]}]: {value.reason}", node[2], len(node[1]))
        return value.value

    return expressions.evaluate(estimate.tree, lookup)


def compare(estimate: Estimate, value: float, solved: float | None) -> dict[str, Any]:
    """The estimate beside the solved value: both in the metric's unit, error in %."""
    unit = estimate.metric.unit
    in_db = unit == "dB" and not expressions.is_decibels(estimate.tree)
    shown = 20 * math.log10(abs(value)) if in_db and value != 0 else value
    row: dict[str, Any] = {"estimate": shown, "estimate_as_written": value,
                           "ratio": in_db, "solved": solved, "error_percent": None}
    if solved is None:
        return row
    if in_db:  # compare ratios: |estimate| against the solved gain as V/V
        reference, mine = 10 ** (solved / 20), abs(value)
    else:
        reference, mine = solved, value
    if reference != 0:
        row["error_percent"] = (mine - reference) / abs(reference) * 100
    return row


def analyse(ctx: Any) -> list[dict[str, Any]]:
    """The ``estimates`` section: one row per estimate line (errors as rows with a reason)."""
    design, results = ctx.design, ctx.results
    estimates, problems = read(design, ctx.library)
    rows = [{"metric": None, "line": d.line, "col": d.col, "reason": d.message}
            for d in problems]
    for estimate in estimates:
        solved = evaluate_metric(estimate.metric, results)
        row: dict[str, Any] = {"metric": estimate.metric.text, "expression": estimate.text,
                               "unit": estimate.metric.unit, "line": estimate.line.number,
                               "col": estimate.metric_col, "reason": solved.reason}
        try:
            value = value_of(design, ctx.library, results, estimate)
        except ExpressionError as exc:
            row.update(estimate=None, solved=solved.value, error_percent=None,
                       reason=exc.message)
        else:
            row.update(compare(estimate, value, solved.value))
        rows.append(row)
    return sorted(rows, key=lambda r: (r["line"], r["col"]))
