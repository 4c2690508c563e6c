"""``docgen diff`` and ``docgen history`` on the scripted repository of
tests/test_history_scripted.py: default sides (HEAD against the work tree), explicit revisions,
paths, ``--json``, library changes listing every design they affect, and shallow clones."""

from __future__ import annotations

import json
import subprocess

import pytest
from history_helpers import git_env
from test_history_scripted import RENAMED, build

from docgen.cli import main


@pytest.fixture(scope="module")
def repo(tmp_path_factory):
    script, ids = build(tmp_path_factory.mktemp("diffcli") / "repo")
    return script, ids


def test_default_is_head_against_the_work_tree(repo, capsys, monkeypatch):
    script, _ = repo
    monkeypatch.chdir(script.root)
    assert main(["diff"]) == 0
    assert capsys.readouterr().out == "no design changed between HEAD and work tree\n"
    script.edit(RENAMED, "5k6 1% 0.25 W           : vcc c1", "6k8 1% 0.25 W           : vcc c1")
    try:
        assert main(["diff", "--json"]) == 0
        data = json.loads(capsys.readouterr().out)
        [diff] = data["diffs"]
        assert (data["from"], data["to"]) == ("HEAD", "work tree")
        [revalued] = diff["parts"]["revalued"]
        assert (revalued["old_text"], revalued["new_text"]) == ("5k6", "6k8")
        assert revalued["relative"] == pytest.approx((6800 - 5600) / 5600, rel=1e-5)
        vce = next(m for m in diff["metrics"] if m["metric"] == "Q1 collector-emitter voltage")
        assert vce["new"] < vce["old"]  # more drop across a larger collector resistor
        assert main(["diff", RENAMED]) == 0
        out = capsys.readouterr().out
        assert "RC re-valued 5k6 → 6k8 (+21.4 %)" in out
        assert "-RC  resistor   5k6" in out and "+RC  resistor   6k8" in out
        assert main(["diff", "--no-text", "designs"]) == 0
        assert "-RC  resistor" not in capsys.readouterr().out
    finally:
        script.git("checkout", "-q", "--", RENAMED)


def test_two_revisions_across_a_rename_and_library_change(repo, capsys, monkeypatch):
    script, ids = repo
    monkeypatch.chdir(script.root)
    assert main(["diff", ids["value"], ids["library"], "--json"]) == 0
    [diff] = json.loads(capsys.readouterr().out)["diffs"]
    assert diff["paths"] == ["designs/ce.md", RENAMED]
    assert [m["part"] for m in diff["parts"]["rewired"]] == ["RE"]
    assert [m["model"] for m in diff["models"]["changed"]] == ["team-npn"]
    # the library commit alone changes the design's results: it is listed though its file is not
    assert main(["diff", ids["rename"], ids["library"]]) == 0
    out = capsys.readouterr().out
    assert "model team-npn: beta 150 → 200" in out
    # the pure rename changes nothing a design is solved from
    assert main(["diff", ids["rewire"], ids["rename"]]) == 0
    assert capsys.readouterr().out.startswith("no design changed")


def test_bad_arguments(repo, capsys, monkeypatch, tmp_path):
    script, _ = repo
    monkeypatch.chdir(script.root)
    assert main(["diff", "HEAD", "HEAD~1", "HEAD~2"]) == 2
    assert main(["diff", "no-such-thing.md"]) == 2
    monkeypatch.chdir(tmp_path)
    assert main(["diff"]) == 2
    assert "git repository" in capsys.readouterr().err


def test_history_command_table_and_json(repo, capsys, monkeypatch, tmp_path):
    script, ids = repo
    monkeypatch.chdir(script.root)
    assert main(["history", RENAMED, "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert [r["sha"] for r in data["rows"]][-1] == ids["add"]
    assert len(data["rows"]) == 7
    assert main(["history", RENAMED]) == 0
    lines = capsys.readouterr().out.splitlines()
    assert lines[0] == f"{RENAMED}: 7 revisions, newest first"
    assert lines[1].startswith(ids["prose"][:10] + "  2024-03-07  Ada Ohm ")
    assert "    library changed: designs/library/parts.md" in lines
    assert main(["history", "nothing.md"]) == 2
    clone = tmp_path / "shallow"
    subprocess.run(["git", "clone", "-q", "--depth", "1", f"file://{script.root}", str(clone)],
                   env=git_env(), check=True)
    monkeypatch.chdir(clone)
    assert main(["history", RENAMED]) == 0
    assert "history is not available: this is a shallow clone" in capsys.readouterr().out
