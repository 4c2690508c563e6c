"""Shared helpers for the demo-record and starter tests: solve a design as ``docgen check`` does."""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import replace
from pathlib import Path
from typing import Any

from docgen import pipeline
from docgen.check.gate import sections_for
from docgen.design import Design, ModelDef
from docgen.record import Record, load_record

ROOT = Path(__file__).resolve().parent.parent
DESIGNS = ROOT / "designs"

_RECORD: list[Record] = []


def record() -> Record:
    """The bundled design record, read once per test session."""
    if not _RECORD:
        _RECORD.append(load_record(DESIGNS))
    return _RECORD[0]


def design(name: str) -> Design:
    """A bundled design by file name (``hydrophone-preamp.md``)."""
    for page in record().designs:
        if Path(page.path).name == name:
            return page
    raise KeyError(name)


def solve(page: Design, models: Mapping[str, ModelDef] | None = None) -> dict[str, Any]:
    """The results of ``page`` with the analyses its requirements need (as ``docgen check``)."""
    models = record().models_for(page) if models is None else models
    return pipeline.run(page, models, only=sections_for(page))


def with_value(page: Design, part: str, value: float) -> Design:
    """``page`` with one part's value changed (the text is left as it was)."""
    parts = tuple(replace(p, value=value, value_text=None) if p.name == part else p
                  for p in page.parts)
    return replace(page, parts=parts)


def verdicts(results: Mapping[str, Any]) -> dict[str, str]:
    """Requirement metric text -> verdict (``pass``, ``fail``, ``not computed``, ``invalid``)."""
    return {row["metric"]: row["verdict"] for row in results.get("checks", [])}
