"""Read-only access to a git repository through the ``git`` command.

Everything docgen needs from git goes through :class:`Repo`: which commits changed a file
(following renames), a file's bytes at a revision, the files of a folder at a revision.  Git is
called as a subprocess with a fixed locale and without pagers, so the output is the same on every
machine; dates are the author dates git stored, never the clock of the machine that builds.
"""

from __future__ import annotations

import os
import subprocess
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path
from typing import Any

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
    """A git work tree, addressed by its top-level folder.

    A Repo lives for one build or one command: the commit order and the logs are asked of git
    once per Repo, for the commit ``HEAD`` named when first asked, so make a new one after
    committing.  With :meth:`keep_answers` they are kept across builds too, by that commit id.
    """

    def __init__(self, root: Path):
        self.root = Path(root)
        self._facts: dict[str, bool] = {}  # has commits / is shallow: asked once per Repo
        # answers asked of git once per Repo: the commit order, library logs (see the class
        # docstring) and the files of folders at commits (which never change)
        self._memo: dict[tuple[str, ...], object] = {}
        self._listings: dict[str, dict[str, dict[str, str]]] = {}  # rev -> folder -> path: id
        self._blobs: dict[str, bytes] = {}
        self._store: tuple[Callable[[str], dict | None], Callable[[str, dict], None]] | None = None
        self._answers: dict[str, Any] | None = None

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
        return self.head() is not None

    def head(self) -> str | None:
        """The commit id ``HEAD`` named when first asked (``None`` before the first commit)."""
        if ("head",) not in self._memo:
            found = self.resolve("HEAD")
            if found is None:
                return None  # asked again next time: a first commit may come
            self._memo["head",] = found
        return str(self._memo["head",])

    def keep_answers(self, load: Callable[[str], dict | None],
                     save: Callable[[str, dict], None]) -> None:
        """Keep the answers that depend only on the commit ``HEAD`` names (the logs, the commit
        order) in a store by that commit's id: ``load(id)`` gives what was saved, ``save(id,
        answers)`` saves.  A rebuild at the same commit then runs none of those git commands
        (on a long history ``git log --follow`` takes tens of milliseconds per design)."""
        self._store = (load, save)

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
        known = self._known_files(rev, paths)
        if known is not None:
            return {p: self._blobs[known[p]] for p in paths if p in known}
        found = _cat_file(self.root, [f"{rev}:{p}" for p in paths])
        return {p: data for p, (kind, _, data) in zip(paths, found, strict=True)
                if kind == "blob"}

    def prefetch(self, revs: list[str], folder: str, suffix: str = "") -> None:
        """Read the files under ``folder`` at each of ``revs`` ahead, in a few git calls for
        all of them (one per level of sub-folders, one for the contents of files ending in
        ``suffix``), so that :meth:`files` and :meth:`read_many` of those revisions need no
        further call.  A history reads the designs folder at every revision of every design:
        two git processes per revision before."""
        todo = [r for r in dict.fromkeys(revs) if folder not in self._listings.get(r, {})]
        if not todo:
            return
        spec = (lambda r: f"{r}:{folder}") if folder not in ("", ".") else (
            lambda r: f"{r}^{{tree}}")
        roots = _cat_file(self.root, [spec(r) for r in todo])
        trees = {oid: data for kind, oid, data in roots if kind == "tree"}
        size = len(next(iter(trees), "")) // 2  # bytes per object id: 20 (SHA-1) or 32
        wanted = list(trees)
        while wanted:  # one level of sub-folders per round
            subtrees = sorted({oid for parent in wanted for mode, _, oid in _entries(
                trees[parent], size) if mode == "40000" and oid not in trees})
            for oid, (kind, _, data) in zip(subtrees, _cat_file(self.root, subtrees),
                                            strict=True):
                trees[oid] = data if kind == "tree" else b""
            wanted = subtrees
        prefix = "" if folder in ("", ".") else folder.rstrip("/") + "/"
        for rev, (kind, oid, _) in zip(todo, roots, strict=True):
            self._listings.setdefault(rev, {})[folder] = (
                _walk(trees, oid, prefix, size) if kind == "tree" else {})
        blobs = sorted({oid for rev in todo for path, oid in self._listings[rev][folder].items()
                        if path.endswith(suffix) and oid not in self._blobs})
        for oid, (kind, _, data) in zip(blobs, _cat_file(self.root, blobs), strict=True):
            if kind == "blob":
                self._blobs[oid] = data

    def prefetch_folder(self, folder: str, suffix: str = "") -> None:
        """:meth:`prefetch` at every commit reachable from ``HEAD`` that changed ``folder``
        (once per Repo): a site build reads the designs folder at each revision of each design,
        and these are such commits."""
        def read() -> bool:
            spec = [] if folder in ("", ".") else ["--", folder]
            revs = self._kept(("commits", folder), lambda head: str(self.run(
                "rev-list", head, *spec)).split())
            self.prefetch(revs, folder, suffix)
            return True

        self._remember(("prefetch", folder, suffix), read)

    def _known_files(self, rev: str, paths: list[str]) -> dict[str, str] | None:
        """path -> blob id for ``paths`` at ``rev`` if a prefetch read them all, else None."""
        for folder, listing in self._listings.get(rev, {}).items():
            inside = "" if folder in ("", ".") else folder.rstrip("/") + "/"
            if all(p.startswith(inside) and (p not in listing or listing[p] in self._blobs)
                   for p in paths):
                return listing
        return None

    def tree_id(self, rev: str, folder: str) -> str | None:
        """The object id of ``folder`` at ``rev`` (a content hash of everything in it)."""
        spec = f"{rev}:{folder}" if folder not in ("", ".") else f"{rev}^{{tree}}"
        try:
            return str(self.run("rev-parse", "--verify", "--quiet", spec)).strip() or None
        except GitError:
            return None

    def files(self, rev: str, folder: str) -> list[str]:
        """Every file under ``folder`` at ``rev`` (sorted, relative to the root)."""
        listing = self._listings.get(rev, {}).get(folder)
        if listing is not None:
            return sorted(listing)
        args = ["ls-tree", "-r", "--name-only", "-z", rev]
        if folder not in ("", "."):
            args += ["--", folder]
        out = str(self.run(*args))
        return sorted(p for p in out.split("\0") if p)

    def order(self) -> dict[str, int]:
        """Position of every commit reachable from ``HEAD``, newest first (topological)."""
        return dict(self._kept(("order",), lambda head: {
            sha: i for i, sha in enumerate(str(self.run("rev-list", "--topo-order",
                                                        head)).split())}))

    def _remember(self, key: tuple[str, ...], compute: Callable[[], Any]) -> Any:
        """``compute()``, asked of git once per Repo (see the class docstring)."""
        if key not in self._memo:
            self._memo[key] = compute()
        return self._memo[key]

    def _kept(self, key: tuple[str, ...], compute: Callable[[str], Any],
              encode: Callable[[Any], Any] = lambda v: v,
              decode: Callable[[Any], Any] = lambda v: v) -> Any:
        """``compute(head)`` for the commit ``HEAD`` names, once per Repo and, with
        :meth:`keep_answers`, once per commit id."""
        def fetch() -> Any:
            head = self.head()
            if head is None or self._store is None:
                return compute(head or "HEAD")
            if self._answers is None:
                self._answers = dict(self._store[0](head) or {})
            name = "\0".join(key)
            if name not in self._answers:
                self._answers[name] = encode(compute(head))
                self._store[1](head, self._answers)
            return decode(self._answers[name])

        return self._remember(key, fetch)

    # -- history -------------------------------------------------------------------------

    def log_follow(self, path: str) -> list[Commit]:
        """Every commit that changed ``path``, newest first, following renames."""
        return list(self._kept(("log_follow", path), lambda head: _parse_log(str(self.run(
            "log", "--follow", "--name-status", "-M", f"--format={_LOG_FORMAT}", head, "--",
            path))), _commits_json, _commits))

    def log_paths(self, paths: list[str]) -> list[Commit]:
        """Every commit that changed any of ``paths`` (no rename following), newest first.

        A commit that touches several of the paths appears once per path.
        """
        if not paths:
            return []
        return list(self._kept(("log_paths", *sorted(paths)), lambda head: [
            c for c in _parse_log(str(self.run("log", "--name-status", "--no-renames",
                                               f"--format={_LOG_FORMAT}", head, "--", *paths)))
            if c.path in paths], _commits_json, _commits))

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


def _commits_json(commits: list[Commit]) -> list[dict[str, str | None]]:
    return [{k: v for k, v in c.to_json().items() if k != "short"} for c in commits]


def _commits(data: list[dict[str, str | None]]) -> list[Commit]:
    return [Commit(**item) for item in data]  # type: ignore[arg-type]


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


def _cat_file(root: Path, requests: list[str]) -> list[tuple[str | None, str, bytes]]:
    """``git cat-file --batch`` for ``requests`` (``rev:path`` or object ids) in one process:
    (type, object id, content) of each, type ``None`` for a missing object."""
    if not requests:
        return []
    proc = subprocess.run(["git", "cat-file", "--batch"], cwd=root,
                          input="".join(f"{r}\n" for r in requests).encode("utf-8"),
                          env=git_environment(), capture_output=True, check=False)
    if proc.returncode != 0:
        raise GitError(proc.stderr.decode("utf-8", "replace").strip() or "git cat-file failed")
    out, at, found = proc.stdout, 0, []
    for _ in requests:
        end = out.index(b"\n", at)
        header = out[at:end].split()
        at = end + 1
        if len(header) == 3 and header[2].isdigit():
            size = int(header[2])
            found.append((header[1].decode(), header[0].decode(), out[at:at + size]))
            at += size + 1
        else:  # "<request> missing" (or ambiguous)
            found.append((None, "", b""))
    return found


def _entries(tree: bytes, size: int) -> list[tuple[str, str, str]]:
    """(mode, name, object id) of each entry of a raw tree object (ids of ``size`` bytes)."""
    out, at = [], 0
    while at < len(tree):
        space = tree.index(b" ", at)
        nul = tree.index(b"\0", space)
        mode, name = tree[at:space].decode(), tree[space + 1:nul].decode("utf-8", "replace")
        out.append((mode, name, tree[nul + 1:nul + 1 + size].hex()))
        at = nul + 1 + size
    return out


def _walk(trees: dict[str, bytes], oid: str, prefix: str, size: int) -> dict[str, str]:
    """path -> object id of every entry under the tree ``oid`` that ``git ls-tree -r`` lists
    (files, symbolic links, sub-module commits), sub-folders walked."""
    found: dict[str, str] = {}
    for mode, name, child in _entries(trees.get(oid, b""), size):
        if mode == "40000":
            found.update(_walk(trees, child, f"{prefix}{name}/", size))
        else:
            found[f"{prefix}{name}"] = child
    return found
