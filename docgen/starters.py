"""Starter templates for ``docgen new``: a design file of a common topology, ready to edit.

Each starter is a design page shipped in ``docgen/starters/<topology>.md`` (package data).
Starters use the built-in generic models so they solve on a fresh machine, and their values
pass their own requirements (a test runs every starter through the checker).  Creating a file
never overwrites one that exists.
"""

from __future__ import annotations

import re
from importlib import resources
from pathlib import Path

from docgen.diagnostics import Diagnostic, DocgenError, Span, did_you_mean

_FOLDER = "starters"
_TITLE_LINE = re.compile(r"^title:.*$", re.MULTILINE)
_FIRST_HEADING = re.compile(r"^# .*$", re.MULTILINE)
_SUMMARY_LINE = re.compile(r"^summary:\s*(.*)$", re.MULTILINE)


def _files() -> dict[str, object]:
    folder = resources.files("docgen").joinpath(_FOLDER)
    return {entry.name[:-3]: entry for entry in folder.iterdir() if entry.name.endswith(".md")}


def names() -> list[str]:
    """The starter topologies, sorted."""
    return sorted(_files())


def text(topology: str) -> str:
    """The starter's file text as shipped (``DocgenError`` naming a close spelling if unknown)."""
    files = _files()
    if topology not in files:
        hint = did_you_mean(topology, files) or "run 'docgen new --list' to see the starters"
        raise DocgenError(Diagnostic("<command line>", Span(1, 1), "error",
                                     f"no starter called '{topology}'", hint))
    return files[topology].read_text(encoding="utf-8")


def summary(topology: str) -> str:
    """The one-line summary from the starter's header."""
    found = _SUMMARY_LINE.search(text(topology))
    return found.group(1).strip() if found else ""


def render(topology: str, title: str | None = None) -> str:
    """The starter's text with ``title`` in its header and its first heading, if given."""
    body = text(topology)
    if title is None:
        return body
    title = title.strip()
    if not title or "\n" in title or "\r" in title:
        raise DocgenError(Diagnostic("<command line>", Span(1, 1), "error",
                                     "a title must be one non-empty line"))
    body = _TITLE_LINE.sub(lambda _: f"title: {title}", body, count=1)
    return _FIRST_HEADING.sub(lambda _: f"# {title}", body, count=1)


def create(topology: str, path: str | Path, title: str | None = None) -> Path:
    """Write a new design file at ``path`` from a starter; refuse to overwrite anything."""
    target = Path(path)
    content = render(topology, title)
    if target.exists():
        raise DocgenError(Diagnostic(str(target), Span(1, 1), "error",
                                     "the file already exists; docgen new never overwrites",
                                     "choose another file name"))
    target.parent.mkdir(parents=True, exist_ok=True)
    with target.open("x", encoding="utf-8", newline="\n") as handle:  # "x": fail if it appears
        handle.write(content)
    return target
