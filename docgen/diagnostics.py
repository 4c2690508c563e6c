"""Diagnostics: every problem docgen finds in an input, with its place in the file.

One root exception (:class:`DocgenError`) carries a list of :class:`Diagnostic`; the reader
collects all problems of a file before raising, so a user sees every error at once.  Positions
are 1-based line and column numbers in the source file, as editors and compilers print them.
"""

from __future__ import annotations

import difflib
from collections.abc import Iterable, Sequence
from dataclasses import dataclass, field
from typing import Literal

Severity = Literal["error", "warning"]


@dataclass(frozen=True, slots=True)
class Span:
    """A place in a source file: 1-based line, 1-based column and the width of the token."""

    line: int
    col: int
    width: int = 1


@dataclass(frozen=True, slots=True)
class Diagnostic:
    """One problem in an input file.

    :param path: the file, as given by the user (relative paths stay relative).
    :param span: where the problem is.
    :param severity: ``error`` stops the design from being solved; ``warning`` does not.
    :param message: what is wrong, in the user's words.
    :param hint: how to fix it, if docgen can tell (a close spelling, the SI form...).
    :param source_line: the text of the offending line, for the caret display.
    """

    path: str
    span: Span
    severity: Severity
    message: str
    hint: str | None = None
    source_line: str | None = None

    @property
    def line(self) -> int:
        """The 1-based line number."""
        return self.span.line

    @property
    def col(self) -> int:
        """The 1-based column number."""
        return self.span.col

    def headline(self) -> str:
        """The ``path:line:col: severity: message`` line."""
        return f"{self.path}:{self.span.line}:{self.span.col}: {self.severity}: {self.message}"

    def render(self) -> str:
        """The headline, the source line with a caret under the token, and the hint."""
        out = [self.headline()]
        if self.source_line is not None:
            text = self.source_line.rstrip("\n").expandtabs(1)
            out.append(f"    {text}")
            out.append("    " + " " * (self.span.col - 1) + "^" + "~" * max(0, self.span.width - 1))
        if self.hint:
            out.append(f"    hint: {self.hint}")
        return "\n".join(out)

    def to_json(self) -> dict[str, object]:
        """Plain data for results files and ``--json`` output."""
        return {
            "path": self.path,
            "line": self.span.line,
            "col": self.span.col,
            "severity": self.severity,
            "message": self.message,
            "hint": self.hint,
        }


class DocgenError(Exception):
    """The root of every error docgen raises on purpose.  Carries one or more diagnostics."""

    def __init__(self, diagnostics: Sequence[Diagnostic] | Diagnostic | str):
        if isinstance(diagnostics, str):
            diagnostics = [Diagnostic("<docgen>", Span(1, 1), "error", diagnostics)]
        elif isinstance(diagnostics, Diagnostic):
            diagnostics = [diagnostics]
        self.diagnostics: tuple[Diagnostic, ...] = tuple(diagnostics)
        super().__init__("\n".join(d.headline() for d in self.diagnostics))


class InputError(DocgenError):
    """A design file (or a library page) cannot be read as written."""


class CircuitError(DocgenError):
    """The circuit is readable but not solvable as drawn (floating net, source loop, ...)."""


class AnalysisError(DocgenError):
    """An analysis could not produce a trustworthy answer (no convergence, singular matrix)."""


@dataclass
class Collector:
    """Gathers diagnostics for one file while it is read, so all of them reach the user."""

    path: str
    lines: Sequence[str]
    items: list[Diagnostic] = field(default_factory=list)

    def add(
        self,
        span: Span,
        message: str,
        *,
        hint: str | None = None,
        severity: Severity = "error",
    ) -> None:
        """Record one problem at ``span``."""
        line_text = self.lines[span.line - 1] if 0 < span.line <= len(self.lines) else None
        self.items.append(Diagnostic(self.path, span, severity, message, hint, line_text))

    @property
    def errors(self) -> list[Diagnostic]:
        """The error-level diagnostics so far."""
        return [d for d in self.items if d.severity == "error"]

    def raise_if_errors(self) -> None:
        """Raise :class:`InputError` with every diagnostic if any is an error."""
        if self.errors:
            raise InputError(sorted(self.items, key=lambda d: (d.line, d.col)))


def did_you_mean(word: str, choices: Iterable[str], *, cutoff: float = 0.6) -> str | None:
    """A hint naming the closest spelling of ``word`` among ``choices``, or ``None``."""
    lowered = {c.lower(): c for c in choices}
    close = difflib.get_close_matches(word.lower(), list(lowered), n=1, cutoff=cutoff)
    return f"did you mean '{lowered[close[0]]}'?" if close else None
