"""The content-based cache keys shared by the site build and the history build.

:func:`cache_key` hashes bytes (a design file and its library pages).  :func:`design_key` hashes
only what solving, checking, plotting and drawing a design read (:func:`solve_input`), so an
edit of the notes alone keeps the key: the notes are rendered when the page is published, never
cached with the results.
"""

from __future__ import annotations

import functools
import hashlib
import json
from collections.abc import Iterable, Mapping
from dataclasses import fields, is_dataclass
from pathlib import Path
from typing import Any

from docgen import __version__
from docgen.design import Design, ModelDef

#: Fenced blocks whose text a later stage reads: the reader's own (circuit, models, bench,
#: require) and those read after it (``estimate`` by the check stage, ``layout`` by the drawer).
#: Any other fenced block is part of the notes.  ``tests/test_cachekey.py`` checks that every
#: tag compared in docgen's code is listed here.
SOLVE_BLOCK_TAGS = frozenset({"circuit", "models", "bench", "require", "estimate", "layout"})
#: Design fields left out of :func:`solve_input`: the whole text (notes included; the parts
#: of it that are read go in line by line) and the blocks (filtered, then added as file lines).
_LEFT_OUT = frozenset({"source", "blocks"})
_SELF = "<this design>"


CODE_SUFFIXES = frozenset({".py", ".md", ".json", ".html", ".css", ".js", ".svg"})


@functools.lru_cache(maxsize=1)
def code_fingerprint() -> str:
    """sha256 over docgen's own files, so a result made by other code is never reused.

    The version number alone does not change while docgen is developed between releases; the
    files do.  Hashing the installed package takes milliseconds.
    """
    root = Path(__file__).resolve().parent
    digest = hashlib.sha256()
    for path in sorted(root.rglob("*")):
        if path.suffix in CODE_SUFFIXES and "__pycache__" not in path.parts and path.is_file():
            digest.update(path.relative_to(root).as_posix().encode() + b"\0")
            digest.update(hashlib.sha256(path.read_bytes()).digest())
    return digest.hexdigest()


def cache_key(design_bytes: bytes, library_bytes: Iterable[bytes] = (), extra: str = "") -> str:
    """sha256 over a design file, the library pages it uses (in a stable order) and the version.

    :param design_bytes: the design file's content.
    :param library_bytes: the content of every library page whose models the design uses.
    :param extra: anything else that changes the result (for example build options).
    """
    h = hashlib.sha256()
    h.update(b"docgen " + __version__.encode() + b"\0")
    h.update(extra.encode() + b"\0")
    h.update(hashlib.sha256(design_bytes).digest())
    for lib in sorted(hashlib.sha256(b).digest() for b in library_bytes):
        h.update(lib)
    return h.hexdigest()


def design_key(design: Design, library: Mapping[str, ModelDef], extra: str = "",
               *, with_path: bool = True) -> str:
    """sha256 over :func:`solve_input` of ``design``, docgen's version and ``extra``.

    :param library: the models visible besides the design's own (library pages, built-ins).
    :param extra: anything else that changes the result (docgen's code fingerprint...).
    :param with_path: key on the design's path too (results and diagnostics name it); the
        history leaves it out, as its revisions of one design live under several names.
    """
    h = hashlib.sha256()
    h.update(b"docgen " + __version__.encode() + b"\0")
    h.update(extra.encode() + b"\0")
    h.update(solve_input(design, library, with_path=with_path))
    return h.hexdigest()


def solve_input(design: Design, library: Mapping[str, ModelDef], *,
                with_path: bool = True) -> bytes:
    """A canonical serialisation of everything the solve, check, plot and draw stages read.

    The parsed design without its notes — header, parts, own models, bench, requirements, the
    reader's warnings, every position (results and diagnostics carry line numbers) — plus the
    file lines of the header and of each block in :data:`SOLVE_BLOCK_TAGS` with their line
    numbers (the estimate and layout readers read them; diagnostics point into them), plus each
    model a part uses as it resolves (own models over the library).  Prose outside those blocks
    is not in it.
    """
    self_path = None if with_path else design.path
    data = {
        "design": {f: _plain(getattr(design, f), self_path) for f in _field_names(Design)
                   if f not in _LEFT_OUT},
        "lines": _read_lines(design),
        "models_used": _models_used(design, library, self_path),
    }
    return json.dumps(data, sort_keys=True, ensure_ascii=False, separators=(",", ":"),
                      allow_nan=True).encode("utf-8")


def _read_lines(design: Design) -> list[tuple[int, str]]:
    """(line number, text) of the header and of every block a later stage reads, fences
    included (a diagnostic's column depends on the fence's indentation)."""
    from docgen.reader.header import header_end

    lines = design.source.splitlines()
    end = header_end(lines)
    wanted = set(range(end + 1)) if end is not None and end >= 0 else set()
    for block in design.blocks:
        if block.tag in SOLVE_BLOCK_TAGS:
            fence = block.first_line - 2  # 0-based index of the opening fence
            wanted.update(range(max(0, fence), fence + 1 + len(block.text.splitlines())))
    return [(index + 1, lines[index]) for index in sorted(wanted) if index < len(lines)]


def _models_used(design: Design, library: Mapping[str, ModelDef],
                 self_path: str | None) -> list[Any]:
    """Each model a part names, as elaboration resolves it; with the names on offer when one
    is missing (the diagnostic's hint lists close names)."""
    own = {m.name: m for m in design.models}
    out: list[Any] = []
    missing = False
    for name in sorted({p.model for p in design.parts if p.model is not None}):
        model = own.get(name) or library.get(name)
        missing = missing or model is None
        plain = _plain(model, self_path)
        if self_path is not None and model is not None and model.source != self_path:
            # the library page's path as the reader was given it differs between the build
            # and the history (absolute or relative to the repository); no result names it
            plain[1][_field_names(ModelDef).index("source")] = "<library page>"
        out.append([name, plain])
    if missing:
        out.append(sorted(f"{m.kind}:{m.name}" for m in library.values()))
    return out


_FIELDS: dict[type, tuple[str, ...]] = {}


def _field_names(kind: type) -> tuple[str, ...]:
    names = _FIELDS.get(kind)
    if names is None:
        names = _FIELDS[kind] = tuple(f.name for f in fields(kind))
    return names


_SCALARS = (type(None), bool, int, float)


def _plain(value: Any, self_path: str | None) -> Any:
    """Plain JSON data for a Design value: dataclasses by type and field, mappings sorted."""
    kind = type(value)
    if kind in _SCALARS:
        return value
    if kind is str:
        return _SELF if self_path is not None and value == self_path else value
    names = _FIELDS.get(kind)
    if names is not None or is_dataclass(value):
        return [kind.__name__, [_plain(getattr(value, f), self_path)
                                for f in names or _field_names(kind)]]
    if isinstance(value, Mapping):
        return [[str(k), _plain(v, self_path)] for k, v in sorted(value.items())]
    if isinstance(value, (tuple, list)):
        return [_plain(item, self_path) for item in value]
    raise TypeError(f"cannot key a {kind.__name__}")
