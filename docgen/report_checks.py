"""Terminal printers for the check sections: requirement verdicts, cautions, hand estimates.

Registered in :data:`docgen.report.SECTION_PRINTERS`; each is ``printer(section, results)``.
"""

from __future__ import annotations

from typing import Any

from docgen.report import eng, heading, table

_SEVERITY_WORDS = {"hazard": "HAZARD", "error": "over rating", "warning": "caution",
                   "info": "note"}


def _value(value: Any, unit: str) -> str:
    if value is None:
        return "n/a"
    if unit == "%":
        return f"{value * 100:.4g} %"
    return eng(value, unit)


def print_checks(checks: list[dict[str, Any]], results: dict[str, Any]) -> list[str]:
    """One row per requirement: metric, value, limit, margin and verdict."""
    rows = []
    for row in checks:
        if row.get("metric") is None:
            rows.append(["(unreadable)", "", "", "", f"invalid: {row['reason']}"])
            continue
        value = row.get("worst", row["value"])
        margin = _value(row["margin"], row["unit"]) if row.get("margin") is not None else ""
        if row.get("margin_fraction") is not None:
            margin += f" ({row['margin_fraction'] * 100:+.3g} %)"
        verdict = row["verdict"] + (f", yield {row['yield'] * 100:.3g} %"
                                    if row.get("yield") is not None else "")
        rows.append([row["metric"], _value(value, row["unit"]), row["limit"], margin, verdict])
    return [*heading("Requirements"),
            *table(["metric", "value", "limit", "margin", "verdict"], rows)]


def print_cautions(cautions: list[dict[str, Any]], results: dict[str, Any]) -> list[str]:
    """Every caution as one plain sentence, hazards first, and the design-aid note once."""
    if not cautions:
        return []
    lines = heading("Cautions")
    lines += [f"  {_SEVERITY_WORDS[c['severity']]}: {c['message']}" for c in cautions]
    return [*lines, f"  {cautions[0]['note']}"]


def print_estimates(estimates: list[dict[str, Any]], results: dict[str, Any]) -> list[str]:
    """Each hand estimate beside the solved value, with the error."""
    rows = []
    for row in estimates:
        if row.get("metric") is None:
            continue
        error = f"{row['error_percent']:+.3g} %" if row.get("error_percent") is not None else (
            row.get("reason") or "")
        rows.append([row["metric"], row.get("expression", ""),
                     _value(row.get("estimate"), row["unit"]),
                     _value(row.get("solved"), row["unit"]), error])
    if not rows:
        return []
    return [*heading("Hand estimates"),
            *table(["metric", "estimate", "value", "solved", "error"], rows)]
