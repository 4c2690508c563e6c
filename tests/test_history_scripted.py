"""A scripted design history through the real reader and pipeline: history rows, cache hits
(a second build solves nothing), semantic diffs of consecutive revisions, metric deltas, the
changed-since-approval flag and a shallow clone.

Bias expectations use the divider-bias formula IE = (VTH − VBE)/(RE + RTH/(β+1))
(Sedra & Smith, *Microelectronic Circuits*, from memory) with VBE ≈ 0.65 V (common practice).
"""

from __future__ import annotations

import subprocess

import pytest
from history_helpers import ScriptedRepo, git_env

from docgen.history.approval import changed_since_approval
from docgen.history.cache import CACHE_DIR, ResultsCache
from docgen.history.git import Repo
from docgen.history.snapshot import RevisionSolver, history_sections
from docgen.history.timeline import design_history
from docgen.pipeline import run

LIBRARY = """---
title: Team parts
---

# Team parts

```models
team-npn  npn  saturation_current=10f beta=150 (100..300) early_voltage=100
```
"""

DESIGN = """---
title: Test common-emitter stage
status: draft
owner: Ada Ohm
---

# Test stage

Divider bias, degenerated emitter.

```circuit
VB  supply     12 V                    : vcc gnd
VS  signal     10 mV 1 kHz source=600  : in gnd
CI  capacitor  10u 10% 25 V            : in b1
R1  resistor   47k 1% 0.25 W           : vcc b1
R2  resistor   10k 1% 0.25 W           : b1 gnd
RC  resistor   4k7 1% 0.25 W           : vcc c1
RE  resistor   1k 1% 0.25 W            : e1 gnd
Q1  npn        team-npn                : c=c1 b=b1 e=e1
CO  capacitor  10u 10% 25 V            : c1 out
```

```bench
input        VS
output       out
load         10k
frequencies  10 Hz .. 100 kHz
boards       20
```

```require
Q1 collector-emitter voltage : > 3.5 V
supply current               : < 3 mA
Q1 collector current         : 0.3 mA .. 2 mA
```
"""

DESIGN_PATH = "designs/ce.md"
RENAMED = "designs/stages/ce-stage.md"


def build(root):
    """The scripted history; returns the script and the commit ids by name."""
    s = ScriptedRepo(root)
    s.write("designs/library/parts.md", LIBRARY)
    s.write(DESIGN_PATH, DESIGN)
    ids = {"add": s.commit("Add the CE stage")}
    s.edit(DESIGN_PATH, "4k7 1% 0.25 W           : vcc c1", "5k6 1% 0.25 W           : vcc c1")
    ids["value"] = s.commit("More gain: RC 4k7 to 5k6", author="Bo Farad")
    s.edit(DESIGN_PATH, "RE  resistor   1k 1% 0.25 W            : e1 gnd",
           "RE  resistor   1k 1% 0.25 W            : e1 e2\n"
           "RE2 resistor   1k 1% 0.25 W            : e2 gnd")
    ids["rewire"] = s.commit("Split the emitter resistor")
    s.move(DESIGN_PATH, RENAMED)
    ids["rename"] = s.commit("Move the stage into stages/")
    s.edit("designs/library/parts.md", "beta=150 (100..300)", "beta=200 (120..300)")
    ids["library"] = s.commit("Library: measured beta of the stocked npn")
    s.edit(RENAMED, "status: draft", "status: approved\napproved: 2024-03-06")
    ids["approve"] = s.commit("Approve the CE stage", author="Cy Henry")
    s.edit(RENAMED, "Divider bias, degenerated emitter.", "Divider bias; emitter split in two.")
    ids["prose"] = s.commit("Notes only")
    return s, ids


class CountingSolve:
    """The real pipeline as the history runs it, counting its calls."""

    def __init__(self):
        self.calls = 0

    def __call__(self, design, library):
        self.calls += 1
        return run(design, library, only=history_sections(design))


@pytest.fixture(scope="module")
def scripted(tmp_path_factory):
    script, ids = build(tmp_path_factory.mktemp("history") / "repo")
    repo = Repo(script.root)
    solve = CountingSolve()
    solver = RevisionSolver(ResultsCache.for_repo(script.root), solve)
    history = design_history(repo, RENAMED, "designs", solver)
    return script, ids, repo, history, solve


def test_history_rows_follow_the_rename_and_list_library_commits(scripted):
    _, ids, _, history, _ = scripted
    assert history["available"]
    rows = history["rows"]
    order = ["prose", "approve", "library", "rename", "rewire", "value", "add"]
    assert [r["sha"] for r in rows] == [ids[n] for n in order]
    assert [r["reason"] for r in rows] == ["design", "design", "library", "design", "design",
                                           "design", "design"]
    assert [r["path"] for r in rows] == [RENAMED] * 4 + [DESIGN_PATH] * 3
    assert rows[2]["library_paths"] == ["designs/library/parts.md"]
    assert rows[1]["author"] == "Cy Henry" and rows[5]["author"] == "Bo Farad"
    assert rows[1]["date"] == "2024-03-06T10:00:00+00:00"
    assert rows[1]["status"] == "approved" and rows[1]["approved"] == "2024-03-06"
    assert rows[-1]["subject"] == "Add the CE stage" and rows[-1]["status"] == "draft"
    assert all(r["errors"] == 0 and r["total"] == 3 for r in rows)


def test_each_content_is_solved_once_and_a_rebuild_solves_nothing(scripted):
    script, _, repo, history, solve = scripted
    # 7 revisions; the pure rename has the same content (and cache key) as the one before it,
    # and the notes-only commit the same key as the approval (docgen/cachekey.py: design_key
    # leaves prose out)
    assert solve.calls == 5
    assert history["rows"][3]["key"] == history["rows"][4]["key"]
    assert history["rows"][0]["key"] == history["rows"][1]["key"]
    assert (script.root / CACHE_DIR / ".gitignore").exists()
    assert script.git("status", "--porcelain") == ""  # the cache never shows up in git status
    again = CountingSolve()
    solver = RevisionSolver(ResultsCache.for_repo(script.root), again)
    rebuilt = design_history(repo, RENAMED, "designs", solver)
    assert again.calls == 0 and solver.solved == 0
    assert solver.cache.hits == 7
    assert rebuilt == history


def test_consecutive_diffs_show_value_change_rewiring_and_metric_deltas(scripted):
    _, _, _, history, _ = scripted
    diffs = history["diffs"]
    value = diffs[5]  # add → value
    [revalued] = value["parts"]["revalued"]
    assert (revalued["part"], revalued["old_text"], revalued["new_text"]) == ("RC", "4k7", "5k6")
    assert revalued["relative"] == pytest.approx((5600 - 4700) / 4700, rel=1e-5)
    assert value["verdicts"] == [{"metric": "Q1 collector-emitter voltage", "old": "pass",
                                  "new": "fail"}]
    rewire = diffs[4]  # value → rewire
    assert rewire["parts"]["rewired"] == [{"part": "RE", "terminal": "n", "old_net": "gnd",
                                           "new_net": "e2"}]
    assert [p["part"] for p in rewire["parts"]["added"]] == ["RE2"]
    rows = {r["metric"]: r for r in rewire["metrics"]}
    supply = rows["supply current"]
    assert supply["delta"] == pytest.approx(supply["new"] - supply["old"], rel=1e-5)
    assert supply["relative"] == pytest.approx(supply["delta"] / supply["old"], rel=1e-5)
    # Divider bias: VTH = 12·10/57 V, RTH = 47k‖10k; doubling RE roughly halves IE.
    vth, rth = 12 * 10 / 57, 47e3 * 10e3 / 57e3
    ratio = ((vth - 0.65) / (2e3 + rth / 151)) / ((vth - 0.65) / (1e3 + rth / 151))
    ic = rows["Q1 collector current"]
    assert ic["new"] / ic["old"] == pytest.approx(ratio, rel=0.05)
    assert rewire["verdicts"] == [{"metric": "Q1 collector-emitter voltage", "old": "fail",
                                   "new": "pass"}]
    rename = diffs[3]
    assert rename["changed"] == [] and rename["paths"] == [DESIGN_PATH, RENAMED]
    library = diffs[2]
    [model] = library["models"]["changed"]
    assert model["model"] == "team-npn"
    assert [(p["param"], p["old"], p["new"]) for p in model["params"]] == [("beta", 150, 200)]
    assert "+approved: 2024-03-06" in diffs[1]["text"]


def test_changed_since_approval(scripted):
    script, ids, repo, _, _ = scripted
    assert changed_since_approval(repo, script.root / RENAMED) is None  # prose edits don't count
    script.edit(RENAMED, "5k6 1% 0.25 W           : vcc c1", "6k8 1% 0.25 W           : vcc c1")
    try:
        info = changed_since_approval(repo, script.root / RENAMED)  # uncommitted edit counts
        assert info is not None and info["sections"] == ["circuit"]
        assert info["approval_commit"] == ids["approve"] and info["approved"] == "2024-03-06"
        assert info["changes"] == ["RC re-valued 5k6 → 6k8 (+21.4 %)"]
        script.commit("RC 5k6 to 6k8 after approval")
        assert changed_since_approval(repo, script.root / RENAMED) is not None
        script.edit(RENAMED, "approved: 2024-03-06", "approved: 2024-03-09")
        assert changed_since_approval(repo, script.root / RENAMED) is None  # approved again
        script.commit("Approve again")
        assert changed_since_approval(repo, script.root / RENAMED) is None
    finally:
        script.git("reset", "-q", "--hard", ids["prose"])


def test_shallow_clone_says_history_is_not_available(scripted, tmp_path):
    script, _, _, _, _ = scripted
    clone = tmp_path / "shallow"
    subprocess.run(["git", "clone", "-q", "--depth", "1", f"file://{script.root}", str(clone)],
                   env=git_env(), check=True)
    solver = RevisionSolver(ResultsCache.for_repo(clone), CountingSolve())
    history = design_history(Repo(clone), RENAMED, "designs", solver)
    assert not history["available"] and "shallow clone" in history["unavailable"]
    assert history["rows"] == [] and solver.solved == 0
    assert changed_since_approval(Repo(clone), clone / RENAMED) is None


def test_internal_error_in_one_revision_is_reported_not_cached(scripted, tmp_path):
    """A crash inside the pipeline (a docgen bug) marks that revision and is solved again next
    time; it does not lose the rest of the history."""
    script, ids, repo, _, _ = scripted
    calls = []

    def crash_on_first_cut(design, library):
        calls.append(design.path)
        if design.part("RC").value_text == "4k7":
            raise ZeroDivisionError("boom")
        return run(design, library, only=history_sections(design))

    solver = RevisionSolver(ResultsCache(tmp_path / "cache"), crash_on_first_cut)
    history = design_history(repo, RENAMED, "designs", solver)
    first = history["rows"][-1]
    assert first["sha"] == ids["add"] and first["errors"] == 1
    assert "internal error while solving this revision: ZeroDivisionError" in \
        history["results"][-1]["errors"][0]["message"]
    assert all(row["errors"] == 0 for row in history["rows"][:-1])
    again = RevisionSolver(ResultsCache(tmp_path / "cache"), crash_on_first_cut)
    design_history(repo, RENAMED, "designs", again)
    assert again.solved == 1  # only the revision that crashed is tried again


def test_parallel_prefetch_gives_the_same_results(scripted, tmp_path):
    """Solving new revisions in worker processes (a first site build) stores exactly what the
    one-at-a-time path stores, and each distinct content is solved once."""
    from docgen.history.timeline import revision_snapshots

    _, _, repo, history, _ = scripted
    solver = RevisionSolver(ResultsCache(tmp_path / "cache"))
    _, _, snaps = revision_snapshots(repo, RENAMED, "designs")
    solver.prefetch(snaps, jobs=2)
    assert solver.solved == 5  # seven revisions, one pure rename, one notes-only commit
    again = design_history(repo, RENAMED, "designs", solver)
    assert solver.solved == 5
    assert again["results"] == history["results"]
