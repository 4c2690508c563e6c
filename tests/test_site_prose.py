"""Prose rendering: raw HTML off, links sanitised and rewritten, live values, positions.

References: CommonMark 0.31 (raw HTML blocks and inline HTML are disabled here, so they are
shown as text); WHATWG URL scheme handling — any scheme other than http, https and mailto is
refused, whatever its letter case or surrounding whitespace.
"""

from __future__ import annotations

import pytest

from docgen.site.prose import LiveValue, ProseTargets, blank_header, render_prose

TARGETS = ProseTargets(pages={"a/other.md": "a/other.html", "top.md": "top.html"},
                       sources=frozenset({"a/page.md", "a/other.md", "top.md", "a/left-out.md"}),
                       files=frozenset({"a/plot.png"}))


def _render(text: str, live=None) -> object:  # noqa: ANN001
    return render_prose(text, source_rel="a/page.md", page="a/page.html", targets=TARGETS,
                        live=live)


@pytest.mark.parametrize("source, forbidden", [
    ("<script>alert(1)</script>", "<script"),
    ('<img src=x onerror="alert(1)">', "<img"),
    ("text <span onmouseover=alert(1)>x</span>", "<span onmouseover"),
    ("[a](javascript:alert(1))", 'href="javascript'),
    ("[a](JaVaScRiPt:alert(1))", "href"),
    ("[a](  javascript:alert(1))", "href"),
    ("[a](vbscript:msgbox(1))", "href"),
    ("[a](data:text/html,<script>alert(1)</script>)", "href"),
    ("<javascript:alert(1)>", "href"),
    ("![x](javascript:alert(1))", "<img"),
    ("![x](https://tracker.example/pixel.png)", "<img"),
    ("[a](file:///etc/passwd)", "href"),
])
def test_hostile_markup_is_inert(source: str, forbidden: str) -> None:
    html = _render(source).html
    assert forbidden not in html


@pytest.mark.parametrize("source, expected", [
    ("[o](other.md)", 'href="other.html"'),
    ("[o](other.md#section)", 'href="other.html#section"'),
    ("[t](../top.md)", 'href="../top.html"'),
    ("[w](https://example.org/x?y=1&z=2)", 'href="https://example.org/x?y=1&amp;z=2"'),
    ("[m](mailto:team@example.org)", 'href="mailto:team@example.org"'),
    ("[here](#parts)", 'href="#parts"'),
    ("![plot](plot.png)", 'src="plot.png"'),
])
def test_links_are_kept_or_rewritten(source: str, expected: str) -> None:
    assert expected in _render(source).html


def test_link_to_a_page_left_out_becomes_plain_text_without_warning() -> None:
    rendered = _render("see [the draft](left-out.md)")
    assert "<a" not in rendered.html and "the draft" in rendered.html
    assert rendered.diagnostics == []


def test_link_to_a_missing_page_warns_with_its_position() -> None:
    rendered = _render("---\ntitle: x\n---\n\nline five\nsee [gone](gone.md) now\n")
    assert "<a" not in rendered.html
    (diagnostic,) = rendered.diagnostics
    assert (diagnostic.line, diagnostic.severity) == (6, "warning")
    assert diagnostic.col == len("see [gone]") + 1


def test_local_image_is_copied() -> None:
    assert _render("![plot](plot.png)").copied_files == {"a/plot.png"}


def test_live_values_show_value_or_marker() -> None:
    def live(metric: str) -> LiveValue:
        if metric == "gain at 1 kHz":
            return LiveValue("20.1 dB")
        if metric == "noise figure":
            return LiveValue(None, "not computed: the noise analysis did not run")
        return LiveValue(None, f"unknown word '{metric}'", "did you mean 'gain'?", unknown=True)

    text = "Gain `= gain at 1 kHz`, NF `= noise figure`,\nbad `= gian <b>`. Code `x = 1`."
    rendered = _render(text, live)
    assert '<span class="live" title="gain at 1 kHz">20.1 dB</span>' in rendered.html
    assert "[not computed: noise figure]" in rendered.html
    assert "[unknown metric: gian &lt;b&gt;]" in rendered.html
    assert "<code>x = 1</code>" in rendered.html
    (diagnostic,) = rendered.diagnostics
    assert (diagnostic.line, diagnostic.col) == (2, 5)
    assert diagnostic.hint == "did you mean 'gain'?"


def test_data_blocks_point_to_their_tables() -> None:
    html = _render("```circuit\nR1 resistor 1k : a b\n```\n\n```python\nx = '<b>'\n```\n").html
    assert 'href="#parts"' in html and "R1 resistor" not in html
    assert "x = &#x27;&lt;b&gt;&#x27;" in html or "x = '&lt;b&gt;'" in html


def test_header_is_blanked_but_lines_are_kept() -> None:
    text = "---\ntitle: t\nstatus: draft\n---\n# Heading\n"
    assert blank_header(text).split("\n")[4] == "# Heading"
    assert "title" not in _render(text).html


def test_headings_can_be_demoted() -> None:
    html = render_prose("# A\n\n## B\n", source_rel="x.md", page="x.html", targets=TARGETS,
                        live=None, heading_shift=1).html
    assert html.startswith("<h2>A</h2>") and "<h3>B</h3>" in html
