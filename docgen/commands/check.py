"""``docgen check [PATHS]``: read every design, print every diagnostic, exit 0 clean / 2 errors.

Structure for later extension: :func:`load` reads the record(s) and returns a
:class:`CheckRun`; :func:`check_designs` is the one place where each readable design is
checked further (requirement verdicts add to it and may return exit code 1); :func:`run` prints.
"""

from __future__ import annotations

import argparse
import json
import sys
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from docgen.design import Design
from docgen.diagnostics import Diagnostic, Span
from docgen.record import Record, load_record, page_files

DEFAULT_ROOT = "designs"


@dataclass
class CheckRun:
    """What ``docgen check`` found: the records read and every diagnostic.

    :param records: one record per path argument.
    :param diagnostics: every diagnostic of every file, by path then position.
    :param files: how many Markdown files were read.
    :param reports: per-design results added by :func:`check_designs` (JSON-ready dicts).
    """

    records: list[Record]
    diagnostics: list[Diagnostic]
    files: int
    reports: list[dict[str, Any]] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)

    @property
    def designs(self) -> list[tuple[Record, Design]]:
        """Every design that read without errors, with the record it belongs to."""
        return [(record, design) for record in self.records for design in record.designs]

    @property
    def errors(self) -> int:
        """How many error-level diagnostics."""
        return sum(d.severity == "error" for d in self.diagnostics)

    @property
    def warnings(self) -> int:
        """How many warnings."""
        return sum(d.severity == "warning" for d in self.diagnostics)


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """The command's options."""
    parser.add_argument("paths", nargs="*", metavar="PATH",
                        help=f"design files or folders (default: {DEFAULT_ROOT}/)")
    parser.add_argument("--library", action="append", default=None, metavar="FOLDER",
                        help="a folder of library pages to use when checking single files "
                        f"(default: {DEFAULT_ROOT}/ if it exists); may be repeated")
    parser.add_argument("--json", action="store_true", help="print one JSON document")
    parser.add_argument("--cache", metavar="FOLDER", default=None,
                        help="where to keep each design's gate result between runs, so only "
                        f"changed designs are solved (default: .docgen-cache beside "
                        f"{DEFAULT_ROOT}/ when it exists)")
    parser.add_argument("--no-cache", action="store_true",
                        help="solve every design afresh and keep nothing")
    parser.add_argument("--notes", action="store_true",
                        help="also print notes: hand estimates beside the solved values, "
                        "parts with no rating or tolerance to check")


def load(paths: list[str], library: list[str] | None = None) -> CheckRun:
    """Read every page under ``paths``; library pages also come from ``library`` folders."""
    paths = paths or [DEFAULT_ROOT]
    if library is None:
        library = [DEFAULT_ROOT] if Path(DEFAULT_ROOT).is_dir() else []
    records: list[Record] = []
    missing: list[Diagnostic] = []
    files = 0
    for path in paths:
        if not Path(path).exists():
            missing.append(Diagnostic(path, Span(1, 1), "error", "no such file or folder"))
            continue
        # a single file also sees the library pages beside it (not the whole folder tree)
        beside = sorted(str(p) for p in Path(path).parent.glob("*.md")) \
            if Path(path).is_file() else []
        roots = library + beside
        records.append(load_record(path, roots))
        files += len(page_files(path))
    diagnostics = missing + [d for r in records for d in r.all_diagnostics]
    diagnostics += _layout_problems(records)
    return CheckRun(records, _unique(diagnostics), files)


def _layout_problems(records: list[Record]) -> list[Diagnostic]:
    """Diagnostics of the designs' ``layout`` blocks, so a bad hint shows before any drawing."""
    from docgen.diagnostics import InputError
    from docgen.draw.hints import read_hints  # light: no schemdraw until a drawing is made

    found: list[Diagnostic] = []
    for record in records:
        for design in record.designs:
            try:
                read_hints(design)
            except InputError as exc:
                found += exc.diagnostics
    return found


def _unique(diagnostics: list[Diagnostic]) -> list[Diagnostic]:
    """Each diagnostic once (a library page seen from two records reports once)."""
    seen: dict[tuple, Diagnostic] = {}
    for d in diagnostics:
        seen.setdefault((d.path, d.line, d.col, d.severity, d.message), d)
    return list(seen.values())


_PENDING: list[tuple[Record, Any]] = []  # what forked workers check, by index
_CACHE: list[Any] = [None]  # the gate cache of this run (set before the workers fork)


def _gate_at(index: int) -> Any:
    """The gate of one design (from the cache when its inputs are unchanged), with the
    changed-since-approval finding added (it reads git history, and is never cached; both
    read only this design, so the workers share them out)."""
    from docgen.check.gate import approval_problem, check_design

    record, design = _PENDING[index]
    library = record.models_for(design)
    cache = _CACHE[0]
    key = cache.key(design, library) if cache is not None else None
    gate = cache.get(key) if cache is not None else None
    if gate is None:
        gate = check_design(design, library)
        if cache is not None:
            cache.put(key, gate)
    changed = approval_problem(design, record.root if Path(record.root).is_dir()
                               else str(Path(record.root).parent))
    if changed is not None:  # an approved design changed since approval: exit 1
        gate.diagnostics.append(changed)
    return gate


def _gates(designs: list[tuple[Record, Any]]) -> list[Any]:
    """The review gate of each design, in order; over the cores when there are several.

    Designs hold read-only mappings that do not pickle, so workers are forked and find their
    design by index (a pre-commit check of a whole record then takes about half the time)."""
    import multiprocessing
    import os

    _PENDING[:] = designs
    try:
        workers = min(len(designs), os.cpu_count() or 1)
        if workers < 2 or "fork" not in multiprocessing.get_all_start_methods():
            return [_gate_at(i) for i in range(len(designs))]
        # the costliest first, so no worker is left with a large-signal run at the end
        order = sorted(range(len(designs)), key=lambda i: -_expected_cost(designs[i][1]))
        with multiprocessing.get_context("fork").Pool(workers) as pool:
            gates = pool.map(_gate_at, order, chunksize=1)
        by_index = dict(zip(order, gates, strict=True))
        return [by_index[i] for i in range(len(designs))]
    finally:
        _PENDING.clear()


#: rough relative cost of the analyses a gate may run (the large-signal run dominates)
_COSTS = {"transient": 8, "spread": 4, "feedback": 2}


def _expected_cost(design: Any) -> int:
    from docgen.check.gate import sections_for

    approved = 2 if design.header.status == "approved" else 0  # its history is read too
    return 1 + approved + sum(_COSTS.get(name, 0) for name in sections_for(design))


def _gate_cache(args: argparse.Namespace) -> Any:
    """The run's gate cache (``None`` with ``--no-cache``, or with no folder to keep it in)."""
    from docgen.check.gate_cache import GateCache

    if getattr(args, "no_cache", False):
        return None
    folder = getattr(args, "cache", None)
    if folder is None and Path(DEFAULT_ROOT).is_dir():
        folder = Path(DEFAULT_ROOT).resolve().parent / ".docgen-cache"
    return GateCache(Path(folder)) if folder is not None else None


def check_designs(check_run: CheckRun, args: argparse.Namespace) -> int:
    """Check each readable design further; return the exit code this adds (0, 1 or 2).

    Each design goes through the review gate (:mod:`docgen.check.gate`): requirement and
    estimate lines are read, the analyses its requirements need are solved, and every failed
    requirement and caution becomes a diagnostic.  Exit 1 when any of them is an error, 2 when
    a requirement or estimate line does not read or the circuit cannot be solved.
    """
    from docgen.check.gate import exit_code

    code = 0
    added: list[Diagnostic] = []
    _CACHE[0] = _gate_cache(args)
    try:
        gates = _gates(check_run.designs)
    finally:
        _CACHE[0] = None
    for gate in gates:
        added += gate.diagnostics
        check_run.notes += gate.notes
        check_run.reports.append(gate.report)
        code = max(code, exit_code(gate))
    check_run.diagnostics = _unique(check_run.diagnostics + added)
    check_run.diagnostics.sort(key=lambda d: (d.path, d.line, d.col))
    return code


def run(args: argparse.Namespace) -> int:
    """Read, check, print; exit 2 on input errors, else the code from :func:`check_designs`."""
    check_run = load(list(args.paths), args.library)
    input_errors = check_run.errors  # the gate adds verdict errors, which mean exit 1, not 2
    code = check_designs(check_run, args)
    if input_errors:
        code = 2
    if args.json:
        print(json.dumps(_json(check_run, code), indent=2, ensure_ascii=False))
    else:
        for d in check_run.diagnostics:
            print(d.render(), end="\n\n")
        for note in check_run.notes if getattr(args, "notes", False) else ():
            print(note)
        print(summary(check_run))
    sys.stdout.flush()
    return code


def summary(check_run: CheckRun) -> str:
    """One line: files read, designs, errors and warnings."""
    designs = len(check_run.designs)

    def count(n: int, word: str) -> str:
        return f"{n} {word}{'' if n == 1 else 's'}"

    verdicts = [row["verdict"] for r in check_run.reports for row in r.get("checks", ())]
    tally = ""
    if verdicts:
        tally = (f"; requirements: {verdicts.count('pass')} pass, {verdicts.count('fail')} fail, "
                 f"{verdicts.count('not computed')} not computed")
    return (f"checked {count(check_run.files, 'file')} ({count(designs, 'readable design')}): "
            f"{count(check_run.errors, 'error')}, {count(check_run.warnings, 'warning')}"
            + tally)


def _json(check_run: CheckRun, code: int) -> dict[str, Any]:
    return {
        "files": check_run.files,
        "errors": check_run.errors,
        "warnings": check_run.warnings,
        "exit_code": code,
        "diagnostics": [d.to_json() for d in check_run.diagnostics],
        "designs": check_run.reports,
    }
