"""History and revision diffs of the design record, read from git.

- :mod:`~docgen.history.git` — read-only git access (log following renames, file contents).
- :mod:`~docgen.history.revisions` — which commits are a design's revisions; when history is
  not available (shallow clone, no commits, outside git).
- :mod:`~docgen.history.snapshot` — a design as it was at a revision, and its results solved
  once, ever, through :mod:`~docgen.history.cache` (content-keyed, in ``.docgen-cache/``).
- :mod:`~docgen.history.semantic` — the semantic diff of two designs (pure);
  :mod:`~docgen.history.headline` the figures tables compare; :mod:`~docgen.history.describe`
  sentences for the terminal.
- :mod:`~docgen.history.timeline` — a design's history rows and consecutive diffs;
  :mod:`~docgen.history.compare` — what ``docgen diff`` compares.
- :mod:`~docgen.history.approval` — :func:`changed_since_approval` for ``docgen check`` and pages.
- :mod:`~docgen.history.site`, :mod:`~docgen.history.pages`, :mod:`~docgen.history.figures` —
  the history and diff pages of the site build.
- :mod:`~docgen.history.hook` — the post-commit hook that rebuilds the site.

Submodules are imported on use, so ``docgen hook`` does not pay for numpy.
"""

from __future__ import annotations

from typing import Any

__all__ = ["changed_since_approval"]


def __getattr__(name: str) -> Any:
    if name == "changed_since_approval":
        from docgen.history.approval import changed_since_approval

        return changed_since_approval
    raise AttributeError(name)
