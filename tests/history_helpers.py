"""Scripted git repositories for the history, diff and hook tests.

Identities and dates come from the environment of each git call (never the machine's global git
config), so every repository built here has the same commit ids on every machine.
"""

from __future__ import annotations

import os
import subprocess
from pathlib import Path


def git_env(date: str = "2024-01-01T09:00:00+00:00", author: str = "Ada Ohm") -> dict[str, str]:
    """An environment for git with a fixed identity and date and no global configuration."""
    env = dict(os.environ)
    email = author.lower().replace(" ", ".") + "@example.invalid"
    env.update({
        "GIT_AUTHOR_NAME": author, "GIT_AUTHOR_EMAIL": email, "GIT_AUTHOR_DATE": date,
        "GIT_COMMITTER_NAME": author, "GIT_COMMITTER_EMAIL": email, "GIT_COMMITTER_DATE": date,
        "GIT_CONFIG_GLOBAL": os.devnull, "GIT_CONFIG_NOSYSTEM": "1", "LC_ALL": "C",
    })
    return env


class ScriptedRepo:
    """A git repository built commit by commit with fixed dates and authors."""

    def __init__(self, root: Path):
        self.root = Path(root)
        self.root.mkdir(parents=True, exist_ok=True)
        self.git("init", "-q", "-b", "main")
        self.day = 0

    def git(self, *args: str, env: dict[str, str] | None = None) -> str:
        """Run git in the repository and return its output (raises on failure)."""
        proc = subprocess.run(["git", *args], cwd=self.root, env=env or git_env(),
                              capture_output=True, text=True, check=True)
        return proc.stdout

    def write(self, rel: str, text: str) -> Path:
        """Write a file (creating folders) without committing it."""
        path = self.root / rel
        path.parent.mkdir(parents=True, exist_ok=True)
        path.write_text(text, encoding="utf-8")
        return path

    def edit(self, rel: str, old: str, new: str) -> None:
        """Replace exactly one occurrence of ``old`` in a file."""
        path = self.root / rel
        text = path.read_text(encoding="utf-8")
        assert text.count(old) == 1, f"{old!r} must occur once in {rel}"
        path.write_text(text.replace(old, new), encoding="utf-8")

    def commit(self, subject: str, author: str = "Ada Ohm") -> str:
        """Commit everything in the work tree, one day after the previous commit."""
        self.day += 1
        date = f"2024-03-{self.day:02d}T10:00:00+00:00"
        env = git_env(date, author)
        self.git("add", "-A", env=env)
        self.git("commit", "-q", "-m", subject, env=env)
        return self.git("rev-parse", "HEAD").strip()

    def move(self, old: str, new: str) -> None:
        """``git mv`` a file (the rename is committed by the next :meth:`commit`)."""
        (self.root / new).parent.mkdir(parents=True, exist_ok=True)
        self.git("mv", old, new)
