"""The per-revision results cache: a revision's results are computed once, ever.

Results are stored under ``.docgen-cache/history/`` (the build's cache folder), one JSON file
per cache key (:func:`docgen.history.snapshot.content_key`: what solving the design reads — its
parsed content without the notes — the library models it uses, docgen's version and the
fingerprint of its files).  Because the key is a hash
of content, a file is never stale: an entry is either right or never looked up again.  The
folder survives builds, is ignored by git (it writes its own ``.gitignore``) and is safe to
delete at any time; the next build just solves again.

A folder of ``None`` keeps results in memory only (the site build with caching turned off).
"""

from __future__ import annotations

import json
from pathlib import Path
from typing import Any

from docgen.atomic import write_atomically

CACHE_DIR = ".docgen-cache"
_IGNORE = "# written by docgen: everything here is a cache, safe to delete\n*\n"


class ResultsCache:
    """Results dicts stored by cache key, with counts of hits and writes for this session."""

    def __init__(self, folder: Path | None):
        self.folder = Path(folder) / "history" if folder is not None else None
        self.memory: dict[str, dict[str, Any]] = {}  # results seen in this process
        self.hits = 0
        self.stores = 0

    @classmethod
    def for_repo(cls, root: Path) -> ResultsCache:
        """The cache beside a designs folder at the top of the work tree ``root``."""
        return cls(Path(root) / CACHE_DIR)

    def _file(self, kind: str, key: str) -> Path:
        assert self.folder is not None
        return self.folder / kind / key[:2] / f"{key}.json"

    def get(self, key: str) -> dict[str, Any] | None:
        """The results stored under ``key``, or ``None`` (an unreadable entry counts as none)."""
        data = self.memory.get(key)
        if data is None and self.folder is not None:
            data = self._read(self._file("results", key))
        if data is not None:
            self.memory[key] = data
            self.hits += 1
        return data

    def put(self, key: str, results: dict[str, Any], *, store: bool = True) -> None:
        """Keep ``results`` under ``key``; with ``store``, also on disk (atomically: a reader
        never sees half a file).  ``store=False`` seeds results computed elsewhere (the site
        build's own cache already holds them)."""
        self.memory[key] = results
        if store and self.folder is not None:
            self._write(self._file("results", key), results)
            self.stores += 1

    def figure(self, key: str) -> str | None:
        """A figure (SVG text) stored under ``key``, or ``None``."""
        if self.folder is None:
            return None
        data = self._read(self._file("figures", key))
        return data.get("svg") if data is not None else None

    def git_answers(self, commit: str) -> dict[str, Any] | None:
        """What git answered about the history up to ``commit`` (logs, commit order), as
        :meth:`docgen.history.git.Repo.keep_answers` saved it, or ``None``."""
        return self._read(self._file("git", commit)) if self.folder is not None else None

    def put_git_answers(self, commit: str, answers: dict[str, Any]) -> None:
        """Save git's answers about the history up to ``commit`` (they never change)."""
        if self.folder is not None:
            self._write(self._file("git", commit), answers)

    def page_memo(self, key: str) -> dict[str, Any] | None:
        """A design's history as its pages last showed it (see
        :func:`docgen.history.site.provide`), or ``None``."""
        return self._read(self._file("pages", key)) if self.folder is not None else None

    def put_page_memo(self, key: str, memo: dict[str, Any]) -> None:
        """Keep a design's history under the key of everything it was made from."""
        if self.folder is not None:
            self._write(self._file("pages", key), memo)

    def put_figure(self, key: str, svg: str) -> None:
        """Store a figure drawn from content that ``key`` hashes."""
        if self.folder is not None:
            self._write(self._file("figures", key), {"svg": svg})

    @staticmethod
    def _read(path: Path) -> dict[str, Any] | None:
        try:
            with path.open(encoding="utf-8") as handle:
                data = json.load(handle)
        except (OSError, ValueError):
            return None
        return data if isinstance(data, dict) else None

    def _write(self, path: Path, data: dict[str, Any]) -> None:
        path.parent.mkdir(parents=True, exist_ok=True)
        _ensure_ignored(self.folder.parent if self.folder else path.parent)
        text = json.dumps(data, sort_keys=True, ensure_ascii=False, allow_nan=True)
        write_atomically(path, text.encode("utf-8"))


def _ensure_ignored(folder: Path) -> None:
    """Give the cache folder its own ``.gitignore`` so it never shows up in ``git status``."""
    marker = folder / ".gitignore"
    if not marker.exists():
        folder.mkdir(parents=True, exist_ok=True)
        marker.write_text(_IGNORE, encoding="utf-8")
