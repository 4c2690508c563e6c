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


def test_overlay_redrawn_on_one_canvas_equals_a_fresh_figure():
    """The overlay is drawn on the process's kept figure; each SVG must be byte for byte what
    a new figure gives (``plots.fresh_figures``), whatever was drawn before it (wider and
    narrower ranges, a different sweep whose older curve is blank at the ends)."""
    import math

    from docgen import plots

    wide = [10.0 ** (k / 4) for k in range(33)]  # 1 Hz .. 100 MHz
    narrow = [10.0 ** (1 + k / 8) for k in range(25)]  # 10 Hz .. 10 kHz
    cases = [
        ({"freq_hz": wide, "gain_db": [20 - k for k in range(33)]},
         {"freq_hz": wide, "gain_db": [21 - k for k in range(33)]}),
        ({"freq_hz": narrow, "gain_db": [0.5 * k for k in range(25)]},
         {"freq_hz": wide, "gain_db": [-40 + 3 * k for k in range(33)]}),
        ({"freq_hz": wide, "gain_db": [1.0] * 33}, {"freq_hz": wide, "gain_db": [1.5] * 33}),
        ({"freq_hz": narrow, "gain_db": [60 - k for k in range(25)]},
         {"freq_hz": narrow, "gain_db": [58 - k for k in range(25)]}),
    ]
    for index, (old, new) in enumerate(cases + cases[:1]):
        labels = (f"old{index}", f"new{index}")
        before = old["gain_db"] if old["freq_hz"] == new["freq_hz"] else [
            _interp(f, old) for f in new["freq_hz"]]
        with plots.fresh_figures():
            fresh = plots.curves(new["freq_hz"], [(labels[0], before),
                                                  (labels[1], new["gain_db"])],
                                 unit="dB", ylabel="gain (dB)", log_y=False)
        assert response_overlay(old, new, labels) == fresh, index
    assert math.isnan(_interp(1.0, cases[1][0]))


def _interp(freq, ac):
    """Gain of ``ac`` at ``freq`` on a log-frequency line, NaN outside its sweep (numpy.interp
    as the reference for the overlay's own interpolation)."""
    import math

    import numpy as np

    return float(np.interp(math.log10(freq), np.log10(ac["freq_hz"]), ac["gain_db"],
                           left=math.nan, right=math.nan))


def test_trend_redrawn_on_one_canvas_equals_a_fresh_figure():
    """Trends of different lengths, units, gaps and panel counts, one after another on the
    process's kept figures: each SVG equals the same trend drawn on a new figure."""
    cases = [
        (["a1", "b2", "c3"], [("midband gain", "dB", [10.0, None, 12.5])]),
        ([f"r{i}" for i in range(10)],
         [("low corner", "Hz", [5.0 + i for i in range(10)]),
          ("input noise", "V", [None, None] + [1e-8 * (i + 1) for i in range(8)])]),
        (["x", "y"], [("midband gain", "dB", [-3.0, 40.0])]),
        ([f"q{i}" for i in range(12)],
         [(f"figure {k}", "Ω", [10.0 ** (k - 2) * (1 + 0.1 * i) for i in range(12)])
          for k in range(6)]),
        (["m", "n", "o", "p"], [("low corner", "Hz", [1e3, 2e3, None, 4e3]),
                                ("output impedance", "Ω", [50.0, 60.0, 70.0, 80.0])]),
    ]
    from docgen import plots

    for index, (labels, series) in enumerate(cases + cases[:2]):
        with plots.fresh_figures():
            fresh = trend_plot(labels, series)
        assert trend_plot(labels, series) == fresh, index
