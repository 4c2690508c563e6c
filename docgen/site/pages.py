"""Template contexts for the pages: a design page, a notebook page, the index, the problems page.

Everything shown is read from a design, its results and the record; nothing is computed here
beyond formatting.  Links are relative to the page being rendered.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from docgen.design import Design, ModelDef
from docgen.diagnostics import Diagnostic
from docgen.site import verdicts
from docgen.site.parts import part_rows
from docgen.site.paths import files_dir, relative_url
from docgen.site.prose import ProseTargets, RenderedProse, render_prose
from docgen.site.record_view import PageEntry
from docgen.units import format_eng

STATUS_WORDS = {"draft": "Draft", "review": "In review", "approved": "Approved",
                "retired": "Retired"}
#: results sections a design page presents, with the words used when one is missing
EXPECTED_SECTIONS = (("ac", "Frequency response and impedance"), ("noise", "Noise"),
                     ("transient", "Waveform and spectrum"),
                     ("spread", "Spread across boards, temperature drift and sensitivity"))


@dataclass
class Link:
    """A link contributed by a page provider (e.g. a design's history page)."""

    label: str
    text: str
    target: str  # site path


@dataclass
class SiteContext:
    """What every page needs to know about the whole site."""

    pages: dict[str, str]  # source_rel -> site path, for pages in this site
    sources: frozenset[str]
    files: frozenset[str]
    last_change: dict[str, str]
    design_links: dict[str, list[Link]] = field(default_factory=dict)
    titles: dict[str, str] = field(default_factory=dict)  # source_rel -> page title


def diag_json(diagnostics: list[Any]) -> list[dict[str, Any]]:
    """Diagnostics as plain dicts for templates, each shown once (two analyses may report the
    same missing input)."""
    out: dict[tuple, dict[str, Any]] = {}
    for item in diagnostics:
        data = item.to_json() if isinstance(item, Diagnostic) else item
        key = (data.get("path"), data.get("line"), data.get("col"), data.get("message"))
        out.setdefault(key, data)
    return list(out.values())


def prose(entry: PageEntry, page: str, site: SiteContext, live: Any,
          heading_shift: int = 0) -> RenderedProse:
    """The page's Markdown rendered for ``page``."""
    text = entry.design.source if entry.design is not None else entry.source.decode(
        "utf-8", errors="replace")
    targets = ProseTargets(site.pages, site.sources, site.files)
    return render_prose(text, source_rel=entry.source_rel, page=page, targets=targets,
                        live=live, display_path=entry.path, heading_shift=heading_shift)


def _param_value(value: float, unit: str) -> str:
    """A model parameter in engineering notation; ``1/V`` takes no prefix (``0.01 1/V``)."""
    return f"{value:g} {unit}" if unit.startswith("1/") else format_eng(value, unit)


def models_table(models: tuple[ModelDef, ...] | list[ModelDef]) -> dict[str, Any] | None:
    """The models a page defines, one row per model, parameters in SI."""
    if not models:
        return None
    from docgen.params import MODEL_KINDS

    rows = []
    for model in models:
        specs = MODEL_KINDS.get(model.kind, {})
        params = []
        for name, p in model.params.items():
            unit = specs[name].unit if name in specs else ""
            text = f"{name} {_param_value(p.value, unit)}"
            if p.low is not None and p.high is not None:
                text += f" ({_param_value(p.low, unit)} .. {_param_value(p.high, unit)})"
            params.append(text)
        rows.append([model.name, model.kind, " · ".join(params)])
    return {"caption": "Parameters as given; a range in brackets is the production spread",
            "columns": ["model", "kind", "parameters"], "rows": rows,
            "numeric": [False, False, False]}


def bench_facts(design: Design) -> list[list[str]]:
    """The bench conditions in words."""
    b = design.bench
    facts = [["input (stimulus)", b.input or "not named"], ["output net", b.output or "not named"]]
    if b.load_resistance is not None:
        load = format_eng(b.load_resistance, "Ω")
        if b.load_capacitance is not None:
            load += " ‖ " + format_eng(b.load_capacitance, "F")
        facts.append(["load", load])
    facts.append(["sweep", f"{format_eng(b.f_start, 'Hz')} .. {format_eng(b.f_stop, 'Hz')}"])
    if b.noise_band:
        facts.append(["noise band", f"{format_eng(b.noise_band[0], 'Hz')} .. "
                                    f"{format_eng(b.noise_band[1], 'Hz')}"])
    facts.append(["ambient", format_eng(b.ambient, "°C")])
    if b.ambient_range:
        facts.append(["ambient range", f"{format_eng(b.ambient_range[0], '°C')} .. "
                                       f"{format_eng(b.ambient_range[1], '°C')}"])
    facts.append(["boards (tolerance analysis)", f"{b.boards} ({b.distribution}, seed {b.seed})"])
    facts.append(["distortion limit", format_eng(b.distortion_limit * 100, "%")])
    return facts


def _met_text(design: Design, results: dict[str, Any] | None) -> str:
    met, failing, total = verdicts.requirements_met(design, results)
    if total == 0:
        return "none written"
    if results is None or not isinstance(results.get("checks"), list):
        return f"{total} written, not checked"
    text = f"{met} of {total} met"
    unchecked = total - met - failing
    return (text + (f", {failing} failing" if failing else "")
            + (f", {unchecked} not computed" if unchecked else ""))


def _downloads(entry: PageEntry, page: str, bundle: dict[str, Any]) -> list[dict[str, str]]:
    folder = files_dir(page)
    items = [("source.md", "the design file", "source file")]
    if bundle.get("results") is not None:
        items.insert(0, ("results.json", "every computed result, SI units", "results.json"))
    if bundle.get("schematic"):
        items.append(("schematic.svg", "the schematic drawing", "schematic.svg"))
    items.append(("parts.csv", "the parts list for purchasing and review", "parts list (CSV)"))
    return [{"href": relative_url(page, f"{folder}/{name}"), "what": what, "text": text}
            for name, what, text in items]


def design_context(entry: PageEntry, bundle: dict[str, Any], page: str,
                   site: SiteContext) -> tuple[dict[str, Any], RenderedProse]:
    """The design page's context, and its rendered notes (with the diagnostics rendering
    found: live values, links)."""
    design = entry.design
    assert design is not None
    results = bundle.get("results")
    notes = prose(entry, page, site, verdicts.live_values(design, results), heading_shift=1)
    header = design.header
    replaced = None
    if header.replaced_by:
        target = _resolve_rel(entry.source_rel, header.replaced_by)
        href = relative_url(page, site.pages[target]) if target in site.pages else None
        replaced = {"text": site.titles.get(target, header.replaced_by), "href": href}
    sections = bundle.get("sections") or []
    present = {key for key in ("ac", "noise", "transient", "spread") if key in (results or {})}
    not_computed = [words for key, words in EXPECTED_SECTIONS
                    if results is not None and key not in present]
    contents = [{"anchor": a, "title": t} for a, t in (
        ("schematic", "Schematic"), ("notes", "Notes"), ("requirements", "Requirements"),
        ("parts", "Parts"))]
    contents += [{"anchor": s["anchor"], "title": s["title"]} for s in sections]
    contents.append({"anchor": "downloads", "title": "Downloads"})
    context = {
        "title": header.title or entry.source_rel,
        "summary": header.summary, "status": header.status, "owner": header.owner,
        "reviewers": list(header.reviewers), "approved": header.approved,
        "replaced_by": replaced, "revision": site.last_change.get(entry.source_rel),
        "source_path": entry.path, "tags": list(header.tags),
        "requirements_met": _met_text(design, results),
        "extra_links": [{"label": link.label, "text": link.text,
                         "href": relative_url(page, link.target)}
                        for link in site.design_links.get(entry.source_rel, [])],
        "cautions": verdicts.caution_items(results),
        "diagnostics": diag_json([*entry.diagnostics, *(bundle.get("errors") or []),
                                  *((results or {}).get("errors") or [])]),
        "contents": contents,
        "schematic": (relative_url(page, files_dir(page) + "/schematic.svg")
                      if bundle.get("schematic") else None),
        "schematic_with_op": bool(bundle.get("schematic_with_op")),
        "schematic_problem": bundle.get("schematic_problem") or "the design was not solved",
        "notes_html": notes.html,
        "requirements": verdicts.requirement_rows(design, results),
        "estimates": verdicts.estimate_table(results),
        "parts": part_rows(design, (results or {}).get("cautions") or []),
        "models": models_table(design.models),
        "bench": bench_facts(design),
        "sections": sections, "not_computed": not_computed,
        "files_url": relative_url(page, files_dir(page)),
        "downloads": _downloads(entry, page, bundle),
    }
    return context, notes


def _resolve_rel(source_rel: str, target: str) -> str:
    import posixpath

    return posixpath.normpath(posixpath.join(posixpath.dirname(source_rel), target))


def note_context(entry: PageEntry, page: str, site: SiteContext
                 ) -> tuple[dict[str, Any], RenderedProse]:
    """A plain notebook page (or a library page) with its links rewritten."""
    notes = prose(entry, page, site, None)
    design = entry.design
    title = (design.header.title if design is not None else None) or entry.source_rel
    context = {
        "title": title,
        "has_heading": notes.html.lstrip().startswith("<h1"),
        "notes_html": notes.html,
        "diagnostics": diag_json(entry.diagnostics),
        "models": models_table(design.models) if design is not None else None,
        "source_path": entry.path,
        "source_href": relative_url(page, files_dir(page) + "/source.md"),
    }
    return context, notes


HEADLINE = (("midband gain", "ac", "midband_gain_db", "dB"),
            ("low corner", "ac", "f_low_hz", "Hz"), ("high corner", "ac", "f_high_hz", "Hz"),
            ("input impedance", "ac", "zin_ohm", "Ω"),
            ("input noise", "noise", "input_rms_v", "V"),
            ("output swing", "transient", "max_swing_vpp", "V pp"),
            ("THD", "transient", "thd_percent", "%"))


def headline(results: dict[str, Any] | None) -> list[list[str]]:
    """The few figures the index shows for a design (those that were computed)."""
    out = []
    for label, section, key, unit in HEADLINE:
        value = ((results or {}).get(section) or {}).get(key)
        if isinstance(value, dict):
            value = value.get("magnitude_ohm", value.get("magnitude"))
        if isinstance(value, (int, float)) and not isinstance(value, bool):
            text = (f"{format_eng(value, 'V')} pp" if unit == "V pp" else format_eng(value, unit))
            out.append([label, text])
    return out


def _short_stamp(stamp: str) -> str:
    """The date of a "date, commit ..." stamp, marked when the file changed since."""
    return stamp.split(",")[0] + (" (edited since)" if "uncommitted" in stamp else "")


def index_row(entry: PageEntry, bundle: dict[str, Any], page: str, site: SiteContext,
              flags: list[str]) -> dict[str, Any]:
    """One row of the index table."""
    design = entry.design
    assert design is not None
    results = bundle.get("results")
    met, failing, total = verdicts.requirements_met(design, results)
    cautions = verdicts.caution_items(results)
    counted = [c for c in cautions if c["level"] != "info"]
    return {
        "href": page, "title": design.header.title or entry.source_rel,
        "summary": design.header.summary, "status": design.header.status,
        "approved": design.header.approved, "owner": design.header.owner,
        "last_change": _short_stamp(site.last_change.get(entry.source_rel) or ""),
        "headline": headline(results), "met": _met_text(design, results),
        "met_class": "met-some" if failing else ("met-all" if total and met == total else ""),
        "cautions": f"{len(counted)} caution(s)" if counted else "",
        "tags": list(design.header.tags),
        "flags": flags + (["not solved"] if results is None else []),
        "hazard": any(c["level"] == "danger" for c in cautions),
    }
