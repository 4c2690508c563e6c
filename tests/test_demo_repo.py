"""The demo git repository: a deterministic, realistic history of the bundled designs."""

from __future__ import annotations

import subprocess
from pathlib import Path

import pytest
from demo_helpers import DESIGNS

from docgen.demo_repo import DemoScriptError, make_demo_repo, replaced
from docgen.reader import read_text


def git(repo: Path, *args: str) -> str:
    return subprocess.run(["git", *args], cwd=repo, check=True, capture_output=True,
                          text=True).stdout


@pytest.fixture(scope="module")
def demo(tmp_path_factory: pytest.TempPathFactory) -> Path:
    return make_demo_repo(tmp_path_factory.mktemp("demo") / "repo")


def test_same_script_gives_the_same_commit_ids(demo: Path, tmp_path: Path) -> None:
    again = make_demo_repo(tmp_path / "again")
    assert git(again, "rev-parse", "HEAD") == git(demo, "rev-parse", "HEAD")


def test_history_has_tweaks_a_rewiring_a_rename_approvals_and_several_authors(demo: Path) -> None:
    log = git(demo, "log", "--format=%an|%s").splitlines()
    assert len(log) >= 15
    assert len({line.split("|")[0] for line in log}) == 4
    renamed = git(demo, "log", "--follow", "--name-status", "--format=",
                  "--", "designs/hydrophone-preamp.md")
    assert "designs/ce-preamp.md\tdesigns/hydrophone-preamp.md" in renamed
    first = git(demo, "log", "--follow", "--diff-filter=A", "--format=%H", "--",
                "designs/hydrophone-preamp.md").strip()
    first_text = git(demo, "show", f"{first}:designs/ce-preamp.md")
    assert ": e1 gnd" in first_text.split("```circuit")[1]  # CE across the whole emitter
    statuses = [read_text(git(demo, "show", f"{sha}:designs/hydrophone-buffer.md"), "b").header
                .status for sha in git(demo, "log", "--format=%H", "--",
                                       "designs/hydrophone-buffer.md").split()]
    assert statuses[::-1] == ["draft", "review", "approved", "review", "approved"]


def test_every_revision_of_every_page_reads_without_errors(demo: Path) -> None:
    for sha in git(demo, "rev-list", "HEAD").split():
        for path in git(demo, "ls-tree", "-r", "--name-only", sha, "designs").split():
            read_text(git(demo, "show", f"{sha}:{path}"), path)  # raises on any error


def test_an_approved_design_changed_after_its_approval(demo: Path) -> None:
    path = "designs/hydrophone-preamp.md"
    header = read_text((demo / path).read_text(encoding="utf-8"), path).header
    last_change = git(demo, "log", "-1", "--format=%aI", "--", path)
    assert header.status == "approved" and last_change[:10] > header.approved


def test_only_that_design_is_flagged_changed_since_approval(demo: Path) -> None:
    from docgen.history.approval import changed_since_approval

    designs = demo / "designs"
    flagged = {p.name: changed_since_approval(demo, p, designs) for p in designs.glob("*.md")}
    assert [name for name, flag in flagged.items() if flag] == ["hydrophone-preamp.md"]
    assert flagged["hydrophone-preamp.md"]["sections"] == ["circuit"]


def test_the_final_tree_matches_the_bundled_designs_but_for_that_change(demo: Path) -> None:
    different = [p.relative_to(DESIGNS) for p in DESIGNS.rglob("*.md")
                 if (demo / "designs" / p.relative_to(DESIGNS)).read_bytes() != p.read_bytes()]
    assert different == [Path("hydrophone-preamp.md")]


def test_refuses_to_replace_a_folder_it_did_not_make(tmp_path: Path) -> None:
    (tmp_path / "keep.txt").write_text("precious", encoding="utf-8")
    with pytest.raises(DemoScriptError):
        make_demo_repo(tmp_path)
    assert (tmp_path / "keep.txt").read_text(encoding="utf-8") == "precious"


def test_a_replacement_that_no_longer_matches_is_loud() -> None:
    with pytest.raises(DemoScriptError):
        replaced("RE1 390", ("RE1 470", "RE1 390"))
