"""One design as it was at one revision (or in the work tree), and its results, solved once.

A snapshot reads every page of the designs folder at that revision with the same reader and
library lookup as the site build (:func:`docgen.record.load_texts`), so a revision's results are
exactly what the build would have published then.  Results are cached by content
(:mod:`docgen.history.cache`); :class:`RevisionSolver` counts how many it actually solved.
"""

from __future__ import annotations

from collections.abc import Callable, Iterable, Mapping
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path
from typing import Any

from docgen.cachekey import cache_key, design_key
from docgen.design import Design, ModelDef
from docgen.diagnostics import Diagnostic, DocgenError
from docgen.history.cache import CACHE_DIR, ResultsCache
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
    library_texts: tuple[tuple[str, str], ...] = ()  # (path, text) of each page in ``uses``


class Tree:
    """Every page of the designs folder at one revision (or in the work tree), read once.

    :param rev: a full commit id, or ``None`` for the work tree.
    :param designs_root: the designs folder (relative to the repository root) whose library
        pages the designs may use.
    """

    def __init__(self, repo: Repo, rev: str | None, designs_root: str):
        self.repo, self.rev, self.designs_root = repo, rev, designs_root
        self.label = WORK_TREE if rev is None else rev[:10]
        self.texts = _texts_at(repo, rev, designs_root)
        self._record: Any = None

    @property
    def record(self) -> Any:
        """The :class:`docgen.record.Record` of these pages (read on first use)."""
        if self._record is None:
            from docgen.record import load_texts

            decoded = {p: data.decode("utf-8", "replace") for p, data in self.texts.items()}
            self._record = load_texts(self.designs_root, decoded, read=read_page)
        return self._record

    def design_paths(self) -> list[str]:
        """The design pages of this tree (read cleanly or not), sorted."""
        record = self.record
        good = {p.path for p in record.pages if p.kind == "design"}
        broken = {p for p in record.diagnostics if record.has_errors(p)}
        return sorted(good | {p for p in broken if _has_circuit(self._text(p))})

    def _text(self, path: str) -> str:
        return self.texts.get(path, b"").decode("utf-8", "replace")

    def snapshot(self, path: str) -> Snapshot:
        """The design at ``path`` in this tree."""
        if path not in self.texts:  # a design kept outside the designs folder
            extra = _read(self.repo, self.rev, [path])
            if not extra:
                return Snapshot(self.label, self.rev, path, None, {}, (), None, (), "")
            self.texts.update(extra)
            self._record = None
        record = self.record
        diagnostics = tuple(record.diagnostics.get(path, ()))
        source = self._text(path)
        try:
            design = None if record.has_errors(path) else record.page(path)
        except KeyError:
            design = None
        if design is None:
            return Snapshot(self.label, self.rev, path, None, {}, (), None, diagnostics, source)
        uses = tuple(record.uses.get(path, ()))
        key = _key_of(self.texts[path], [self.texts[p] for p in uses], design, record.library)
        return Snapshot(self.label, self.rev, path, design, record.library, uses, key,
                        diagnostics, source, tuple((p, self._text(p)) for p in uses))


def _key_of(text: bytes, library_texts: list[bytes], design: Design,
            library: Mapping[str, ModelDef]) -> str:
    """:func:`content_key`, remembered by the bytes it was made from (a page's text repeats
    across revisions; hashing bytes is cheaper than serialising the design again)."""
    seen = cache_key(text, library_texts, extra=design.path)
    key = _KEYS.get(seen)
    if key is None:
        key = _KEYS[seen] = content_key(design, library)
    return key


_KEYS: dict[str, str] = {}


@lru_cache(maxsize=4096)
def _read_page(text: str, path: str) -> Design | DocgenError:
    from docgen.reader import read_text

    try:
        return read_text(text, path)
    except DocgenError as exc:
        return exc


def read_page(text: str, path: str) -> Design:
    """:func:`docgen.reader.read_text`, remembered: a page's text repeats across revisions and
    a Design is immutable, so each distinct (text, path) is read once per process."""
    found = _read_page(text, path)
    if isinstance(found, DocgenError):
        raise type(found)(found.diagnostics)  # a fresh error each time (no growing traceback)
    return found


def content_key(design: Design, library: Mapping[str, ModelDef]) -> str:
    """The results cache key: what solving the design reads (:func:`docgen.cachekey.design_key`,
    without the path: one design's revisions live under several names; the notes are not in
    it, so a commit that changed only prose is not solved again) and docgen itself (its version
    and the fingerprint of its files, as the site build's cache uses: results made by other
    code are never reused)."""
    from docgen.cachekey import code_fingerprint

    return design_key(design, library, extra=f"history\0{code_fingerprint()}", with_path=False)


def _has_circuit(text: str) -> bool:
    """True for a page with a ``circuit`` block (a design page, even one that fails to read)."""
    from docgen.reader import find_blocks

    return any(b.tag == "circuit" for b in find_blocks(text.splitlines(), text))


def tree(repo: Repo, rev: str | None, designs_root: str) -> Tree:
    """The :class:`Tree` at ``rev``; trees of commits are kept for the process (they never
    change), so a commit shared by several designs' histories is read once."""
    if rev is None:
        return Tree(repo, None, designs_root)
    key = (str(repo.root), rev, designs_root)
    found = _TREES.get(key)
    if found is None:
        found = _TREES[key] = Tree(repo, rev, designs_root)
        while len(_TREES) > _TREES_KEPT:
            _TREES.pop(next(iter(_TREES)))
    return found


_TREES: dict[tuple[str, str, str], Tree] = {}
_TREES_KEPT = 256


def snapshot(repo: Repo, rev: str | None, path: str, designs_root: str) -> Snapshot:
    """Read the design at ``path`` as it was at ``rev`` (``None``: as it is in the work tree)."""
    return tree(repo, rev, designs_root).snapshot(path)


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
        results, trustworthy = self._solve(snap.design, snap.library)
        if trustworthy:
            self.cache.put(snap.key, results)
        return results

    def prefetch(self, snaps: Iterable[Snapshot], jobs: int = 1) -> None:
        """Solve every snapshot whose content is not cached yet, ``jobs`` processes at a time.

        Only worth it for many new revisions (a first build); with one job, a custom ``solve``
        or fewer than two to do, the revisions are solved here in turn.
        """
        todo: dict[str, Snapshot] = {}
        for snap in snaps:
            if snap.design is not None and snap.key is not None and snap.key not in todo \
                    and self.cache.get(snap.key) is None:
                todo[snap.key] = snap
        if jobs <= 1 or len(todo) < 2 or self.solve is not None:
            for snap in todo.values():
                self.results(snap)
            return
        from docgen.history.workers import worker_pool

        keys = sorted(todo)
        work = [(todo[k].path, todo[k].source, todo[k].library_texts) for k in keys]
        with worker_pool(jobs, len(todo), _preload_pipeline) as pool:
            assert pool is not None
            # a few revisions per round trip: each solve is tens of milliseconds
            solved = pool.map(_solve_texts, work, chunksize=max(1, min(8, len(work) // (4 * jobs))))
            for key, (results, trustworthy) in zip(keys, solved, strict=True):
                self.solved += 1
                if trustworthy:
                    self.cache.put(key, results)

    def _solve(self, design: Design, library: Mapping[str, ModelDef]
               ) -> tuple[dict[str, Any], bool]:
        """Results and whether they may be cached (not after an internal error)."""
        from docgen.pipeline import design_summary, run
        from docgen.units import round_results

        self.solved += 1
        base = {"schema": "docgen-results/1", "design": design_summary(design)}
        try:
            if self.solve is not None:
                return round_results(self.solve(design, library)), True
            return round_results(run(design, library, only=history_sections(design))), True
        except DocgenError as exc:  # the circuit cannot be solved as drawn at this revision
            errors = [{"analysis": "elaborate", **d.to_json()} for d in exc.diagnostics]
            return {**base, "errors": errors}, True
        except Exception as exc:  # noqa: BLE001 - one old revision must not lose the history
            message = (f"internal error while solving this revision: {type(exc).__name__}: "
                       f"{exc} (please report it)")
            errors = [{"analysis": "solve", "path": design.path, "line": 1, "col": 1,
                       "severity": "error", "message": message, "hint": None}]
            return {**base, "errors": errors}, False


def history_sections(design: Design) -> frozenset[str]:
    """The analyses an old revision needs: what its requirements read (so every verdict in the
    row is real) plus the small-signal headline figures.  The large-signal swing search and the
    board spread run only where a requirement asks for them: they cost seconds per revision,
    and a history has many revisions."""
    from docgen.check.gate import sections_for

    return sections_for(design) | HEADLINE_SECTIONS


HEADLINE_SECTIONS = frozenset({"op", "ac", "noise"})


def _preload_pipeline() -> None:
    """Import the reader and the analyses once in the parent rather than once in every
    worker."""
    import contextlib
    import importlib

    from docgen.pipeline import ANALYSES

    for module in ("docgen.record", "docgen.elaborate", *(t.split(":")[0] for _, t in ANALYSES)):
        with contextlib.suppress(ModuleNotFoundError):
            importlib.import_module(module)


def _solve_texts(work: tuple[str, str, tuple[tuple[str, str], ...]]
                 ) -> tuple[dict[str, Any], bool]:
    return solve_texts(*work)


def solve_texts(path: str, source: str, library_texts: tuple[tuple[str, str], ...]
                ) -> tuple[dict[str, Any], bool]:
    """Read and solve one revision from its texts (in a worker process); see
    :meth:`RevisionSolver.prefetch`.  The pages it uses resolve its models exactly as the whole
    folder would (a model comes from the page that owns it, else the built-ins)."""
    from docgen.record import load_texts

    record = load_texts("", {path: source, **dict(library_texts)}, read=read_page)
    solver = RevisionSolver(ResultsCache(None))
    solver.solved -= 1  # counted by the caller
    return solver._solve(record.page(path), record.library)


def unreadable_results(snap: Snapshot) -> dict[str, Any]:
    """A results dict for a revision whose design file had input errors (or was missing)."""
    errors = [{"analysis": "read", **d.to_json()} for d in snap.diagnostics
              if d.severity == "error"]
    if not errors:
        errors = [{"analysis": "read", "path": snap.path, "line": 1, "col": 1,
                   "severity": "error", "message": "the design file is not there at this "
                   "revision", "hint": None}]
    return {"schema": "docgen-results/1", "design": None, "errors": errors}


def open_repo(designs: str | Path) -> tuple[Repo | None, str]:
    """The repository holding the designs folder ``designs`` (as the user typed it) and that
    folder relative to the repository root (``designs`` as given when outside git)."""
    repo = Repo.find(Path(designs))
    if repo is None:
        return None, Path(designs).as_posix()
    try:
        return repo, repo.relative(designs)
    except ValueError:
        return repo, Path(designs).as_posix()


def solver_for(repo: Repo, designs_root: str) -> RevisionSolver:
    """The solver backed by the cache folder ``docgen build`` uses for these designs (beside the
    designs folder), so the terminal and the site share their results."""
    return RevisionSolver(ResultsCache((repo.root / designs_root).parent / CACHE_DIR))
