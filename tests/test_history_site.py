"""History and diff pages in the built site, from the scripted repository of
tests/test_history_scripted.py: pages and links, WHATWG parsing (html5lib), no solving on a
rebuild, byte-identical output, the changed-since-approval flag, and a shallow clone."""

from __future__ import annotations

import posixpath
import re
import subprocess
from pathlib import Path

import html5lib
import pytest
from history_helpers import git_env
from test_history_scripted import RENAMED, build

from docgen.site.build import BuildOptions, build_site

HISTORY = "stages/ce-stage.files/history.html"

# One cold build of a seven-revision history draws about ten matplotlib figures (~8 s).
pytestmark = pytest.mark.slow


def site_build(root: Path, out: Path) -> None:
    build_site(BuildOptions(root / "designs", out, jobs=1, progress=False))


def parse_strict(path: Path) -> None:
    """Parse as WHATWG HTML; any parse error fails (html5lib, strict mode)."""
    html5lib.HTMLParser(strict=True).parse(path.read_bytes())


def links(path: Path) -> list[str]:
    return re.findall(r'(?:href|src)="([^"#]+)', path.read_text(encoding="utf-8"))


@pytest.fixture(scope="module")
def built(tmp_path_factory):
    base = tmp_path_factory.mktemp("historysite")
    script, ids = build(base / "repo")
    site_build(script.root, base / "site")
    return script, ids, base / "site"


def test_history_page_lists_every_revision_and_links_each_diff(built):
    script, ids, site = built
    history = site / HISTORY
    parse_strict(history)
    text = history.read_text(encoding="utf-8")
    for sha in ids.values():
        assert sha[:10] in text
    diffs = sorted((site / "stages/ce-stage.files").glob("diff-*.html"))
    assert len(diffs) == 6
    for page in diffs:
        parse_strict(page)
    targets = [t for t in links(history) if "diff-" in t]
    assert sorted(targets) == sorted(p.name for p in diffs)
    assert "history-trends.svg" in links(history)
    # the design page links to its history
    design = (site / "stages/ce-stage.html").read_text(encoding="utf-8")
    assert 'href="ce-stage.files/history.html"' in design
    # every link on the history and diff pages resolves inside the site
    for page in [history, *diffs]:
        for target in links(page):
            resolved = posixpath.normpath(posixpath.join(posixpath.dirname(
                page.relative_to(site).as_posix()), target))
            assert (site / resolved).exists(), (page.name, target)
    # nothing machine-specific ends up in a page
    for page in [history, *diffs]:
        assert str(script.root) not in page.read_text(encoding="utf-8")


def test_diff_page_content(built):
    _, ids, site = built
    page = site / f"stages/ce-stage.files/diff-{ids['add'][:10]}-{ids['value'][:10]}.html"
    text = page.read_text(encoding="utf-8")
    assert "Parts re-valued" in text and "4k7" in text and "5k6" in text
    assert "+19.1 %" in text  # (5600 − 4700)/4700
    assert "Requirement verdicts that changed" in text
    assert "<del>-RC  resistor   4k7" in text and "<ins>+RC  resistor   5k6" in text
    rewire = site / f"stages/ce-stage.files/diff-{ids['value'][:10]}-{ids['rewire'][:10]}.html"
    assert "Parts re-wired" in rewire.read_text(encoding="utf-8")


def test_rebuild_solves_nothing_and_is_byte_identical(built, tmp_path, monkeypatch):
    script, _, site = built

    def no_solving(*args, **kwargs):
        raise AssertionError("a rebuild must take every revision from the cache")

    monkeypatch.setattr("docgen.pipeline.run", no_solving)
    again = tmp_path / "again"
    site_build(script.root, again)
    for path in sorted((site / "stages/ce-stage.files").iterdir()):
        assert (again / path.relative_to(site)).read_bytes() == path.read_bytes(), path.name


def test_changed_since_approval_flag_on_pages(built, tmp_path):
    script, _, _ = built
    script.edit(RENAMED, "5k6 1% 0.25 W           : vcc c1", "6k8 1% 0.25 W           : vcc c1")
    try:
        out = tmp_path / "flagged"
        site_build(script.root, out)
        index = (out / "index.html").read_text(encoding="utf-8")
        assert "changed since approval" in index
        design = (out / "stages/ce-stage.html").read_text(encoding="utf-8")
        assert "changed since approval (circuit)" in design
        history = (out / HISTORY).read_text(encoding="utf-8")
        assert 'id="approval"' in history and "RC re-valued 5k6 → 6k8" in history
    finally:
        script.git("checkout", "-q", "--", RENAMED)


def test_shallow_clone_builds_and_says_history_is_not_available(built, tmp_path):
    script, _, _ = built
    clone = tmp_path / "shallow"
    subprocess.run(["git", "clone", "-q", "--depth", "1", f"file://{script.root}", str(clone)],
                   env=git_env(), check=True)
    out = tmp_path / "site"
    site_build(clone, out)
    history = out / HISTORY
    parse_strict(history)
    assert "history is not available: this is a shallow clone" in history.read_text("utf-8")
    assert not list((out / "stages/ce-stage.files").glob("diff-*.html"))
    design = (out / "stages/ce-stage.html").read_text(encoding="utf-8")
    assert "not available" in design


def test_rebuild_takes_each_unchanged_history_as_kept(built, tmp_path, monkeypatch):
    # A rebuild at the same commits reads no revision again (each design's history pages are
    # kept under the key of what they were made from) and writes the same bytes as a build
    # whose cache holds no kept pages.
    import shutil

    from docgen.history import timeline

    script, _, site = built
    cache = script.root / ".docgen-cache"
    assert list((cache / "history" / "pages").rglob("*.json")), "the first build kept none"

    def no_reading(*args, **kwargs):
        raise AssertionError("an unchanged history must not be read again")

    monkeypatch.setattr(timeline, "revision_snapshots", no_reading)
    monkeypatch.setattr("docgen.history.site.revision_snapshots", no_reading)
    kept = tmp_path / "kept"
    site_build(script.root, kept)
    monkeypatch.undo()
    shutil.rmtree(cache / "history" / "pages")
    fresh = tmp_path / "fresh"
    site_build(script.root, fresh)
    files = sorted(p.relative_to(fresh) for p in fresh.rglob("*") if p.is_file())
    assert files == sorted(p.relative_to(kept) for p in kept.rglob("*") if p.is_file())
    for relative in files:
        assert (kept / relative).read_bytes() == (fresh / relative).read_bytes(), relative
