"""The semantic diff on hand-built designs: every kind of change, metric deltas, flipped verdicts.

Expected numbers are plain arithmetic written out beside each check (relative change
(new − old)/|old|); the text diff is checked against Python's own ``difflib.unified_diff``.
"""

from __future__ import annotations

import difflib
from dataclasses import replace

import pytest

from docgen.design import Bench, Design, Header, Limit, ModelDef, ModelParam, Part, Requirement
from docgen.diagnostics import Span
from docgen.history.semantic import diff_designs, relative_change

AT = Span(1, 1)


def part(name, kind, value, text, nets, model=None, tolerance=0.01, rating=None, params=None):
    terminals = tuple(nets.items()) if isinstance(nets, dict) else (("p", nets[0]),
                                                                      ("n", nets[1]))
    return Part(name, kind, value, text, model, tolerance, rating, params or {}, terminals, AT)


def requirement(metric, text, kind="between", low=None, high=None, across=()):
    return Requirement(metric, Limit(kind, low, high, text=text), across, AT, AT, AT)


BASE_PARTS = (
    part("VB", "supply", 12.0, "12 V", ("vcc", "gnd"), tolerance=None),
    part("RC", "resistor", 4700.0, "4k7", ("vcc", "c1"), rating=0.25),
    part("RE", "resistor", 1000.0, "1k", ("e1", "gnd")),
    part("Q1", "npn", None, None, {"c": "c1", "b": "b1", "e": "e1"}, model="team-npn",
         tolerance=None),
)
TEAM_NPN = ModelDef("team-npn", "npn", {"beta": ModelParam(200.0, 120.0, 300.0)}, AT,
                    "designs/library/parts.md")
BASE = Design(
    path="designs/ce.md", kind="design", header=Header(title="CE stage", status="review"),
    parts=BASE_PARTS, bench=Bench(input="VS", output="c1"),
    requirements=(requirement("gain at 1 kHz", "12 dB .. 16 dB", low=12, high=16),
                  requirement("low corner", "< 20 Hz", kind="below", high=20)),
    source="line one\nRC 4k7\nline three\n",
)


def results(gain_db, low_hz, verdict_gain="pass", verdict_low="pass"):
    """A results dict shaped as docs/results.md describes (values chosen by hand)."""
    return {
        "ac": {"midband_gain_db": gain_db, "f_low_hz": low_hz},
        "checks": [
            {"metric": "gain at 1 kHz", "value": gain_db, "unit": "dB", "verdict": verdict_gain},
            {"metric": "low corner", "value": low_hz, "unit": "Hz", "verdict": verdict_low},
        ],
    }


def test_identical_designs_have_an_empty_diff():
    d = diff_designs(BASE, BASE, results(14.0, 10.0), results(14.0, 10.0))
    assert d["changed"] == []
    assert d["text"] == ""
    assert d["verdicts"] == []
    assert all(row["delta"] == 0 for row in d["metrics"])


def test_parts_added_removed_revalued_rewired_and_changed():
    parts = list(BASE_PARTS)
    parts[1] = replace(parts[1], value=5600.0, value_text="5k6", rating=0.5)   # re-valued
    parts[2] = replace(parts[2], terminals=(("p", "e1"), ("n", "e2")))          # re-wired
    parts[3] = replace(parts[3], terminals=(("c", "c1"), ("b", "b2"), ("e", "e1")))
    del parts[0]                                                                 # removed
    parts.append(part("CE", "capacitor", 100e-6, "100u", ("e1", "gnd")))         # added
    d = diff_designs(BASE, replace(BASE, parts=tuple(parts)))
    p = d["parts"]
    assert [a["part"] for a in p["added"]] == ["CE"]
    assert p["added"][0]["unit"] == "F" and p["added"][0]["nets"] == {"p": "e1", "n": "gnd"}
    assert [r["part"] for r in p["removed"]] == ["VB"]
    [revalued] = p["revalued"]
    assert (revalued["part"], revalued["old_text"], revalued["new_text"]) == ("RC", "4k7", "5k6")
    assert revalued["unit"] == "Ω"
    assert revalued["relative"] == pytest.approx((5600 - 4700) / 4700, rel=1e-5)  # +19.1 %
    assert p["rewired"] == [
        {"part": "RE", "terminal": "n", "old_net": "gnd", "new_net": "e2"},
        {"part": "Q1", "terminal": "b", "old_net": "b1", "new_net": "b2"},
    ]
    assert p["changed"] == [{"part": "RC", "field": "rating", "old": 0.25, "new": 0.5}]
    assert d["changed"] == ["parts"]


def test_models_changed_in_the_design_and_in_the_library():
    own_old = ModelDef("mine", "diode", {"ideality": ModelParam(1.8)}, AT, "designs/ce.md")
    own_new = replace(own_old, params={"ideality": ModelParam(1.9),
                                       "series_resistance": ModelParam(0.5)})
    old = replace(BASE, models=(own_old,))
    new = replace(BASE, models=(own_new,))
    library_new = {"team-npn": replace(TEAM_NPN, params={"beta": ModelParam(250.0, 150.0,
                                                                            350.0)})}
    d = diff_designs(old, new, old_library={"team-npn": TEAM_NPN}, new_library=library_new)
    changed = {m["model"]: m for m in d["models"]["changed"]}
    assert set(changed) == {"mine", "team-npn"}
    ideality, series = changed["mine"]["params"]
    assert (ideality["param"], ideality["old"], ideality["new"]) == ("ideality", 1.8, 1.9)
    assert series["old"] is None and series["new"] == 0.5 and series["relative"] is None
    [beta] = changed["team-npn"]["params"]
    assert beta["old_range"] == [120.0, 300.0] and beta["new_range"] == [150.0, 350.0]
    assert beta["relative"] == pytest.approx(0.25)  # (250 − 200)/200
    # a model no part uses and the design does not define is not part of its diff
    d2 = diff_designs(BASE, BASE, old_library={"other": TEAM_NPN}, new_library={})
    assert d2["models"] == {"added": [], "removed": [], "changed": []}
    # a part switched to a model that is only in the new library: added, and the old removed
    q = replace(BASE_PARTS[3], model="team-npn-2")
    d3 = diff_designs(BASE, replace(BASE, parts=BASE_PARTS[:3] + (q,)),
                      old_library={"team-npn": TEAM_NPN},
                      new_library={"team-npn-2": replace(TEAM_NPN, name="team-npn-2")})
    assert [m["model"] for m in d3["models"]["added"]] == ["team-npn-2"]
    assert [m["model"] for m in d3["models"]["removed"]] == ["team-npn"]
    assert d3["parts"]["changed"] == [{"part": "Q1", "field": "model", "old": "team-npn",
                                       "new": "team-npn-2"}]


def test_requirements_bench_and_header():
    new = replace(
        BASE,
        header=Header(title="CE stage", status="approved", approved="2024-03-04"),
        bench=Bench(input="VS", output="c1", load_resistance=10e3, f_stop=2e6),
        requirements=(requirement("gain at 1 kHz", "13 dB .. 16 dB", low=13, high=16),
                      requirement("output swing", "> 4 V pp", kind="above", low=4)),
    )
    d = diff_designs(BASE, new)
    r = d["requirements"]
    assert r["added"] == [{"metric": "output swing", "limit": "> 4 V pp", "across": []}]
    assert r["removed"] == [{"metric": "low corner", "limit": "< 20 Hz", "across": []}]
    assert r["changed"][0]["old"]["limit"] == "12 dB .. 16 dB"
    assert r["changed"][0]["new"]["limit"] == "13 dB .. 16 dB"
    assert d["bench"] == [{"field": "load_resistance", "old": None, "new": 10e3},
                          {"field": "f_stop", "old": 1e6, "new": 2e6}]
    assert d["header"] == [{"field": "status", "old": "review", "new": "approved"},
                           {"field": "approved", "old": None, "new": "2024-03-04"}]
    assert d["changed"] == ["bench", "header", "requirements"]


def test_metric_deltas_and_flipped_verdicts():
    d = diff_designs(BASE, BASE, results(14.0, 10.0), results(11.5, 25.0, "fail", "fail"))
    rows = {row["metric"]: row for row in d["metrics"]}
    assert rows["midband gain"]["old"] == 14.0 and rows["midband gain"]["new"] == 11.5
    assert rows["midband gain"]["delta"] == pytest.approx(-2.5)
    assert rows["low corner"]["delta"] == pytest.approx(15.0)
    assert rows["low corner"]["relative"] == pytest.approx(1.5)  # (25 − 10)/10
    assert rows["low corner"]["unit"] == "Hz"
    assert rows["gain at 1 kHz"]["delta"] == pytest.approx(-2.5)
    assert d["verdicts"] == [{"metric": "gain at 1 kHz", "old": "pass", "new": "fail"},
                             {"metric": "low corner", "old": "pass", "new": "fail"}]
    # a side without results (could not be solved) still lists the other side's figures
    d2 = diff_designs(BASE, BASE, None, results(14.0, 10.0))
    gain = next(r for r in d2["metrics"] if r["metric"] == "midband gain")
    assert gain["old"] is None and gain["new"] == 14.0 and gain["delta"] is None


def test_text_diff_is_difflib_unified_diff():
    new = replace(BASE, path="designs/stages/ce.md", source="line one\nRC 5k6\nline three\n")
    d = diff_designs(BASE, new, labels=("abc123", "work tree"))
    expected = "".join(difflib.unified_diff(
        BASE.source.splitlines(keepends=True), new.source.splitlines(keepends=True),
        fromfile="designs/ce.md (abc123)", tofile="designs/stages/ce.md (work tree)"))
    assert d["text"] == expected
    assert d["paths"] == ["designs/ce.md", "designs/stages/ce.md"]


def test_relative_change_edge_cases():
    assert relative_change(None, 1.0) is None
    assert relative_change(0.0, 1.0) is None
    assert relative_change(-2.0, -1.0) == pytest.approx(0.5)  # (−1 − (−2))/|−2|


def test_history_table_shows_the_same_headline_as_the_index():
    """The history table's columns are the index's headline figures, in the same order, and
    every headline name is a metric of the vocabulary (docgen/metrics.py)."""
    from docgen.history.headline import HEADLINE, TABLE
    from docgen.metrics import parse
    from docgen.site.pages import HEADLINE as INDEX

    assert list(TABLE) == [label for label, *_ in INDEX]
    for text in HEADLINE:
        parse(text)
