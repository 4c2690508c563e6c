"""The designer's prose rendered to safe HTML: CommonMark with raw HTML off and links checked.

* Raw HTML in the source is never passed through (markdown-it-py with ``html`` off escapes it).
* Links: ``http``, ``https`` and ``mailto`` stay; a relative link to another ``.md`` page of the
  record becomes a relative link to its ``.html`` page; a link to a page left out of this site
  (status filter) or to a file that does not exist becomes plain text; any other scheme
  (``javascript:``, ``data:``, ``vbscript:``...) becomes plain text.
* A code span that starts with ``=`` is a live value: the metric after ``=`` is evaluated on the
  design's results and the number is shown; an unknown metric shows a visible marker and
  yields a diagnostic pointing at the file, line and column.
* The data blocks (``circuit``, ``require``...) are shown as a pointer to the table that
  presents them rather than repeated.
"""

from __future__ import annotations

import posixpath
from collections.abc import Callable, Mapping
from dataclasses import dataclass, field
from urllib.parse import urlsplit

from markdown_it import MarkdownIt
from markdown_it.common.utils import escapeHtml

from docgen.diagnostics import Diagnostic, Span
from docgen.site.paths import relative_url

#: fenced block tags that hold data shown elsewhere on the page -> (section anchor, words)
DATA_BLOCKS: dict[str, tuple[str, str]] = {
    "circuit": ("parts", "parts list and schematic"),
    "models": ("models", "device models"),
    "bench": ("bench", "bench conditions"),
    "require": ("requirements", "requirements table"),
    "estimate": ("estimates", "hand estimates"),
    "layout": ("schematic", "schematic"),
}
SAFE_SCHEMES = frozenset({"http", "https", "mailto"})


@dataclass(frozen=True, slots=True)
class LiveValue:
    """What a live value shows: the formatted value, or a problem (and whether it is an error)."""

    text: str | None
    problem: str | None = None
    hint: str | None = None
    unknown: bool = False


@dataclass
class ProseTargets:
    """Where links may point.

    :param pages: source path (relative to the designs folder) -> site path, for pages in the site.
    :param sources: every page of the record, in the site or not.
    :param files: other files of the designs folder a note may link to or show (copied as is).
    """

    pages: Mapping[str, str]
    sources: frozenset[str]
    files: frozenset[str] = frozenset()


@dataclass
class RenderedProse:
    """The HTML of a page's prose, the diagnostics found, and local files it needs copied."""

    html: str
    diagnostics: list[Diagnostic] = field(default_factory=list)
    copied_files: set[str] = field(default_factory=set)


def blank_header(text: str) -> str:
    """The text with its ``---`` header replaced by blank lines (line numbers stay true)."""
    lines = text.split("\n")
    if not lines or lines[0].strip() != "---":
        return text
    for index in range(1, len(lines)):
        if lines[index].strip() == "---":
            return "\n" * (index + 1) + "\n".join(lines[index + 1:])
    return text


def _parser() -> MarkdownIt:
    md = MarkdownIt("commonmark", {"html": False, "linkify": False, "typographer": False})
    md.enable(["table", "strikethrough"])
    md.add_render_rule("fence", _render_fence)
    md.add_render_rule("code_inline", _render_code_inline)
    md.add_render_rule("link_open", _render_link_open)
    md.add_render_rule("link_close", _render_link_close)
    md.add_render_rule("image", _render_image)
    md.add_render_rule("heading_open", _render_heading)
    md.add_render_rule("heading_close", _render_heading)
    return md


def render_prose(text: str, *, source_rel: str, page: str, targets: ProseTargets,
                 live: Callable[[str], LiveValue] | None,
                 display_path: str | None = None, heading_shift: int = 0) -> RenderedProse:
    """Render one page's Markdown (header removed) to HTML for the site page at ``page``.

    :param display_path: the file path diagnostics name (default ``source_rel``).
    :param heading_shift: levels to demote headings by (a design page's notes sit under the
        page title, so their ``#`` becomes ``h2``).
    """
    body = blank_header(text)
    lines = body.split("\n")
    md = _parser()
    out = RenderedProse("")
    shown = display_path or source_rel
    env = {"live": live, "out": out, "source_rel": shown, "heading_shift": heading_shift}
    tokens = md.parse(body, env)
    for token in tokens:
        if token.type == "inline" and token.children:
            where = _Where(source_rel, shown, token.map, lines)
            _prepare_inline(token.children, where, page, targets, out)
    out.html = md.renderer.render(tokens, md.options, env)
    return out


@dataclass(frozen=True, slots=True)
class _Where:
    """The source of an inline run: its page, the path to name, and its line range."""

    source_rel: str
    shown: str
    line_map: list[int] | None
    lines: list[str]

    def span(self, needle: str) -> Span:
        """Where ``needle`` first appears in this run's lines."""
        return _find_span(needle, self.line_map, self.lines)


def _prepare_inline(children: list, where: _Where, page: str, targets: ProseTargets,
                    out: RenderedProse) -> None:
    """Decide each link's fate and each live value's position before rendering."""
    open_links: list = []
    for child in children:
        if child.type == "link_open":
            href = _rewrite(child.attrGet("href") or "", where, page, targets, out)
            child.meta["drop"] = href is None
            if href is not None:
                child.attrSet("href", href)
            open_links.append(child)
        elif child.type == "link_close" and open_links:
            child.meta["drop"] = open_links.pop().meta["drop"]
        elif child.type == "image":
            src = _rewrite(child.attrGet("src") or "", where, page, targets, out,
                           allow_remote=False)
            child.meta["drop"] = src is None
            if src is not None:
                child.attrSet("src", src)
        elif child.type == "code_inline" and child.content.startswith("="):
            child.meta["span"] = where.span(child.markup + child.content)


def _find_span(needle: str, line_map: list[int] | None, lines: list[str]) -> Span:
    """The 1-based line and column of a code span inside its paragraph's lines."""
    first, last = line_map if line_map else (0, len(lines))
    for index in range(first, min(last, len(lines))):
        col = lines[index].find(needle)
        if col >= 0:
            return Span(index + 1, col + 1, len(needle))
    return Span(first + 1, 1, 1)


def _rewrite(url: str, where: _Where, page: str, targets: ProseTargets,
             out: RenderedProse, *, allow_remote: bool = True) -> str | None:
    """The URL to write for a link in the source, or ``None`` to render plain text instead."""
    parts = urlsplit(url)
    if parts.scheme or parts.netloc:
        ok = allow_remote and parts.scheme.lower() in SAFE_SCHEMES and "\\" not in url
        return url if ok else None
    if not parts.path:
        return url if parts.fragment and not parts.query else None
    here = posixpath.dirname(where.source_rel)
    target = posixpath.normpath(posixpath.join(here, parts.path))
    fragment = f"#{parts.fragment}" if parts.fragment else ""
    if target in targets.pages:
        return relative_url(page, targets.pages[target]) + fragment
    if target in targets.files and not target.endswith(".md"):
        out.copied_files.add(target)
        return relative_url(page, target)
    if target not in targets.sources:
        out.diagnostics.append(Diagnostic(where.shown, where.span(f"({url}"), "warning",
                                          f"link to '{parts.path}', which is not in the record",
                                          "check the relative path from this page"))
    return None


def _render_fence(self, tokens, idx, options, env) -> str:  # noqa: ANN001 - markdown-it rule
    token = tokens[idx]
    tag = token.info.strip().split(" ")[0] if token.info else ""
    if tag in DATA_BLOCKS:
        anchor, words = DATA_BLOCKS[tag]
        return (f'<p class="block-pointer">The <code>{escapeHtml(tag)}</code> block is shown '
                f'in the <a href="#{anchor}">{words}</a>.</p>\n')
    return f"<pre><code>{escapeHtml(token.content)}</code></pre>\n"


def _render_code_inline(self, tokens, idx, options, env) -> str:  # noqa: ANN001
    token = tokens[idx]
    if not token.content.startswith("="):
        return f"<code>{escapeHtml(token.content)}</code>"
    metric = token.content[1:].strip()
    live = env.get("live")
    value = live(metric) if live else LiveValue(None, "results not computed")
    if value.text is not None:
        return (f'<span class="live" title="{escapeHtml(metric)}">'
                f"{escapeHtml(value.text)}</span>")
    if value.unknown:
        span = token.meta.get("span", Span(1, 1))
        out: RenderedProse = env["out"]
        out.diagnostics.append(Diagnostic(env["source_rel"], span, "warning",
                                          f"live value: {value.problem}", value.hint))
    label = "unknown metric" if value.unknown else "not computed"
    return (f'<span class="live live-missing" title="{escapeHtml(value.problem or "")}">'
            f"[{label}: {escapeHtml(metric)}]</span>")


def _render_heading(self, tokens, idx, options, env) -> str:  # noqa: ANN001
    token = tokens[idx]
    level = min(6, int(token.tag[1]) + env.get("heading_shift", 0))
    return f"<h{level}>" if token.nesting == 1 else f"</h{level}>\n"


def _render_link_open(self, tokens, idx, options, env) -> str:  # noqa: ANN001
    token = tokens[idx]
    if token.meta.get("drop"):
        return '<span class="link-removed">'
    href = escapeHtml(token.attrGet("href") or "")
    return f'<a href="{href}">'


def _render_link_close(self, tokens, idx, options, env) -> str:  # noqa: ANN001
    return "</span>" if tokens[idx].meta.get("drop") else "</a>"


def _render_image(self, tokens, idx, options, env) -> str:  # noqa: ANN001
    token = tokens[idx]
    alt = self.renderInlineAsText(token.children or [], options, env)
    if token.meta.get("drop"):
        return f'<span class="link-removed">[image: {escapeHtml(alt)}]</span>'
    return f'<img src="{escapeHtml(token.attrGet("src") or "")}" alt="{escapeHtml(alt)}">'
