"""Atomic publication: pages are written into a fresh folder beside the site, then swapped in.

A build never writes into the live site.  It fills ``.<name>.building-XXXX`` next to the output
folder and, when every page is written, renames the old site to ``.<name>.previous`` and the new
folder into place, then deletes the previous one.  A build killed at any moment leaves either
the old site or the new one; the only window with no folder at the output path lies between
two renames, and the next build (or :func:`recover`) puts the previous site back.
"""

from __future__ import annotations

import os
import shutil
import tempfile
from pathlib import Path


def _previous(out: Path) -> Path:
    return out.parent / f".{out.name}.previous"


def recover(out: Path) -> None:
    """Undo a swap interrupted between its two renames, and remove stale build folders."""
    previous = _previous(out)
    if not out.exists() and previous.exists():
        os.replace(previous, out)
    elif previous.exists():
        shutil.rmtree(previous, ignore_errors=True)
    for stale in out.parent.glob(f".{out.name}.building-*"):
        shutil.rmtree(stale, ignore_errors=True)


class StagedSite:
    """A temporary folder that becomes the site on :meth:`publish`."""

    def __init__(self, out: Path):
        self.out = Path(out)
        self.out.parent.mkdir(parents=True, exist_ok=True)
        recover(self.out)
        prefix = f".{self.out.name}.building-"
        self.root = Path(tempfile.mkdtemp(dir=self.out.parent, prefix=prefix))

    def write(self, rel: str, content: str | bytes) -> None:
        """Write one file at the site path ``rel`` (POSIX, relative to the site root)."""
        path = self.root / rel
        path.parent.mkdir(parents=True, exist_ok=True)
        data = content.encode("utf-8") if isinstance(content, str) else content
        path.write_bytes(data)

    def publish(self) -> None:
        """Swap the staged folder into place of the old site."""
        os.chmod(self.root, 0o755)  # mkdtemp makes it private; a site is for reading
        previous = _previous(self.out)
        if self.out.exists():
            os.replace(self.out, previous)
        os.replace(self.root, self.out)
        shutil.rmtree(previous, ignore_errors=True)

    def discard(self) -> None:
        """Remove the staged folder (the build failed before publishing)."""
        shutil.rmtree(self.root, ignore_errors=True)
