"""The ``---`` header: one ``key: value`` per line.  Not YAML: YAML-only forms are errors."""

from __future__ import annotations

import datetime
import re
from typing import Any

from docgen.design import Header, frozen_map
from docgen.diagnostics import Collector, Span, did_you_mean

STATUSES = ("draft", "review", "approved", "retired")

#: header key -> (Header field, meaning) — the docs list this table.
KEYS: dict[str, tuple[str, str]] = {
    "title": ("title", "the design's name (required on a design page)"),
    "status": ("status", "draft (default), review, approved or retired"),
    "owner": ("owner", "who is responsible"),
    "reviewers": ("reviewers", "comma-separated names"),
    "approved": ("approved", "approval date YYYY-MM-DD; required when status is approved"),
    "tags": ("tags", "comma-separated words"),
    "summary": ("summary", "one line, shown in lists"),
    "replaced-by": ("replaced_by", "for a retired design: the file that replaces it"),
}
_LISTS = {"reviewers", "tags"}
_KEY_RE = re.compile(r"^(?P<key>[A-Za-z][A-Za-z0-9_-]*)\s*:(?:\s+|$)(?P<value>.*)$")
_NOT_YAML = "the header is one 'key: value' per line (it is not YAML)"


def header_end(lines: list[str]) -> int | None:
    """The 0-based index of the closing ``---`` if the file starts with a header, else None.

    Returns ``-1`` when the header is opened but never closed.
    """
    if not lines or lines[0].rstrip() != "---":
        return None
    for i in range(1, len(lines)):
        if lines[i].rstrip() == "---":
            return i
    return -1


def read_header(lines: list[str], end: int, collector: Collector) -> Header:
    """The header between line 1 and the 0-based line ``end``."""
    values: dict[str, str] = {}
    spans: dict[str, Span] = {}
    for index in range(1, end):
        _read_line(index + 1, lines[index], collector, values, spans)
    return _build(values, spans, collector)


def _read_line(number: int, text: str, collector: Collector, values: dict[str, str],
               spans: dict[str, Span]) -> None:
    if not text.strip() or text.lstrip().startswith("#"):
        return
    indent = len(text) - len(text.lstrip())
    if indent:
        collector.add(Span(number, 1, indent), "indented header line: nesting is not supported",
                      hint=_NOT_YAML)
        return
    if text.startswith("- "):
        collector.add(Span(number, 1, 1), "a list item in the header: lists are not supported",
                      hint="write 'tags: one, two' on one line")
        return
    match = _KEY_RE.match(text.rstrip())
    if not match:
        collector.add(Span(number, 1, len(text.rstrip())), "expected 'key: value'", hint=_NOT_YAML)
        return
    key, value = match["key"], match["value"].strip()
    key_span = Span(number, 1, len(key))
    value_col = match.start("value") + 1
    if key not in KEYS:
        collector.add(key_span, f"unknown header key '{key}' (ignored)", severity="warning",
                      hint=did_you_mean(key, KEYS) or f"keys: {', '.join(KEYS)}")
        return
    if key in values:
        collector.add(key_span, f"header key '{key}' is given twice")
        return
    value = _plain_value(value, Span(number, value_col, max(1, len(value))), collector)
    if value is None:
        return
    values[key] = value
    spans[key] = Span(number, value_col, max(1, len(value))) if value else key_span


def _plain_value(value: str, span: Span, collector: Collector) -> str | None:
    """The value as written, or None after reporting a YAML-only form."""
    if value[:1] in ("[", "{"):
        collector.add(span, "brackets in a header value: lists and mappings are not supported",
                      hint="write 'tags: one, two'")
        return None
    if value in ("|", ">", "|-", ">-") or value[:1] in ("&", "*", "!"):
        collector.add(span, f"'{value[:1]}' is YAML syntax, which the header does not use",
                      hint=_NOT_YAML)
        return None
    if len(value) >= 2 and value[0] == value[-1] and value[0] in "\"'":
        if "\\" in value:
            collector.add(span, "quoted text with escapes is not supported",
                          hint="write the value plainly, without quotes")
            return None
        collector.add(span, "quotes are not needed in the header (removed)", severity="warning")
        return value[1:-1]
    return value


def _build(values: dict[str, str], spans: dict[str, Span], collector: Collector) -> Header:
    fields: dict[str, Any] = {}
    for key, value in values.items():
        field = KEYS[key][0]
        if key in _LISTS:
            fields[field] = tuple(v.strip() for v in value.split(",") if v.strip())
        else:
            fields[field] = value or None
    status = values.get("status")
    if status is not None and status not in STATUSES:
        collector.add(spans["status"], f"unknown status '{status}'",
                      hint=did_you_mean(status, STATUSES) or f"one of {', '.join(STATUSES)}")
        fields.pop("status")
    approved = values.get("approved")
    if approved is not None and not _is_date(approved):
        collector.add(spans["approved"], f"'{approved}' is not a date",
                      hint="write the date as YYYY-MM-DD, e.g. 2024-03-18")
    if status == "approved" and not approved:
        collector.add(spans["status"], "status is approved but no approval date is given",
                      hint="add a line 'approved: YYYY-MM-DD'")
    return Header(**fields, spans=frozen_map(spans))


def _is_date(text: str) -> bool:
    if not re.fullmatch(r"\d{4}-\d{2}-\d{2}", text):
        return False
    try:
        datetime.date.fromisoformat(text)
    except ValueError:
        return False
    return True
