"""The site build's page provider: a history page per design, a diff page per pair of
consecutive revisions, and the changed-since-approval flag on design pages and the index.

Registered in :data:`docgen.site.providers.PROVIDERS`.  Each revision's results come from the
content cache (the build's cache folder), so after the first build only new revisions are
solved; the current revision's results are taken from the build itself.  Each design's history
as the pages show it is kept too, under the key of everything it is made from
(:func:`_memo_key`): a rebuild reads none of an unchanged design's revisions again.
"""

from __future__ import annotations

from typing import Any

from docgen.history.cache import ResultsCache
from docgen.history.drawing import FigureJob, draw_missing, response_job, trend_job
from docgen.history.pages import diff_context, diff_name, history_context
from docgen.history.revisions import list_revisions, unavailable_reason
from docgen.history.snapshot import RevisionSolver, Tree, content_key, open_repo
from docgen.history.timeline import design_history, revision_snapshots
from docgen.site.pages import Link
from docgen.site.paths import files_dir, relative_url
from docgen.site.providers import Contribution, ProviderInput

Json = dict[str, Any]


def provide(site: ProviderInput) -> Contribution:
    """History and diff pages for every design in the site."""
    repo, root = open_repo(site.record.root)
    solver = RevisionSolver(ResultsCache(site.cache_dir))  # None (--no-cache): memory only
    if repo is not None:  # a rebuild at the same commit asks git for no log again
        repo.keep_answers(solver.cache.git_answers, solver.cache.put_git_answers)
    contribution = Contribution()
    paths = {rel: rel if root in ("", ".") else f"{root.rstrip('/')}/{rel}" for rel in site.designs}
    _seed(site, solver)
    work = Tree(repo, None, root) if repo is not None and unavailable_reason(repo) is None \
        else None  # the work tree, read once for every design
    memo_keys = {rel: _memo_key(repo, work, paths[rel], root) for rel in site.designs}
    histories: dict[str, Json] = {}
    figures: dict[str, dict[str, str | None]] = {}
    for rel, key in memo_keys.items():  # a design whose history is as it was: nothing to read
        kept = _recall(solver, key)
        if kept is not None:
            histories[rel], figures[rel] = kept
    missing = [rel for rel in site.designs if rel not in histories]
    found = {rel: revision_snapshots(repo, paths[rel], root, work) for rel in missing}
    # A first build: new revisions solved, then every figure not cached drawn, over the cores.
    solver.prefetch([s for rel in missing for s in found[rel][2]], site.jobs)
    made = {rel: design_history(repo, paths[rel], root, solver, found=found[rel])
            for rel in missing}
    plans = {rel: figure_plan(made[rel]) for rel in missing}
    svgs = draw_missing(solver.cache, [j for p in plans.values() for j in p.values() if j],
                        site.jobs)
    for rel in missing:
        histories[rel] = _plain({k: v for k, v in made[rel].items() if k != "results"})
        figures[rel] = {name: svgs[job.key] if job else None for name, job in plans[rel].items()}
        if memo_keys[rel] is not None:
            solver.cache.put_page_memo(memo_keys[rel], {"history": histories[rel], "figures": {
                name: job.key if job else None for name, job in plans[rel].items()}})
    for rel in site.designs:
        entry = site.record.entries[rel]
        title = entry.design.header.title if entry.design is not None else rel
        history = histories[rel]
        _design_pages(site, contribution, rel, title or rel, history,
                      history["changed_since_approval"], figures[rel])
    return contribution


def _memo_key(repo: Any, work: Tree | None, rel: str, root: str) -> str | None:
    """The key of everything a design's history pages are made from: the design and the
    library pages it uses as they are now (text and solve key), the commits of its revisions
    (each fixes every page of its revision), and docgen itself.  ``None`` without a history."""
    import hashlib
    import json

    from docgen import __version__
    from docgen.cachekey import code_fingerprint

    if work is None:
        return None
    current = work.snapshot(rel)
    listing = list_revisions(repo, rel, current.uses)
    payload = ["history pages", __version__, code_fingerprint(), rel, root, current.key,
               current.source, [list(pair) for pair in current.library_texts],
               [r.to_json() for r in listing.revisions], listing.unavailable,
               list(listing.notes)]
    text = json.dumps(payload, sort_keys=True, ensure_ascii=False)
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


def _recall(solver: RevisionSolver, key: str | None
            ) -> tuple[Json, dict[str, str | None]] | None:
    """A kept history and its figures, or ``None`` when any of them is not in the cache."""
    memo = solver.cache.page_memo(key) if key is not None else None
    if memo is None or not isinstance(memo.get("history"), dict):
        return None
    figures: dict[str, str | None] = {}
    for name, figure_key in (memo.get("figures") or {}).items():
        figures[name] = solver.cache.figure(figure_key) if figure_key else None
        if figure_key and figures[name] is None:
            return None  # a figure was cleared from the cache: make the pages afresh
    return memo["history"], figures


def _plain(history: Json) -> Json:
    """The history as a kept copy reads back (JSON: tuples become lists), so a page made now
    and one made from the memo later are the same bytes."""
    import json

    return json.loads(json.dumps(history, sort_keys=True, ensure_ascii=False, allow_nan=True))


def figure_plan(history: Json) -> dict[str, FigureJob | None]:
    """The figures a design's history page (``"trend"``) and diff pages (``"response <i>"``)
    show, as jobs to draw; ``None`` where a page has none."""
    rows, results = history["rows"], history["results"]
    plan = {"trend": trend_job(rows)}
    for i in range(len(history["diffs"])):
        plan[f"response {i}"] = response_job(rows, results, i)
    return plan


def _seed(site: ProviderInput, solver: RevisionSolver) -> None:
    """The build's own results of the designs as they are now: no need to solve them again."""
    for rel in site.designs:
        entry, bundle = site.record.entries[rel], site.bundles.get(rel) or {}
        if entry.design is not None and bundle.get("results"):
            key = content_key(entry.design, site.record.library)
            solver.cache.put(key, bundle["results"], store=False)


def _design_pages(site: ProviderInput, out: Contribution, rel: str, title: str, history: Json,
                  approval: Json | None, figures: dict[str, str | None]) -> None:
    page = site.pages[rel]
    folder = files_dir(page)
    history_path = f"{folder}/history.html"
    rows = history["rows"]
    diff_paths = [f"{folder}/{diff_name(rows[i + 1]['sha'], rows[i]['sha'])}"
                  for i in range(len(history["diffs"]))]
    trend = None
    if figures["trend"] is not None:
        out.files[f"{folder}/history-trends.svg"] = figures["trend"]
        trend = "history-trends.svg"
    context = history_context(
        history, title=title, design_href=relative_url(history_path, page),
        diff_hrefs=[relative_url(history_path, p) for p in diff_paths], trend=trend,
        approval=approval)
    out.files[history_path] = site.render("history.html", history_path, f"History of {title}",
                                          page=context)
    for i, diff in enumerate(history["diffs"]):
        _diff_page(site, out, i, diff, history, diff_paths, title, page, history_path,
                   figures[f"response {i}"])
    count = len(rows)
    text = f"{count} revision{'s' if count != 1 else ''}" if history["available"] \
        else "not available"
    links = [Link("History", text, history_path)]
    if approval is not None:
        links.append(Link("Review", f"changed since approval ({', '.join(approval['sections'])})",
                          history_path + "#approval"))
        out.index_flags.setdefault(rel, []).append("changed since approval")
    out.design_links.setdefault(rel, []).extend(links)


def _diff_page(site: ProviderInput, out: Contribution, i: int, diff: Json, history: Json,
               diff_paths: list[str], title: str, page: str, history_path: str,
               svg: str | None) -> None:
    rows = history["rows"]
    path = diff_paths[i]
    overlay = None
    if svg is not None:
        figure = path[: -len(".html")] + "-response.svg"
        out.files[figure] = svg
        overlay = relative_url(path, figure)
    context = diff_context(
        diff, title=title, old_row=rows[i + 1], new_row=rows[i],
        history_href=relative_url(path, history_path), design_href=relative_url(path, page),
        overlay=overlay,
        older_href=relative_url(path, diff_paths[i + 1]) if i + 1 < len(diff_paths) else None,
        newer_href=relative_url(path, diff_paths[i - 1]) if i > 0 else None)
    out.files[path] = site.render("diff.html", path, f"Changes to {title}", page=context)
