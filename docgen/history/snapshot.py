"""One design as it was at one revision (or in the work tree), and its results, solved once.

A snapshot reads every page of the designs folder at that revision with the same reader and
library lookup as the site build (:func:`docgen.record.load_texts`), so a revision's results are
exactly what the build would have published then.  Results are cached by content
(:mod:`docgen.history.cache`); :class:`RevisionSolver` counts how many it actually solved.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from docgen.cachekey import cache_key
from docgen.design import Design, ModelDef
from docgen.diagnostics import Diagnostic, DocgenError
from docgen.history.cache import ResultsCache
from docgen.history.git import Repo

WORK_TREE = "work tree"

Solve = Callable[[Design, Mapping[str, ModelDef]], dict[str, Any]]


@dataclass(frozen=True)
class Snapshot:
    """A design at one revision.

    :param label: the short commit id, or ``"work tree"``.
    :param rev: the full commit id (``None`` for the work tree).
    :param path: the design file's path then, relative to the repository root.
    :param design: the design read, or ``None`` if it has input errors (see ``diagnostics``).
    :param library: the models visible to the design besides its own.
    :param uses: the library pages whose models it uses.
    :param key: the content cache key (``None`` when the design could not be read).
    """

    label: str
    rev: str | None
    path: str
    design: Design | None
    library: Mapping[str, ModelDef]
    uses: tuple[str, ...]
    key: str | None
    diagnostics: tuple[Diagnostic, ...]
    source: str


def snapshot(repo: Repo, rev: str | None, path: str, designs_root: str) -> Snapshot:
    """Read the design at ``path`` as it was at ``rev`` (``None``: as it is in the work tree).

    :param designs_root: the designs folder (relative to the repository root) whose library
        pages the design may use.
    """
    texts = _texts_at(repo, rev, designs_root)
    if path not in texts:  # a design kept outside the designs folder
        texts.update(_read(repo, rev, [path]))
    label = WORK_TREE if rev is None else rev[:10]
    if path not in texts:
        return Snapshot(label, rev, path, None, {}, (), None, (), "")
    from docgen.record import load_texts

    decoded = {p: data.decode("utf-8", "replace") for p, data in texts.items()}
    record = load_texts(designs_root, decoded)
    diagnostics = tuple(record.diagnostics.get(path, ()))
    try:
        design = record.page(path)
    except KeyError:
        design = None
    if design is None or record.has_errors(path):
        return Snapshot(label, rev, path, None, {}, (), None, diagnostics, decoded[path])
    uses = tuple(record.uses.get(path, ()))
    key = cache_key(texts[path], [texts[p] for p in uses])
    return Snapshot(label, rev, path, design, record.library, uses, key, diagnostics,
                    decoded[path])


def _texts_at(repo: Repo, rev: str | None, folder: str) -> dict[str, bytes]:
    if rev is None:
        base = repo.root / folder
        files = sorted(base.rglob("*.md")) if base.is_dir() else []
        return {f.relative_to(repo.root).as_posix(): f.read_bytes() for f in files if f.is_file()}
    return repo.read_many(rev, [p for p in repo.files(rev, folder) if p.endswith(".md")])


def _read(repo: Repo, rev: str | None, paths: list[str]) -> dict[str, bytes]:
    if rev is None:
        return {p: (repo.root / p).read_bytes() for p in paths if (repo.root / p).is_file()}
    return repo.read_many(rev, paths)


class RevisionSolver:
    """Results of snapshots through the pipeline, each content solved at most once, ever.

    :param solve: the pipeline (default :func:`docgen.pipeline.run`); tests pass a counting
        wrapper to prove a rebuild solves nothing.
    """

    def __init__(self, cache: ResultsCache, solve: Solve | None = None):
        self.cache = cache
        self.solve = solve
        self.solved = 0

    def results(self, snap: Snapshot) -> dict[str, Any]:
        """The results dict of ``snap`` (from the cache when its content was seen before)."""
        if snap.design is None or snap.key is None:
            return unreadable_results(snap)
        cached = self.cache.get(snap.key)
        if cached is not None:
            return cached
        results = self._solve(snap.design, snap.library)
        self.cache.put(snap.key, results)
        return results

    def _solve(self, design: Design, library: Mapping[str, ModelDef]) -> dict[str, Any]:
        from docgen.pipeline import design_summary, run
        from docgen.units import round_results

        self.solved += 1
        try:
            results = (self.solve or run)(design, library)
        except DocgenError as exc:  # the circuit cannot be solved as drawn at this revision
            results = {"schema": "docgen-results/1", "design": design_summary(design),
                       "errors": [{"analysis": "elaborate", **d.to_json()}
                                  for d in exc.diagnostics]}
        return round_results(results)


def unreadable_results(snap: Snapshot) -> dict[str, Any]:
    """A results dict for a revision whose design file had input errors (or was missing)."""
    errors = [{"analysis": "read", **d.to_json()} for d in snap.diagnostics
              if d.severity == "error"]
    if not errors:
        errors = [{"analysis": "read", "path": snap.path, "line": 1, "col": 1,
                   "severity": "error", "message": "the design file is not there at this "
                   "revision", "hint": None}]
    return {"schema": "docgen-results/1", "design": None, "errors": errors}


def repo_path(repo: Repo, path: str | Path) -> str:
    """``path`` (as the user typed it, relative to the current folder) relative to the repo."""
    return repo.relative(path)
