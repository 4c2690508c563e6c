"""Template contexts of the history page and the diff pages (formatting only; the data comes
from :func:`docgen.history.timeline.design_history`)."""

from __future__ import annotations

from typing import Any

from docgen.history.describe import percent, value_text
from docgen.history.headline import TABLE

Json = dict[str, Any]


def diff_name(old_sha: str, new_sha: str) -> str:
    """The file name of the diff page between two commits."""
    return f"diff-{old_sha[:10]}-{new_sha[:10]}.html"


def history_context(history: Json, *, title: str, design_href: str,
                    diff_hrefs: list[str | None], trend: str | None,
                    approval: Json | None) -> Json:
    """The history page: one row per revision, headline columns, verdicts, diff links."""
    rows = history["rows"]
    columns = [m for m in TABLE if any(f["metric"] == m for r in rows for f in r["figures"])]
    table = []
    for row, href in zip(rows, diff_hrefs + [None] * (len(rows) - len(diff_hrefs)),
                         strict=False):
        figures = {f["metric"]: f for f in row["figures"]}
        failing = [m for m, v in sorted(row["verdicts"].items()) if v != "pass"]
        table.append({
            "short": row["short"], "date": row["date"][:10], "author": row["author"],
            "subject": row["subject"], "status": row["status"] or "unreadable",
            "approved": row["approved"],
            "reason": ("library page changed: " + ", ".join(row["library_paths"])
                       if row["reason"] == "library" else None),
            "moved": row["path"] if row["path"] != history["path"] else None,
            "cells": [value_text(figures[m]["value"], figures[m]["unit"]) if m in figures
                      else "—" for m in columns],
            "met": (f"{row['passed']} of {row['total']} met" if row["total"]
                    else "no requirements"),
            "all_met": row["total"] > 0 and row["passed"] == row["total"],
            "failing": [f"{m}: {row['verdicts'][m]}" for m in failing],
            "errors": row["errors"],
            "diff_href": href,
        })
    return {"title": title, "path": history["path"], "design_href": design_href,
            "available": history["available"], "unavailable": history["unavailable"],
            "columns": columns, "rows": table, "trend": trend, "approval": approval}


def diff_context(diff: Json, *, title: str, old_row: Json, new_row: Json, history_href: str,
                 design_href: str, overlay: str | None, older_href: str | None,
                 newer_href: str | None) -> Json:
    """The diff page between two consecutive revisions."""
    sides = [_side(old_row), _side(new_row)]
    context: Json = {"title": title, "sides": sides, "history_href": history_href,
                     "design_href": design_href, "older_href": older_href,
                     "newer_href": newer_href, "overlay": overlay,
                     "readable": diff["readable"], "text_lines": _text_lines(diff["text"])}
    if not diff["readable"]:
        return context
    parts = diff["parts"]
    context.update({
        "added": [_part_row(p) for p in parts["added"]],
        "removed": [_part_row(p) for p in parts["removed"]],
        "revalued": [{"part": p["part"], "old": value_text(p["old"], p["unit"], p["old_text"]),
                      "new": value_text(p["new"], p["unit"], p["new_text"]),
                      "change": percent(p["relative"])} for p in parts["revalued"]],
        "rewired": parts["rewired"],
        "other": [{"part": c["part"], "field": c["field"], "old": value_text(c["old"]),
                   "new": value_text(c["new"])} for c in parts["changed"]],
        "models": _model_rows(diff["models"]),
        "requirements": _requirement_rows(diff["requirements"]),
        "settings": [{"what": "bench " + b["field"].replace("_", " "),
                      "old": value_text(b["old"]), "new": value_text(b["new"])}
                     for b in diff["bench"]]
        + [{"what": h["field"].replace("_", " "), "old": value_text(h["old"]),
            "new": value_text(h["new"])} for h in diff["header"]],
        "metrics": [{"metric": m["metric"], "old": value_text(m["old"], m["unit"]),
                     "new": value_text(m["new"], m["unit"]),
                     "delta": value_text(m["delta"], m["unit"]) if m["delta"] else "0",
                     "relative": percent(m["relative"]), "changed": m["old"] != m["new"]}
                    for m in diff["metrics"]],
        "verdicts": diff["verdicts"],
    })
    return context


def _side(row: Json) -> Json:
    return {"short": row["short"], "date": row["date"][:10], "author": row["author"],
            "subject": row["subject"], "path": row["path"]}


def _part_row(p: Json) -> Json:
    return {"part": p["part"], "kind": p["kind"],
            "value": value_text(p["value"], p["unit"], p["value_text"]) if p["value"] is not None
            else (p["model"] or "—"),
            "nets": " ".join(f"{t}={n}" for t, n in p["nets"].items())}


def _model_rows(models: Json) -> list[Json]:
    rows = [{"model": m["model"], "change": f"added ({m['kind']}, from {m['source']})"}
            for m in models["added"]]
    rows += [{"model": m["model"], "change": "removed"} for m in models["removed"]]
    for m in models["changed"]:
        for p in m["params"]:
            rows.append({"model": m["model"], "change": f"{p['param']}: {value_text(p['old'])}"
                         f" → {value_text(p['new'])} {percent(p['relative'])}".rstrip()})
        if m["old_source"] != m["source"]:
            rows.append({"model": m["model"],
                         "change": f"now from {m['source']} (was {m['old_source']})"})
    return rows


def _requirement_rows(reqs: Json) -> list[Json]:
    rows = [{"metric": r["metric"], "old": "—", "new": r["limit"]} for r in reqs["added"]]
    rows += [{"metric": r["metric"], "old": r["limit"], "new": "removed"}
             for r in reqs["removed"]]
    rows += [{"metric": r["metric"], "old": _limit(r["old"]), "new": _limit(r["new"])}
             for r in reqs["changed"]]
    return rows


def _limit(req: Json) -> str:
    return req["limit"] + (" across " + " ".join(req["across"]) if req["across"] else "")


def _text_lines(text: str) -> list[Json]:
    """The unified diff as lines tagged ``add``, ``del``, ``hunk`` or ``same``."""
    out = []
    for line in text.splitlines():
        if line.startswith(("+++", "---")):
            kind = "file"
        elif line.startswith("@@"):
            kind = "hunk"
        elif line.startswith("+"):
            kind = "add"
        elif line.startswith("-"):
            kind = "del"
        else:
            kind = "same"
        out.append({"kind": kind, "text": line})
    return out
