"""Every demo design in designs/ draws faithfully and readably, and ``docgen draw`` works."""

from __future__ import annotations

from pathlib import Path

import pytest

from docgen.cli import main
from docgen.reader import read_file

ROOT = Path(__file__).parent.parent
DEMOS = sorted(p for p in (ROOT / "designs").glob("*.md") if "```circuit" in p.read_text())


@pytest.mark.parametrize("path", DEMOS, ids=lambda p: p.stem)
def test_demo_design_draws_faithfully(path: Path) -> None:
    from docgen.draw import draw

    design = read_file(str(path))
    schematic = draw(design)
    assert schematic.report.faults == []
    assert schematic.report.problems == []
    assert schematic.placement.flagged == []


def test_draw_command_writes_svg(tmp_path: Path) -> None:
    out = tmp_path / "s.svg"
    assert main(["draw", str(DEMOS[0]), "-o", str(out)]) == 0
    text = out.read_text(encoding="utf-8")
    assert text.startswith("<svg") and text.rstrip().endswith("</svg>")


def test_draw_command_errors(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["draw", str(tmp_path / "missing.md")]) == 2
    assert "no such file" in capsys.readouterr().err
    page = tmp_path / "note.md"
    page.write_text("---\ntitle: a note\n---\n\nJust prose.\n", encoding="utf-8")
    assert main(["draw", str(page)]) == 2
    assert "nothing to draw" in capsys.readouterr().err
