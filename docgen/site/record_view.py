"""The record as the site build sees it: every page by its path inside the designs folder.

A thin view over :func:`docgen.record.load_record`: per page its design (or ``None`` when it
could not be read), its diagnostics, its bytes and the bytes of the library pages it uses (for
the cache key).
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from pathlib import Path

from docgen.design import Design, ModelDef
from docgen.diagnostics import Diagnostic


@dataclass
class PageEntry:
    """One Markdown file of the record.

    :param source_rel: POSIX path relative to the designs folder (``frontend/ce.md``).
    :param path: the path diagnostics name (as the reader gives it).
    :param kind: ``design``, ``library``, ``note``, or ``unreadable``.
    """

    source_rel: str
    path: str
    kind: str
    design: Design | None
    diagnostics: list[Diagnostic]
    source: bytes
    library_bytes: list[bytes] = field(default_factory=list)

    @property
    def has_errors(self) -> bool:
        """True when reading found an error (the page cannot be solved)."""
        return any(d.severity == "error" for d in self.diagnostics)


@dataclass
class RecordView:
    """All pages by ``source_rel`` (sorted), the model library, and record-wide diagnostics."""

    root: Path
    entries: dict[str, PageEntry]
    library: Mapping[str, ModelDef]
    diagnostics: list[Diagnostic] = field(default_factory=list)

    def models_for(self, design: Design) -> dict[str, ModelDef]:
        """The models visible to ``design``: its own over the library (the lookup order)."""
        return {**self.library, **{m.name: m for m in design.models}}


def read_record(root: Path) -> RecordView:
    """Load the record under ``root`` and index it for the build."""
    from docgen.record import load_record, page_files

    record = load_record(root)
    designs = {page.path: page for page in record.pages}
    entries: dict[str, PageEntry] = {}
    for file in page_files(root):
        path = file.as_posix()
        rel = file.relative_to(root).as_posix() if file != Path(root) else file.name
        design = designs.get(path)
        source = file.read_bytes()
        libraries = [Path(p).read_bytes() for p in record.uses.get(path, ())]
        entries[rel] = PageEntry(rel, path, design.kind if design else "unreadable", design,
                                 list(record.diagnostics.get(path, ())), source, libraries)
    known = set(designs) | {e.path for e in entries.values()}
    elsewhere = [d for path, items in sorted(record.diagnostics.items()) if path not in known
                 for d in items]
    return RecordView(Path(root), entries, record.library, elsewhere)
