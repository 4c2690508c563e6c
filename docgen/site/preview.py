"""Local preview: serve the site on 127.0.0.1, rebuild when a design file changes, reload pages.

The watcher polls the designs folder (modification time and size of every file) at a fixed
interval; a change triggers a rebuild through the normal atomic build, and a counter served at
``/__docgen_build`` goes up.  Pages built for preview carry a small script that polls that
counter once a second (for at most an hour) and reloads when it changes.
"""

from __future__ import annotations

import functools
import http.server
import sys
import threading
import time
from collections.abc import Callable
from pathlib import Path

from docgen.site.build import BuildOptions, BuildReport, build_site

BUILD_PATH = "/__docgen_build"


def snapshot(root: Path) -> dict[str, tuple[int, int]]:
    """(modification time, size) of every file under ``root``."""
    found = {}
    for path in sorted(root.rglob("*")):
        try:
            if path.is_file():
                stat = path.stat()
                found[path.as_posix()] = (stat.st_mtime_ns, stat.st_size)
        except OSError:
            continue  # removed while we looked
    return found


class _Handler(http.server.SimpleHTTPRequestHandler):
    """Static files from the site folder, plus the build counter."""

    counter: Callable[[], int] = staticmethod(lambda: 0)

    def do_GET(self) -> None:  # noqa: N802 - the http.server API
        if self.path.split("?")[0] == BUILD_PATH:
            body = str(self.counter()).encode()
            self.send_response(200)
            self.send_header("Content-Type", "text/plain; charset=utf-8")
            self.send_header("Cache-Control", "no-store")
            self.send_header("Content-Length", str(len(body)))
            self.end_headers()
            self.wfile.write(body)
            return
        super().do_GET()

    def log_message(self, format: str, *args: object) -> None:  # noqa: A002
        pass  # quiet: the terminal shows builds, not every request


class Preview:
    """A preview session: the server thread, the build counter and the watch loop."""

    def __init__(self, options: BuildOptions, port: int = 8000, interval: float = 0.5):
        self.options = options
        self.interval = max(0.1, interval)
        self.builds = 0
        handler = type("Handler", (_Handler,), {"counter": staticmethod(lambda: self.builds)})
        self._serve_from = Path(options.out_dir).resolve()
        factory = functools.partial(handler, directory=str(self._serve_from))
        self.server = http.server.ThreadingHTTPServer(("127.0.0.1", port), factory)
        self.server.daemon_threads = True

    @property
    def url(self) -> str:
        """The address of the index page."""
        return f"http://127.0.0.1:{self.server.server_address[1]}/index.html"

    def rebuild(self) -> BuildReport:
        """Build once and bump the counter the pages poll."""
        report = build_site(self.options)
        for diagnostic in report.diagnostics:
            print(diagnostic.render(), file=sys.stderr)
        self.builds += 1
        print(f"docgen preview: build {self.builds}: {len(report.solved)} design(s) solved, "
              f"{len(report.reused)} from the cache", flush=True)
        return report

    def run(self, max_seconds: float | None = None) -> None:
        """Build, serve and watch until Ctrl-C (or ``max_seconds``)."""
        self.rebuild()
        thread = threading.Thread(target=self.server.serve_forever, daemon=True)
        thread.start()
        print(f"docgen preview: serving {self.url} (Ctrl-C stops)", flush=True)
        designs = Path(self.options.designs_dir)
        seen = snapshot(designs)
        started = time.monotonic()
        try:
            while max_seconds is None or time.monotonic() - started < max_seconds:
                time.sleep(self.interval)
                now = snapshot(designs)
                if now != seen:
                    seen = now
                    self.rebuild()
        finally:
            self.server.shutdown()
            self.server.server_close()
