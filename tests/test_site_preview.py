"""``docgen preview``: serves on 127.0.0.1, rebuilds when a design changes, stops on Ctrl-C."""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import time
import urllib.request
from pathlib import Path

import pytest
from site_helpers import copy_fixtures


def _get(url: str) -> str:
    with urllib.request.urlopen(url, timeout=10) as response:  # noqa: S310 - localhost only
        return response.read().decode("utf-8")


def _wait_for(predicate, seconds: float = 60.0) -> bool:  # noqa: ANN001
    deadline = time.monotonic() + seconds
    while time.monotonic() < deadline:
        if predicate():
            return True
        time.sleep(0.1)
    return False


@pytest.mark.slow
def test_preview_serves_rebuilds_and_stops_on_interrupt(tmp_path: Path) -> None:
    copy_fixtures(tmp_path / "designs")
    process = subprocess.Popen(
        [sys.executable, "-m", "docgen.cli", "preview", "designs", "--port", "0",
         "--interval", "0.2", "--out", "preview-site"],
        cwd=tmp_path, stdout=subprocess.PIPE, stderr=subprocess.DEVNULL, text=True)
    try:
        url = None
        for line in process.stdout:  # type: ignore[union-attr]
            if "serving" in line:
                url = line.split("serving ")[1].split(" ")[0]
                break
        assert url and url.startswith("http://127.0.0.1:")
        base = url.rsplit("/", 1)[0]
        index = _get(url)
        assert "assets/live-reload.js" in index  # preview pages poll for rebuilds
        assert _get(base + "/__docgen_build") == "1"
        design = tmp_path / "designs" / "divider.md"
        design.write_text(design.read_text() + "\nA note added while previewing.\n")
        assert _wait_for(lambda: _get(base + "/__docgen_build") == "2")
        assert "A note added while previewing." in _get(base + "/divider.html")
        process.send_signal(signal.SIGINT)
        assert process.wait(timeout=30) == 0
    finally:
        if process.poll() is None:
            os.kill(process.pid, signal.SIGKILL)
            process.wait()
