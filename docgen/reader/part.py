"""A part while its line is read: the fields found so far and whether all of them read."""

from __future__ import annotations

from docgen.diagnostics import Collector, Span
from docgen.kinds import KINDS, KindSpec
from docgen.reader.common import report_quantity
from docgen.reader.lexer import SourceLine, Word
from docgen.units import QuantityError


class PartBuilder:
    """The fields of one part while its line is read."""

    def __init__(self, line: SourceLine, collector: Collector, name: Word, kind: str):
        self.line = line
        self.collector = collector
        self.name = name
        self.kind = kind
        self.spec: KindSpec = KINDS[kind]
        self.value: float | None = None
        self.value_text: str | None = None
        self.model: str | None = None
        self.tolerance: float | None = None
        self.rating: float | None = None
        self.params: dict[str, float] = {}
        self.spans: dict[str, Span] = {}
        self.ok = True

    def error(self, span: Span, message: str, hint: str | None = None) -> None:
        """Report a problem of this part (the part is then left out)."""
        self.ok = False
        self.collector.add(span, message, hint=hint)

    def quantity_error(self, span: Span, error: QuantityError) -> None:
        """Report a value that does not read."""
        self.ok = False
        report_quantity(self.collector, span, error)
