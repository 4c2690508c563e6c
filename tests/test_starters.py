"""``docgen new``: starters exist for the common topologies, pass their own requirements,
take a title, and never overwrite a file."""

from __future__ import annotations

from pathlib import Path

import pytest
from demo_helpers import solve, verdicts

from docgen import cli, starters
from docgen.diagnostics import DocgenError
from docgen.reader import read_text
from docgen.record import load_record

REQUIRED = {"common-emitter", "emitter-follower", "noninverting-opamp", "inverting-opamp",
            "jfet-buffer"}


def test_the_issue_topologies_are_all_there() -> None:
    assert set(starters.names()) >= REQUIRED


def test_list_prints_every_starter_with_its_summary(capsys: pytest.CaptureFixture[str]) -> None:
    assert cli.main(["new", "--list"]) == 0
    lines = capsys.readouterr().out.splitlines()
    assert [line.split()[0] for line in lines] == starters.names()
    assert all(len(line.split(maxsplit=1)) == 2 for line in lines)


@pytest.mark.parametrize("topology", sorted(REQUIRED))
def test_starter_output_passes_docgen_check_and_its_own_requirements(
        topology: str, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    target = tmp_path / f"{topology}.md"
    assert cli.main(["new", topology, str(target)]) == 0
    assert cli.main(["check", str(target)]) == 0
    assert " 0 errors" in capsys.readouterr().out
    rec = load_record(target)
    assert dict(rec.diagnostics) == {}
    (page,) = rec.designs
    assert page.requirements
    found = verdicts(solve(page, rec.models_for(page)))
    assert "fail" not in found.values() and "invalid" not in found.values(), found


def test_title_goes_into_the_header_and_the_heading(tmp_path: Path) -> None:
    target = starters.create("jfet-buffer", tmp_path / "sub" / "probe.md", "pH probe buffer")
    text = target.read_text(encoding="utf-8")
    assert read_text(text, str(target)).header.title == "pH probe buffer"
    assert "\n# pH probe buffer\n" in text


def test_a_title_must_be_one_line(tmp_path: Path) -> None:
    with pytest.raises(DocgenError):
        starters.create("jfet-buffer", tmp_path / "x.md", "two\nlines")
    assert not (tmp_path / "x.md").exists()


def test_an_existing_file_is_never_overwritten(tmp_path: Path,
                                               capsys: pytest.CaptureFixture[str]) -> None:
    target = tmp_path / "mine.md"
    target.write_text("my own notes\n", encoding="utf-8")
    assert cli.main(["new", "common-emitter", str(target)]) == 2
    assert target.read_text(encoding="utf-8") == "my own notes\n"
    assert "already exists" in capsys.readouterr().err


def test_unknown_topology_is_an_error_with_a_close_spelling(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert cli.main(["new", "emiter-follower", str(tmp_path / "f.md")]) == 2
    assert "did you mean 'emitter-follower'" in capsys.readouterr().err
    assert not (tmp_path / "f.md").exists()


def test_missing_arguments_are_a_usage_error(capsys: pytest.CaptureFixture[str]) -> None:
    assert cli.main(["new", "common-emitter"]) == 2
    assert "--list" in capsys.readouterr().err
