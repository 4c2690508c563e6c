"""docgen neaten: golden layout, idempotence, meaning kept, --check, refusing broken files.

The golden file ``fixtures/neaten/neat.md`` was checked by hand against the layout rules in
docs/format.md (columns two spaces apart and as wide as their widest cell; trailing comments in
one column two spaces after the block's longest line; single spaces inside fields; spellings
and prose untouched).
"""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest
from reader_helpers import meaning

from docgen.cli import main
from docgen.diagnostics import InputError
from docgen.neaten import neaten_text
from docgen.reader import read_text

FIXTURES = Path(__file__).parent / "fixtures" / "neaten"
DESIGNS = Path(__file__).parent.parent / "designs"


def ragged() -> str:
    return (FIXTURES / "ragged.md").read_text(encoding="utf-8")


def test_golden_layout() -> None:
    assert neaten_text(ragged()) == (FIXTURES / "neat.md").read_text(encoding="utf-8")


def test_idempotent() -> None:
    once = neaten_text(ragged())
    assert neaten_text(once) == once


def _pages() -> list[Path]:
    return [FIXTURES / "ragged.md", *sorted(DESIGNS.rglob("*.md"))]


@pytest.mark.parametrize("path", _pages(), ids=lambda p: p.name)
def test_meaning_is_kept(path: Path) -> None:
    text = path.read_text(encoding="utf-8")
    try:
        before = read_text(text, "x.md")
    except InputError:
        pytest.skip("page does not read (another test reports it)")
    after = read_text(neaten_text(text), "x.md")
    assert meaning(after) == meaning(before)
    assert neaten_text(neaten_text(text)) == neaten_text(text)


def test_limit_text_is_respaced_only() -> None:
    design = read_text(neaten_text(ragged()), "x.md")
    assert design.requirements[1].limit.text == "< 20 Hz"


def test_crlf_and_missing_final_newline_are_kept() -> None:
    text = ragged().replace("\n", "\r\n").rstrip("\r\n")
    out = neaten_text(text)
    assert "\r\n" in out and "\n" not in out.replace("\r\n", "")
    assert not out.endswith("\n")


def test_refuses_a_page_with_errors() -> None:
    with pytest.raises(InputError):
        neaten_text(ragged().replace("resistor 4k7", "resistor 4meg"))


def test_command(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    shutil.copy(FIXTURES / "ragged.md", tmp_path / "a.md")
    shutil.copy(FIXTURES / "neat.md", tmp_path / "b.md")
    assert main(["neaten", "--check", str(tmp_path)]) == 1
    assert capsys.readouterr().out == f"would neaten {(tmp_path / 'a.md').as_posix()}\n"
    assert (tmp_path / "a.md").read_text(encoding="utf-8") == ragged()  # --check writes nothing
    assert main(["neaten", str(tmp_path)]) == 0
    assert (tmp_path / "a.md").read_text(encoding="utf-8") == neaten_text(ragged())
    assert main(["neaten", "--check", str(tmp_path)]) == 0
    (tmp_path / "c.md").write_text(ragged().replace("4k7", "4meg"), encoding="utf-8")
    assert main(["neaten", str(tmp_path)]) == 2
    assert "'meg' is not an SI prefix" in capsys.readouterr().err
