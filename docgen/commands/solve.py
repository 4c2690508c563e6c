"""``docgen solve FILE [--json]``: solve one design and print its results.

Reads the file (and the library pages it may use) with the record loader, runs every analysis
of :mod:`docgen.pipeline` and prints aligned tables in engineering notation, or one JSON object
(numbers rounded to 6 significant figures, the contract of ``docs/results.md``).  Exit 0 when
every analysis finished, 2 on input errors or when the design cannot be solved.
"""

from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path

from docgen.diagnostics import Diagnostic, Span


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """The command's options."""
    parser.add_argument("file", metavar="FILE", help="the design file to solve")
    parser.add_argument("--library", action="append", default=None, metavar="FOLDER",
                        help="a folder of library pages (default: designs/ if it exists, and "
                        "the file's own folder); may be repeated")
    parser.add_argument("--json", action="store_true", help="print one JSON object")


def run(args: argparse.Namespace) -> int:
    """Solve ``args.file``; print the results; return the exit code."""
    from docgen import pipeline
    from docgen.commands.check import load
    from docgen.report import render
    from docgen.units import round_results

    if not Path(args.file).is_file():
        _print_diagnostics([Diagnostic(args.file, Span(1, 1), "error", "no such file")])
        return 2
    check_run = load([args.file], args.library)
    own = [d for d in check_run.diagnostics if d.path == args.file]
    _print_diagnostics(own)
    if any(d.severity == "error" for d in own):
        return 2
    designs = [(record, design) for record, design in check_run.designs
               if design.path == args.file]
    if not designs:
        print(f"{args.file}: not a design page (it has no circuit block)", file=sys.stderr)
        return 2
    record, design = designs[0]
    results = pipeline.run(design, record.models_for(design))
    if args.json:
        print(json.dumps(round_results(results), indent=2, ensure_ascii=False))
    else:
        print(render(results), end="")
    _print_analysis_errors(results.get("errors", []))
    return 2 if results.get("errors") else 0


def _print_diagnostics(diagnostics: list[Diagnostic]) -> None:
    for d in diagnostics:
        print(d.render(), file=sys.stderr)


def _print_analysis_errors(errors: list[dict]) -> None:
    """Each distinct analysis failure once on stderr, as ``path:line:col: error: ...``."""
    seen: set[tuple] = set()
    for e in errors:
        key = (e["path"], e["line"], e["col"], e["message"])
        if key in seen:
            continue
        seen.add(key)
        print(f"{e['path']}:{e['line']}:{e['col']}: {e['severity']}: {e['message']}",
              file=sys.stderr)
        if e.get("hint"):
            print(f"    hint: {e['hint']}", file=sys.stderr)
