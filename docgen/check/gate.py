"""The review gate of one design for ``docgen check``: verdicts and cautions as diagnostics.

:func:`check_design` reads the requirement and estimate lines (their problems are input
errors), solves only the analyses the requirements need (``Context.only``), and turns each
failed requirement and each caution into a diagnostic at the ``require`` line or the part's
line.  The review status sets the severity: on an approved or in-review design a failed
requirement or a part over its rating is an error; on a draft or retired one a warning.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import Any

from docgen.check import estimates, requirements
from docgen.check.requirements import STRICT_STATUSES
from docgen.design import Design, ModelDef
from docgen.diagnostics import Diagnostic, DocgenError, Span
from docgen.metrics import sections_needed

CHECK_SECTIONS = frozenset({"checks", "cautions", "estimates"})


@dataclass
class GateResult:
    """What the gate found for one design: diagnostics, notes and a JSON-ready report."""

    diagnostics: list[Diagnostic] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)
    report: dict[str, Any] = field(default_factory=dict)
    input_error: bool = False


def sections_for(design: Design) -> frozenset[str]:
    """The analyses ``docgen check`` runs for ``design``: what its requirements and estimates
    read, the operating point (the rating checks need it) and the check sections."""
    return frozenset(sections_needed(requirements.metrics_of(design))) | CHECK_SECTIONS


def _at(design: Design, line: int, col: int, severity: str, message: str,
        hint: str | None = None) -> Diagnostic:
    lines = design.source.splitlines()
    text = lines[line - 1] if 0 < line <= len(lines) else None
    return Diagnostic(design.path, Span(line, col), severity, message, hint, text)  # type: ignore[arg-type]


def _number(value: float | None, unit: str) -> str:
    from docgen.units import format_eng

    if value is None:
        return "?"
    if unit == "%":
        return f"{value * 100:.3g} %"
    return format_eng(value, unit)


def verdict_message(row: Mapping[str, Any]) -> str:
    """One line for a requirement that did not pass."""
    what = f"requirement '{row['metric']} : {row['limit']}'"
    if row["verdict"] == "not computed":
        return f"{what} not checked: {row['reason'].removeprefix('not computed: ')}"
    value = row.get("worst", row["value"])
    where = " on the worst board/temperature" if row.get("across") else ""
    text = f"{what} fails{where}: {_number(value, row['unit'])}"
    if row.get("margin") is not None:
        text += f", {_number(abs(row['margin']), row['unit'])} outside the limit"
        if row.get("margin_fraction") is not None:
            text += f" ({abs(row['margin_fraction']) * 100:.3g} %)"
    if row.get("yield") is not None:
        text += f"; yield {row['yield'] * 100:.3g} %"
    return text


def estimate_message(row: Mapping[str, Any]) -> str:
    """One line: the hand estimate beside the solved value, with the error."""
    unit = row["unit"]
    text = f"estimate {row['metric']} ≈ {_number(row.get('estimate'), unit)}"
    if row.get("solved") is not None:
        text += f", solved {_number(row['solved'], unit)}"
    if row.get("error_percent") is not None:
        text += f" (error {row['error_percent']:+.3g} %)"
    elif row.get("reason"):
        text += f" ({row['reason']})"
    return text


def caution_severity(caution: Mapping[str, Any], status: str) -> str | None:
    """The diagnostic severity of a caution on a page of ``status`` (None: a note only)."""
    if caution["severity"] == "info":
        return None
    if caution["severity"] == "error" and status in STRICT_STATUSES:
        return "error"
    return "warning"


def static_problems(design: Design, library: Mapping[str, ModelDef]) -> list[Diagnostic]:
    """Problems in the requirement and estimate lines, found without solving."""
    return requirements.read(design)[1] + estimates.read(design, library)[1]


def check_design(design: Design, library: Mapping[str, ModelDef]) -> GateResult:
    """Solve what the requirements need and report every failure and caution."""
    from docgen import pipeline

    gate = GateResult(report={"path": design.path, "title": design.header.title,
                              "status": design.header.status})
    gate.diagnostics += static_problems(design, library)
    if any(d.severity == "error" for d in gate.diagnostics):
        gate.input_error = True
        return gate
    try:
        results = pipeline.run(design, library, only=sections_for(design))
    except DocgenError as exc:  # the circuit cannot be solved as drawn
        gate.diagnostics += exc.diagnostics
        gate.input_error = True
        return gate
    status = design.header.status
    # An analysis that could not finish leaves requirements unverified: an error on an
    # approved or in-review page (exit 1), a warning on a draft or retired one.
    failure = "error" if status in STRICT_STATUSES else "warning"
    for error in results.get("errors", ()):
        gate.diagnostics.append(_at(design, error["line"], error["col"], failure,
                                    f"{error['analysis']} analysis: {error['message']}",
                                    error.get("hint")))
    for row in results.get("checks", ()):
        if row["verdict"] in ("fail", "not computed"):
            gate.diagnostics.append(_at(design, row["line"], row["col"], row["severity"],
                                        verdict_message(row)))
    for caution in results.get("cautions", ()):
        severity = caution_severity(caution, status)
        if severity is None:
            gate.notes.append(f"{design.path}:{caution['line']}:{caution['col']}: note: "
                              f"{caution['message']}")
        else:
            gate.diagnostics.append(_at(design, caution["line"], caution["col"], severity,
                                        caution["message"]))
    for row in results.get("estimates", ()):
        if row.get("metric") is not None:
            gate.notes.append(f"{design.path}:{row['line']}:{row['col']}: note: "
                              + estimate_message(row))
    gate.report.update(checks=results.get("checks", []), cautions=results.get("cautions", []),
                       estimates=results.get("estimates", []),
                       analyses=sorted(k for k in results if k not in ("schema", "design")))
    return gate


def approval_problem(design: Design, root: str) -> Diagnostic | None:
    """An error when an approved design's circuit, models or requirements changed since its
    approval (from git history; nothing when the history is not available)."""
    if design.header.status != "approved":
        return None
    from docgen.history.approval import changed_since_approval

    info = changed_since_approval(None, design.path, root)
    if info is None:
        return None
    span = design.header.spans.get("approved") or design.header.spans.get("status") or Span(1, 1)
    changes = "; ".join(info.get("changes", [])[:3])
    return _at(design, span.line, span.col, "error", info["message"],
               (f"changes: {changes}. " if changes else "") + "review the design again and "
               "give it a new 'approved:' date")


def exit_code(gate: GateResult) -> int:
    """2 when the design could not be checked, 1 when an error-level verdict or caution."""
    if gate.input_error:
        return 2
    return 1 if any(d.severity == "error" for d in gate.diagnostics) else 0
