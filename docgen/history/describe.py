"""Plain sentences for a semantic diff: the terminal output of ``docgen diff`` and the reasons
given by the changed-since-approval flag.  Values are shown as the author wrote them, or in
engineering notation with their unit."""

from __future__ import annotations

from typing import Any

from docgen.units import MINUS, format_eng

Json = dict[str, Any]


def value_text(value: Any, unit: str | None = "", written: str | None = None) -> str:
    """A value for people: as written if known, else engineering notation; ``—`` for none."""
    if written:
        return written
    if value is None:
        return "—"
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        return format_eng(float(value), unit or "")
    if isinstance(value, (list, tuple)):
        return ", ".join(str(v) for v in value) or "—"
    return str(value)


def percent(fraction: float | None) -> str:
    """A relative change as a signed percentage (``+19.1 %``), or ``""``."""
    if fraction is None:
        return ""
    if fraction == 0:
        return "0 %"
    return f"{fraction * 100:+.3g} %".replace("-", MINUS)


def circuit_lines(diff: Json) -> list[str]:
    """One sentence per part change."""
    parts = diff["parts"]
    lines = [f"{p['part']} added: {p['kind']} {value_text(p['value'], p['unit'], p['value_text'])}"
             f" on {' '.join(p['nets'].values())}" for p in parts["added"]]
    lines += [f"{p['part']} removed ({p['kind']})" for p in parts["removed"]]
    for p in parts["revalued"]:
        change = percent(p["relative"])
        lines.append(f"{p['part']} re-valued {value_text(p['old'], p['unit'], p['old_text'])} → "
                     f"{value_text(p['new'], p['unit'], p['new_text'])}"
                     + (f" ({change})" if change else ""))
    lines += [f"{m['part']} re-wired: {m['terminal']} moved from {m['old_net'] or '—'} to "
              f"{m['new_net'] or '—'}" for m in parts["rewired"]]
    lines += [f"{c['part']} {c['field']}: {value_text(c['old'])} → {value_text(c['new'])}"
              for c in parts["changed"]]
    return lines


def model_lines(diff: Json) -> list[str]:
    """One sentence per model change."""
    models = diff["models"]
    lines = [f"model {m['model']} added ({m['kind']}, from {m['source']})"
             for m in models["added"]]
    lines += [f"model {m['model']} removed" for m in models["removed"]]
    for m in models["changed"]:
        params = [f"{p['param']} {value_text(p['old'])} → {value_text(p['new'])}"
                  for p in m["params"]]
        if m["old_source"] != m["source"]:
            params.append(f"now from {m['source']} (was {m['old_source']})")
        lines.append(f"model {m['model']}: " + "; ".join(params))
    return lines


def requirement_lines(diff: Json) -> list[str]:
    """One sentence per requirement change."""
    reqs = diff["requirements"]
    lines = [f"requirement added: {r['metric']} : {r['limit']}" for r in reqs["added"]]
    lines += [f"requirement removed: {r['metric']} : {r['limit']}" for r in reqs["removed"]]
    lines += [f"requirement {r['metric']}: {_limit(r['old'])} → {_limit(r['new'])}"
              for r in reqs["changed"]]
    return lines


def _limit(req: Json) -> str:
    across = " across " + " ".join(req["across"]) if req["across"] else ""
    return req["limit"] + across


def bench_lines(diff: Json) -> list[str]:
    """One sentence per bench or header change."""
    lines = [f"bench {b['field'].replace('_', ' ')}: {value_text(b['old'])} → "
             f"{value_text(b['new'])}" for b in diff["bench"]]
    lines += [f"{h['field'].replace('_', ' ')}: {value_text(h['old'])} → {value_text(h['new'])}"
              for h in diff["header"]]
    return lines


def metric_lines(diff: Json) -> list[str]:
    """One line per headline figure that changed, and one per flipped verdict."""
    lines = []
    for row in diff["metrics"]:
        if row["old"] == row["new"]:
            continue
        change = percent(row["relative"])
        lines.append(f"{row['metric']}: {value_text(row['old'], row['unit'])} → "
                     f"{value_text(row['new'], row['unit'])}" + (f" ({change})" if change else ""))
    lines += [f"verdict {v['metric']}: {v['old']} → {v['new']}" for v in diff["verdicts"]]
    return lines


def summary_lines(diff: Json) -> list[str]:
    """Every change in the order a reviewer reads them."""
    return (circuit_lines(diff) + model_lines(diff) + requirement_lines(diff)
            + bench_lines(diff) + metric_lines(diff))
