"""Where each page of the record lands in the site, and relative links between pages.

The site mirrors the designs folder: ``designs/frontend/ce-stage.md`` becomes
``frontend/ce-stage.html`` with its downloads and figures in ``frontend/ce-stage.files/``, so a
relative link between two ``.md`` pages stays valid once ``.md`` becomes ``.html``.  Every link
the site writes is relative, so it works from ``file://`` and from any static server.
"""

from __future__ import annotations

import posixpath

#: names the build itself writes at the site root; a page of the record never takes them
RESERVED = frozenset({"index.html", "problems.html", "README.md", "assets"})


def page_path(source_rel: str) -> str:
    """The site path (POSIX, relative to the site root) of the page for ``source_rel``."""
    stem = source_rel[:-3] if source_rel.endswith(".md") else source_rel
    out = stem + ".html"
    if out in RESERVED or out.split("/")[0] in RESERVED - {"index.html", "problems.html"}:
        out = "page-" + out
    return out


def files_dir(page: str) -> str:
    """The folder beside a page that holds its figures and downloads."""
    return page[: -len(".html")] + ".files"


def relative_url(from_page: str, to_path: str) -> str:
    """A relative URL from the page at ``from_page`` to the site path ``to_path``."""
    base = posixpath.dirname(from_page) or "."
    return posixpath.relpath(to_path, base)


def root_prefix(page: str) -> str:
    """The relative prefix from ``page`` back to the site root (``""`` or ``"../"``...)."""
    depth = page.count("/")
    return "../" * depth
