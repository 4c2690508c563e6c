"""``docgen hook``: install, refuse to clobber, force with backup, remove and restore, and a real
commit that runs the installed hook and rebuilds the site.

Hook locations and behaviour follow githooks(5): hooks live in ``$GIT_DIR/hooks`` (or
``core.hooksPath``), ``post-commit`` runs after each commit and cannot affect its outcome.
"""

from __future__ import annotations

import os
import stat
import subprocess
import sys

import pytest
from history_helpers import ScriptedRepo, git_env

from docgen.cli import main
from docgen.history import hook
from docgen.history.git import Repo


@pytest.fixture()
def repo(tmp_path):
    script = ScriptedRepo(tmp_path / "repo")
    script.write("README.txt", "x\n")
    script.commit("start")
    return script


def test_install_writes_an_executable_marked_hook(repo, capsys):
    assert main(["hook", "install", "--repo", str(repo.root)]) == 0
    path = repo.root / ".git" / "hooks" / "post-commit"
    text = path.read_text()
    assert text.startswith("#!/bin/sh\n") and hook.MARKER in text
    assert "build designs --out site" in text
    assert path.stat().st_mode & stat.S_IXUSR
    assert hook.state(Repo(repo.root)).owner == "docgen"
    # installing again replaces docgen's own hook quietly
    assert main(["hook", "install", "--repo", str(repo.root), "--out", "public"]) == 0
    assert "--out public" in path.read_text()
    assert main(["hook", "status", "--repo", str(repo.root)]) == 0
    assert "docgen's hook" in capsys.readouterr().out


def test_foreign_hook_is_refused_then_kept_aside_with_force_and_restored(repo, capsys):
    path = repo.root / ".git" / "hooks" / "post-commit"
    path.parent.mkdir(parents=True, exist_ok=True)
    foreign = "#!/bin/sh\necho someone else's hook\n"
    path.write_text(foreign)
    assert main(["hook", "install", "--repo", str(repo.root)]) == 2
    assert "--force" in capsys.readouterr().err
    assert path.read_text() == foreign
    assert main(["hook", "remove", "--repo", str(repo.root)]) == 2
    assert path.read_text() == foreign

    assert main(["hook", "install", "--force", "--repo", str(repo.root)]) == 0
    assert hook.MARKER in path.read_text()
    assert (path.parent / "post-commit.before-docgen").read_text() == foreign
    assert main(["hook", "remove", "--repo", str(repo.root)]) == 0
    assert path.read_text() == foreign
    assert not (path.parent / "post-commit.before-docgen").exists()


def test_remove_without_hook_and_outside_git(repo, tmp_path, capsys):
    assert main(["hook", "remove", "--repo", str(repo.root)]) == 0
    assert "nothing to remove" in capsys.readouterr().out
    outside = tmp_path / "plain"
    outside.mkdir()
    assert main(["hook", "install", "--repo", str(outside)]) == 2


def test_hooks_path_setting_is_honoured(repo):
    repo.git("config", "core.hooksPath", "tools/hooks")
    state = hook.install(Repo(repo.root))
    assert state.path == repo.root / "tools" / "hooks" / "post-commit"
    assert state.owner == "docgen"


def test_installed_hook_runs_after_a_commit(repo):
    """A real ``git commit`` runs the hook; here the hook's interpreter is replaced by a tiny
    script that records its arguments, so this test checks the wiring, not the build."""
    recorder = repo.root / "record-args.sh"
    log = repo.root / "hook-ran.txt"
    recorder.write_text(f'#!/bin/sh\necho "$@" > "{log}"\npwd >> "{log}"\n')
    recorder.chmod(0o755)
    path = hook.install(Repo(repo.root)).path
    path.write_text(hook.hook_script("designs", "site", python=str(recorder)))
    repo.write("designs/x.md", "# x\n")
    repo.commit("add x")
    args, folder = log.read_text().splitlines()
    assert args.split() == ["-m", "docgen.cli", "build", "designs", "--out", "site"]
    assert folder == str(repo.root)
    assert os.access(path, os.X_OK)
    assert sys.executable in hook.hook_script("d", "s")
    # the hook runs from the repository root, whatever folder the commit was made in
    log.unlink()
    env = git_env("2024-03-09T10:00:00+00:00")
    (repo.root / "designs" / "y.md").write_text("# y\n")
    subprocess.run(["git", "add", "y.md"], cwd=repo.root / "designs", env=env, check=True)
    subprocess.run(["git", "commit", "-q", "-m", "add y"], cwd=repo.root / "designs", env=env,
                   check=True)
    assert log.read_text().splitlines()[1] == str(repo.root)


@pytest.mark.slow
def test_hook_rebuilds_the_site_with_history_after_each_commit(tmp_path):
    """The real hook and the real ``docgen build``: each commit republishes the site, and the
    history page grows by one revision per commit."""
    from test_history_scripted import DESIGN

    script = ScriptedRepo(tmp_path / "repo")
    script.write(".gitignore", "/site/\n")
    script.write("designs/ce.md", DESIGN)
    script.commit("Add the CE stage")
    assert main(["hook", "install", "--repo", str(script.root)]) == 0
    script.edit("designs/ce.md", "4k7 1% 0.25 W           : vcc c1",
                "3k9 1% 0.25 W           : vcc c1")
    second = script.commit("RC 4k7 to 3k9")
    history = script.root / "site" / "ce.files" / "history.html"
    text = history.read_text(encoding="utf-8")
    assert second[:10] in text and text.count("<code>") >= 2
    assert (script.root / "site" / "index.html").exists()
    script.edit("designs/ce.md", "3k9 1% 0.25 W           : vcc c1",
                "4k3 1% 0.25 W           : vcc c1")
    third = script.commit("RC 3k9 to 4k3")
    text = history.read_text(encoding="utf-8")
    assert third[:10] in text and second[:10] in text
    assert len(list(history.parent.glob("diff-*.html"))) == 2


def test_ci_recipe_runs_real_commands_with_full_history():
    """examples/ci/publish-site.yml: every docgen command it runs parses with docgen's own
    argument parser, and it fetches the full history (history pages need every revision)."""
    import re
    import shlex
    from pathlib import Path

    from docgen.cli import build_parser

    recipe = Path(__file__).resolve().parent.parent / "examples" / "ci" / "publish-site.yml"
    text = recipe.read_text(encoding="utf-8")
    assert re.search(r"^\s+fetch-depth: 0$", text, re.M)
    assert re.search(r"^\s+path: \.docgen-cache$", text, re.M)
    commands = re.findall(r"^\s+run: (docgen .*)$", text, re.M)
    assert {shlex.split(c)[1] for c in commands} == {"build", "check"}
    parser = build_parser()
    for command in commands:
        parser.parse_args(shlex.split(command)[1:])  # exits (fails the test) on a bad option
