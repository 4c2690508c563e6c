"""The ``docgen`` command: one entry point, one sub-command module per job.

Each sub-command lives in ``docgen/commands/<module>.py`` and defines ``add_arguments(parser)``
and ``run(args) -> int``.  Modules are imported only when their command runs, so a quick
``docgen check`` does not pay for matplotlib.

Exit codes (a CI job can rely on them): 0 clean; 1 a requirement or rating fails on an approved
or in-review design, or an approved design changed since approval; 2 input errors (2 outranks 1).
"""

from __future__ import annotations

import argparse
import importlib
import sys
from collections.abc import Sequence

from docgen import __version__
from docgen.diagnostics import DocgenError

#: sub-command name -> (module under docgen.commands, one-line help)
COMMANDS: dict[str, tuple[str, str]] = {
    "build": ("build", "build the static notebook site from a folder of designs"),
    "check": ("check", "read and check designs; print diagnostics and requirement verdicts"),
    "solve": ("solve", "solve one design and print its results (or JSON)"),
    "draw": ("draw", "draw one design's schematic as SVG"),
    "diff": ("diff", "compare a design between two revisions"),
    "history": ("history", "list the revisions of a design with headline figures"),
    "new": ("new", "start a new design file from a starter topology"),
    "neaten": ("neaten", "rewrite design files' blocks in the canonical aligned layout"),
    "preview": ("preview", "serve the site on localhost and rebuild when a design changes"),
    "hook": ("hook", "install a git hook that rebuilds the site after each commit"),
}


def build_parser() -> argparse.ArgumentParser:
    """The argument parser with every sub-command whose module is present."""
    parser = argparse.ArgumentParser(
        prog="docgen",
        description="A design record for discrete amplifier stages.",
    )
    parser.add_argument("--version", action="version", version=f"docgen {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    for name, (module_name, help_text) in COMMANDS.items():
        module = _load(module_name)
        if module is None:
            continue
        p = sub.add_parser(name, help=help_text, description=help_text)
        module.add_arguments(p)
        p.set_defaults(_module=module)
    return parser


def _load(module_name: str):  # noqa: ANN202 - a module or None
    try:
        return importlib.import_module(f"docgen.commands.{module_name}")
    except ModuleNotFoundError as exc:
        if exc.name == f"docgen.commands.{module_name}":
            return None
        raise


def main(argv: Sequence[str] | None = None) -> int:
    """Run ``docgen`` with ``argv`` (default: the process arguments); return the exit code."""
    parser = build_parser()
    args = parser.parse_args(list(argv) if argv is not None else None)
    if getattr(args, "_module", None) is None:
        parser.print_help()
        return 2
    try:
        return int(args._module.run(args))
    except DocgenError as exc:
        for d in exc.diagnostics:
            print(d.render(), file=sys.stderr)
        return 2
    except KeyboardInterrupt:
        print("docgen: interrupted", file=sys.stderr)
        return 130


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
