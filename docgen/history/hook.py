"""The git post-commit hook that rebuilds the site after each commit.

The hook is a short shell script marked with :data:`MARKER`, so docgen recognises its own hook
and never overwrites or deletes anyone else's.  With ``force`` a foreign hook is kept beside it
as ``post-commit.before-docgen`` and restored when docgen's hook is removed.  The rebuild is fast
because the site build and the history share the content-keyed cache.
"""

from __future__ import annotations

import os
import shlex
import stat
import sys
from dataclasses import dataclass
from pathlib import Path

from docgen.history.git import Repo

HOOK_NAME = "post-commit"
BACKUP_SUFFIX = ".before-docgen"
MARKER = "# docgen post-commit hook"


class HookRefused(Exception):
    """The hook was not changed; the message says why and what to do."""


@dataclass(frozen=True, slots=True)
class HookState:
    """Where the hook lives and whose it is (``none``, ``docgen`` or ``foreign``)."""

    path: Path
    owner: str
    backup: Path | None


def hooks_dir(repo: Repo) -> Path:
    """The folder git runs hooks from (honours ``core.hooksPath``)."""
    out = str(repo.run("rev-parse", "--git-path", "hooks")).strip()
    folder = Path(out)
    return folder if folder.is_absolute() else repo.root / folder


def state(repo: Repo) -> HookState:
    """The post-commit hook's path and owner."""
    path = hooks_dir(repo) / HOOK_NAME
    backup = path.with_name(HOOK_NAME + BACKUP_SUFFIX)
    if not path.exists():
        owner = "none"
    else:
        owner = "docgen" if MARKER in path.read_text(encoding="utf-8", errors="replace") \
            else "foreign"
    return HookState(path, owner, backup if backup.exists() else None)


def hook_script(designs: str, out: str, python: str | None = None) -> str:
    """The hook's text: rebuild ``designs`` into ``out`` from the repository root.

    A failed rebuild never undoes the commit (a post-commit hook cannot), so the hook says so
    and exits 0.
    """
    python = python or sys.executable
    command = " ".join(shlex.quote(a) for a in
                       [python, "-m", "docgen.cli", "build", designs, "--out", out])
    return "\n".join([
        "#!/bin/sh",
        MARKER,
        "# Rebuilds the published notebook after each commit; the results cache makes it fast.",
        "# Installed by 'docgen hook install'; remove with 'docgen hook remove'.",
        'cd "$(git rev-parse --show-toplevel)" || exit 0',
        f"if ! {command}; then",
        '    echo "docgen: the site rebuild failed; the commit itself is recorded." >&2',
        "fi",
        "exit 0",
        "",
    ])


def install(repo: Repo, designs: str = "designs", out: str = "site", *,
            force: bool = False) -> HookState:
    """Install docgen's post-commit hook; refuse to replace a foreign hook unless ``force``.

    With ``force`` the foreign hook is moved aside (see :data:`BACKUP_SUFFIX`), never lost.
    """
    current = state(repo)
    if current.owner == "foreign":
        if not force:
            raise HookRefused(
                f"{current.path} exists and was not written by docgen; not replacing it. "
                "Use --force to keep it as "
                f"{current.path.name + BACKUP_SUFFIX} and install docgen's hook.")
        backup = current.path.with_name(HOOK_NAME + BACKUP_SUFFIX)
        if backup.exists():
            raise HookRefused(f"{backup} already exists; move it away first.")
        os.replace(current.path, backup)
    current.path.parent.mkdir(parents=True, exist_ok=True)
    current.path.write_text(hook_script(designs, out), encoding="utf-8")
    mode = current.path.stat().st_mode
    current.path.chmod(mode | stat.S_IXUSR | stat.S_IXGRP | stat.S_IXOTH)
    return state(repo)


def remove(repo: Repo) -> HookState:
    """Remove docgen's hook (restoring a hook it had moved aside); never touch a foreign one."""
    current = state(repo)
    if current.owner == "foreign":
        raise HookRefused(f"{current.path} was not written by docgen; leaving it in place.")
    if current.owner == "docgen":
        current.path.unlink()
        if current.backup is not None:
            os.replace(current.backup, current.path)
    return state(repo)
