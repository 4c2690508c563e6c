"""The semantic diff between two revisions of a design.

A pure function of two :class:`~docgen.design.Design` objects, the models each resolves and the
results dict each produced: nothing here reads git or solves anything.  The diff says what a
reviewer asks first — which parts were added, removed, re-valued or re-wired, which models,
requirements and bench settings changed, how every headline figure moved and which verdicts
flipped — and ends with the plain text diff of the source.
"""

from __future__ import annotations

import difflib
from collections.abc import Mapping
from dataclasses import fields
from typing import Any

from docgen.design import Bench, Design, ModelDef, Part, Requirement
from docgen.history.headline import headline_figures, verdicts
from docgen.kinds import KINDS

Json = dict[str, Any]

#: Header fields a reviewer cares about, in the order pages list them.
HEADER_FIELDS = ("title", "status", "approved", "owner", "reviewers", "tags", "summary",
                 "replaced_by")


def diff_designs(
    old: Design,
    new: Design,
    old_results: Mapping[str, Any] | None = None,
    new_results: Mapping[str, Any] | None = None,
    *,
    old_library: Mapping[str, ModelDef] | None = None,
    new_library: Mapping[str, ModelDef] | None = None,
    labels: tuple[str, str] = ("before", "after"),
) -> Json:
    """Everything that changed from ``old`` to ``new``, as plain JSON-serialisable data.

    :param old_library: the models ``old`` could use besides its own (library pages and
        built-ins at that revision); with it, a changed library model shows up too.
    :param labels: names of the two sides for the text diff (revision ids, "work tree").
    """
    result: Json = {
        "paths": [old.path, new.path],
        "parts": diff_parts(old.parts, new.parts),
        "models": diff_models(used_models(old, old_library), used_models(new, new_library)),
        "requirements": diff_requirements(old.requirements, new.requirements),
        "bench": diff_bench(old.bench, new.bench),
        "header": diff_header(old, new),
        "metrics": diff_metrics(old_results, new_results),
        "verdicts": flipped_verdicts(old_results, new_results),
        "text": text_diff(old.path, old.source, new.path, new.source, labels),
    }
    result["changed"] = sorted(section for section in
                               ("parts", "models", "requirements", "bench", "header")
                               if _has_entries(result[section]))
    return result


def _has_entries(section: Any) -> bool:
    if isinstance(section, Mapping):
        return any(bool(v) for v in section.values())
    return bool(section)


# -- parts --------------------------------------------------------------------------------


def diff_parts(old: tuple[Part, ...], new: tuple[Part, ...]) -> Json:
    """Parts added, removed, re-valued, re-wired and otherwise changed, matched by name."""
    before = {p.name: p for p in old}
    after = {p.name: p for p in new}
    out: Json = {"added": [], "removed": [], "revalued": [], "rewired": [], "changed": []}
    for name, part in after.items():
        if name not in before:
            out["added"].append(part_summary(part))
    for name, part in before.items():
        if name not in after:
            out["removed"].append(part_summary(part))
            continue
        other = after[name]
        if part.value != other.value:
            out["revalued"].append(_revalued(part, other))
        out["rewired"].extend(_rewired(part, other))
        out["changed"].extend(_other_changes(part, other))
    return out


def part_summary(part: Part) -> Json:
    """A part as one row: name, kind, value (as written and in SI), model and nets."""
    return {
        "part": part.name,
        "kind": part.kind,
        "value": part.value,
        "value_text": part.value_text,
        "unit": _value_unit(part.kind),
        "model": part.model,
        "nets": {terminal: net for terminal, net in part.terminals},
    }


def _value_unit(kind: str) -> str | None:
    spec = KINDS.get(kind)
    return spec.value_unit if spec else None


def _revalued(old: Part, new: Part) -> Json:
    return {
        "part": new.name,
        "kind": new.kind,
        "old": old.value,
        "new": new.value,
        "old_text": old.value_text,
        "new_text": new.value_text,
        "unit": _value_unit(new.kind),
        "relative": relative_change(old.value, new.value),
    }


def _rewired(old: Part, new: Part) -> list[Json]:
    before, after = dict(old.terminals), dict(new.terminals)
    moves = []
    order = [t for t, _ in new.terminals] + [t for t, _ in old.terminals if t not in after]
    for terminal in order:
        if before.get(terminal) != after.get(terminal):
            moves.append({"part": new.name, "terminal": terminal,
                          "old_net": before.get(terminal), "new_net": after.get(terminal)})
    return moves


def _other_changes(old: Part, new: Part) -> list[Json]:
    changes = []
    for field_name in ("kind", "model", "tolerance", "rating"):
        a, b = getattr(old, field_name), getattr(new, field_name)
        if a != b:
            changes.append({"part": new.name, "field": field_name, "old": a, "new": b})
    for key in sorted(set(old.params) | set(new.params)):
        a, b = old.params.get(key), new.params.get(key)
        if a != b:
            changes.append({"part": new.name, "field": key, "old": a, "new": b})
    return changes


# -- models -------------------------------------------------------------------------------


def used_models(design: Design, library: Mapping[str, ModelDef] | None) -> dict[str, ModelDef]:
    """The design's own models plus the library models its parts name (own ones win)."""
    table = {m.name: m for m in design.models}
    for part in design.parts:
        if part.model and part.model not in table and library and part.model in library:
            table[part.model] = library[part.model]
    return table


def diff_models(old: Mapping[str, ModelDef], new: Mapping[str, ModelDef]) -> Json:
    """Models added, removed, and changed parameter by parameter (value and spread)."""
    out: Json = {"added": [], "removed": [], "changed": []}
    for name in sorted(set(new) - set(old)):
        out["added"].append({"model": name, "kind": new[name].kind, "source": new[name].source})
    for name in sorted(set(old) - set(new)):
        out["removed"].append({"model": name, "kind": old[name].kind, "source": old[name].source})
    for name in sorted(set(old) & set(new)):
        a, b = old[name], new[name]
        params = []
        for key in sorted(set(a.params) | set(b.params)):
            pa, pb = a.params.get(key), b.params.get(key)
            va = None if pa is None else (pa.value, pa.low, pa.high)
            vb = None if pb is None else (pb.value, pb.low, pb.high)
            if va != vb:
                params.append({
                    "param": key,
                    "old": None if pa is None else pa.value,
                    "new": None if pb is None else pb.value,
                    "old_range": None if pa is None or pa.low is None else [pa.low, pa.high],
                    "new_range": None if pb is None or pb.low is None else [pb.low, pb.high],
                    "relative": relative_change(pa and pa.value, pb and pb.value),
                })
        if params or a.kind != b.kind or a.source != b.source:
            out["changed"].append({"model": name, "kind": b.kind, "old_source": a.source,
                                   "source": b.source, "params": params})
    return out


# -- requirements, bench, header ---------------------------------------------------------


def _requirement_key(req: Requirement) -> str:
    return " ".join(req.metric.split())


def _requirement_text(req: Requirement) -> Json:
    return {"metric": _requirement_key(req), "limit": req.limit.text, "across": list(req.across)}


def diff_requirements(old: tuple[Requirement, ...], new: tuple[Requirement, ...]) -> Json:
    """Requirements added, removed, or with a new limit or spread clause (matched by metric)."""
    before = {_requirement_key(r): r for r in old}
    after = {_requirement_key(r): r for r in new}
    out: Json = {"added": [], "removed": [], "changed": []}
    for key, req in after.items():
        if key not in before:
            out["added"].append(_requirement_text(req))
    for key, req in before.items():
        if key not in after:
            out["removed"].append(_requirement_text(req))
            continue
        a, b = _requirement_text(req), _requirement_text(after[key])
        if (a["limit"], a["across"]) != (b["limit"], b["across"]):
            out["changed"].append({"metric": key, "old": a, "new": b})
    return out


def diff_bench(old: Bench, new: Bench) -> list[Json]:
    """Bench settings whose value changed (``spans`` ignored: moving a line is no change)."""
    out = []
    for f in fields(Bench):
        if f.name == "spans":
            continue
        a, b = getattr(old, f.name), getattr(new, f.name)
        if isinstance(a, Mapping):
            a, b = dict(a), dict(b)
        if a != b:
            out.append({"field": f.name, "old": _plain(a), "new": _plain(b)})
    return out


def diff_header(old: Design, new: Design) -> list[Json]:
    """Header fields whose value changed (status, approval date, owner...)."""
    out = []
    for name in HEADER_FIELDS:
        a, b = getattr(old.header, name), getattr(new.header, name)
        if a != b:
            out.append({"field": name, "old": _plain(a), "new": _plain(b)})
    return out


def _plain(value: Any) -> Any:
    if isinstance(value, tuple):
        return [_plain(v) for v in value]
    if isinstance(value, Mapping):
        return {k: _plain(v) for k, v in value.items()}
    return value


# -- results ------------------------------------------------------------------------------


def diff_metrics(old: Mapping[str, Any] | None, new: Mapping[str, Any] | None) -> list[Json]:
    """Every headline figure of either side, before and after, with the change."""
    before = {row["metric"]: row for row in headline_figures(old or {})}
    after = {row["metric"]: row for row in headline_figures(new or {})}
    rows = []
    for metric in list(before) + [m for m in after if m not in before]:
        a, b = before.get(metric, {}), after.get(metric, {})
        va, vb = a.get("value"), b.get("value")
        delta = vb - va if isinstance(va, (int, float)) and isinstance(vb, (int, float)) else None
        rows.append({
            "metric": metric,
            "unit": b.get("unit", a.get("unit", "")),
            "old": va,
            "new": vb,
            "delta": _sig(delta),
            "relative": relative_change(va, vb),
        })
    return rows


def flipped_verdicts(old: Mapping[str, Any] | None, new: Mapping[str, Any] | None) -> list[Json]:
    """Requirements whose verdict differs between the two sides (matched by metric text)."""
    before, after = verdicts(old or {}), verdicts(new or {})
    return [{"metric": metric, "old": before[metric], "new": after[metric]}
            for metric in after if metric in before and before[metric] != after[metric]]


def text_diff(old_path: str, old_source: str, new_path: str, new_source: str,
              labels: tuple[str, str] = ("before", "after")) -> str:
    """The unified diff of two sources (empty when the text is the same)."""
    lines = difflib.unified_diff(
        old_source.splitlines(keepends=True),
        new_source.splitlines(keepends=True),
        fromfile=f"{old_path} ({labels[0]})",
        tofile=f"{new_path} ({labels[1]})",
    )
    return "".join(line if line.endswith("\n") else line + "\n" for line in lines)


def relative_change(old: float | None, new: float | None) -> float | None:
    """``(new − old)/|old|``, or ``None`` where it has no meaning (a side missing, old zero)."""
    if not isinstance(old, (int, float)) or not isinstance(new, (int, float)) or old == 0:
        return None
    return _sig((new - old) / abs(old))


def _sig(value: float | None) -> float | None:
    """Round a derived figure like every published number (6 significant figures)."""
    if value is None:
        return None
    from docgen.units import round_sig

    return round_sig(value)
