"""Writing the site: every page rendered into a staged folder, then swapped into place."""

from __future__ import annotations

import subprocess
from importlib import resources
from pathlib import Path
from typing import Any

from docgen import __version__
from docgen.diagnostics import Diagnostic, Span
from docgen.site import pages as page_contexts
from docgen.site.compute import results_text
from docgen.site.output import StagedSite
from docgen.site.pages import SiteContext
from docgen.site.parts import parts_csv
from docgen.site.paths import files_dir, page_path, root_prefix
from docgen.site.providers import Contribution, ProviderInput, load_providers
from docgen.site.record_view import RecordView
from docgen.site.render import keep_compiled_templates, render

SITE_NAME = "Design notebook"
ASSETS = ("docgen.css", "favicon.svg", "filter.js", "live-reload.js")
STATUS_ORDER = ("draft", "review", "approved", "retired")


def _git(root: Path, *args: str) -> str | None:
    try:
        return subprocess.run(["git", *args], cwd=root, capture_output=True, text=True,
                              check=True, timeout=60).stdout
    except (OSError, subprocess.SubprocessError):
        return None


def last_changes(root: Path) -> dict[str, str]:
    """``source_rel`` -> "date, commit" of the last commit that touched it (from git), with a
    note when the working copy differs; nothing outside a git checkout."""
    out = _git(root, "log", "--format=%x00%cs %h", "--name-only", "--relative", "--", ".")
    if out is None:
        return {}
    found: dict[str, str] = {}
    for block in out.split("\0")[1:]:
        lines = block.strip("\n").split("\n")
        stamp = lines[0].strip()
        for name in lines[1:]:
            if name.strip():
                found.setdefault(name.strip(), stamp.replace(" ", ", commit "))
    changed = _git(root, "ls-files", "--modified", "--others", "--exclude-standard") or ""
    for name in changed.splitlines():
        found[name] = (found[name] + " (uncommitted changes since)" if name in found
                       else "not committed yet")
    return found


def local_files(root: Path) -> frozenset[str]:
    """Files other than pages under the designs folder (images a note may show)."""
    return frozenset(p.relative_to(root).as_posix() for p in sorted(root.rglob("*"))
                     if p.is_file() and p.suffix != ".md"
                     and not any(part.startswith(".") for part in p.relative_to(root).parts))


def _scope(view: RecordView, statuses: frozenset[str] | None, shown: int) -> tuple[str, str]:
    total = sum(1 for e in view.entries.values() if e.kind == "design" and e.design is not None)
    if statuses is None:
        return (f"Working site: every design in the record ({total}).",
                "Every design is included, whatever its status.")
    words = ", ".join(page_contexts.STATUS_WORDS[s].lower() for s in STATUS_ORDER if s in statuses)
    return (f"Release site: designs with status {words} only ({shown} of {total}).",
            f"This site includes only designs whose status is {words}: {shown} of the {total} "
            "designs in the record. Links to the others are removed.")


def write_site(view: RecordView, in_site: list[str], bundles: dict[str, dict[str, Any]],
               options: Any) -> tuple[int, list[Diagnostic]]:
    """Render and publish every page; return (files written, diagnostics from rendering)."""
    root = Path(options.designs_dir)
    keep_compiled_templates(Path(options.cache_dir) / "templates" if options.cache_dir
                            else None)
    pages = {rel: page_path(rel) for rel in in_site}
    site = SiteContext(pages, frozenset(view.entries), local_files(root), last_changes(root))
    site.titles = {rel: e.design.header.title for rel, e in view.entries.items()
                   if e.design is not None and e.design.header.title}
    designs = [rel for rel in in_site if view.entries[rel].kind == "design"]
    staged = StagedSite(Path(options.out_dir))
    try:
        count, diagnostics = _write_all(view, designs, bundles, site, staged, options)
        staged.publish()
    except BaseException:
        staged.discard()
        raise
    return count, diagnostics


def _base(page_path: str, title: str, chrome: dict[str, Any], **context: Any
          ) -> dict[str, Any]:
    return {"root": root_prefix(page_path), "title": title, "site": chrome, **context}


def _write_all(view: RecordView, designs: list[str], bundles: dict[str, dict[str, Any]],
               site: SiteContext, staged: StagedSite, options: Any
               ) -> tuple[int, list[Diagnostic]]:
    written: dict[str, str | bytes] = {}
    diagnostics: list[Diagnostic] = []
    problems = _problems(view, designs, bundles, site)
    shown = [rel for rel in designs if rel in bundles or view.entries[rel].design is not None]
    scope, scope_detail = _scope(view, options.statuses, len(shown))
    chrome = {"name": SITE_NAME, "version": __version__, "scope": scope,
              "has_problems": bool(problems), "problem_count": len(problems),
              "nav_links": [], "live_reload": options.live_reload}

    def render_page(template: str, page_path: str, title: str, **context: Any) -> str:
        return render(template, **_base(page_path, title, chrome, **context))

    contribution = _run_providers(view, designs, bundles, site, render_page, options,
                                  diagnostics)
    chrome["nav_links"] = [{"href": link.target, "text": link.text}
                           for link in contribution.nav_links]
    site.design_links = contribution.design_links
    rows = []
    copied: set[str] = set()
    for rel in designs:
        entry, page = view.entries[rel], site.pages[rel]
        bundle = bundles.get(rel) or {"results": None, "errors": [], "sections": [],
                                      "schematic": None,
                                      "schematic_problem": "the design has input errors"}
        context, notes = page_contexts.design_context(entry, bundle, page, site)
        diagnostics.extend(notes.diagnostics)
        copied |= notes.copied_files
        written[page] = render_page("design.html", page, context["title"], page=context)
        _design_files(written, entry, page, bundle)
        flags = list(contribution.index_flags.get(rel, []))
        rows.append(page_contexts.index_row(entry, bundle, page, site, flags))
    notebook = []
    for rel, entry in view.entries.items():
        if rel in site.pages and entry.kind != "design":
            page = site.pages[rel]
            context, notes = page_contexts.note_context(entry, page, site)
            diagnostics.extend(notes.diagnostics)
            copied |= notes.copied_files
            written[page] = render_page("note.html", page, context["title"], page=context)
            written[files_dir(page) + "/source.md"] = entry.source
            summary = entry.design.header.summary if entry.design is not None else None
            notebook.append({"href": page, "title": context["title"], "summary": summary,
                             "kind": entry.kind})
    index = _index(rows, notebook, problems, scope_detail)
    written["index.html"] = render_page("index.html", "index.html", "All designs", index=index)
    written["problems.html"] = render_page("problems.html", "problems.html",
                                           "Files that could not be read or solved",
                                           problems=problems)
    for rel in sorted(copied):
        written[rel] = (Path(options.designs_dir) / rel).read_bytes()
    written.update(contribution.files)
    written["README.md"] = README
    for name in ASSETS:
        written[f"assets/{name}"] = resources.files("docgen").joinpath("assets", name).read_bytes()
    for rel in sorted(written):
        staged.write(rel, written[rel])
    return len(written), diagnostics


def _design_files(written: dict[str, str | bytes], entry: Any, page: str,
                  bundle: dict[str, Any]) -> None:
    folder = files_dir(page)
    written[f"{folder}/source.md"] = entry.source
    written[f"{folder}/parts.csv"] = parts_csv(entry.design)
    if bundle.get("results") is not None:
        written[f"{folder}/results.json"] = bundle.get("results_json") or \
            results_text(bundle["results"])
    if bundle.get("schematic"):
        written[f"{folder}/schematic.svg"] = bundle["schematic"]
    for section in bundle.get("sections") or []:
        for fig in section.get("figures") or []:
            written[f"{folder}/{fig['file']}"] = fig["svg"]


def _index(rows: list[dict[str, Any]], notebook: list[dict[str, Any]],
           problems: list[dict[str, Any]], scope_detail: str) -> dict[str, Any]:
    rows = sorted(rows, key=lambda r: (r["title"].casefold(), r["href"]))
    present = {r["status"] for r in rows}
    return {
        "rows": rows,
        "statuses": [{"value": s, "text": page_contexts.STATUS_WORDS[s]} for s in STATUS_ORDER
                     if s in present],
        "tags": sorted({t for r in rows for t in r["tags"]}, key=str.casefold),
        "notebook": sorted(notebook, key=lambda n: (n["title"].casefold(), n["href"])),
        "problems": len(problems),
        "scope_detail": scope_detail,
        "elv_warnings": [{"href": r["href"], "title": r["title"],
                          "text": "a supply exceeds extra-low voltage; see the design page"}
                         for r in rows if r["hazard"]],
    }


def _problems(view: RecordView, designs: list[str], bundles: dict[str, dict[str, Any]],
              site: SiteContext) -> list[dict[str, Any]]:
    out = []
    for rel, entry in view.entries.items():
        found = [d.to_json() for d in entry.diagnostics if d.severity == "error"]
        bundle = bundles.get(rel) or {}
        found += [e for e in bundle.get("errors") or [] if e.get("severity") == "error"]
        found += [e for e in (bundle.get("results") or {}).get("errors") or []]
        if entry.design is not None and rel not in designs and entry.kind == "design":
            continue  # left out of this site by the status filter
        if found:
            page = site.pages.get(rel)
            out.append({"path": entry.path, "diagnostics": page_contexts.diag_json(found),
                        "href": page if page else None})
    record_wide = [d.to_json() for d in view.diagnostics if d.severity == "error"]
    if record_wide:
        out.append({"path": "the record as a whole", "diagnostics": record_wide, "href": None})
    return out


def _run_providers(view: RecordView, designs: list[str], bundles: dict[str, dict[str, Any]],
                   site: SiteContext, render_page: Any, options: Any,
                   diagnostics: list[Diagnostic]) -> Contribution:
    total = Contribution()
    cache = options.cache_dir
    if cache is None:  # None asks for the build's default folder; False turns caching off
        from docgen.site.build import default_cache_dir

        cache = default_cache_dir(options.designs_dir)
    given = ProviderInput(view, designs, dict(site.pages), bundles, render_page,
                          Path(cache) if cache else None, options.jobs or 1)
    for provide in load_providers(options.providers):
        try:
            part = provide(given)
        except Exception as exc:  # noqa: BLE001 - a provider bug must not lose the site
            diagnostics.append(Diagnostic("<docgen>", Span(1, 1), "error",
                                          f"page provider {provide.__module__} failed: "
                                          f"{type(exc).__name__}: {exc}"))
            continue
        total.files.update(part.files)
        for rel, links in part.design_links.items():
            total.design_links.setdefault(rel, []).extend(links)
        for rel, flags in part.index_flags.items():
            total.index_flags.setdefault(rel, []).extend(flags)
        total.nav_links.extend(part.nav_links)
    return total


#: the site's README, identical to the one kept in git so a build leaves the tree clean
README = """# site/

The default output folder of `docgen build`: the published notebook (static HTML, plots,
schematics, results JSON). Everything here except this README is generated and ignored by git;
`docgen build` rewrites this README itself, so a rebuild never loses it.
"""
