"""``docgen preview [DESIGNS_DIR]``: serve the site locally and rebuild when a design changes."""

from __future__ import annotations

import argparse
import os
from pathlib import Path

from docgen.diagnostics import DocgenError


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """Options of ``docgen preview``."""
    parser.add_argument("designs", nargs="?", default="designs",
                        help="folder of design files (default: designs)")
    parser.add_argument("--out", default=None,
                        help="where the preview site is built (default: "
                             ".docgen-cache/preview beside the designs folder)")
    parser.add_argument("--port", type=int, default=8000,
                        help="port on 127.0.0.1 (default 8000; 0 picks a free one)")
    parser.add_argument("--interval", type=float, default=0.5,
                        help="seconds between checks of the design files (default 0.5)")
    parser.add_argument("--only-status", metavar="STATUS[,STATUS...]", default=None,
                        help="preview only designs at these statuses")
    parser.add_argument("--stop-after", type=float, default=None, metavar="SECONDS",
                        help="stop by itself after this many seconds (default: run until Ctrl-C)")


def run(args: argparse.Namespace) -> int:
    """Build, serve and watch until interrupted."""
    from docgen.commands.build import parse_statuses
    from docgen.site.build import BuildOptions, default_cache_dir
    from docgen.site.preview import Preview

    designs = Path(args.designs)
    if not designs.is_dir():
        raise DocgenError(f"{designs}: no such folder of designs")
    out = Path(args.out) if args.out else default_cache_dir(designs) / "preview"
    options = BuildOptions(designs, out, jobs=os.cpu_count() or 1,
                           statuses=parse_statuses(args.only_status), progress=False,
                           live_reload=True)
    try:
        preview = Preview(options, port=args.port, interval=args.interval)
    except OSError as exc:
        raise DocgenError(f"cannot serve on 127.0.0.1:{args.port}: {exc.strerror}") from None
    try:
        preview.run(max_seconds=args.stop_after)
    except KeyboardInterrupt:
        print("docgen preview: stopped")
    return 0
