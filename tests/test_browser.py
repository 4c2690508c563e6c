"""Real-browser tests: Debian's chromium, driven by playwright, on the demo site.

Opens the index and every design page from ``file://`` and from a local static server; there
must be no console errors, no uncaught exceptions and no failed requests; the status and tag
filter must work, and the table must show in full without JavaScript.  Screenshots are saved in
``build/screenshots/`` for a person to look at.  In CI (``CI=true``) a missing browser is a
failure, never a skip.
"""

from __future__ import annotations

import functools
import http.server
import os
import threading
from collections.abc import Iterator
from pathlib import Path

import pytest
from site_helpers import REPO, build

pytestmark = pytest.mark.browser

CHROMIUM = Path("/usr/bin/chromium")
ARGS = ["--no-sandbox", "--disable-gpu", "--disable-background-networking",
        "--disable-component-update", "--disable-sync", "--no-first-run"]
SHOTS = REPO / "build" / "screenshots"


def _require_browser() -> None:
    missing = None
    try:
        import playwright.sync_api  # noqa: F401
    except ImportError:
        missing = "playwright is not installed"
    if missing is None and not CHROMIUM.exists():
        missing = f"{CHROMIUM} is not installed (apt-get install chromium)"
    if missing:
        if os.environ.get("CI", "").lower() in ("1", "true"):
            pytest.fail(f"browser tests cannot run in CI: {missing}")
        pytest.skip(missing)


@pytest.fixture(scope="module")
def demo_site(tmp_path_factory: pytest.TempPathFactory) -> Path:
    _require_browser()
    out = tmp_path_factory.mktemp("browser") / "site"
    report = build(REPO / "designs", out, jobs=os.cpu_count() or 1)
    assert report.pages > 0
    return out


@pytest.fixture(scope="module")
def browser() -> Iterator[object]:
    _require_browser()
    from playwright.sync_api import sync_playwright

    with sync_playwright() as playwright:
        chromium = playwright.chromium.launch(executable_path=str(CHROMIUM), args=ARGS)
        yield chromium
        chromium.close()


@pytest.fixture(scope="module")
def server(demo_site: Path) -> Iterator[str]:
    class Quiet(http.server.SimpleHTTPRequestHandler):
        def log_message(self, format: str, *args: object) -> None:  # noqa: A002
            pass

    handler = functools.partial(Quiet, directory=str(demo_site))
    httpd = http.server.ThreadingHTTPServer(("127.0.0.1", 0), handler)
    thread = threading.Thread(target=httpd.serve_forever, daemon=True)
    thread.start()
    yield f"http://127.0.0.1:{httpd.server_address[1]}"
    httpd.shutdown()
    httpd.server_close()


def _design_pages(site: Path) -> list[str]:
    return sorted(p.relative_to(site).as_posix() for p in site.glob("*.html")
                  if p.name not in ("index.html", "problems.html"))


class Visitor:
    """One browser tab that records console errors, page errors and failed requests."""

    def __init__(self, browser: object):
        self.page = browser.new_page(viewport={"width": 1200, "height": 900})  # type: ignore[attr-defined]
        self.problems: list[str] = []
        self.page.on("console", lambda m: self.problems.append(f"console {m.type}: {m.text}")
                     if m.type == "error" else None)
        self.page.on("pageerror", lambda e: self.problems.append(f"page error: {e}"))
        self.page.on("requestfailed",
                     lambda r: self.problems.append(f"failed: {r.url} {r.failure}"))
        self.page.on("response", lambda r: self.problems.append(f"HTTP {r.status}: {r.url}")
                     if r.status >= 400 else None)

    def visit(self, url: str, shot: str | None = None) -> list[str]:
        """Open ``url``; return the problems seen while it loaded."""
        self.problems.clear()
        self.page.goto(url, wait_until="load")
        if shot:
            SHOTS.mkdir(parents=True, exist_ok=True)
            self.page.screenshot(path=str(SHOTS / shot), full_page=True)
        return list(self.problems)


@pytest.mark.slow
def test_pages_load_cleanly_from_file_and_http(demo_site: Path, browser: object,
                                               server: str) -> None:
    pages = ["index.html", "problems.html", *_design_pages(demo_site)]
    assert len(pages) > 3
    from_file, from_server = Visitor(browser), Visitor(browser)
    for name in pages:
        stem = name.replace("/", "_").removesuffix(".html")
        assert from_file.visit((demo_site / name).as_uri(), f"{stem}.png") == [], name
        assert from_server.visit(f"{server}/{name}") == [], name
    from_file.page.close()
    from_server.page.close()


def test_filter_by_status_and_tag(demo_site: Path, browser: object) -> None:
    page = browser.new_page()  # type: ignore[attr-defined]
    page.goto((demo_site / "index.html").as_uri())
    rows = page.locator("#designs tbody tr")
    total = rows.count()
    assert page.locator("#filters").is_visible()
    statuses = sorted({rows.nth(i).get_attribute("data-status") for i in range(total)})
    for status in statuses:
        page.select_option("#filter-status", status)
        visible = [rows.nth(i).get_attribute("data-status") for i in range(total)
                   if rows.nth(i).is_visible()]
        assert visible and set(visible) == {status}
        expected = sum(rows.nth(i).get_attribute("data-status") == status for i in range(total))
        assert len(visible) == expected
        assert page.locator("#filter-count").inner_text() == f"{expected} of {total} designs shown"
    page.select_option("#filter-status", "")
    tag = page.locator("#filter-tag option").nth(1).get_attribute("value")
    page.select_option("#filter-tag", tag)
    for i in range(total):
        tags = (rows.nth(i).get_attribute("data-tags") or "").split("|")
        assert rows.nth(i).is_visible() == (tag in tags)
    page.select_option("#filter-tag", "")
    assert all(rows.nth(i).is_visible() for i in range(total))
    page.close()


def test_index_without_javascript_is_a_plain_table(demo_site: Path, browser: object) -> None:
    context = browser.new_context(java_script_enabled=False)  # type: ignore[attr-defined]
    page = context.new_page()
    page.goto((demo_site / "index.html").as_uri())
    rows = page.locator("#designs tbody tr")
    assert rows.count() > 0 and all(rows.nth(i).is_visible() for i in range(rows.count()))
    assert not page.locator("#filters").is_visible()
    context.close()
