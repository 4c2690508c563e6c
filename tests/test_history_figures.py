"""Trend series and figures of the history pages: which figures are drawn, and that the SVG is
the same for the same input (no dates, fixed hash salt)."""

from __future__ import annotations

from docgen.history.figures import response_overlay, trend_plot, trend_series


def row(**figures):
    return {"figures": [{"metric": m, "value": v, "unit": "dB"} for m, v in figures.items()]}


def test_trend_series_are_oldest_first_with_gaps_and_moving_figures_first():
    rows = [row(flat=1.0, moving=3.0), row(flat=1.0), row(flat=1.0, moving=2.0),
            row(lonely=5.0)]  # newest first, as the history lists them
    series = trend_series(rows)
    assert [s[0] for s in series] == ["moving", "flat"]  # 'lonely' has a single value
    assert series[0][2] == [None, 2.0, None, 3.0]
    assert series[1][2] == [None, 1.0, 1.0, 1.0]
    assert len(trend_series([row(**{f"m{i}": float(i)}) for i in range(3)] * 2, limit=2)) == 2


def test_figures_are_deterministic_svg():
    series = [("midband gain", "dB", [10.0, None, 12.5])]
    first = trend_plot(["a", "b", "c"], series)
    assert first == trend_plot(["a", "b", "c"], series)
    assert first.lstrip().startswith("<?xml") and "<svg" in first
    ac = {"freq_hz": [10.0, 100.0, 1000.0], "gain_db": [1.0, 2.0, 3.0]}
    other = {"freq_hz": [10.0, 1000.0], "gain_db": [0.0, 2.0]}  # a different sweep
    overlay = response_overlay(other, ac, ("old", "new"))
    assert overlay is not None and overlay == response_overlay(other, ac, ("old", "new"))
    assert "old" in overlay and "new" in overlay
    assert response_overlay(None, ac, ("old", "new")) is None
