"""``docgen draw FILE [-o out.svg]``: draw one design's schematic as SVG.

The drawing is laid out from the circuit block alone (``--operating-point`` first solves the
bias point so rails are placed by their solved voltages), read back from its own geometry and
compared with the netlist; any disagreement or readability problem is printed as a warning.
Exit 0 when the file was drawn, 2 on input errors.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """The command's options."""
    parser.add_argument("file", metavar="FILE", help="the design file to draw")
    parser.add_argument("-o", "--output", metavar="SVG", default=None,
                        help="where to write the SVG (default: print it)")
    parser.add_argument("--operating-point", action="store_true",
                        help="solve the bias point first and use the net voltages")
    parser.add_argument("--layered", action="store_true",
                        help="use the general layered layout instead of the amplifier layout")


def run(args: argparse.Namespace) -> int:
    """Draw ``args.file``; write or print the SVG; return the exit code."""
    from docgen.diagnostics import Diagnostic, DocgenError, Span
    from docgen.draw import draw
    from docgen.reader import read_file

    if not Path(args.file).is_file():
        raise DocgenError(Diagnostic(args.file, Span(1, 1), "error", "no such file"))
    design = read_file(args.file)
    if not design.parts:
        raise DocgenError(Diagnostic(args.file, Span(1, 1), "error",
                                     "nothing to draw: the page has no circuit block"))
    volts = _operating_point(args.file, design) if args.operating_point else None
    schematic = draw(design, volts, style="layered" if args.layered else None)
    for line in schematic.notes + schematic.report.faults + schematic.report.problems:
        print(f"{args.file}: warning: schematic: {line}", file=sys.stderr)
    svg = schematic.svg()
    if args.output:
        Path(args.output).write_text(svg, encoding="utf-8")
    else:
        sys.stdout.write(svg)
    return 0


def _operating_point(path: str, design) -> dict[str, float] | None:  # noqa: ANN001
    """The solved net voltages, or ``None`` (with a warning) if the bias point fails."""
    from docgen import pipeline
    from docgen.commands.check import load

    check_run = load([path], None)
    record = next((r for r, d in check_run.designs if d.path == design.path), None)
    if record is None:
        return None
    results = pipeline.run(design, record.models_for(design), only=frozenset({"op"}))
    nets = (results.get("op") or {}).get("nets")
    if not isinstance(nets, dict):
        print(f"{path}: warning: no operating point; drawn from the structure alone",
              file=sys.stderr)
        return None
    return nets
