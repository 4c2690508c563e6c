"""The record: every page under a folder, read, with the device-model library resolved.

One bad file never stops the rest: each file's diagnostics are kept by path.  Models are looked
up in the design's own ``models`` blocks, then the library pages, then the built-in page
(``docgen/builtin/generic.md``).  The record also says which library pages each design uses,
for the content-based cache key.
"""

from __future__ import annotations

import posixpath
from collections.abc import Callable, Iterable, Iterator, Mapping
from dataclasses import dataclass, field
from functools import lru_cache, partial
from importlib import resources
from pathlib import Path

from docgen.design import Design, ModelDef, frozen_map
from docgen.diagnostics import Collector, Diagnostic, DocgenError, Span, did_you_mean
from docgen.kinds import KINDS
from docgen.reader import page_blocks, read_file, read_text
from docgen.reader.common import article

BUILTIN = "<built-in>"


@dataclass(frozen=True)
class Record:
    """Every page read from a folder.

    :param root: the folder (or file) as given.
    :param pages: every page that read without errors, sorted by path.
    :param diagnostics: path -> every diagnostic of that file (errors and warnings), for
        each file that has any.
    :param library: model name -> model, from library pages then built-ins (a library page's
        model shadows a built-in of the same name).
    :param uses: design path -> the library page paths whose models it uses.
    """

    root: str
    pages: tuple[Design, ...]
    diagnostics: Mapping[str, tuple[Diagnostic, ...]]
    library: Mapping[str, ModelDef]
    uses: Mapping[str, tuple[str, ...]] = field(default_factory=frozen_map)

    @property
    def designs(self) -> tuple[Design, ...]:
        """The design pages without input errors (ready to solve)."""
        return tuple(p for p in self.pages if p.kind == "design" and not self.has_errors(p.path))

    def has_errors(self, path: str) -> bool:
        """True if the file at ``path`` has an error-level diagnostic."""
        return any(d.severity == "error" for d in self.diagnostics.get(path, ()))

    @property
    def all_diagnostics(self) -> tuple[Diagnostic, ...]:
        """Every diagnostic of every file, by path then position."""
        return tuple(d for path in sorted(self.diagnostics) for d in self.diagnostics[path])

    def models_for(self, design: Design) -> dict[str, ModelDef]:
        """The models visible to ``design``: its own over the library (lookup order)."""
        visible = dict(self.library)
        visible.update({m.name: m for m in design.models})
        return visible

    def page(self, path: str) -> Design:
        """The page read from ``path`` (``KeyError`` if none read cleanly)."""
        for p in self.pages:
            if p.path == path:
                return p
        raise KeyError(path)


@lru_cache(maxsize=1)
def builtin_page() -> Design:
    """docgen's own library page of generic models (read once per process: a Design is
    immutable, and the history reads a record at every revision)."""
    text = resources.files("docgen").joinpath("builtin/generic.md").read_text(encoding="utf-8")
    return read_text(text, BUILTIN)


def page_files(root: str | Path) -> list[Path]:
    """Every ``*.md`` file under ``root`` (any depth, sorted), or ``root`` itself if a file."""
    base = Path(root)
    if base.is_file():
        return [base]
    return sorted(p for p in base.rglob("*.md") if p.is_file())


def load_record(root: str | Path, library_roots: Iterable[str | Path] = ()) -> Record:
    """Read every page under ``root``; library pages under ``library_roots`` are added.

    ``library_roots`` lets a single design file see the team's library pages kept elsewhere.
    """
    files = page_files(root)
    extra = sorted({f for r in library_roots for f in page_files(r)} - set(files))
    extra = [f for f in extra if _declares_models(f)]  # other pages there are not ours to judge
    pages, diagnostics = _read_all(_file_readers(files))
    extra_pages, extra_diagnostics = _read_all(_file_readers(extra))
    for path, items in extra_diagnostics.items():  # broken library pages still get reported
        diagnostics.setdefault(path, items)
    return _assemble(str(root), pages, extra_pages, diagnostics)


def _declares_models(path: Path) -> bool:
    """True if the page has a ``models`` block: only such pages can lend models to a design."""
    try:
        text = path.read_text(encoding="utf-8", errors="replace")
    except OSError:
        return False
    return any(block.tag == "models" for block in page_blocks(text))


def load_texts(root: str, texts: Mapping[str, str],
               read: Callable[[str, str], Design] = read_text) -> Record:
    """A record from page texts keyed by path, read exactly as :func:`load_record` reads files.

    For pages that are not files on disk, such as a folder at a git revision (the history).
    ``read`` may be a memoised :func:`docgen.reader.read_text` (pages repeat across revisions).
    """
    readers = ((path, partial(read, texts[path], path)) for path in sorted(texts))
    pages, diagnostics = _read_all(readers)
    return _assemble(root, pages, [], diagnostics)


def _assemble(root: str, pages: list[Design], extra_pages: list[Design],
              diagnostics: dict[str, tuple[Diagnostic, ...]]) -> Record:
    libraries = [p for p in pages + extra_pages if p.kind == "library"]
    library, owners = _library(libraries, diagnostics)
    uses = {}
    for design in (p for p in pages if p.kind == "design"):
        uses[design.path] = _check_models(design, library, owners, diagnostics)
    _check_replacements(pages, diagnostics)
    return Record(root, tuple(pages), frozen_map(diagnostics), frozen_map(library),
                  frozen_map(uses))


def _file_readers(files: list[Path]) -> Iterator[tuple[str, Callable[[], Design]]]:
    return ((path.as_posix(), partial(read_file, path.as_posix())) for path in files)


def _read_all(readers: Iterable[tuple[str, Callable[[], Design]]]
              ) -> tuple[list[Design], dict[str, tuple[Diagnostic, ...]]]:
    pages: list[Design] = []
    diagnostics: dict[str, tuple[Diagnostic, ...]] = {}
    for path, read in readers:
        try:
            page = read()
        except DocgenError as exc:
            diagnostics[path] = exc.diagnostics
            continue
        pages.append(page)
        if page.warnings:
            diagnostics[page.path] = page.warnings
    return pages, diagnostics


def _library(pages: list[Design], diagnostics: dict[str, tuple[Diagnostic, ...]]
             ) -> tuple[dict[str, ModelDef], dict[str, str]]:
    """Models of the library pages over the built-ins; duplicates across pages reported."""
    library = {m.name: m for m in builtin_page().models}
    owners: dict[str, str] = {}
    for page in pages:
        collector = Collector(page.path, page.source.splitlines())
        for model in page.models:
            if model.name in owners:
                collector.add(model.span, f"model '{model.name}' is also defined in "
                              f"{owners[model.name]}", hint="give one of them another name")
                continue
            owners[model.name] = page.path
            library[model.name] = model
        _merge(diagnostics, page.path, collector.items)
    return library, owners


def _check_models(design: Design, library: Mapping[str, ModelDef], owners: Mapping[str, str],
                  diagnostics: dict[str, tuple[Diagnostic, ...]]) -> tuple[str, ...]:
    """Report unknown or wrong-kind models; return the library pages the design uses."""
    collector = Collector(design.path, design.source.splitlines())
    own = {m.name: m for m in design.models}
    used: set[str] = set()
    for part in design.parts:
        if part.model is None:
            continue
        span = part.spans.get("model", part.span)
        model = own.get(part.model) or library.get(part.model)
        wanted = KINDS[part.kind].model_kind
        fitting = [n for n, m in {**library, **own}.items() if m.kind == wanted]
        if model is None:
            collector.add(span, f"unknown model '{part.model}'",
                          hint=did_you_mean(part.model, fitting)
                          or did_you_mean(part.model, [*own, *library])
                          or "define it in a models block or a library page")
            continue
        if model.kind != wanted:
            collector.add(span, f"model '{part.model}' is {article(model.kind)} model, but "
                          f"{part.name} is {article(part.kind)}",
                          hint=did_you_mean(part.model, fitting))
            continue
        if part.model not in own and part.model in owners:
            used.add(owners[part.model])
    _merge(diagnostics, design.path, collector.items)
    return tuple(sorted(used))


def _check_replacements(pages: list[Design],
                        diagnostics: dict[str, tuple[Diagnostic, ...]]) -> None:
    """Warn where ``replaced-by`` names no page of the record (relative to the page's folder)."""
    paths = {p.path for p in pages} | set(diagnostics)
    for page in pages:
        target = page.header.replaced_by
        if target is None:
            continue
        resolved = posixpath.normpath(posixpath.join(posixpath.dirname(page.path), target))
        if resolved in paths:
            continue
        collector = Collector(page.path, page.source.splitlines())
        names = [posixpath.relpath(p, posixpath.dirname(page.path) or ".") for p in paths]
        collector.add(page.header.spans.get("replaced-by", Span(1, 1)),
                      f"replaced-by names no page of the record: '{target}'",
                      hint=did_you_mean(target, names), severity="warning")
        _merge(diagnostics, page.path, collector.items)


def _merge(diagnostics: dict[str, tuple[Diagnostic, ...]], path: str,
           items: list[Diagnostic]) -> None:
    if items:
        combined = (*diagnostics.get(path, ()), *items)
        diagnostics[path] = tuple(sorted(combined, key=lambda d: (d.line, d.col)))
