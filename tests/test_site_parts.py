"""Parts list flags: IEC 60063 preferred values by tolerance, missing ratings, CSV download.

References: IEC 60063 series values and the usual pairing of series with tolerance (E6 20 %,
E12 10 %, E24 5 %, E48 2 %, E96 1 %, E192 0.5 % and tighter), from memory; CSV per RFC 4180
read back with Python's csv module.
"""

from __future__ import annotations

import csv
import io

import pytest

from docgen.reader import read_text
from docgen.site.parts import part_rows, parts_csv, preferred_flag, series_for

DESIGN = """---
title: Parts fixture
---

```circuit
VB  supply     12 V                 : vcc gnd
R1  resistor   4k7 5% 0.25 W        : vcc b
R2  resistor   4k8 5% 0.25 W        : b gnd
R3  resistor   4k99 1% 0.125 W      : vcc c
R4  resistor   5k                   : c gnd
C1  capacitor  100n 10%             : b gnd
R5  resistor   4k7 1% 0.125 W       : c gnd
```
"""


@pytest.mark.parametrize("tolerance, series", [
    (0.2, "E6"), (0.1, "E12"), (0.05, "E24"), (0.02, "E48"), (0.01, "E96"), (0.005, "E192"),
    (0.001, "E192"), (None, "E24"),
])
def test_series_follows_tolerance(tolerance: float | None, series: str) -> None:
    assert series_for(tolerance) == series


@pytest.fixture(scope="module")
def design():  # noqa: ANN201
    return read_text(DESIGN, "parts-fixture.md")


def test_preferred_flags(design) -> None:  # noqa: ANN001
    flags = {p.name: preferred_flag(p) for p in design.parts}
    assert flags["VB"] is None  # a supply is not a stocked value
    assert flags["R1"] == {"series": "E24", "member": "E24", "ok": True, "nearest": "4.7 kΩ"}
    assert flags["R2"] == {"series": "E24", "member": None, "ok": False, "nearest": "4.7 kΩ"}
    assert flags["R3"] == {"series": "E96", "member": "E96", "ok": True, "nearest": "4.99 kΩ"}
    assert flags["R4"]["ok"] is False and flags["R4"]["nearest"] == "5.1 kΩ"  # E24: 5.1
    # 4.7 kΩ at 1 %: not in E96, but an E24 value, stocked at 1 % too (common practice)
    assert flags["R5"] == {"series": "E96", "member": "E24", "ok": True, "nearest": "4.75 kΩ"}


def test_rows_flag_missing_tolerance_and_rating(design) -> None:  # noqa: ANN001
    caution = {"part": "R1", "message": "R1 runs at 60 % of its power rating"}
    rows = {r["name"]: r for r in part_rows(design, [caution])}
    assert rows["R2"]["flags"] == ["not in E24; nearest 4.7 kΩ"]
    assert "no tolerance given (treated as exact)" in rows["R4"]["flags"]
    assert "no rating given (rating not checked)" in rows["R4"]["flags"]
    assert "no rating given (rating not checked)" in rows["C1"]["flags"]
    assert rows["R1"]["cautions"] == ["R1 runs at 60 % of its power rating"]
    assert rows["R1"]["series"] == "E24 ✓"


def test_csv_reads_back(design) -> None:  # noqa: ANN001
    table = list(csv.DictReader(io.StringIO(parts_csv(design))))
    assert [row["part"] for row in table] == ["VB", "R1", "R2", "R3", "R4", "C1", "R5"]
    r3 = table[3]
    assert float(r3["value_si"]) == pytest.approx(4990.0)
    assert (r3["tolerance_percent"], r3["rating"], r3["rating_unit"]) == ("1", "0.125", "W")
    assert (r3["preferred_series"], r3["value_in_series"]) == ("E96", "E96")
    assert (table[2]["preferred_series"], table[2]["value_in_series"]) == ("E24", "no")
    assert table[2]["nearest_preferred"] == "4.7 kΩ"
