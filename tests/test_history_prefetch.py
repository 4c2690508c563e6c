"""Reading a folder at many revisions in a few git calls (docgen/history/git.py: Repo.prefetch).

The reference is git itself: ``git ls-tree -r`` and ``git cat-file`` through a fresh Repo (no
prefetch) must give what the prefetched Repo gives, and the prefetched Repo must ask git
nothing more for those revisions.
"""

from __future__ import annotations

import subprocess

import pytest
from history_helpers import ScriptedRepo

from docgen.history.git import Repo


@pytest.fixture()
def repo_and_commits(tmp_path):
    """Pages in a folder and a sub-folder, edited, renamed, deleted over five commits."""
    script = ScriptedRepo(tmp_path / "repo")
    script.write("designs/a.md", "one\n")
    script.write("designs/library/parts.md", "parts\n")
    script.write("designs/picture.png", "not a page\n")
    script.write("outside.md", "elsewhere\n")
    commits = [script.commit("add")]
    script.write("designs/a.md", "one\ntwo\n")
    commits.append(script.commit("edit a"))
    script.move("designs/a.md", "designs/sub/deeper/b.md")
    commits.append(script.commit("move a two folders down"))
    script.write("designs/library/parts.md", "parts, edited\n")
    script.write("outside.md", "elsewhere, edited\n")
    commits.append(script.commit("library and outside"))
    script.git("rm", "-q", "designs/library/parts.md")
    commits.append(script.commit("drop the library"))
    return script, commits


def test_prefetched_files_and_contents_are_gits_own(repo_and_commits):
    script, commits = repo_and_commits
    plain, fetched = Repo(script.root), Repo(script.root)
    fetched.prefetch_folder("designs", ".md")
    for rev in commits:
        files = plain.files(rev, "designs")
        assert fetched.files(rev, "designs") == files
        pages = [p for p in files if p.endswith(".md")] + ["designs/missing.md"]
        assert fetched.read_many(rev, pages) == plain.read_many(rev, pages)
    assert fetched.files(commits[2], "designs") == [
        "designs/library/parts.md", "designs/picture.png", "designs/sub/deeper/b.md"]
    assert fetched.read_many(commits[2], ["designs/sub/deeper/b.md"]) == {
        "designs/sub/deeper/b.md": b"one\ntwo\n"}


def test_after_the_prefetch_reading_those_revisions_runs_no_git(repo_and_commits, monkeypatch):
    script, commits = repo_and_commits
    repo = Repo(script.root)
    repo.prefetch_folder("designs", ".md")

    def no_git(*args, **kwargs):
        raise AssertionError(f"git was run: {args[0]}")

    monkeypatch.setattr(subprocess, "run", no_git)
    for rev in commits:
        repo.read_many(rev, [p for p in repo.files(rev, "designs") if p.endswith(".md")])
    repo.prefetch_folder("designs", ".md")  # once per Repo


def test_paths_outside_the_prefetched_folder_still_come_from_git(repo_and_commits):
    script, commits = repo_and_commits
    repo = Repo(script.root)
    repo.prefetch_folder("designs", ".md")
    assert repo.read_many(commits[3], ["outside.md"]) == {"outside.md": b"elsewhere, edited\n"}
    assert repo.read_many(commits[0], ["designs/picture.png"]) == {
        "designs/picture.png": b"not a page\n"}  # not prefetched (suffix), read from git


def test_kept_answers_are_gits_own_and_a_second_repo_at_that_commit_asks_git_no_log(
        repo_and_commits, monkeypatch):
    """Repo.keep_answers: logs and the commit order saved by commit id, given back as git gave
    them; after a new commit they are asked again (another id)."""
    script, commits = repo_and_commits
    store: dict[str, dict] = {}

    def ask(repo: Repo) -> tuple:
        return (repo.log_follow("designs/sub/deeper/b.md"), repo.order(),
                repo.log_paths(["designs/library/parts.md"]))

    fresh = ask(Repo(script.root))
    first = Repo(script.root)
    first.keep_answers(store.get, store.__setitem__)
    assert ask(first) == fresh
    assert list(store) == [commits[-1]]
    assert [c.path for c in fresh[0]] == ["designs/sub/deeper/b.md"] + ["designs/a.md"] * 2

    real_run = subprocess.run

    def only_head(args, *rest, **options):
        assert "log" not in args and "rev-list" not in args, f"git was asked: {args}"
        return real_run(args, *rest, **options)

    monkeypatch.setattr(subprocess, "run", only_head)
    second = Repo(script.root)
    second.keep_answers(store.get, store.__setitem__)
    assert ask(second) == fresh
    monkeypatch.setattr(subprocess, "run", real_run)

    script.write("designs/sub/deeper/b.md", "changed again\n")
    newest = script.commit("edit b again")
    third = Repo(script.root)
    third.keep_answers(store.get, store.__setitem__)
    assert third.log_follow("designs/sub/deeper/b.md")[0].sha == newest
    assert set(store) == {commits[-1], newest}
