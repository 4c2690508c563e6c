"""docgen check, the reading side: rendered diagnostics, summary, --json, exit 0/2, paths."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from docgen.cli import main

BROKEN = """\
---
title: Broken
---

```circuit
V1  supply   5 V      : a gnd
R1  resistr  1k       : a gnd
R2  resistor 2.2meg   : a gnd
```
"""

NOTE = "# Conventions\n\nNothing to solve here.\n"
WARNED = "---\ntitle: Library\ncolour: blue\n---\n\n```models\nmy-npn npn beta=150\n```\n"


@pytest.fixture
def folder(tmp_path: Path) -> Path:
    (tmp_path / "broken.md").write_text(BROKEN, encoding="utf-8")
    (tmp_path / "note.md").write_text(NOTE, encoding="utf-8")
    return tmp_path


def test_input_errors_exit_2_with_rendered_diagnostics(
        folder: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["check", str(folder)]) == 2
    out = capsys.readouterr().out
    path = (folder / "broken.md").as_posix()
    assert f"{path}:7:5: error: unknown part kind 'resistr'" in out
    assert "    R1  resistr  1k       : a gnd\n        ^~~~~~~\n" in out
    assert "    hint: did you mean 'resistor'?" in out
    assert f"{path}:8:17: error: 'meg' is not an SI prefix" in out
    assert "hint: did you mean '2.2M'?" in out
    assert out.rstrip().splitlines()[-1] == (
        "checked 2 files (0 readable designs): 2 errors, 0 warnings")


def test_warnings_only_exit_0(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    (tmp_path / "lib.md").write_text(WARNED, encoding="utf-8")
    assert main(["check", str(tmp_path)]) == 0
    out = capsys.readouterr().out
    assert f"{(tmp_path / 'lib.md').as_posix()}:3:1: warning: unknown header key 'colour'" in out
    assert out.rstrip().endswith("0 errors, 1 warning")


def test_json(folder: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["check", "--json", str(folder)]) == 2
    data = json.loads(capsys.readouterr().out)
    assert (data["files"], data["errors"], data["warnings"], data["exit_code"]) == (2, 2, 0, 2)
    first = data["diagnostics"][0]
    assert {k: first[k] for k in ("line", "col", "severity", "message")} == {
        "line": 7, "col": 5, "severity": "error", "message": "unknown part kind 'resistr'"}


def test_missing_path(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["check", str(tmp_path / "nowhere")]) == 2
    assert "no such file or folder" in capsys.readouterr().out


def test_default_folder_is_designs(tmp_path: Path, monkeypatch: pytest.MonkeyPatch,
                                   capsys: pytest.CaptureFixture[str]) -> None:
    (tmp_path / "designs").mkdir()
    (tmp_path / "designs" / "broken.md").write_text(BROKEN, encoding="utf-8")
    monkeypatch.chdir(tmp_path)
    assert main(["check"]) == 2
    assert "designs/broken.md:7:5: error" in capsys.readouterr().out


def test_single_file_sees_library_pages(tmp_path: Path, monkeypatch: pytest.MonkeyPatch,
                                        capsys: pytest.CaptureFixture[str]) -> None:
    (tmp_path / "designs" / "lib").mkdir(parents=True)
    (tmp_path / "designs" / "lib" / "parts.md").write_text(
        "```models\nteam-npn npn beta=150\n```\n", encoding="utf-8")
    design = ("---\ntitle: t\n---\n```circuit\nV1 supply 5 V : c gnd\n"
              "Q1 npn team-nnp : c=c b=c e=gnd\n```\n")
    (tmp_path / "designs" / "stage.md").write_text(design, encoding="utf-8")
    monkeypatch.chdir(tmp_path)
    assert main(["check", "--json", "designs/stage.md"]) == 2
    data = json.loads(capsys.readouterr().out)
    assert [(d["line"], d["message"], d["hint"]) for d in data["diagnostics"]] == [
        (6, "unknown model 'team-nnp'", "did you mean 'team-npn'?")]
