"""The built site: links, WHATWG parsing, escaping, hostile notes, status filter, exit codes.

References: WHATWG HTML (parsed with html5lib in strict mode, which raises on every parse error
the standard defines); the exit codes are docgen's documented contract (DEVELOPERS.md).
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest
from site_helpers import (
    FIXTURES,
    broken_links,
    build,
    copy_fixtures,
    html_pages,
    links,
    parse_strict,
)

HOSTILE_TITLE = "Odd <b>title</b> & \"quotes\" 'too'"


@pytest.fixture(scope="module")
def built(tmp_path_factory: pytest.TempPathFactory) -> tuple[Path, object]:
    root = tmp_path_factory.mktemp("site-build")
    designs = copy_fixtures(root / "designs")
    report = build(designs, root / "site", cache_dir=root / "cache")
    return root / "site", report


def test_pages_exist_for_every_readable_page(built: tuple[Path, object]) -> None:
    site, _ = built
    names = {p.relative_to(site).as_posix() for p in html_pages(site)}
    assert {"index.html", "problems.html", "rc-filter.html", "divider.html", "hostile.html",
            "notes/overview.html"} <= names
    assert "broken.html" not in names  # unreadable: listed on the problems page instead
    assert (site / "README.md").read_text().startswith("# site/")
    for name in ("results.json", "source.md", "parts.csv"):
        assert (site / "rc-filter.files" / name).is_file()


def test_every_link_resolves(built: tuple[Path, object]) -> None:
    site, _ = built
    assert broken_links(site) == []


def test_every_page_parses_as_whatwg_html(built: tuple[Path, object]) -> None:
    site, _ = built
    for page in html_pages(site):
        parse_strict(page.read_bytes())  # raises html5lib's ParseError on any error


def test_exit_code_says_input_errors(built: tuple[Path, object]) -> None:
    _, report = built
    assert report.exit_code == 2  # broken.md has input errors; 2 outranks 1
    assert any(d.path.endswith("broken.md") and d.severity == "error"
               for d in report.diagnostics)


def test_problems_page_lists_the_unreadable_file_with_positions(built: tuple[Path, object]) -> None:
    site, _ = built
    text = (site / "problems.html").read_text()
    assert "broken.md" in text
    assert re.search(r"broken\.md:7:\d+", text)
    assert "problems.html" in (site / "index.html").read_text()


def _all_elements(site: Path):
    for page in html_pages(site):
        tree = parse_strict(page.read_bytes())
        for element in tree.iter():  # type: ignore[attr-defined]
            yield page, element


def test_hostile_notes_are_inert(built: tuple[Path, object]) -> None:
    site, _ = built
    for page, element in _all_elements(site):
        tag = element.tag if isinstance(element.tag, str) else ""
        if tag == "script":
            assert (element.get("src") or "").endswith("assets/filter.js"), page
        for name, value in element.attrib.items():
            assert not name.lower().startswith("on"), (page, name)
            if name in ("href", "src"):
                scheme = value.split(":", 1)[0].strip().lower() if ":" in value else ""
                assert scheme in ("", "http", "https", "mailto"), (page, value)
    hostile = (site / "hostile.html").read_text()
    assert "&lt;script&gt;alert" in hostile  # the raw HTML is shown as text, escaped
    assert "<img src=x" not in hostile


def test_title_is_escaped_everywhere(built: tuple[Path, object]) -> None:
    site, _ = built
    escaped = "Odd &lt;b&gt;title&lt;/b&gt; &amp; &#34;quotes&#34; &#39;too&#39;"
    for name in ("index.html", "hostile.html"):
        text = (site / name).read_text()
        assert "<b>title</b>" not in text
        assert escaped in text, name
    titles = [element.text for page, element in _all_elements(site)
              if element.tag == "title" and page.name == "hostile.html"]
    assert titles and titles[0].startswith(HOSTILE_TITLE)


def test_links_between_pages_are_rewritten(built: tuple[Path, object]) -> None:
    site, _ = built
    overview = (site / "notes" / "overview.html").read_text()
    assert 'href="../rc-filter.html"' in overview
    assert 'href="../divider.html#bias-divider"' in overview
    assert 'href="https://example.org/"' in overview
    assert 'href="notes/overview.html#chain"' in (site / "rc-filter.html").read_text()


def test_unknown_live_metric_is_marked_and_diagnosed(built: tuple[Path, object]) -> None:
    site, report = built
    page = (site / "rc-filter.html").read_text()
    assert "[unknown metric: gian at 1 kHz]" in page
    found = [d for d in report.diagnostics if "gian" in d.message]
    assert found and found[0].path.endswith("rc-filter.md")
    assert (found[0].line, found[0].col) == (17, 35)  # the code span's place in the file


def test_safety_sentence_on_every_page(built: tuple[Path, object]) -> None:
    site, _ = built
    for page in html_pages(site):
        text = page.read_text()
        assert "Computed results are design aids; confirm them on the bench." in text
        assert "follow local codes and licensed practice" in text


def test_status_filter_removes_excluded_designs_cleanly(tmp_path: Path) -> None:
    designs = copy_fixtures(tmp_path / "designs")
    site = tmp_path / "site"
    report = build(designs, site, cache_dir=tmp_path / "cache",
                   statuses=frozenset({"approved"}))
    assert not (site / "divider.html").exists() and not (site / "hostile.html").exists()
    assert not any("divider.html" in url or "hostile.html" in url
                   for page in html_pages(site) for _, url in links(page))
    assert broken_links(site) == []
    index = (site / "index.html").read_text()
    assert "designs with status approved only (1 of 3)" in index
    filter_page = (site / "rc-filter.html").read_text()
    assert '<span class="link-removed">divider</span>' in filter_page
    assert report.exit_code == 2  # the unreadable file is still an input error


def test_rebuild_replaces_the_old_site_and_leaves_no_staging(tmp_path: Path) -> None:
    designs = copy_fixtures(tmp_path / "designs")
    site = tmp_path / "site"
    build(designs, site, cache_dir=tmp_path / "cache")
    (site / "stale-file.html").write_text("left over")
    build(designs, site, cache_dir=tmp_path / "cache")
    assert not (site / "stale-file.html").exists()
    assert sorted(p.name for p in tmp_path.iterdir()) == ["cache", "designs", "site"]


def test_hazardous_supply_is_warned_prominently(tmp_path: Path) -> None:
    """A 150 V DC supply exceeds extra-low voltage (IEC 61140: 120 V ripple-free DC, from
    memory); the checks flag it and the pages show it above everything else."""
    site = tmp_path / "site"
    build(FIXTURES.parent / "site-hazard", site, cache_dir=tmp_path / "cache")
    page = (site / "hv.html").read_text()
    warning = page.index('class="caution caution-danger"')
    assert warning < page.index('id="schematic"')
    assert "HAZARDOUS VOLTAGE" in page and "Hazardous voltage:" in page
    index = (site / "index.html").read_text()
    assert "caution caution-danger" in index and 'href="hv.html"' in index


GATED = """---
title: Gate fixture
status: {status}
owner: Test Owner
approved: 2026-02-01
---

```circuit
VB  supply    9 V                : vcc gnd
R1  resistor  10k 1% 0.25 W      : vcc mid
R2  resistor  10k 1% 0.25 W      : mid gnd
```

```require
voltage at mid : 6 V .. 7 V
```
"""


@pytest.mark.parametrize("status, code", [("draft", 0), ("review", 1), ("approved", 1),
                                          ("retired", 0)])
def test_exit_code_one_for_failing_review_or_approved_design(tmp_path: Path, status: str,
                                                              code: int) -> None:
    """An equal divider from 9 V gives 4.5 V (Ohm's law), outside 6..7 V: the requirement
    fails, which only gates designs in review or approved (DEVELOPERS.md exit codes)."""
    designs = tmp_path / "designs"
    designs.mkdir()
    (designs / "gate.md").write_text(GATED.format(status=status))
    report = build(designs, tmp_path / "site", cache_dir=tmp_path / "cache")
    assert report.exit_code == code
    assert report.failing == (["gate.md"] if code else [])
    assert "FAILS" in (tmp_path / "site" / "gate.html").read_text()


@pytest.mark.slow
def test_demo_site_links_resolve_and_pages_parse(tmp_path: Path) -> None:
    """The real designs/ folder: every link resolves and every page is valid WHATWG HTML."""
    from site_helpers import REPO

    report = build(REPO / "designs", tmp_path / "site", jobs=2)
    assert report.exit_code in (0, 1), [d.render() for d in report.diagnostics]
    site = tmp_path / "site"
    assert broken_links(site) == []
    for page in html_pages(site):
        parse_strict(page.read_bytes())
    assert len(list(site.glob("*.files/results.json"))) >= 8
