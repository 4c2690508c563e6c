"""Property tests of the semantic diff on generated circuits (hypothesis): the diff of a design
with itself is empty, and added/removed/re-valued/re-wired parts are exactly the set
differences of the two part lists (plain set arithmetic as the reference)."""

from __future__ import annotations

from dataclasses import replace

from hypothesis import given, settings
from hypothesis import strategies as st

from docgen.design import Design, Header, Part
from docgen.diagnostics import Span
from docgen.history.semantic import diff_designs

NAMES = ["R1", "R2", "R3", "C1", "C2", "L1"]
NETS = ["gnd", "a", "b", "c", "out"]
KIND = {"R": "resistor", "C": "capacitor", "L": "inductor"}


@st.composite
def parts(draw):
    names = draw(st.lists(st.sampled_from(NAMES), unique=True, max_size=len(NAMES)))
    out = []
    for name in names:
        value = draw(st.floats(min_value=1e-12, max_value=1e6, allow_nan=False))
        p, n = draw(st.lists(st.sampled_from(NETS), min_size=2, max_size=2, unique=True))
        out.append(Part(name, KIND[name[0]], value, None, None, 0.01, None, {},
                        (("p", p), ("n", n)), Span(1, 1)))
    return tuple(out)


def design(part_list):
    return Design(path="d.md", kind="design", header=Header(title="t"), parts=part_list)


@settings(max_examples=100, deadline=None)
@given(parts())
def test_a_design_against_itself_has_no_change(part_list):
    diff = diff_designs(design(part_list), design(part_list))
    assert diff["changed"] == []
    assert all(not rows for rows in diff["parts"].values())


@settings(max_examples=150, deadline=None)
@given(parts(), parts())
def test_part_changes_are_the_set_differences(old_parts, new_parts):
    diff = diff_designs(design(old_parts), design(new_parts))["parts"]
    old, new = {p.name: p for p in old_parts}, {p.name: p for p in new_parts}
    assert {p["part"] for p in diff["added"]} == set(new) - set(old)
    assert {p["part"] for p in diff["removed"]} == set(old) - set(new)
    common = set(old) & set(new)
    assert {p["part"] for p in diff["revalued"]} == {n for n in common
                                                     if old[n].value != new[n].value}
    for row in diff["revalued"]:
        a, b = old[row["part"]].value, new[row["part"]].value
        assert abs(row["relative"] - (b - a) / a) <= 1e-5 * abs((b - a) / a)
    moved = {(m["part"], m["terminal"], m["old_net"], m["new_net"]) for m in diff["rewired"]}
    expected = {(n, t, dict(old[n].terminals)[t], dict(new[n].terminals)[t])
                for n in common for t in ("p", "n")
                if dict(old[n].terminals)[t] != dict(new[n].terminals)[t]}
    assert moved == expected


@settings(max_examples=50, deadline=None)
@given(parts())
def test_renaming_the_file_alone_is_no_change(part_list):
    a = design(part_list)
    assert diff_designs(a, replace(a, path="elsewhere/d.md"))["changed"] == []
