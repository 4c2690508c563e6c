"""What ``docgen diff`` compares: the designs that differ between two revisions.

A design differs when its cache key differs — its own text or a library page it uses changed —
so a library edit lists every design it affects.  Renames pair the old path with the new one.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

from docgen.history.git import Repo
from docgen.history.snapshot import RevisionSolver, Snapshot, Tree, tree
from docgen.history.timeline import revision_diff


@dataclass(frozen=True, slots=True)
class Pair:
    """One design on both sides (``None`` where it does not exist)."""

    old: Snapshot | None
    new: Snapshot | None


def design_pairs(repo: Repo, rev_a: str, rev_b: str | None, designs_root: str,
                 paths: Sequence[str] = ()) -> list[Pair]:
    """Designs that differ between ``rev_a`` and ``rev_b`` (``None``: the work tree).

    :param paths: repository-relative design paths on the ``rev_b`` side (or folders); empty
        means every design under ``designs_root``.
    """
    a, b = tree(repo, repo.resolve(rev_a) or rev_a, designs_root), \
        tree(repo, repo.resolve(rev_b) if rev_b else None, designs_root)
    renamed = {new: old for old, new in repo.changed_files(rev_a, rev_b, designs_root)
               if old and new and old != new}
    wanted = _expand(paths, b, a) if paths else None
    new_paths = b.design_paths()
    old_paths = set(a.design_paths())
    pairs = []
    for path in new_paths:
        if wanted is not None and path not in wanted:
            continue
        old_path = renamed.get(path, path)
        old = a.snapshot(old_path) if old_path in old_paths else None
        old_paths.discard(old_path)
        new = b.snapshot(path)
        if old is None or old.key != new.key or old.key is None or old.source != new.source:
            pairs.append(Pair(old, new))
    for path in sorted(old_paths):
        if wanted is None or path in wanted:
            pairs.append(Pair(a.snapshot(path), None))
    known = set(new_paths) | set(a.design_paths())
    for path in sorted((wanted or set()) - known):  # a design kept outside the designs folder
        old, new = a.snapshot(renamed.get(path, path)), b.snapshot(path)
        if (old.source or new.source) and old.source != new.source:
            pairs.append(Pair(old if old.source else None, new if new.source else None))
    return pairs


def _expand(paths: Sequence[str], *trees: Tree) -> set[str]:
    """The design paths named by ``paths`` (a folder names every design under it)."""
    known = {p for t in trees for p in t.design_paths()}
    wanted: set[str] = set()
    for path in paths:
        folder = path.rstrip("/") + "/"
        wanted.update(p for p in known if p == path or p.startswith(folder))
        wanted.add(path)
    return wanted


def compare(pairs: Sequence[Pair], solver: RevisionSolver) -> list[dict[str, Any]]:
    """The semantic diff of each pair (results from the cache, solved once if new)."""
    out = []
    for pair in pairs:
        if pair.old is None or pair.new is None:
            side = pair.new or pair.old
            assert side is not None
            out.append({"labels": [side.label, side.label], "paths": [side.path, side.path],
                        "readable": False, "only": "new" if pair.old is None else "old",
                        "text": ""})
            continue
        out.append(revision_diff(pair.old, pair.new, solver.results(pair.old),
                                 solver.results(pair.new)))
    return out
