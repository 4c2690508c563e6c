"""Pieces every block reader shares: name patterns, wording and reporting helpers."""

from __future__ import annotations

import re
from collections.abc import Collection

from docgen.diagnostics import Collector, Span, did_you_mean
from docgen.reader.lexer import Word
from docgen.units import QuantityError

PART_NAME = re.compile(r"^[A-Za-z][A-Za-z0-9_]*$")
NET_NAME = re.compile(r"^[A-Za-z0-9_][A-Za-z0-9_.+\-]*$")
MODEL_NAME = re.compile(r"^[A-Za-z][A-Za-z0-9_.+\-]*$")


def article(kind: str) -> str:
    """``kind`` with its indefinite article ("an npn", "a resistor")."""
    return f"{'an' if kind[0] in 'aeioun' else 'a'} {kind}"


def report_quantity(collector: Collector, span: Span, error: QuantityError) -> None:
    """Record a :class:`QuantityError` found in the text at ``span``."""
    col = span.col + error.offset
    width = error.width or span.width
    if col + width > span.col + span.width:  # keep the caret inside the field
        col, width = span.col, span.width
    collector.add(Span(span.line, col, width), error.message, hint=error.hint)



def check_head(line: int, name: Word, kind: Word, collector: Collector, pattern: re.Pattern,
               kinds: Collection[str], noun: str) -> bool | None:
    """Check a line's NAME and KIND words: None if the kind is unknown, else whether the
    name is well formed (both problems are reported)."""
    ok = bool(pattern.match(name.text))
    if not ok:
        collector.add(name.span(line), f"'{name.text}' is not a {noun} name",
                      hint="a name starts with a letter")
    if kind.text not in kinds:
        collector.add(kind.span(line), f"unknown {noun} kind '{kind.text}'",
                      hint=did_you_mean(kind.text, kinds) or f"one of {', '.join(kinds)}")
        return None
    return ok
