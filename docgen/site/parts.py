"""The parts list: values, tolerances, ratings, IEC 60063 preferred-value flags and cautions.

Which preferred series a part is checked against follows its tolerance, as IEC 60063 pairs
them (from memory): 20 % → E6, 10 % → E12, 5 % → E24, 2 % → E48, 1 % → E96, tighter → E192;
a part with no tolerance is checked against E24.  A value of a coarser series is accepted too
(common practice: E24 values are stocked at 1 % as well), so only values in neither are flagged.
"""

from __future__ import annotations

import csv
import io
from functools import lru_cache
from typing import Any

from docgen import eseries
from docgen.design import Design, Part
from docgen.kinds import KINDS
from docgen.units import format_eng

#: kinds whose value is a stocked component value (preferred numbers apply)
STOCKED = frozenset({"resistor", "capacitor", "inductor"})
SERIES_BY_TOLERANCE = ((0.2, "E6"), (0.1, "E12"), (0.05, "E24"), (0.02, "E48"), (0.01, "E96"))


def series_for(tolerance: float | None) -> str:
    """The IEC 60063 series that goes with a relative tolerance."""
    if tolerance is None:
        return "E24"
    for limit, name in SERIES_BY_TOLERANCE:
        if tolerance >= limit * (1 - 1e-9):
            return name
    return "E192"


COARSER = ("E24", "E12", "E6")


def preferred_flag(part: Part) -> dict[str, Any] | None:
    """For a stocked part: the series its tolerance calls for, the series the value belongs to
    (that one or a coarser one; ``None`` if neither), and the nearest value of the first."""
    if part.kind not in STOCKED or not part.value or part.value <= 0:
        return None
    return dict(_flag(part.kind, part.value, part.tolerance))


@lru_cache(maxsize=4096)
def _flag(kind: str, value: float, tolerance: float | None) -> dict[str, Any]:
    """:func:`preferred_flag` by value (pages and parts lists ask for the same parts on every
    build; the series search is the slow part)."""
    series = series_for(tolerance)
    unit = KINDS[kind].value_unit or ""
    allowed = [series, *(s for s in COARSER if s != series and
                         len(eseries.SERIES[s]) < len(eseries.SERIES[series]))]
    member = next((s for s in allowed if eseries.is_preferred(value, s)), None)
    nearest = eseries.nearest(value, series)
    return {"series": series, "member": member, "ok": member is not None,
            "nearest": format_eng(nearest, unit)}


def _rating_unit(part: Part) -> str:
    return KINDS[part.kind].rating_unit or ""


def part_rows(design: Design, cautions: list[dict[str, Any]]) -> list[dict[str, Any]]:
    """One row per part, with its flags (preferred value, rating, tolerance) and cautions."""
    by_part: dict[str, list[dict[str, Any]]] = {}
    for caution in cautions:
        if isinstance(caution, dict) and caution.get("part"):
            by_part.setdefault(str(caution["part"]), []).append(caution)
    rows = []
    for part in design.parts:
        spec = KINDS.get(part.kind)
        unit = spec.value_unit if spec else ""
        value = (format_eng(part.value, unit or "") if part.value is not None
                 else (part.model or ""))
        flags = []
        preferred = preferred_flag(part)
        if preferred and not preferred["ok"]:
            wider = preferred["series"] in ("E48", "E96", "E192")  # E12 and E6 lie inside E24
            named = f"{preferred['series']} or E24" if wider else preferred["series"]
            flags.append(f"not in {named}; nearest {preferred['nearest']}")
        if part.kind in STOCKED and part.tolerance is None:
            flags.append("no tolerance given (treated as exact)")
        if spec and spec.rating_unit and part.rating is None:
            flags.append("no rating given (rating not checked)")
        rows.append({
            "name": part.name,
            "kind": part.kind,
            "value": value,
            "written": part.value_text or "",
            "tolerance": format_eng(part.tolerance * 100, "%") if part.tolerance else "",
            "rating": format_eng(part.rating, _rating_unit(part)) if part.rating else "",
            "series": f"{preferred['member']} ✓" if preferred and preferred["ok"] else "",
            "nets": " ".join(f"{t}={n}" if not (spec and spec.two_terminal) else n
                             for t, n in part.terminals),
            "flags": flags,
            "cautions": [str(c.get("message") or c.get("sentence") or "") for c in
                         by_part.get(part.name, [])],
            "line": part.span.line,
        })
    return rows


def parts_csv(design: Design) -> str:
    """The parts list as CSV (SI values, percent tolerances), for purchasing and review."""
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow(["part", "kind", "value", "value_si", "unit", "tolerance_percent", "rating",
                     "rating_unit", "model", "connections", "preferred_series",
                     "value_in_series", "nearest_preferred"])
    for part in design.parts:
        spec = KINDS.get(part.kind)
        preferred = preferred_flag(part)
        writer.writerow([
            part.name, part.kind, part.value_text or "",
            "" if part.value is None else repr(float(part.value)),
            (spec.value_unit or "") if spec else "",
            "" if part.tolerance is None else f"{part.tolerance * 100:g}",
            "" if part.rating is None else f"{part.rating:g}", _rating_unit(part),
            part.model or "", " ".join(f"{t}={n}" for t, n in part.terminals),
            preferred["series"] if preferred else "",
            (preferred["member"] or "no") if preferred else "",
            preferred["nearest"] if preferred else "",
        ])
    return buffer.getvalue()
