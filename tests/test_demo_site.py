"""The bundled demo record publishes: every page renders, no errors, and each design's page
carries its schematic and results (WHATWG HTML parsing via html5lib, the published standard)."""

from __future__ import annotations

from pathlib import Path

import pytest
from demo_helpers import DESIGNS


@pytest.mark.slow
def test_the_demo_record_builds_into_a_site_without_errors(tmp_path: Path) -> None:
    import html5lib

    from docgen.site.build import BuildOptions, build_site

    report = build_site(BuildOptions(DESIGNS, tmp_path / "site", jobs=None, cache_dir=False,
                                     progress=False, providers=[]))
    errors = [d.headline() for d in report.diagnostics if d.severity == "error"]
    assert errors == []
    assert report.failing == []  # approved and in-review designs all meet their requirements
    for page in DESIGNS.rglob("*.md"):
        stem = page.relative_to(DESIGNS).with_suffix("")
        html = (tmp_path / "site" / stem).with_suffix(".html")
        assert html.is_file(), stem
        html5lib.HTMLParser(strict=True).parse(html.read_bytes())
        if "```circuit" in page.read_text(encoding="utf-8"):
            files = (tmp_path / "site" / stem).with_suffix(".files")
            assert (files / "schematic.svg").is_file() and (files / "results.json").is_file()
