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
