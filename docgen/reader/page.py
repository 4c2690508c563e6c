"""One Markdown page to a :class:`Design`: header, fenced blocks, then the block readers.

markdown-it-py finds the fenced blocks (its token maps give their lines); each block tag has
one reader in :data:`BLOCK_READERS`.  Every problem goes to one :class:`Collector`, so a user
sees all the errors of a file at once.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

from markdown_it import MarkdownIt

from docgen.design import Bench, Block, Design, Header, ModelDef, Part, Requirement
from docgen.diagnostics import Collector, Diagnostic, InputError, Span
from docgen.reader.bench import read_bench
from docgen.reader.circuit import read_circuit
from docgen.reader.header import header_end, read_header
from docgen.reader.lexer import SourceLine, source_lines
from docgen.reader.models import read_models
from docgen.reader.require import read_require
from docgen.reader.wiring import check_wiring, report_duplicates

#: the block tags docgen reads; any other fenced block is prose.
BLOCK_TAGS = ("circuit", "models", "bench", "require")

# Only block structure matters here (where fences are), so inline parsing is switched off.
_BLOCK_PARSER = MarkdownIt("commonmark").disable("inline")


@dataclass(frozen=True, slots=True)
class FoundBlock:
    """A fenced block with its lines as they stand in the file."""

    tag: str
    fence_line: int  # 1-based line of the opening fence
    lines: list[SourceLine]
    text: str


def find_blocks(file_lines: list[str], text: str) -> list[FoundBlock]:
    """Every fenced block of the page, in order (markdown-it-py token maps give the lines)."""
    tokens = _BLOCK_PARSER.parse(text)
    found = []
    for token in tokens:
        if token.type != "fence" or token.map is None:
            continue
        info = token.info.split()
        tag = info[0] if info else ""
        first = token.map[0] + 1  # 0-based index of the first content line
        found.append(FoundBlock(tag, token.map[0] + 1, source_lines(file_lines, first,
                                                                    token.content),
                                token.content))
    return found


def page_blocks(text: str) -> list[FoundBlock]:
    """The fenced blocks of a page's text, the ``---`` header skipped (for tools like neaten)."""
    file_lines = text.splitlines()
    end = header_end(file_lines)
    if end is None or end == -1:
        return find_blocks(file_lines, "\n".join(file_lines))
    return find_blocks(file_lines, "\n".join([""] * (end + 1) + file_lines[end + 1:]))


def read_text(text: str, path: str = "<text>") -> Design:
    """Read one page; raise :class:`InputError` with every diagnostic if any is an error.

    Warnings of a page that reads cleanly travel on :attr:`Design.warnings`.
    """
    file_lines = text.splitlines()
    collector = Collector(path, file_lines)
    try:
        design = _read(text, file_lines, path, collector)
    except RecursionError:  # pathological nesting in the Markdown itself
        collector.add(Span(1, 1), "the page is nested too deeply to read")
        design = None
    collector.raise_if_errors()
    assert design is not None
    return design


def read_file(path: str | Path) -> Design:
    """Read a page from disk (UTF-8); the path is kept as given."""
    name = str(path)
    try:
        text = Path(path).read_text(encoding="utf-8")
    except UnicodeDecodeError as exc:
        raise InputError(_file_problem(name, f"not UTF-8 text ({exc.reason})")) from None
    except OSError as exc:
        raise InputError(_file_problem(name, exc.strerror or "cannot be read")) from None
    return read_text(text, name)


def _file_problem(path: str, message: str) -> Diagnostic:
    return Diagnostic(path, Span(1, 1), "error", message)


def _read(text: str, file_lines: list[str], path: str, collector: Collector) -> Design:
    header = _header(file_lines, collector)
    blocks = page_blocks(text)
    circuits = [b for b in blocks if b.tag == "circuit"]
    models_blocks = [b for b in blocks if b.tag == "models"]
    kind = "design" if circuits else ("library" if models_blocks else "note")
    for extra in circuits[1:]:
        collector.add(Span(extra.fence_line, 1, 3), "a second circuit block: a design page "
                      "has exactly one", hint="put each design in its own file")
    before = len(collector.errors)
    parts: list[Part] = read_circuit(circuits[0].lines, collector) if circuits else []
    complete = len(collector.errors) == before
    models: list[ModelDef] = []
    for block in models_blocks:
        models.extend(read_models(block.lines, collector, path))
    bench = _bench(blocks, kind, collector)
    requirements = _requirements(blocks, kind, collector)
    if kind == "design":
        _design_checks(header, parts, bench, circuits[0], collector, complete)
    report_duplicates(models, "model name", collector)
    return Design(
        path=path, kind=kind, header=header, parts=tuple(parts), models=tuple(models),
        bench=bench, requirements=tuple(requirements),
        blocks=tuple(Block(b.tag, b.text, b.fence_line + 1) for b in blocks),
        source=text, warnings=tuple(d for d in collector.items if d.severity == "warning"),
    )


def _header(file_lines: list[str], collector: Collector) -> Header:
    end = header_end(file_lines)
    if end is None:
        return Header()
    if end == -1:
        collector.add(Span(1, 1, 3), "the header opened by '---' on line 1 is never closed",
                      hint="end the header with a line '---'")
        return Header()
    return read_header(file_lines, end, collector)


def _bench(blocks: list[FoundBlock], kind: str, collector: Collector) -> Bench:
    benches = [b for b in blocks if b.tag == "bench"]
    for extra in benches[1:]:
        collector.add(Span(extra.fence_line, 1, 3), "a second bench block",
                      hint="a design has one bench block")
    if benches and kind != "design":
        collector.add(Span(benches[0].fence_line, 1, 3), "a bench block on a page without a "
                      "circuit block is ignored", severity="warning")
    return read_bench(benches[0].lines, collector) if benches else Bench()


def _requirements(blocks: list[FoundBlock], kind: str,
                  collector: Collector) -> list[Requirement]:
    out: list[Requirement] = []
    for block in (b for b in blocks if b.tag == "require"):
        if kind != "design":
            collector.add(Span(block.fence_line, 1, 3), "a require block on a page without a "
                          "circuit block is ignored", severity="warning")
        out.extend(read_require(block.lines, collector))
    return out


def _design_checks(header: Header, parts: list[Part], bench: Bench, circuit: FoundBlock,
                   collector: Collector, complete: bool) -> None:
    if header.title is None:
        collector.add(Span(1, 1), "a design page needs a title",
                      hint="start the file with a header: '---', 'title: ...', '---'")
    fence = Span(circuit.fence_line, 1, 3)
    if not parts and not collector.errors:
        collector.add(fence, "the circuit block has no parts")
    check_wiring(parts, bench, collector, fence, complete)

