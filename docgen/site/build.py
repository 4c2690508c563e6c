"""``docgen build``: read the record, solve what changed, and publish the site atomically.

Order of work: load the record → pick the pages this site includes (status filter) → for each
design, take its bundle (results, figures, schematic) from the cache or compute it, in parallel
over designs → run the page providers (history...) → write every page into a staged folder →
swap it into place.  Output depends only on the inputs: pages are written in sorted order,
figures are deterministic SVG and no time stamp is written anywhere.
"""

from __future__ import annotations

import os
import sys
from collections.abc import Iterable
from dataclasses import dataclass, field, replace
from pathlib import Path
from typing import Any

from docgen.cachekey import code_fingerprint, design_key
from docgen.diagnostics import Diagnostic, Span
from docgen.site.cache import BundleCache
from docgen.site.compute import compute_bundle, compute_in_worker, init_worker
from docgen.site.record_view import PageEntry, RecordView, read_record

STATUSES = ("draft", "review", "approved", "retired")
GATED = frozenset({"approved", "review"})


@dataclass
class BuildOptions:
    """How to build.

    :param statuses: build only designs at these statuses (``None``: all).
    :param cache_dir: the cache folder (default ``.docgen-cache`` beside the designs folder);
        ``False`` turns caching off.
    :param progress: show a progress bar (``None``: only on a terminal and outside CI).
    :param live_reload: add the preview server's reload script to every page.
    """

    designs_dir: Path
    out_dir: Path
    jobs: int | None = None
    statuses: frozenset[str] | None = None
    cache_dir: Path | None | bool = None
    progress: bool | None = None
    live_reload: bool = False
    providers: list[str] | None = None


@dataclass
class BuildReport:
    """What a build did: pages written, designs solved or reused, diagnostics, exit code."""

    pages: int = 0
    solved: list[str] = field(default_factory=list)
    reused: list[str] = field(default_factory=list)
    diagnostics: list[Diagnostic] = field(default_factory=list)
    failing: list[str] = field(default_factory=list)
    exit_code: int = 0


def default_cache_dir(designs_dir: Path) -> Path:
    """``.docgen-cache`` beside the designs folder (ignored by git)."""
    return Path(designs_dir).resolve().parent / ".docgen-cache"


def included(entry: PageEntry, statuses: frozenset[str] | None) -> bool:
    """Whether a readable page belongs in this site (notebook pages always do)."""
    if entry.design is None:
        return False
    if entry.kind != "design" or statuses is None:
        return True
    return entry.design.header.status in statuses


def solvable(entry: PageEntry) -> bool:
    """A design page that was read without errors."""
    return entry.kind == "design" and entry.design is not None and not entry.has_errors


class _NoProgress:
    """What :func:`_progress` gives when there is no bar to show (tqdm is not even imported:
    about 35 ms of a no-change rebuild)."""

    def __enter__(self) -> _NoProgress:
        return self

    def __exit__(self, *exc: object) -> None:
        return None

    def update(self, count: int) -> None:
        """Nothing to show."""


def _progress(total: int, enabled: bool | None) -> Any:
    if enabled is None:
        enabled = sys.stderr.isatty() and os.environ.get("CI", "").lower() not in ("1", "true")
    if not enabled:
        return _NoProgress()
    from tqdm import tqdm

    return tqdm(total=total, unit="design", desc="docgen build", leave=False)


def bundle_key(view: RecordView, rel: str) -> str:
    """The cache key of a design's bundle: what solving, plotting and drawing it read
    (:func:`docgen.cachekey.design_key`; the notes are not in it, they are rendered at publish
    time), the path as given (results and diagnostics name the file so) and docgen's own code
    (the version alone does not change between releases)."""
    entry = view.entries[rel]
    design = entry.design
    assert design is not None
    return design_key(design, view.library, extra=f"{entry.path}\0{code_fingerprint()}")


def solve_all(view: RecordView, wanted: list[str], options: BuildOptions,
              report: BuildReport) -> dict[str, dict[str, Any]]:
    """Bundles for the designs in ``wanted``: from the cache, or computed (in parallel)."""
    cache_root = options.cache_dir
    cache = BundleCache(None if cache_root in (None, False) else Path(cache_root))  # type: ignore[arg-type]
    keys = {rel: bundle_key(view, rel) for rel in wanted}
    bundles: dict[str, dict[str, Any]] = {}
    missing = []
    for rel in wanted:
        cached = cache.get(keys[rel])
        if cached is not None:
            bundles[rel] = cached
            report.reused.append(rel)
        else:
            missing.append(rel)
    cores = options.jobs or os.cpu_count() or 1
    jobs = max(1, min(cores, len(missing) or 1))
    with _progress(len(wanted), options.progress) as bar:
        bar.update(len(wanted) - len(missing))
        # one design to do and a core to spare (a one-design rebuild): it plots with a helper
        for rel, bundle in _compute(view, missing, jobs, options.designs_dir, cores > 1):
            cache.put(keys[rel], bundle)  # a docgen crash too: the key covers docgen's code
            bundles[rel] = bundle
            report.solved.append(rel)
            bar.update(1)
    report.solved.sort()
    return bundles


def _compute(view: RecordView, missing: list[str], jobs: int, designs_dir: Path,
             helper: bool = False) -> Iterable[tuple[str, dict[str, Any]]]:
    if jobs == 1:
        for rel in missing:
            design = view.entries[rel].design
            yield rel, compute_bundle(design, view.models_for(design),  # type: ignore[arg-type]
                                      helper=helper and len(missing) == 1)
        return
    import multiprocessing
    from concurrent.futures import ProcessPoolExecutor  # only when something is to be solved

    context = multiprocessing.get_context("fork" if sys.platform.startswith("linux") else None)
    with ProcessPoolExecutor(max_workers=jobs, mp_context=context, initializer=init_worker,
                             initargs=(str(designs_dir),)) as pool:
        yield from pool.map(compute_in_worker, missing)


def _bundle_diagnostics(bundle: dict[str, Any]) -> list[Diagnostic]:
    out = []
    for item in bundle.get("errors") or []:
        out.append(Diagnostic(str(item.get("path", "")), Span(int(item.get("line") or 1),
                                                              int(item.get("col") or 1)),
                              item.get("severity", "error"), str(item.get("message", "")),
                              item.get("hint")))
    return out


def gate_failures(view: RecordView, bundles: dict[str, dict[str, Any]]) -> list[str]:
    """Designs in review or approved whose requirements or ratings fail (exit code 1)."""
    failing = []
    for rel, bundle in sorted(bundles.items()):
        design = view.entries[rel].design
        results = bundle.get("results") or {}
        if design is None or design.header.status not in GATED:
            continue
        checks = results.get("checks") or []
        cautions = results.get("cautions") or []
        if any(isinstance(c, dict) and c.get("verdict") == "fail" for c in checks) or any(
                isinstance(c, dict) and c.get("severity") in ("error", "danger")
                for c in cautions):
            failing.append(rel)
    return failing


def build_site(options: BuildOptions) -> BuildReport:
    """Build the site for ``options``; the old site stays in place until the new one is whole."""
    from docgen.site.publish import write_site

    if options.cache_dir is None:
        options = replace(options, cache_dir=default_cache_dir(options.designs_dir))
    report = BuildReport()
    view = read_record(Path(options.designs_dir))
    report.diagnostics.extend(view.diagnostics)
    for entry in view.entries.values():
        report.diagnostics.extend(entry.diagnostics)
    in_site = [rel for rel, e in view.entries.items() if included(e, options.statuses)]
    wanted = [rel for rel in in_site if solvable(view.entries[rel])]
    bundles = solve_all(view, wanted, options, report)
    for rel in wanted:
        report.diagnostics.extend(_bundle_diagnostics(bundles[rel]))
    report.pages, render_diagnostics = write_site(view, in_site, bundles, options)
    report.diagnostics.extend(render_diagnostics)
    report.failing = gate_failures(view, bundles)
    errors = any(d.severity == "error" for d in report.diagnostics)
    report.exit_code = 2 if errors else (1 if report.failing else 0)
    return report
