"""``docgen build [DESIGNS_DIR] [--out SITE_DIR]``: publish the static notebook site."""

from __future__ import annotations

import argparse
import os
import sys
from pathlib import Path

from docgen.diagnostics import DocgenError, did_you_mean

STATUSES = ("draft", "review", "approved", "retired")


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """Options of ``docgen build``."""
    parser.add_argument("designs", nargs="?", default="designs",
                        help="folder of design files (default: designs)")
    parser.add_argument("--out", default="site", help="output folder (default: site)")
    parser.add_argument("--jobs", type=int, default=None,
                        help="designs solved in parallel (default: the number of cores)")
    parser.add_argument("--only-status", metavar="STATUS[,STATUS...]", default=None,
                        help="publish only designs at these statuses, e.g. 'approved' for a "
                             "release site or 'approved,review' (default: every design)")
    parser.add_argument("--cache", default=None,
                        help="cache folder (default: .docgen-cache beside the designs folder)")
    parser.add_argument("--no-cache", action="store_true", help="solve every design afresh")
    bar = parser.add_mutually_exclusive_group()
    bar.add_argument("--progress", dest="progress", action="store_true", default=None,
                     help="always show the progress bar")
    bar.add_argument("--quiet", dest="progress", action="store_false",
                     help="never show the progress bar")


def parse_statuses(text: str | None) -> frozenset[str] | None:
    """The statuses named in ``text`` (comma-separated); raise a diagnostic for a wrong word."""
    if text is None:
        return None
    words = [w.strip() for w in text.split(",") if w.strip()]
    for word in words:
        if word not in STATUSES:
            hint = did_you_mean(word, STATUSES) or f"use any of {', '.join(STATUSES)}"
            raise DocgenError(f"--only-status: unknown status '{word}' ({hint})")
    if not words:
        raise DocgenError("--only-status: name at least one status, e.g. 'approved'")
    return frozenset(words)


def run(args: argparse.Namespace) -> int:
    """Build the site; print diagnostics and a one-line summary; return the exit code."""
    from docgen.site.build import BuildOptions, build_site

    designs = Path(args.designs)
    if not designs.is_dir():
        raise DocgenError(f"{designs}: no such folder of designs")
    if args.jobs is not None and args.jobs < 1:
        raise DocgenError("--jobs must be 1 or more")
    cache: Path | bool | None = False if args.no_cache else (Path(args.cache) if args.cache
                                                             else None)
    options = BuildOptions(designs, Path(args.out), jobs=args.jobs or os.cpu_count() or 1,
                           statuses=parse_statuses(args.only_status), cache_dir=cache,
                           progress=args.progress)
    report = build_site(options)
    for diagnostic in report.diagnostics:
        print(diagnostic.render(), file=sys.stderr)
    errors = sum(d.severity == "error" for d in report.diagnostics)
    warnings = sum(d.severity == "warning" for d in report.diagnostics)
    summary = (f"docgen build: {report.pages} files in {args.out}/; "
               f"{len(report.solved)} design(s) solved, {len(report.reused)} from the cache; "
               f"{errors} error(s), {warnings} warning(s)")
    if report.failing:
        summary += f"; failing requirements or ratings in review/approved: " \
                   f"{', '.join(report.failing)}"
    print(summary)
    return report.exit_code
