"""Which revisions of a design the history lists, and whether history is available at all.

A design's revisions are the commits that changed its file (following renames) and the commits
that changed a library page it uses — those change its results too.  History needs a full
clone: a shallow clone or a repository without commits builds fine but says history is not
available, with the reason.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from docgen.history.git import Commit, GitError, Repo


@dataclass(frozen=True, slots=True)
class Revision:
    """One row of a design's history.

    :param commit: the commit (for a design change, its ``path`` is the design's path then).
    :param path: the design file's path at this revision (relative to the repository root).
    :param reason: ``design`` when the commit changed the design file, ``library`` when it
        changed only library pages the design uses.
    :param library_paths: the library pages this commit changed.
    """

    commit: Commit
    path: str
    reason: str
    library_paths: tuple[str, ...] = ()

    def to_json(self) -> dict[str, object]:
        """Plain data for the history page and ``--json``."""
        return {**self.commit.to_json(), "path": self.path, "reason": self.reason,
                "library_paths": list(self.library_paths)}


@dataclass(frozen=True, slots=True)
class Listing:
    """The revisions of one design, newest first, or why there are none to show."""

    path: str
    revisions: tuple[Revision, ...] = ()
    unavailable: str | None = None
    notes: tuple[str, ...] = field(default=())

    @property
    def available(self) -> bool:
        """True when the history could be read."""
        return self.unavailable is None


def unavailable_reason(repo: Repo | None) -> str | None:
    """Why this checkout cannot show history (``None`` when it can)."""
    if repo is None:
        return "history is not available: the designs are not in a git repository"
    try:
        if not repo.has_commits():
            return "history is not available: the repository has no commits yet"
        if repo.is_shallow():
            return ("history is not available: this is a shallow clone, so earlier revisions "
                    "are missing (clone with full history, e.g. fetch-depth 0 in CI)")
    except (GitError, FileNotFoundError) as exc:
        return f"history is not available: git failed ({exc})"
    return None


def list_revisions(repo: Repo | None, rel: str,
                   library_paths: tuple[str, ...] = ()) -> Listing:
    """The revisions of the design at ``rel`` (relative to the repository root), newest first.

    :param library_paths: repository-relative paths of the library pages the design uses now;
        commits that changed them since the design's first commit are listed too.
    """
    reason = unavailable_reason(repo)
    if reason is not None or repo is None:
        return Listing(rel, unavailable=reason)
    design_commits = [c for c in repo.log_follow(rel) if c.status != "D"]
    if not design_commits:
        return Listing(rel, unavailable="history is not available: the design file has not "
                                        "been committed yet")
    order = repo.order()
    by_sha: dict[str, Revision] = {}
    for commit in design_commits:
        by_sha.setdefault(commit.sha, Revision(commit, commit.path, "design"))
    first = max(order.get(c.sha, -1) for c in design_commits)
    library: dict[str, list[str]] = {}
    library_commits: dict[str, Commit] = {}
    for commit in repo.log_paths(list(library_paths)):
        if order.get(commit.sha, first + 1) <= first:
            library.setdefault(commit.sha, []).append(commit.path)
            library_commits.setdefault(commit.sha, commit)
    for sha, paths in library.items():
        changed = tuple(sorted(set(paths)))
        if sha in by_sha:
            rev = by_sha[sha]
            by_sha[sha] = Revision(rev.commit, rev.path, "design", changed)
        else:
            design_path = _path_at(order[sha], design_commits, order)
            by_sha[sha] = Revision(library_commits[sha], design_path, "library", changed)
    revisions = sorted(by_sha.values(), key=lambda r: order.get(r.commit.sha, 0))
    return Listing(rel, tuple(revisions))


def _path_at(position: int, design_commits: list[Commit], order: dict[str, int]) -> str:
    """The design's path at the commit at ``position``: that of the newest older design commit."""
    older = [c for c in design_commits if order.get(c.sha, -1) > position]
    return min(older, key=lambda c: order[c.sha]).path
