"""The per-revision results cache: a revision's results are computed once, ever.

Results are stored under ``.docgen-cache/history/`` at the repository root, one JSON file per
cache key (:func:`docgen.cachekey.cache_key`: the design file's bytes, the library pages it uses,
docgen's version).  Because the key is a hash of content, a file is never stale: an entry is
either right or never looked up again.  The folder survives builds, is ignored by git (it writes
its own ``.gitignore``) and is safe to delete at any time; the next build just solves again.

A second, smaller table maps git object ids (the design file's blob, the designs folder's tree)
to the cache key, so a rebuild does not even need to read a revision it has seen before.
"""

from __future__ import annotations

import json
import os
import tempfile
from pathlib import Path
from typing import Any

CACHE_DIR = ".docgen-cache"
_IGNORE = "# written by docgen: everything here is a cache, safe to delete\n*\n"


class ResultsCache:
    """Results dicts stored by cache key, with counts of hits and writes for this session."""

    def __init__(self, folder: Path):
        self.folder = Path(folder) / "history"
        self.hits = 0
        self.stores = 0

    @classmethod
    def for_repo(cls, root: Path) -> ResultsCache:
        """The cache of the repository whose work tree is at ``root``."""
        return cls(Path(root) / CACHE_DIR)

    def _file(self, kind: str, key: str) -> Path:
        return self.folder / kind / key[:2] / f"{key}.json"

    def get(self, key: str) -> dict[str, Any] | None:
        """The results stored under ``key``, or ``None`` (an unreadable entry counts as none)."""
        data = self._read(self._file("results", key))
        if data is not None:
            self.hits += 1
        return data

    def put(self, key: str, results: dict[str, Any]) -> None:
        """Store ``results`` under ``key`` (atomically: a reader never sees half a file)."""
        self._write(self._file("results", key), results)
        self.stores += 1

    def key_for(self, ids: str) -> str | None:
        """The cache key remembered for a combination of git object ids, if any."""
        data = self._read(self._file("keys", ids))
        return data.get("key") if isinstance(data, dict) else None

    def remember_key(self, ids: str, key: str) -> None:
        """Remember that the git objects ``ids`` give the cache key ``key``."""
        self._write(self._file("keys", ids), {"key": key})

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
        _ensure_ignored(self.folder.parent)
        text = json.dumps(data, sort_keys=True, ensure_ascii=False, allow_nan=True)
        fd, tmp = tempfile.mkstemp(dir=path.parent, prefix=".tmp-", suffix=".json")
        try:
            with os.fdopen(fd, "w", encoding="utf-8") as handle:
                handle.write(text)
            os.replace(tmp, path)
        except BaseException:
            Path(tmp).unlink(missing_ok=True)
            raise


def _ensure_ignored(folder: Path) -> None:
    """Give the cache folder its own ``.gitignore`` so it never shows up in ``git status``."""
    marker = folder / ".gitignore"
    if not marker.exists():
        folder.mkdir(parents=True, exist_ok=True)
        marker.write_text(_IGNORE, encoding="utf-8")
