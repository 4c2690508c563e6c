"""IEC 60063 preferred values (docgen.eseries).

Tables checked against IEC 60063 (from memory): E12 and E24 as listed in the standard, the
start and end of E96, and E192's 9.20 where the rounding formula gives 9.19.
"""

from __future__ import annotations

import pytest

from docgen.eseries import (
    E6,
    E12,
    E24,
    E48,
    E96,
    E192,
    SERIES,
    is_preferred,
    nearest,
    next_down,
    next_up,
)

# IEC 60063 (from memory).
E12_STANDARD = (1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2)
E24_EXTRA = (1.1, 1.3, 1.6, 2.0, 2.4, 3.0, 3.6, 4.3, 5.1, 6.2, 7.5, 9.1)
E96_START = (1.00, 1.02, 1.05, 1.07, 1.10, 1.13, 1.15, 1.18, 1.21, 1.24, 1.27, 1.30)


def test_e6_e12_e24_tables() -> None:
    assert E6 == (1.0, 1.5, 2.2, 3.3, 4.7, 6.8)
    assert E12 == E12_STANDARD
    assert tuple(sorted(E12_STANDARD + E24_EXTRA)) == E24


def test_e24_deviates_from_the_formula() -> None:
    # IEC 60063 (from memory): the E24 values 2.7 ... 4.7 and 8.2 keep their historical values;
    # the formula 10^(i/24) rounded to two figures gives 2.6, 2.9, 3.2, 3.5, 3.8, 4.2, 4.6, 8.3.
    formula = tuple(round(10 ** (i / 24), 1) for i in range(24))
    differ = {(t, f) for t, f in zip(E24, formula, strict=True) if t != f}
    assert differ == {(2.7, 2.6), (3.0, 2.9), (3.3, 3.2), (3.6, 3.5), (3.9, 3.8), (4.3, 4.2),
                      (4.7, 4.6), (8.2, 8.3)}


def test_e96_and_e192() -> None:
    assert E96[:12] == E96_START
    assert E96[-2:] == (9.53, 9.76)
    assert 9.20 in E192 and 9.19 not in E192
    assert (len(E48), len(E96), len(E192)) == (48, 96, 192)
    # The three-figure series follow the formula 10^(i/n) rounded to three figures, except
    # E192's 9.20 (IEC 60063, from memory).
    for table, n in ((E48, 48), (E96, 96), (E192, 192)):
        formula = [round(10 ** (i / n), 2) for i in range(n)]
        exceptions = [(t, f) for t, f in zip(table, formula, strict=True) if t != f]
        assert exceptions == ([(9.20, 9.19)] if n == 192 else [])


def test_series_nest() -> None:
    assert set(E6) <= set(E12) <= set(E24)
    assert set(E48) <= set(E96) <= set(E192)
    for table in SERIES.values():
        assert list(table) == sorted(table) and table[0] >= 1.0 and table[-1] < 10.0


@pytest.mark.parametrize(("value", "series", "expected"), [
    (4650.0, "E12", 4700.0), (4.4e-9, "E6", 4.7e-9), (0.96, "E12", 1.0), (9.6, "E12", 10.0),
    (1.04e5, "E24", 1.0e5), (1.06e5, "E24", 1.1e5), (9.19, "E192", 9.2), (149.0, "E96", 150.0),
])
def test_nearest_across_decades(value: float, series: str, expected: float) -> None:
    assert nearest(value, series) == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize(("value", "series", "up", "down"), [
    (4700.0, "E24", 5100.0, 4300.0), (1000.0, "E12", 1200.0, 820.0), (9.1, "E24", 10.0, 8.2),
    (4800.0, "E12", 5600.0, 4700.0), (1e-12, "E6", 1.5e-12, 0.68e-12),
])
def test_next_up_and_down(value: float, series: str, up: float, down: float) -> None:
    assert next_up(value, series) == pytest.approx(up, rel=1e-12)
    assert next_down(value, series) == pytest.approx(down, rel=1e-12)


def test_membership_with_tolerance() -> None:
    assert is_preferred(4700.0, "E12")
    assert is_preferred(4.7e-9 * (1 + 1e-6), "E6")
    assert not is_preferred(4750.0, "E24")
    assert is_preferred(4750.0, "E96")
    assert is_preferred(4760.0, "E96", rel_tol=0.01)


def test_bad_input() -> None:
    with pytest.raises(ValueError):
        nearest(-1.0)
    with pytest.raises(ValueError):
        nearest(1.0, "E7")
