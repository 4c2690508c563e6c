"""``docgen new TOPOLOGY FILE [--title TEXT]``: start a design file from a starter topology."""

from __future__ import annotations

import argparse
import sys


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """Options of ``docgen new``."""
    parser.add_argument("topology", nargs="?", help="the starter to copy (see --list)")
    parser.add_argument("file", nargs="?", help="the design file to create (never overwritten)")
    parser.add_argument("--title", help="the new design's title (default: the starter's)")
    parser.add_argument("--list", action="store_true", help="list the starters and exit")


def run(args: argparse.Namespace) -> int:
    """List the starters, or create one design file; exit 2 on a usage error."""
    from docgen import starters

    if args.list:
        listed = starters.names()
        width = max(len(name) for name in listed)
        for name in listed:
            print(f"{name:<{width}}  {starters.summary(name)}")
        return 0
    if not args.topology or not args.file:
        print("docgen new: give a TOPOLOGY and a FILE, or --list", file=sys.stderr)
        return 2
    created = starters.create(args.topology, args.file, args.title)
    print(f"created {created} from the '{args.topology}' starter; "
          f"edit it, then run: docgen check {created}")
    return 0
