"""``docgen check`` on folders of designs that pass, fail and do not read: exit codes 0/1/2,
diagnostics at the require line or the part's line, the summary, --json, and that only the
analyses a design's requirements need are run.

Reference values: an unloaded divider of two equal resistors halves its supply (Ohm's law); the
power of 12 V across 100 Ω is V²/R = 1.44 W (Joule's law).
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from docgen.cli import main

DIVIDER = """---
title: divider
status: {status}
{approved}---

```circuit
VA  supply    10 V           : vcc gnd
R1  resistor  1k 1% 0.25 W   : vcc mid
R2  resistor  1k 1% 0.25 W   : mid gnd
```

```require
voltage at mid : {limit}
```
"""

HOT = """---
title: hot resistor
status: {status}
{approved}---

```circuit
VA  supply    12 V           : vcc gnd
R1  resistor  100 1% 0.25 W  : vcc gnd
```
"""


def _page(folder: Path, name: str, template: str, status: str, limit: str = "4 V .. 6 V"):
    approved = "approved: 2026-01-05\n" if status == "approved" else ""
    (folder / name).write_text(template.format(status=status, approved=approved, limit=limit),
                               encoding="utf-8")
    return folder / name


def _check(folder: Path, capsys: pytest.CaptureFixture, *extra: str) -> tuple[int, str]:
    code = main(["check", str(folder), "--library", str(folder), *extra])
    return code, capsys.readouterr().out


@pytest.mark.parametrize("status, limit, expected", [
    ("approved", "4 V .. 6 V", 0),     # 5 V passes
    ("approved", "6 V .. 7 V", 1),     # fails on an approved design: error
    ("review", "6 V .. 7 V", 1),       # in review counts as approved for the gate
    ("draft", "6 V .. 7 V", 0),        # a draft failing is a warning
    ("retired", "6 V .. 7 V", 0),      # retired: warnings only
])
def test_requirement_failure_by_review_status(tmp_path: Path, capsys, status, limit, expected):
    path = _page(tmp_path, "d.md", DIVIDER, status, limit)
    code, out = _check(tmp_path, capsys)
    assert code == expected
    if limit.startswith("6"):
        severity = "error" if expected else "warning"
        line = 14 if status == "approved" else 13
        assert f"{path}:{line}:1: {severity}: requirement 'voltage at mid : 6 V .. 7 V' fails" \
               in out
        assert "1 V outside the limit" in out  # 5 V against the 6 V low end
    assert "requirements:" in out.splitlines()[-1]


@pytest.mark.parametrize("status, expected", [("approved", 1), ("draft", 0)])
def test_part_over_rating(tmp_path: Path, capsys, status: str, expected: int) -> None:
    path = _page(tmp_path, "hot.md", HOT, status)
    code, out = _check(tmp_path, capsys)
    assert code == expected
    line = 9 if status == "approved" else 8
    severity = "error" if expected else "warning"
    assert f"{path}:{line}:1: {severity}: R1 dissipates 1.44 W" in out


def test_mixed_folder(tmp_path: Path, capsys) -> None:
    """Passing, failing and unreadable designs together: 2 outranks 1."""
    _page(tmp_path, "good.md", DIVIDER, "approved")
    _page(tmp_path, "bad.md", DIVIDER, "approved", "6 V .. 7 V")
    code, out = _check(tmp_path, capsys)
    assert code == 1
    broken = _page(tmp_path, "broken.md", DIVIDER.replace("voltage at mid", "voltage at mdi"),
                   "draft")
    code, out = _check(tmp_path, capsys)
    assert code == 2
    assert f"{broken}:13:1: error: no net called 'mdi'; did you mean 'mid'?" in out
    (tmp_path / "unreadable.md").write_text("---\ntitle: x\n---\n```circuit\nR1 resistr 1k : a "
                                            "gnd\n```\n", encoding="utf-8")
    code, out = _check(tmp_path, capsys)
    assert code == 2
    last = out.splitlines()[-1]
    assert last.startswith("checked 4 files") and "1 fail" in last


def test_unknown_metric_word_points_at_its_column(tmp_path: Path, capsys) -> None:
    path = _page(tmp_path, "d.md", DIVIDER.replace("voltage at mid", "voltage att mid"), "draft")
    code, out = _check(tmp_path, capsys)
    assert code == 2
    assert f"{path}:13:9: error: unknown word 'att' in metric" in out
    assert "hint: did you mean 'at'?" in out


def test_json_report(tmp_path: Path, capsys) -> None:
    _page(tmp_path, "bad.md", DIVIDER, "approved", "6 V .. 7 V")
    code, out = _check(tmp_path, capsys, "--json")
    data = json.loads(out)
    assert code == 1 and data["exit_code"] == 1
    (design,) = data["designs"]
    (row,) = design["checks"]
    assert row["verdict"] == "fail" and row["value"] == pytest.approx(5.0, rel=1e-9)
    assert row["margin"] == pytest.approx(-1.0, rel=1e-9)
    assert row["margin_fraction"] == pytest.approx(-1 / 6, rel=1e-9)
    assert (row["line"], row["col"]) == (14, 1)


def test_only_the_needed_analyses_run(tmp_path: Path, capsys) -> None:
    """A design whose requirements read only the operating point is not swept or sampled."""
    _page(tmp_path, "d.md", DIVIDER, "approved")
    code, out = _check(tmp_path, capsys, "--json")
    (design,) = json.loads(out)["designs"]
    assert {"op", "checks", "cautions"} <= set(design["analyses"])
    assert not {"ac", "noise", "transient", "spread"} & set(design["analyses"])


def test_notes_are_printed_on_request(tmp_path: Path, capsys) -> None:
    (tmp_path / "n.md").write_text("---\ntitle: n\n---\n```circuit\nVA supply 5 V : vcc gnd\n"
                                   "R1 resistor 1k : vcc gnd\n```\n```estimate\n"
                                   "R1 current ≈ VA / R1 / 2\n```\n", encoding="utf-8")
    code, out = _check(tmp_path, capsys)
    assert code == 0 and "note:" not in out
    code, out = _check(tmp_path, capsys, "--notes")
    assert "n.md:6:1: note: R1 has no power rating" in out
    # Ohm's law: 5 V / 1 kΩ = 5 mA; the halved estimate is 50 % low
    assert "n.md:9:1: note: estimate R1 current ≈ 2.5 mA, solved 5 mA (error -50 %)" in out


def _git(folder: Path, *args: str) -> None:
    import os
    import subprocess

    env = dict(os.environ, GIT_AUTHOR_NAME="Test", GIT_AUTHOR_EMAIL="t@example.invalid",
               GIT_COMMITTER_NAME="Test", GIT_COMMITTER_EMAIL="t@example.invalid",
               GIT_AUTHOR_DATE="2026-01-05T10:00:00Z", GIT_COMMITTER_DATE="2026-01-05T10:00:00Z",
               GIT_CONFIG_GLOBAL="/dev/null", GIT_CONFIG_SYSTEM="/dev/null")
    subprocess.run(["git", *args], cwd=folder, env=env, check=True, capture_output=True)


def test_approved_design_changed_since_approval(tmp_path: Path, capsys, monkeypatch) -> None:
    """An approved page whose requirements changed after the approval commit exits 1."""
    designs = tmp_path / "designs"
    designs.mkdir()
    page = _page(designs, "d.md", DIVIDER, "approved")
    _git(tmp_path, "init", "-q", "-b", "main")
    _git(tmp_path, "add", ".")
    _git(tmp_path, "commit", "-q", "-m", "approve")
    monkeypatch.chdir(tmp_path)
    assert main(["check", "designs"]) == 0
    capsys.readouterr()
    page.write_text(page.read_text(encoding="utf-8").replace("4 V .. 6 V", "4.5 V .. 5.5 V"),
                    encoding="utf-8")
    assert main(["check", "designs"]) == 1
    out = capsys.readouterr().out
    assert "designs/d.md:4:11: error: changed since approval: requirements changed" in out


def test_solve_prints_the_check_sections(tmp_path: Path, capsys) -> None:
    path = _page(tmp_path, "d.md", DIVIDER, "approved", "6 V .. 7 V")
    main(["solve", str(path)])  # exit 2: the page has no bench, so no response to compute
    out = capsys.readouterr().out
    assert "Requirements" in out
    row = next(line for line in out.splitlines() if line.strip().startswith("voltage at mid"))
    assert row.split()[-1] == "fail" and "6 V .. 7 V" in row


@pytest.mark.parametrize("status, expected, severity", [("approved", 1, "error"),
                                                        ("draft", 0, "warning")])
def test_an_analysis_that_fails_leaves_the_requirement_unverified(
        tmp_path: Path, capsys, status: str, expected: int, severity: str) -> None:
    """No bench: the response cannot be computed, so 'gain at 1 kHz' cannot be checked."""
    path = _page(tmp_path, "d.md", DIVIDER.replace("voltage at mid", "gain at 1 kHz"), status,
                 "> 0 dB")
    code, out = _check(tmp_path, capsys)
    assert code == expected
    assert f"{path}:1:1: {severity}: ac analysis: the bench names no input" in out
    assert "not checked: the 'ac' analysis failed: the bench names no input" in out


def test_hazardous_supply_is_a_prominent_warning(tmp_path: Path, capsys) -> None:
    """150 V DC is beyond extra-low voltage (IEC 61140, from memory): always reported, with the
    deferral to local codes in --json; it is a safety warning, not a failed requirement."""
    (tmp_path / "hv.md").write_text("---\ntitle: hv\nstatus: approved\napproved: 2026-01-05\n"
                                    "---\n```circuit\nVH supply 150 V : hv gnd\n"
                                    "R1 resistor 1M 1% 0.25 W : hv gnd\n```\n", encoding="utf-8")
    code, out = _check(tmp_path, capsys)
    assert code == 0
    assert "hv.md:7:1: warning: HAZARDOUS VOLTAGE: 150 V DC" in out
    code, out = _check(tmp_path, capsys, "--json")
    (caution,) = json.loads(out)["designs"][0]["cautions"]
    assert caution["severity"] == "hazard" and "licensed practice" in caution["note"]


def test_gate_results_are_kept_until_the_design_changes(tmp_path: Path,
                                                          capsys: pytest.CaptureFixture,
                                                          monkeypatch: pytest.MonkeyPatch):
    # A second check of an unchanged design takes its gate result from the cache (solving is
    # made impossible here) and prints the same; a changed limit is solved again.
    from docgen.check import gate

    folder = tmp_path / "designs"
    folder.mkdir()
    page = _page(folder, "d.md", DIVIDER, "review", "6 V .. 7 V")
    cache = ["--cache", str(tmp_path / "cache")]
    first = _check(folder, capsys, *cache)
    assert first[0] == 1 and "fails" in first[1]

    def refuse(*_args, **_kwargs):
        raise AssertionError("solved although nothing changed")

    monkeypatch.setattr(gate, "check_design", refuse)
    assert _check(folder, capsys, *cache) == first
    page.write_text(page.read_text(encoding="utf-8").replace("6 V .. 7 V", "4 V .. 6 V"),
                    encoding="utf-8")
    with pytest.raises(AssertionError, match="solved although"):
        _check(folder, capsys, *cache)
    monkeypatch.undo()
    assert _check(folder, capsys, *cache)[0] == 0
    assert _check(folder, capsys, "--no-cache")[0] == 0
