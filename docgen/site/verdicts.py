"""Reading the checks' output for pages: requirement rows, cautions, estimates, live values.

The checks (``docgen/check``) write ``checks``, ``cautions`` and ``estimates`` into the results;
this module only turns them into display rows.  Nothing here decides a verdict.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

from docgen.design import Design
from docgen.site.prose import LiveValue
from docgen.units import format_eng

Results = dict[str, Any]
VERDICT_WORDS = {"pass": "meets", "fail": "FAILS", "not computed": "not computed"}


def format_value(value: float | None, unit: str) -> str:
    """A metric value in engineering notation; ``%`` units are fractions shown ×100."""
    if value is None:
        return "n/a"
    if unit == "%":
        return format_eng(value * 100, "%")
    if unit.endswith(" pp") or unit.endswith(" rms"):
        base, _, suffix = unit.partition(" ")
        return f"{format_eng(value, base)} {suffix}"
    return format_eng(value, unit)


def live_values(design: Design, results: Results | None) -> Callable[[str], LiveValue]:
    """A function from metric text to what the page shows for it."""
    def live(text: str) -> LiveValue:
        try:
            from docgen import metric_values, metrics
        except ImportError:
            return LiveValue(None, "the metric vocabulary is not available")
        try:
            metric = metrics.parse(text)
        except metrics.MetricError as exc:
            return LiveValue(None, exc.message, exc.hint, unknown=True)
        kinds = {p.name: p.kind for p in design.parts}
        problems = metrics.unknown_names(metric, kinds, design.nets)
        if problems:
            return LiveValue(None, "; ".join(problems), unknown=True)
        if results is None:
            return LiveValue(None, "the design was not solved")
        value = metric_values.evaluate(metric, results)
        if value.value is None:
            return LiveValue(None, value.reason or "not computed")
        return LiveValue(format_value(value.value, value.unit))
    return live


def _verdict_class(verdict: str) -> str:
    return {"pass": "pass", "fail": "fail"}.get(verdict, "none")


def requirement_rows(design: Design, results: Results | None) -> list[dict[str, str]]:
    """Rows of the requirements table: the checks' verdicts, or the bare requirement lines."""
    checks = (results or {}).get("checks")
    if isinstance(checks, list) and checks:
        return [_check_row(c) for c in checks if isinstance(c, dict)]
    reason = "not computed (the design was not solved)" if results is None else "not computed"
    return [{"metric": r.metric, "across": ", ".join(r.across), "value": "", "limit":
             r.limit.text, "margin": "", "verdict": reason, "verdict_class": "none", "note": ""}
            for r in design.requirements]


def _check_row(check: dict[str, Any]) -> dict[str, str]:
    unit = str(check.get("unit") or "")
    value = check.get("value")
    margin = check.get("margin")
    fraction = check.get("margin_fraction")
    margin_text = format_value(margin, unit) if isinstance(margin, (int, float)) else ""
    if isinstance(fraction, (int, float)) and margin_text:
        margin_text += f" ({format_eng(fraction * 100, '%', 2)})"
    verdict = str(check.get("verdict") or "not computed")
    across = check.get("across") or []
    note = str(check.get("reason") or "")
    if note.startswith("not computed: ") and verdict == "not computed":
        note = note[len("not computed: "):]  # the verdict already says it
    if isinstance(check.get("yield"), (int, float)):
        note = f"yield {format_eng(check['yield'] * 100, '%')}" + (f"; {note}" if note else "")
    return {
        "metric": str(check.get("metric", "")),
        "across": ", ".join(across) if isinstance(across, list) else str(across),
        "value": format_value(value, unit) if isinstance(value, (int, float)) else "",
        "limit": str(check.get("limit") or check.get("limit_text") or ""),
        "margin": margin_text,
        "verdict": VERDICT_WORDS.get(verdict, verdict),
        "verdict_class": _verdict_class(verdict),
        "note": str(note),
    }


def requirements_met(design: Design, results: Results | None) -> tuple[int, int, int]:
    """(met, failing, total) over the design's requirement verdicts."""
    rows = (results or {}).get("checks")
    if not isinstance(rows, list):
        return 0, 0, len(design.requirements)
    verdicts = [str(c.get("verdict")) for c in rows if isinstance(c, dict)]
    return verdicts.count("pass"), verdicts.count("fail"), len(verdicts)


def caution_items(results: Results | None) -> list[dict[str, str]]:
    """Cautions for display, hazardous-voltage warnings first."""
    items = []
    for caution in (results or {}).get("cautions") or []:
        if not isinstance(caution, dict):
            continue
        severity = str(caution.get("severity", "warning"))
        hazard = severity in ("danger", "hazard") or "extra-low" in str(caution.get("message", ""))
        level = "danger" if hazard else ("info" if severity == "info" else "warning")
        label = {"danger": "Hazardous voltage", "info": "Note"}.get(level, "Caution")
        items.append({"level": level, "label": label,
                      "text": str(caution.get("message") or caution.get("sentence") or ""),
                      "part": str(caution.get("part") or "")})
    order = {"danger": 0, "warning": 1, "info": 2}
    return sorted(items, key=lambda c: order[c["level"]])


def _percent(error: float) -> str:
    """A hand estimate's error: two decimals are plenty; below 0.01 % it is exact to the page."""
    if abs(error) < 0.005:
        return "< 0.01 %"
    return format_eng(round(error, 2), "%")


def estimate_table(results: Results | None) -> dict[str, Any] | None:
    """Hand estimates beside the solved values, with the difference in percent."""
    rows = []
    for item in (results or {}).get("estimates") or []:
        if not isinstance(item, dict):
            continue
        unit = str(item.get("unit") or "")
        estimate, solved = item.get("estimate"), item.get("solved")
        error = item.get("error_percent")
        rows.append([str(item.get("metric", "")), str(item.get("expression", "")),
                     format_value(estimate, unit) if isinstance(estimate, (int, float)) else "",
                     format_value(solved, unit) if isinstance(solved, (int, float)) else
                     str(item.get("reason") or "not computed"),
                     _percent(error) if isinstance(error, (int, float)) else ""])
    if not rows:
        return None
    return {"caption": "Estimates written in the design file, evaluated on its parts",
            "columns": ["metric", "estimate", "by hand", "solved", "difference"], "rows": rows,
            "numeric": [False, False, True, True, True]}
