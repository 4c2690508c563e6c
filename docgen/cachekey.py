"""The one content-based cache key shared by the site build and the history build."""

from __future__ import annotations

import hashlib
from collections.abc import Iterable

from docgen import __version__


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
