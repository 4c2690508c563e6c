"""Read-only access to a git repository through the ``git`` command.

Everything docgen needs from git goes through :class:`Repo`: which commits changed a file
(following renames), a file's bytes at a revision, the files of a folder at a revision.  Git is
called as a subprocess with a fixed locale and without pagers, so the output is the same on every
machine; dates are the author dates git stored, never the clock of the machine that builds.
"""

from __future__ import annotations

import os
import subprocess
from dataclasses import dataclass
from pathlib import Path

#: Marks one commit's header line in ``git log`` output (ASCII record separator).
_RECORD = "\x1e"
#: Separates the fields of that header line (ASCII unit separator).
_FIELD = "\x1f"
_LOG_FORMAT = _RECORD + _FIELD.join(["%H", "%aI", "%an", "%s"])


class GitError(RuntimeError):
    """A git command failed (the message carries git's own words)."""


@dataclass(frozen=True, slots=True)
class Commit:
    """One commit as the history shows it.

    :param sha: the full commit id.
    :param date: the author date in ISO 8601 with its offset, as git stored it.
    :param author: the author's name.
    :param subject: the first line of the message.
    :param path: the file's path (relative to the repository root) in this commit; for a
        commit found by following a rename this is the name the file had then.
    :param status: git's change letter for that file: ``A`` added, ``M`` modified, ``R`` renamed
        (``old_path`` then says from where), ``D`` deleted.
    """

    sha: str
    date: str
    author: str
    subject: str
    path: str
    status: str
    old_path: str | None = None

    @property
    def short(self) -> str:
        """The abbreviated id shown in tables (fixed length, so pages stay stable)."""
        return self.sha[:10]

    def to_json(self) -> dict[str, str | None]:
        """Plain data for results files and ``--json`` output."""
        return {
            "sha": self.sha,
            "short": self.short,
            "date": self.date,
            "author": self.author,
            "subject": self.subject,
            "path": self.path,
            "status": self.status,
            "old_path": self.old_path,
        }


class Repo:
    """A git work tree, addressed by its top-level folder."""

    def __init__(self, root: Path):
        self.root = Path(root)
        self._facts: dict[str, bool] = {}  # has commits / is shallow: asked once per Repo

    @classmethod
    def find(cls, start: Path | str) -> Repo | None:
        """The repository containing ``start`` (a file or folder), or ``None`` outside git."""
        start = Path(start).resolve()
        folder = start if start.is_dir() else start.parent
        while not folder.exists():
            folder = folder.parent
        try:
            top = _git(folder, "rev-parse", "--show-toplevel").strip()
        except (GitError, FileNotFoundError):
            return None
        return cls(Path(top))

    # -- plain queries -------------------------------------------------------------------

    def run(self, *args: str, binary: bool = False) -> str | bytes:
        """Run ``git ARGS`` in the work tree and return its standard output."""
        return _git(self.root, *args, binary=binary)

    def relative(self, path: Path | str) -> str:
        """``path`` relative to the repository root, with forward slashes."""
        return Path(path).resolve().relative_to(self.root.resolve()).as_posix()

    def has_commits(self) -> bool:
        """True once the repository has a ``HEAD`` commit (remembered once true)."""
        if not self._facts.get("commits"):
            self._facts["commits"] = self.resolve("HEAD") is not None
        return self._facts["commits"]

    def is_shallow(self) -> bool:
        """True for a shallow clone (its history is cut off, so it cannot be shown)."""
        if "shallow" not in self._facts:
            out = str(self.run("rev-parse", "--is-shallow-repository")).strip()
            self._facts["shallow"] = out == "true"
        return self._facts["shallow"]

    def resolve(self, rev: str) -> str | None:
        """The full commit id ``rev`` names, or ``None`` if it names no commit."""
        try:
            out = str(self.run("rev-parse", "--verify", "--quiet", f"{rev}^{{commit}}"))
        except GitError:
            return None
        return out.strip() or None

    def show(self, rev: str, path: str) -> bytes | None:
        """The bytes of ``path`` at ``rev``, or ``None`` if the file is not there."""
        try:
            return bytes(self.run("show", f"{rev}:{path}", binary=True))
        except GitError:
            return None

    def read_many(self, rev: str, paths: list[str]) -> dict[str, bytes]:
        """The bytes of each of ``paths`` at ``rev`` in one git call (missing files left out)."""
        if not paths:
            return {}
        request = "".join(f"{rev}:{p}\n" for p in paths).encode("utf-8")
        proc = subprocess.run(["git", "cat-file", "--batch"], cwd=self.root, input=request,
                              env=git_environment(), capture_output=True, check=False)
        if proc.returncode != 0:
            raise GitError(proc.stderr.decode("utf-8", "replace").strip() or "git cat-file failed")
        out, at, found = proc.stdout, 0, {}
        for path in paths:
            end = out.index(b"\n", at)
            header = out[at:end].split()
            at = end + 1
            if len(header) == 3 and header[1] == b"blob":
                size = int(header[2])
                found[path] = out[at:at + size]
                at += size + 1
        return found

    def tree_id(self, rev: str, folder: str) -> str | None:
        """The object id of ``folder`` at ``rev`` (a content hash of everything in it)."""
        spec = f"{rev}:{folder}" if folder not in ("", ".") else f"{rev}^{{tree}}"
        try:
            return str(self.run("rev-parse", "--verify", "--quiet", spec)).strip() or None
        except GitError:
            return None

    def files(self, rev: str, folder: str) -> list[str]:
        """Every file under ``folder`` at ``rev`` (sorted, relative to the root)."""
        args = ["ls-tree", "-r", "--name-only", "-z", rev]
        if folder not in ("", "."):
            args += ["--", folder]
        out = str(self.run(*args))
        return sorted(p for p in out.split("\0") if p)

    def order(self) -> dict[str, int]:
        """Position of every commit reachable from ``HEAD``, newest first (topological)."""
        out = str(self.run("rev-list", "--topo-order", "HEAD"))
        return {sha: i for i, sha in enumerate(out.split())}

    # -- history -------------------------------------------------------------------------

    def log_follow(self, path: str) -> list[Commit]:
        """Every commit that changed ``path``, newest first, following renames."""
        out = str(self.run("log", "--follow", "--name-status", "-M", f"--format={_LOG_FORMAT}",
                           "HEAD", "--", path))
        return _parse_log(out)

    def log_paths(self, paths: list[str]) -> list[Commit]:
        """Every commit that changed any of ``paths`` (no rename following), newest first.

        A commit that touches several of the paths appears once per path.
        """
        if not paths:
            return []
        out = str(self.run("log", "--name-status", "--no-renames", f"--format={_LOG_FORMAT}",
                           "HEAD", "--", *paths))
        return [c for c in _parse_log(out) if c.path in paths]

    def changed_files(self, rev_a: str, rev_b: str | None, folder: str) -> list[tuple[str, str]]:
        """``(old path, new path)`` of files that differ between two revisions under ``folder``.

        ``rev_b`` ``None`` compares with the work tree.  Renames are matched, so a renamed file is
        one pair; an added file has an empty old path, a deleted one an empty new path.
        """
        args = ["diff", "--name-status", "-M", "-z", rev_a] + ([rev_b] if rev_b else [])
        out = str(self.run(*args, "--", folder or "."))
        items = [p for p in out.split("\0")]
        pairs: list[tuple[str, str]] = []
        i = 0
        while i < len(items) and items[i]:
            status = items[i]
            if status.startswith(("R", "C")):
                pairs.append((items[i + 1], items[i + 2]))
                i += 3
                continue
            path = items[i + 1]
            pairs.append(("" if status == "A" else path, "" if status == "D" else path))
            i += 2
        return pairs


def _parse_log(out: str) -> list[Commit]:
    """Commits from ``git log --name-status --format=<_LOG_FORMAT>`` output."""
    commits: list[Commit] = []
    for record in out.split(_RECORD)[1:]:
        header, _, body = record.partition("\n")
        sha, date, author, subject = header.split(_FIELD, 3)
        for line in body.splitlines():
            if not line.strip():
                continue
            fields = line.split("\t")
            status = fields[0][:1]
            if status in ("R", "C"):
                old, new = fields[1], fields[2]
                commits.append(Commit(sha, date, author, subject, new, status, old))
            else:
                commits.append(Commit(sha, date, author, subject, fields[1], status))
    return commits


def git_environment() -> dict[str, str]:
    """The environment docgen runs git in: fixed locale, no pager, no prompts, plain paths."""
    env = dict(os.environ)
    env.update({"LC_ALL": "C", "LANG": "C", "GIT_PAGER": "cat", "GIT_TERMINAL_PROMPT": "0"})
    return env


def _git(cwd: Path, *args: str, binary: bool = False) -> str | bytes:
    cmd = ["git", "-c", "core.quotepath=off", "-c", "log.showSignature=false", *args]
    proc = subprocess.run(cmd, cwd=cwd, env=git_environment(), capture_output=True, check=False)
    if proc.returncode != 0:
        message = proc.stderr.decode("utf-8", "replace").strip() or f"git {args[0]} failed"
        raise GitError(message)
    return proc.stdout if binary else proc.stdout.decode("utf-8", "replace")
