"""The canonical layout of a page's blocks, so that diffs between revisions show real changes.

Per block, the columns are aligned (two spaces between columns), every field is spelled with
single spaces inside, trailing comments line up in one column after the block's longest line,
whole-line comments and blank lines stay, and every value keeps the spelling its author chose
(``4k7`` stays ``4k7``).  Prose outside the blocks is untouched.  Neatening is idempotent.
"""

from __future__ import annotations

from collections.abc import Callable

from docgen.reader import page_blocks, read_text
from docgen.reader.lexer import SourceLine, group_fields

GAP = "  "

#: block tag -> splits a line's body into (aligned columns, free text after them).
Splitter = Callable[[SourceLine], tuple[list[str], str]]


def _words(line: SourceLine, start: int = 0, stop: int | None = None) -> list[str]:
    return [w.text for w in line.words(start, stop)]


def _circuit(line: SourceLine) -> tuple[list[str], str]:
    colon = line.body.find(":")
    words = line.words(0, colon)
    middle = " ".join(f.text for f in group_fields(words[2:]))
    return [words[0].text, words[1].text, middle], ": " + " ".join(_words(line, colon + 1))


def _models(line: SourceLine) -> tuple[list[str], str]:
    words = _words(line)
    return words[:2], " ".join(words[2:])


def _bench(line: SourceLine) -> tuple[list[str], str]:
    from docgen.reader.bench import all_keys

    words = _words(line)
    key = next(k for k in all_keys() if words[: len(k.split())] == k.split())
    return [key], " ".join(words[len(key.split()):])


def _require(line: SourceLine) -> tuple[list[str], str]:
    colon = line.body.rfind(":")
    return [" ".join(_words(line, 0, colon))], ": " + " ".join(_words(line, colon + 1))


SPLITTERS: dict[str, Splitter] = {
    "circuit": _circuit, "models": _models, "bench": _bench, "require": _require,
}


def neaten_text(text: str, path: str = "<text>") -> str:
    """The page with its blocks in the canonical layout.

    Raises :class:`docgen.diagnostics.InputError` if the page has input errors: a page is
    only rewritten when docgen can read all of it.
    """
    read_text(text, path)
    newline = "\r\n" if "\r\n" in text else "\n"
    lines = text.splitlines()
    for block in page_blocks(text):
        splitter = SPLITTERS.get(block.tag)
        if splitter is None:
            continue
        for line, new in zip(block.lines, _layout(block.lines, splitter), strict=True):
            lines[line.number - 1] = new
    ending = newline if text.endswith(("\n", "\r")) else ""
    return newline.join(lines) + ending


def _layout(lines: list[SourceLine], splitter: Splitter) -> list[str]:
    """The neat text of each line of one block."""
    rows = [None if line.is_blank else splitter(line) for line in lines]
    widths = _widths([r[0] for r in rows if r is not None])
    bodies = [_body(row, widths) if row is not None else "" for row in rows]
    comment_at = max((len(b) for b in bodies), default=0)
    out = []
    for body, line in zip(bodies, lines, strict=True):
        prefix = line.text[: line.indent]
        if line.comment is None:
            out.append((prefix + body).rstrip())
        elif not body:
            out.append(prefix + line.comment)  # a whole-line comment
        else:
            out.append(prefix + body.ljust(comment_at) + GAP + line.comment)
    return out


def _widths(rows: list[list[str]]) -> list[int]:
    count = max((len(r) for r in rows), default=0)
    return [max((len(r[i]) for r in rows if i < len(r)), default=0) for i in range(count)]


def _body(row: tuple[list[str], str], widths: list[int]) -> str:
    columns, rest = row
    cells = [c.ljust(w) for c, w in zip(columns, widths, strict=False) if w]
    return (GAP.join(cells) + GAP + rest).rstrip() if rest else GAP.join(cells).rstrip()
