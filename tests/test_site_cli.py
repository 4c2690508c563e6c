"""``docgen build`` on the command line: options, summary line, exit codes."""

from __future__ import annotations

from pathlib import Path

import pytest
from site_helpers import copy_fixtures

from docgen.cli import main


def test_build_command_writes_the_site_and_says_what_it_did(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    designs = copy_fixtures(tmp_path / "designs")
    code = main(["build", str(designs), "--out", str(tmp_path / "site"), "--jobs", "1",
                 "--cache", str(tmp_path / "cache"), "--quiet"])
    captured = capsys.readouterr()
    assert code == 2  # broken.md
    assert "3 design(s) solved, 0 from the cache" in captured.out
    assert "broken.md:7:18: error:" in captured.err
    assert (tmp_path / "site" / "index.html").is_file()
    main(["build", str(designs), "--out", str(tmp_path / "site"), "--jobs", "1",
          "--cache", str(tmp_path / "cache"), "--quiet"])
    assert "0 design(s) solved, 3 from the cache" in capsys.readouterr().out


@pytest.mark.parametrize("argv, message", [
    (["--only-status", "aproved"], "unknown status 'aproved' (did you mean 'approved'?)"),
    (["--only-status", ","], "name at least one status"),
    (["--jobs", "0"], "--jobs must be 1 or more"),
])
def test_bad_options_are_input_errors(tmp_path: Path, capsys: pytest.CaptureFixture[str],
                                      argv: list[str], message: str) -> None:
    designs = copy_fixtures(tmp_path / "designs")
    code = main(["build", str(designs), "--out", str(tmp_path / "site"), *argv])
    assert code == 2
    assert message in capsys.readouterr().err
    assert not (tmp_path / "site").exists()


def test_missing_designs_folder(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["build", str(tmp_path / "nowhere")]) == 2
    assert "no such folder of designs" in capsys.readouterr().err
