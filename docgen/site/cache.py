"""The build's incremental cache: one JSON bundle per design, keyed by content.

A bundle holds everything slow to make for one design — its results, its figures and its
schematic — and is stored under ``<cache>/site/<key>.json`` where the key comes from
:func:`docgen.cachekey.design_key` (what solving, plotting and drawing the design read: not its
notes, which are rendered at publish time; the library models it uses; docgen's version) with
the path as given and :func:`code_fingerprint` as its extra part.
The folder is safe to delete at any time; entries are written atomically so a killed build
never leaves a half-written bundle behind.
"""

from __future__ import annotations

import json
from pathlib import Path
from typing import Any

from docgen.atomic import write_atomically

Bundle = dict[str, Any]


class BundleCache:
    """Bundles on disk by key; ``None`` root disables caching."""

    def __init__(self, root: Path | None):
        self.folder = Path(root) / "site" if root is not None else None

    def get(self, key: str) -> Bundle | None:
        """The bundle stored for ``key``, or ``None`` (missing or unreadable)."""
        if self.folder is None:
            return None
        path = self.folder / f"{key}.json"
        try:
            with path.open(encoding="utf-8") as handle:
                bundle = json.load(handle)
        except (OSError, ValueError):
            return None
        return bundle if isinstance(bundle, dict) and bundle.get("key") == key else None

    def put(self, key: str, bundle: Bundle) -> None:
        """Store ``bundle`` under ``key`` (write to a temporary file, then rename)."""
        if self.folder is None:
            return
        self.folder.mkdir(parents=True, exist_ok=True)
        text = json.dumps({**bundle, "key": key}, sort_keys=True, ensure_ascii=False)
        write_atomically(self.folder / f"{key}.json", text.encode("utf-8"))
