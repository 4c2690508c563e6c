"""Shared helpers for the site tests: building fixture records, crawling and parsing pages."""

from __future__ import annotations

import shutil
from pathlib import Path
from urllib.parse import unquote, urlsplit

import html5lib

from docgen.site.build import BuildOptions, BuildReport, build_site

FIXTURES = Path(__file__).parent / "fixtures" / "site"
REPO = Path(__file__).resolve().parent.parent


def copy_fixtures(target: Path) -> Path:
    """A private copy of the fixture record (tests may edit it)."""
    shutil.copytree(FIXTURES, target)
    return target


def build(designs: Path, out: Path, **options: object) -> BuildReport:
    """Build in this process (one job unless told otherwise), progress bar off."""
    options.setdefault("jobs", 1)
    options.setdefault("progress", False)
    return build_site(BuildOptions(designs, out, **options))  # type: ignore[arg-type]


def parse_strict(data: bytes) -> object:
    """Parse as WHATWG HTML with html5lib, raising on any parse error."""
    parser = html5lib.HTMLParser(strict=True, namespaceHTMLElements=False)
    return parser.parse(data)


def html_pages(site: Path) -> list[Path]:
    """Every HTML page of a built site."""
    return sorted(site.rglob("*.html"))


def links(page: Path) -> list[tuple[str, str]]:
    """(attribute, URL) of every href and src in a page."""
    tree = parse_strict(page.read_bytes())
    found = []
    for element in tree.iter():  # type: ignore[attr-defined]
        for attribute in ("href", "src"):
            value = element.get(attribute)
            if value is not None:
                found.append((attribute, value))
    return found


def broken_links(site: Path) -> list[str]:
    """Links in the site that point at no file (external http(s)/mailto links are skipped)."""
    broken = []
    for page in html_pages(site):
        for _, url in links(page):
            parts = urlsplit(url)
            if parts.scheme in ("http", "https", "mailto"):
                continue
            if parts.scheme or parts.netloc or url.startswith("/"):
                broken.append(f"{page.relative_to(site)}: not relative: {url}")
                continue
            if not parts.path:
                continue  # a fragment on the same page
            target = (page.parent / unquote(parts.path)).resolve()
            if not target.is_file() or site.resolve() not in target.parents:
                broken.append(f"{page.relative_to(site)}: {url}")
    return broken


def tree_bytes(root: Path) -> dict[str, bytes]:
    """Every file under ``root`` by relative path, with its bytes."""
    return {p.relative_to(root).as_posix(): p.read_bytes() for p in sorted(root.rglob("*"))
            if p.is_file()}
