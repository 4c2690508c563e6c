"""Smoke test of the benchmark script's parts on tiny inputs (no timing is asserted: speed is
shown by ``benchmarks/run.py``, never by tests)."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest

BENCHMARKS = Path(__file__).resolve().parent.parent / "benchmarks"
sys.path.insert(0, str(BENCHMARKS))

import generate  # noqa: E402
import stages  # noqa: E402


def test_generated_record_is_distinct_designs_with_history(tmp_path: Path) -> None:
    """Every generated design reads without diagnostics, no two are alike, and git holds one
    commit per revision."""
    from docgen.record import load_record

    designs = generate.make_record(tmp_path / "record", 5, 3)
    texts = [p.read_text(encoding="utf-8") for p in sorted(designs.glob("*.md"))]
    assert len(texts) == 5
    assert len(set(texts)) == 5
    circuits = {t.split("```circuit")[1].split("```")[0] for t in texts}
    assert len(circuits) == 5  # distinct circuits, not only distinct titles
    record = load_record(designs)
    assert len(record.designs) == 5
    assert not [d for d in record.all_diagnostics if d.severity == "error"]
    log = subprocess.run(["git", "log", "--oneline"], cwd=designs.parent, capture_output=True,
                         text=True, check=True).stdout.splitlines()
    assert len(log) == 3
    assert generate.design_text(0, 0) != generate.design_text(0, 2)


def test_e12_values_written_in_design_syntax() -> None:
    """IEC 60062 style values: 4k7, 390, 82k."""
    assert generate._ohms(4700) == "4k7"
    assert generate._ohms(390) == "390"
    assert generate._ohms(82000) == "82k"
    assert generate._ohms(1000) == "1k"


@pytest.mark.parametrize("clock", ["wall", "cpu"])
def test_stages_report_cold_and_warm(clock: str) -> None:
    """The analyses part times every cheap stage cold and warm with a numpy reference."""
    design = BENCHMARKS.parent / "designs" / "hydrophone-preamp.md"
    figures = stages.measure(str(design), 2, False, clock)
    assert set(figures["cold"]) == set(stages.CHEAP)
    assert len(figures["warm"]) == 1
    assert all(value > 0 for value in figures["cold"].values())
    assert figures["unknowns"] > 0 and figures["raw sweep 400"] > 0


def test_script_options() -> None:
    import run

    quick = run.parse(["--quick", "--only", "spread", "check"])
    assert (quick.repeats, quick.designs, quick.revisions) == (3, 2, 2)
    assert quick.only == ["spread", "check"]
    full = run.parse([])
    assert (full.repeats, full.designs, full.revisions) == (5, 200, 10)


def test_the_value_edit_moves_one_resistor_to_its_e24_neighbour_and_back(tmp_path: Path) -> None:
    """The site rows' second one-design edit: one value changes, to the next E24 value (IEC
    60063's E24 runs 10, 11, 12, ...), and back on the next round."""
    import run

    from docgen.reader import read_text

    designs = tmp_path / "designs"
    designs.mkdir()
    page = designs / "divider.md"
    page.write_text((Path(__file__).parent / "fixtures" / "site" / "divider.md").read_text())
    before = read_text(page.read_text(), str(page))
    assert run._nudge_one(designs, 0) == "R1 10k -> 11k"
    after = read_text(page.read_text(), str(page))
    assert [(a.name, a.value, b.value) for a, b in zip(before.parts, after.parts, strict=True)
            if a.value != b.value] == [("R1", 10e3, 11e3)]
    run._nudge_one(designs, 1)
    assert read_text(page.read_text(), str(page)).parts == before.parts


def test_scaling_option_builds_cold_at_each_size(tmp_path: Path, monkeypatch, capsys) -> None:
    """``--scaling`` builds each size cold with --jobs 1 and 2 and prints CPU per design
    revision (the builds are replaced by a stand-in here: nothing is timed)."""
    import run

    args = run.parse(["--only", "generated", "--scaling", "2", "1", "--revisions", "2"])
    assert args.scaling == [2, 1]
    calls = []

    def fake_build(designs: Path, work: Path, jobs: int) -> tuple[float, float, str]:
        count = len(list(designs.glob("*.md")))
        calls.append((count, jobs))
        return 1.0 * count, 2.0 * count, ""

    monkeypatch.setattr(run, "_build", fake_build)
    run.bench_generated(run.Table(), args)
    assert calls == [(1, 1), (1, 2), (2, 1), (2, 2)]
    out = capsys.readouterr().out
    assert "2 generated x 2 --jobs 2: cold" in out
    assert "1.000 s cpu per design revision" in out  # 2 s cpu for 1 design x 2 revisions
    assert "x2.00 wall, x2.00 cpu for x2 designs" in out
