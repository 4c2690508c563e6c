"""Build behaviour: cache reuse, byte-identical output across processes, atomic publication."""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest
from site_helpers import build, copy_fixtures, tree_bytes

from docgen.site.output import StagedSite, recover


def test_no_change_rebuild_solves_nothing_and_one_change_solves_one(tmp_path: Path) -> None:
    designs = copy_fixtures(tmp_path / "designs")
    cache = tmp_path / "cache"
    first = build(designs, tmp_path / "site", cache_dir=cache)
    assert first.solved == ["divider.md", "hostile.md", "rc-filter.md"]
    again = build(designs, tmp_path / "site", cache_dir=cache)
    assert again.solved == [] and sorted(again.reused) == first.solved
    divider = designs / "divider.md"
    divider.write_text(divider.read_text().replace("10k 1% 0.25 W      : mid gnd",
                                                   "11k 1% 0.25 W      : mid gnd"))
    changed = build(designs, tmp_path / "site", cache_dir=cache)
    assert changed.solved == ["divider.md"]
    assert sorted(changed.reused) == ["hostile.md", "rc-filter.md"]


def test_a_notes_edit_reuses_the_bundle_and_the_page_shows_the_new_notes(tmp_path: Path) -> None:
    """The notes are rendered when the page is published, so the cached results, figures and
    schematic stay valid (docgen/cachekey.py: design_key leaves prose out)."""
    designs = copy_fixtures(tmp_path / "designs")
    cache = tmp_path / "cache"
    build(designs, tmp_path / "site", cache_dir=cache)
    divider = designs / "divider.md"
    divider.write_text(divider.read_text().replace(
        "Two resistors halve the supply:", "Two equal resistors halve the supply:")
        + "\nOne more sentence of notes.\n")
    changed = build(designs, tmp_path / "site", cache_dir=cache)
    assert changed.solved == []
    assert sorted(changed.reused) == ["divider.md", "hostile.md", "rc-filter.md"]
    page = (tmp_path / "site" / "divider.html").read_text()
    assert "One more sentence of notes." in page and "Two equal resistors" in page
    fresh = build(designs, tmp_path / "fresh", cache_dir=False)  # the same page without a cache
    assert fresh.solved and (tmp_path / "fresh" / "divider.html").read_text() == page


def _cli_build(cwd: Path, out: str, jobs: int, seed: str) -> subprocess.CompletedProcess:
    env = {**os.environ, "PYTHONHASHSEED": seed, "CI": "true"}
    return subprocess.run([sys.executable, "-m", "docgen.cli", "build", "designs", "--out", out,
                           "--no-cache", "--jobs", str(jobs)],
                          cwd=cwd, env=env, capture_output=True, text=True, timeout=300)


@pytest.mark.slow
def test_builds_in_separate_processes_are_byte_identical(tmp_path: Path) -> None:
    copy_fixtures(tmp_path / "designs")
    one = _cli_build(tmp_path, "site-one", 1, "1")
    two = _cli_build(tmp_path, "site-two", 2, "987")
    assert one.returncode == two.returncode == 2, one.stderr + two.stderr
    first, second = tree_bytes(tmp_path / "site-one"), tree_bytes(tmp_path / "site-two")
    assert sorted(first) == sorted(second)
    different = [name for name in first if first[name] != second[name]]
    assert different == []
    assert len(first) > 15


def _many_designs(folder: Path, count: int) -> None:
    copy_fixtures(folder)
    text = (folder / "divider.md").read_text()
    for index in range(count):
        (folder / f"copy-{index:02d}.md").write_text(text.replace("Bias divider",
                                                                  f"Bias divider {index}"))


@pytest.mark.slow
def test_sigkill_midway_leaves_the_previous_site_intact(tmp_path: Path) -> None:
    _many_designs(tmp_path / "designs", 40)
    done = _cli_build(tmp_path, "site", 1, "0")
    assert done.returncode == 2, done.stderr
    before = tree_bytes(tmp_path / "site")
    (tmp_path / "designs" / "divider.md").write_text(
        (tmp_path / "designs" / "divider.md").read_text() + "\nChanged.\n")
    process = subprocess.Popen([sys.executable, "-m", "docgen.cli", "build", "designs",
                                "--out", "site", "--no-cache", "--jobs", "1"], cwd=tmp_path,
                               stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
    deadline = time.monotonic() + 120
    staged = []
    while time.monotonic() < deadline and process.poll() is None:
        staged = list(tmp_path.glob(".site.building-*"))
        if staged:
            break
        time.sleep(0.002)
    assert staged, "the build finished before it could be killed mid-write"
    os.kill(process.pid, signal.SIGKILL)
    process.wait()
    assert process.returncode == -signal.SIGKILL
    assert tree_bytes(tmp_path / "site") == before  # the old site, untouched
    again = _cli_build(tmp_path, "site", 1, "0")
    assert again.returncode == 2
    assert "Changed." in (tmp_path / "site" / "divider.html").read_text()
    assert not list(tmp_path.glob(".site.*"))  # the killed build's folder is cleaned up


def test_interrupted_swap_is_recovered(tmp_path: Path) -> None:
    out = tmp_path / "site"
    staged = StagedSite(out)
    staged.write("index.html", "old")
    staged.publish()
    os.replace(out, tmp_path / ".site.previous")  # as if killed between the two renames
    recover(out)
    assert (out / "index.html").read_text() == "old"
