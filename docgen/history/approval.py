"""Review integrity: has an approved design changed since it was approved?

The approval revision is the earliest commit of the newest unbroken run of revisions that carry
the design's current ``approved:`` date with status ``approved``.  If the circuit, the models it
uses or its requirements differ between that revision and the design as it is now (the work
tree, so a pre-commit ``docgen check`` sees it), the design has "changed since approval" until
someone approves it again with a new date.  Prose, bench and header edits do not count.
"""

from __future__ import annotations

from collections.abc import Iterable
from pathlib import Path
from typing import Any

from docgen.history.describe import circuit_lines, model_lines, requirement_lines
from docgen.history.git import Repo
from docgen.history.revisions import list_revisions
from docgen.history.semantic import diff_designs
from docgen.history.snapshot import Snapshot, snapshot

#: What counts as a change needing a new approval: diff section → words on the page.
REVIEWED = (("parts", "circuit"), ("models", "models"), ("requirements", "requirements"))


def changed_since_approval(repo: Repo | Path | str | None, path: str | Path,
                           designs_root: str | Path = "designs") -> dict[str, Any] | None:
    """What changed since the design at ``path`` was approved, or ``None`` if nothing did.

    ``None`` also when the design is not approved now, or its history is not available (a
    shallow clone cannot show when it was approved).

    :param repo: the repository (or any folder inside it); ``path`` and ``designs_root`` are
        relative to the current folder, or absolute.
    """
    if not isinstance(repo, Repo):
        repo = Repo.find(Path(repo) if repo is not None else Path(path))
        if repo is None:
            return None
    return approval_check(repo, _relative(repo, path), _relative(repo, designs_root))


def approval_check(repo: Repo, rel: str, root: str) -> dict[str, Any] | None:
    """:func:`changed_since_approval` with paths already relative to the repository root."""
    current = snapshot(repo, None, rel, root)
    if current.design is None or current.design.header.status != "approved":
        return None
    listing = list_revisions(repo, rel, current.uses)
    if not listing.available:
        return None
    snaps = (snapshot(repo, r.commit.sha, r.path, root) for r in listing.revisions)
    approval = find_approval(current, snaps)
    return approval_info(approval, current) if approval is not None else None


def _relative(repo: Repo, path: str | Path) -> str:
    try:
        return repo.relative(path)
    except ValueError:  # already relative to the repository root
        return Path(path).as_posix()


def find_approval(current: Snapshot, snaps: Iterable[Snapshot]) -> Snapshot | None:
    """The snapshot at which the current approval was given, from ``snaps`` (newest first);
    ``None`` when the current approval is not committed yet (or the design is not approved)."""
    if current.design is None or current.design.header.status != "approved":
        return None
    date = current.design.header.approved
    approval = None
    for then in snaps:
        header = then.design.header if then.design else None
        if header is None or header.status != "approved" or header.approved != date:
            break
        approval = then
    return approval


def approval_info(approval: Snapshot, current: Snapshot) -> dict[str, Any] | None:
    """The changed-since-approval flag between two snapshots, or ``None`` if nothing counts."""
    assert approval.design is not None and current.design is not None
    diff = diff_designs(approval.design, current.design, old_library=approval.library,
                        new_library=current.library, labels=(approval.label, current.label))
    sections = [words for section, words in REVIEWED if diff["changed"].count(section)]
    if not sections:
        return None
    changes = circuit_lines(diff) + model_lines(diff) + requirement_lines(diff)
    date = current.design.header.approved
    return {
        "path": current.path,
        "approved": date,
        "approval_commit": approval.rev,
        "approval_label": approval.label,
        "sections": sections,
        "changes": changes,
        "message": (f"changed since approval: {', '.join(sections)} changed after it was "
                    f"approved on {date} (commit {approval.label}) without a new approval"),
    }
