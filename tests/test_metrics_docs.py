"""The Metrics section of docs/format.md is executed: every example there must parse, carry
the unit the table states, and every form of the grammar must have an example, so the
documentation cannot drift from the code."""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from docgen.check import expressions
from docgen.metrics import FORMS, parse
from docgen.reader.require import parse_limit

DOC = Path(__file__).resolve().parents[1] / "docs" / "format.md"


def _section() -> str:
    text = DOC.read_text(encoding="utf-8")
    start = text.index("\n## Metrics")
    end = text.find("\n## ", start + 1)
    return text[start:end if end > 0 else None]


def _table() -> list[tuple[str, str]]:
    rows = re.findall(r"^\| `([^`]+)` \| ([^|]+) \|", _section(), re.M)
    assert len(rows) >= len(FORMS)
    return [(example, unit.strip()) for example, unit in rows]


def _block(tag: str) -> list[str]:
    blocks = re.findall(rf"^```{tag}\n(.*?)^```", _section(), re.M | re.S)
    assert blocks, f"the Metrics section has a {tag} example"
    return [line for block in blocks for line in block.splitlines() if line.strip()]


@pytest.mark.parametrize("example, unit", _table())
def test_table_examples_parse_with_their_unit(example: str, unit: str) -> None:
    assert parse(example).unit == unit


def test_every_form_is_documented() -> None:
    documented = {parse(example).form for example, _ in _table()}
    assert documented == {form.name for form in FORMS}


def test_require_examples_read() -> None:
    """The requirement example (a ``text`` block, so the page keeps one ``require`` example)."""
    for line in _block("text"):
        metric, _, rest = line.partition(":")
        parse(metric.strip())
        limit = re.sub(r"\s+across\s+\w+\s*$", "", rest).strip()
        parse_limit(limit)


def test_estimate_examples_read() -> None:
    for line in _block("estimate"):
        metric, _, expression = line.partition("≈")
        parse(metric.strip())
        expressions.parse(expression)
