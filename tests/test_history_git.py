"""The git layer: commits of a file across a rename, file contents at revisions, shallow clones.

The expectations are what git itself documents for ``git log --follow`` and ``git diff -M``
(git-log(1), git-diff(1)); each repository is scripted here with fixed dates and identities.
"""

from __future__ import annotations

import subprocess

import pytest
from history_helpers import ScriptedRepo, git_env

from docgen.history.git import Repo


@pytest.fixture()
def renamed(tmp_path):
    """a.md created, edited, renamed to sub/b.md, edited again; other.md changes alongside."""
    script = ScriptedRepo(tmp_path / "repo")
    script.write("designs/a.md", "one\n")
    script.write("designs/other.md", "x\n")
    first = script.commit("add a")
    script.write("designs/a.md", "one\ntwo\n")
    second = script.commit("edit a", author="Bo Farad")
    script.move("designs/a.md", "designs/sub/b.md")
    third = script.commit("rename a to b")
    script.write("designs/other.md", "y\n")
    script.commit("edit other only")
    script.write("designs/sub/b.md", "one\ntwo\nthree\n")
    fifth = script.commit("edit b")
    return script, [fifth, third, second, first]


def test_log_follows_renames_with_dates_authors_and_paths(renamed):
    script, expected = renamed
    repo = Repo.find(script.root / "designs")
    commits = repo.log_follow("designs/sub/b.md")
    assert [c.sha for c in commits] == expected
    assert [c.subject for c in commits] == ["edit b", "rename a to b", "edit a", "add a"]
    assert [c.path for c in commits] == ["designs/sub/b.md", "designs/sub/b.md",
                                         "designs/a.md", "designs/a.md"]
    assert commits[1].status == "R" and commits[1].old_path == "designs/a.md"
    assert commits[3].status == "A"
    assert commits[2].author == "Bo Farad"
    # dates are the author dates git stored, not the clock of this machine
    assert commits[0].date == "2024-03-05T10:00:00+00:00"
    assert commits[3].date == "2024-03-01T10:00:00+00:00"


def test_show_files_tree_and_order(renamed):
    script, expected = renamed
    repo = Repo(script.root)
    assert repo.show(expected[-1], "designs/a.md") == b"one\n"
    assert repo.show(expected[-1], "designs/sub/b.md") is None
    assert repo.files(expected[0], "designs") == ["designs/other.md", "designs/sub/b.md"]
    order = repo.order()
    assert [order[s] for s in expected] == sorted(order[s] for s in expected)
    assert repo.tree_id(expected[-1], "designs") != repo.tree_id(expected[0], "designs")
    assert repo.resolve("HEAD~1") is not None and repo.resolve("no-such-rev") is None


def test_changed_files_pairs_renames_and_work_tree(renamed):
    script, expected = renamed
    repo = Repo(script.root)
    assert repo.changed_files(expected[-1], expected[1], "designs") == [
        ("designs/a.md", "designs/sub/b.md")]
    script.write("designs/new.md", "n\n")
    script.git("add", "designs/new.md")
    script.write("designs/other.md", "z\n")
    assert repo.changed_files("HEAD", None, "designs") == [
        ("", "designs/new.md"), ("designs/other.md", "designs/other.md")]


def test_shallow_clone_and_empty_repo(renamed, tmp_path):
    script, _ = renamed
    clone = tmp_path / "clone"
    subprocess.run(["git", "clone", "-q", "--depth", "1", f"file://{script.root}", str(clone)],
                   env=git_env(), check=True)
    assert Repo(clone).is_shallow()
    assert not Repo(script.root).is_shallow()
    empty = ScriptedRepo(tmp_path / "empty")
    assert not Repo(empty.root).has_commits()
    assert Repo.find(tmp_path / "not-a-repo-folder") is None  # pytest's tmp is outside git


def test_revisions_merge_design_and_library_commits(tmp_path):
    """Design commits (following the rename) and library-page commits, newest first; library
    commits before the design existed are not part of its history."""
    from docgen.history.revisions import list_revisions

    script = ScriptedRepo(tmp_path / "repo")
    script.write("designs/library/parts.md", "v1\n")
    early = script.commit("library before the design")
    script.write("designs/a.md", "one\n")
    added = script.commit("add a")
    script.write("designs/library/parts.md", "v2\n")
    library = script.commit("library tweak")
    script.move("designs/a.md", "designs/b.md")
    script.write("designs/library/parts.md", "v3\n")
    both = script.commit("rename a and tweak the library")
    listing = list_revisions(Repo(script.root), "designs/b.md", ("designs/library/parts.md",))
    assert listing.available
    rows = [(r.commit.sha, r.path, r.reason, r.library_paths) for r in listing.revisions]
    assert rows == [
        (both, "designs/b.md", "design", ("designs/library/parts.md",)),
        (library, "designs/a.md", "library", ("designs/library/parts.md",)),
        (added, "designs/a.md", "design", ()),
    ]
    assert early not in [r[0] for r in rows]
    assert listing.revisions[0].to_json()["reason"] == "design"


def test_revisions_unavailable_reasons(renamed, tmp_path):
    from docgen.history.revisions import list_revisions

    script, _ = renamed
    clone = tmp_path / "clone"
    subprocess.run(["git", "clone", "-q", "--depth", "1", f"file://{script.root}", str(clone)],
                   env=git_env(), check=True)
    shallow = list_revisions(Repo(clone), "designs/sub/b.md")
    assert not shallow.available and "shallow clone" in shallow.unavailable
    assert "not in a git repository" in list_revisions(None, "designs/x.md").unavailable
    empty = ScriptedRepo(tmp_path / "empty")
    assert "no commits" in list_revisions(Repo(empty.root), "x.md").unavailable
    script.write("designs/new.md", "n\n")
    assert "not been committed" in list_revisions(Repo(script.root),
                                                  "designs/new.md").unavailable


def test_read_many_matches_show(renamed):
    script, expected = renamed
    repo = Repo(script.root)
    paths = ["designs/other.md", "designs/missing.md", "designs/sub/b.md"]
    found = repo.read_many(expected[0], paths)
    assert found == {p: repo.show(expected[0], p) for p in paths if repo.show(expected[0], p)}
    assert found["designs/sub/b.md"] == b"one\ntwo\nthree\n"
