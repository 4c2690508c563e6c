"""Headline figures and verdicts of one results dict, as the history and diff tables show them.

Reads only the results dict (never solves).  The headline is the same short list for every
design — midband gain, corners, impedances, supply currents — followed by the value of each of
the design's own requirements, so a table across revisions compares like with like.
"""

from __future__ import annotations

from collections.abc import Mapping
from functools import cache
from typing import Any

from docgen.metric_values import evaluate
from docgen.metrics import Metric, parse

#: The figures the site's index shows for each design (``docgen/site/pages.py``), in the metric
#: vocabulary (docgen/metrics.py): the columns of the history table.
TABLE: tuple[str, ...] = (
    "midband gain", "low corner", "high corner", "input impedance", "input noise",
    "output swing", "THD",
)
#: Every figure diffs and trends compare: the table's, plus two a reviewer asks about next.
HEADLINE: tuple[str, ...] = (*TABLE, "output impedance", "supply current")


@cache
def _metric(text: str) -> Metric:
    return parse(text)


def headline_figures(results: Mapping[str, Any]) -> list[dict[str, Any]]:
    """``[{metric, value, unit}]``: the fixed headline, then each requirement's value.

    A figure the results do not contain is left out (not reported as zero).
    """
    rows: list[dict[str, Any]] = []
    seen: set[str] = set()

    def add(metric: str, value: Any, unit: str) -> None:
        if metric not in seen and _is_number(value):
            seen.add(metric)
            rows.append({"metric": metric, "value": float(value), "unit": unit})

    for text in HEADLINE:
        found = evaluate(_metric(text), results)
        add(text, found.value, found.unit)
    for check in results.get("checks") or []:
        if isinstance(check, Mapping):
            add(check_label(check), check.get("value"), str(check.get("unit") or ""))
    return rows


def verdicts(results: Mapping[str, Any]) -> dict[str, str]:
    """``{requirement: verdict}`` from the ``checks`` section (``pass``, ``fail``, ...)."""
    out: dict[str, str] = {}
    for check in results.get("checks") or []:
        if isinstance(check, Mapping):
            verdict = check.get("verdict", check.get("status"))
            if verdict is not None:
                out[check_label(check)] = str(verdict)
    return out


def check_label(check: Mapping[str, Any]) -> str:
    """A requirement's name in tables: its metric text plus its spread clause, if any."""
    metric = " ".join(str(check.get("metric", "")).split())
    across = check.get("across")
    if isinstance(across, (list, tuple)):
        across = " ".join(str(a) for a in across)
    return f"{metric} across {across}" if across and across != "nominal" else metric


def verdict_counts(results: Mapping[str, Any]) -> dict[str, int]:
    """How many requirements pass, and how many there are (``{"passed": n, "total": m}``)."""
    found = verdicts(results)
    return {"passed": sum(1 for v in found.values() if v == "pass"), "total": len(found)}


def _is_number(value: Any) -> bool:
    return isinstance(value, (int, float)) and not isinstance(value, bool) and value == value
