"""Block lines to positioned words and fields: the one tokeniser every block reader shares.

A block line keeps its file line number and the column where the block's content starts (a
fence inside a list item is indented), so every word knows its 1-based file column.  ``#``
starts a comment anywhere.  Words are grouped into *fields*: a number and the unit words after
it (``15 V``, ``3 mV rms``) are one field, as is ``key=value`` with a unit after it.
"""

from __future__ import annotations

import re
from collections.abc import Callable
from dataclasses import dataclass
from typing import TypeVar

from docgen.diagnostics import Span

T = TypeVar("T")
_NUMBER_START = re.compile(r"^(?:[+\-\u2212±]?\.?\d|R\d)")


@dataclass(frozen=True, slots=True)
class Word:
    """A whitespace-separated word with its 1-based file column."""

    text: str
    col: int

    @property
    def end(self) -> int:
        """The column just after the word."""
        return self.col + len(self.text)

    def span(self, line: int) -> Span:
        """The word's position on ``line``."""
        return Span(line, self.col, max(1, len(self.text)))


@dataclass(frozen=True, slots=True)
class Field:
    """One or more words that belong together (a value and its unit)."""

    words: tuple[Word, ...]

    @property
    def text(self) -> str:
        """The words joined by single spaces (the canonical spelling of the field)."""
        return " ".join(w.text for w in self.words)

    @property
    def col(self) -> int:
        """The column of the first word."""
        return self.words[0].col

    def span(self, line: int) -> Span:
        """The field's position on ``line``."""
        return Span(line, self.col, self.words[-1].end - self.col)


@dataclass(frozen=True, slots=True)
class SourceLine:
    """A line of a block as it stands in the file.

    :param number: 1-based line number in the file.
    :param text: the whole file line.
    :param indent: how many characters of the file line precede the block's content.
    :param body: the content with the comment removed (right-stripped).
    :param comment: the comment from ``#`` on, or ``None``.
    :param comment_col: the 1-based column of the ``#``.
    """

    number: int
    text: str
    indent: int
    body: str
    comment: str | None
    comment_col: int

    def words(self, start: int = 0, stop: int | None = None) -> list[Word]:
        """The words of ``body[start:stop]`` with their file columns."""
        chunk = self.body[start:stop]
        return [Word(m.group(), self.indent + start + m.start() + 1)
                for m in re.finditer(r"\S+", chunk)]

    def span_at(self, index: int, width: int = 1) -> Span:
        """The span of ``width`` characters at 0-based ``index`` into the body."""
        return Span(self.number, self.indent + index + 1, max(1, width))

    @property
    def is_blank(self) -> bool:
        """True for an empty or comment-only line."""
        return not self.body.strip()


def source_lines(file_lines: list[str], first: int, content: str) -> list[SourceLine]:
    """The lines of a fenced block whose content starts on 0-based file line ``first``."""
    out = []
    for i, text in enumerate(content.splitlines()):
        number = first + i + 1
        whole = file_lines[first + i] if first + i < len(file_lines) else text
        indent = len(whole) - len(text) if text and whole.endswith(text) else 0
        hash_at = text.find("#")
        body = text if hash_at < 0 else text[:hash_at]
        comment = None if hash_at < 0 else text[hash_at:].rstrip()
        out.append(SourceLine(number, whole, indent, body.rstrip(), comment,
                              indent + hash_at + 1))
    return out


def read_lines(lines: list[SourceLine], read: Callable[[SourceLine], T | None]) -> list[T]:
    """``read`` applied to every non-blank line; lines it rejects (``None``) are left out."""
    results = (read(line) for line in lines if not line.is_blank)
    return [r for r in results if r is not None]


def is_number_start(text: str) -> bool:
    """True if ``text`` starts like a value (``4k7``, ``-3m``, ``±1%``, ``R47``, ``.5``)."""
    return bool(_NUMBER_START.match(text))


def group_fields(words: list[Word]) -> list[Field]:
    """Group words into fields: a value (or ``key=value``) absorbs the unit words after it."""
    fields: list[list[Word]] = []
    for word in words:
        if fields and _continues(fields[-1], word):
            fields[-1].append(word)
        else:
            fields.append([word])
    return [Field(tuple(f)) for f in fields]


def _continues(field: list[Word], word: Word) -> bool:
    """True if ``word`` is a unit word belonging to the value that starts ``field``."""
    if "=" in word.text or is_number_start(word.text) or word.text.startswith("("):
        return False
    head = field[0].text
    value = head.split("=", 1)[1] if "=" in head else head
    return is_number_start(value)
