"""The review gate's cache: a design's gate result kept under the key of what it reads.

A gate result (:class:`docgen.check.gate.GateResult`) depends only on the design's solve input
and the library models it uses (:func:`docgen.cachekey.design_key`) and on docgen's own code
(:func:`docgen.cachekey.code_fingerprint`), so ``docgen check`` before a commit solves only the
designs that changed since the last check.  The changed-since-approval test reads git and is
never cached.  Entries live under ``<cache>/check/<key>.pickle`` (the same ``.docgen-cache``
folder as the site build's, beside the designs folder); the folder is safe to delete, and a
file that cannot be read counts as missing.
"""

from __future__ import annotations

import pickle
from collections.abc import Mapping
from pathlib import Path
from typing import Any

from docgen.atomic import write_atomically
from docgen.cachekey import code_fingerprint, design_key
from docgen.design import Design, ModelDef


class GateCache:
    """Gate results on disk by design key; ``None`` as the folder turns caching off."""

    def __init__(self, root: Path | None):
        self.folder = Path(root) / "check" if root is not None else None

    def key(self, design: Design, library: Mapping[str, ModelDef]) -> str:
        """The key of ``design``'s gate result."""
        return design_key(design, library, extra=f"check\0{code_fingerprint()}")

    def get(self, key: str) -> Any | None:
        """The stored result for ``key``, or ``None``."""
        if self.folder is None:
            return None
        try:
            with (self.folder / f"{key}.pickle").open("rb") as handle:
                stored = pickle.load(handle)
        except (OSError, pickle.UnpicklingError, EOFError, AttributeError, ImportError,
                ValueError):
            return None
        return stored.get("result") if isinstance(stored, dict) and stored.get("key") == key \
            else None

    def put(self, key: str, result: Any) -> None:
        """Store ``result`` under ``key`` (a temporary file renamed into place)."""
        if self.folder is None:
            return
        data = pickle.dumps({"key": key, "result": result})
        try:
            self.folder.mkdir(parents=True, exist_ok=True)
            write_atomically(self.folder / f"{key}.pickle", data)
        except OSError:
            return  # a read-only checkout still gets its check, just not cached
