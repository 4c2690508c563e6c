"""A design's history: one row per revision with its headline figures and verdicts, and the
semantic diff between each pair of consecutive revisions.

Everything returned is plain JSON-serialisable data; the pages and ``docgen history`` render
it.  Each revision's results come from :class:`~docgen.history.snapshot.RevisionSolver`, so a
revision is solved once, ever.
"""

from __future__ import annotations

from typing import Any

from docgen.history.approval import approval_info, find_approval
from docgen.history.git import Repo
from docgen.history.headline import headline_figures, verdict_counts, verdicts
from docgen.history.revisions import Listing, Revision, list_revisions, unavailable_reason
from docgen.history.semantic import diff_designs, text_diff
from docgen.history.snapshot import RevisionSolver, Snapshot, Tree, snapshot

Json = dict[str, Any]


def design_history(repo: Repo | None, rel: str, designs_root: str, solver: RevisionSolver,
                   *, with_diffs: bool = True,
                   found: tuple[Snapshot | None, Listing, list[Snapshot]] | None = None) -> Json:
    """The history of the design at ``rel`` (relative to the repository root), newest first.

    :returns: ``{"path", "available", "unavailable", "rows": [...], "diffs": [...],
        "results": [...]}``; each row is a revision with ``status``, ``approved``, ``figures``,
        ``verdicts``, ``passed``, ``total`` and ``errors``; ``diffs[i]`` compares row ``i + 1``
        (older) with row ``i``; ``results[i]`` is row ``i``'s results dict;
        ``changed_since_approval`` is the review-integrity flag (see
        :mod:`docgen.history.approval`) or ``None``.
    :param found: what :func:`revision_snapshots` returned for this design, if the caller has
        it already (it asks git several times; the site asks once per design).
    """
    current, listing, snaps = found or revision_snapshots(repo, rel, designs_root)
    if not listing.available:
        return _unavailable(rel, listing.unavailable)
    results = [solver.results(s) for s in snaps]
    rows = [revision_row(r, s, res) for r, s, res in zip(listing.revisions, snaps, results,
                                                          strict=True)]
    assert current is not None
    approval = find_approval(current, snaps)
    flag = approval_info(approval, current) if approval is not None else None
    diffs = []
    if with_diffs:
        for i in range(len(snaps) - 1):
            diffs.append(revision_diff(snaps[i + 1], snaps[i], results[i + 1], results[i]))
    return {"path": rel, "available": True, "unavailable": None, "rows": rows, "diffs": diffs,
            "results": results, "changed_since_approval": flag}


def revision_snapshots(repo: Repo | None, rel: str, designs_root: str,
                       work: Tree | None = None
                       ) -> tuple[Snapshot | None, Listing, list[Snapshot]]:
    """The design now (work tree), its revisions, and a snapshot of each (nothing solved).

    :param work: the work tree already read (a build reads it once for all its designs).
    """
    reason = unavailable_reason(repo)
    if reason is not None or repo is None:
        return None, Listing(rel, unavailable=reason), []
    current = work.snapshot(rel) if work is not None else snapshot(repo, None, rel, designs_root)
    listing = list_revisions(repo, rel, current.uses)
    repo.prefetch_folder(designs_root, ".md")  # every design's revisions: a few git calls
    snaps = [snapshot(repo, r.commit.sha, r.path, designs_root) for r in listing.revisions]
    return current, listing, snaps


def _unavailable(rel: str, reason: str | None) -> Json:
    return {"path": rel, "available": False, "unavailable": reason, "rows": [], "diffs": [],
            "results": [], "changed_since_approval": None}


def revision_row(revision: Revision, snap: Snapshot, results: Json) -> Json:
    """One row of the history table."""
    header = snap.design.header if snap.design else None
    return {
        **revision.to_json(),
        "title": header.title if header else None,
        "status": header.status if header else None,
        "approved": header.approved if header else None,
        "key": snap.key,
        "figures": headline_figures(results),
        "verdicts": verdicts(results),
        **verdict_counts(results),
        "errors": len(results.get("errors") or []),
    }


def revision_diff(old: Snapshot, new: Snapshot, old_results: Json | None,
                  new_results: Json | None) -> Json:
    """The semantic diff between two snapshots, with their labels (``None`` sides → text only)."""
    labels = (old.label, new.label)
    if old.design is None or new.design is None:
        return {"labels": list(labels), "paths": [old.path, new.path], "readable": False,
                "text": text_diff(old.path, old.source, new.path, new.source, labels)}
    diff = diff_designs(old.design, new.design, old_results, new_results,
                        old_library=old.library, new_library=new.library, labels=labels)
    return {"labels": list(labels), "readable": True, **diff}

