"""The history's figures planned as jobs and drawn over worker processes: the same SVG bytes
whichever process draws them, each drawn once (then read from the cache), and no job where a
page shows no figure."""

from __future__ import annotations

import pytest

from docgen.history.cache import ResultsCache
from docgen.history.drawing import draw_missing, response_job, trend_job
from docgen.history.figures import response_overlay, trend_plot


def rows(*values: float) -> list[dict]:
    """History rows newest first, each with one headline figure."""
    return [{"short": f"{i:07d}abc", "key": f"key{i}",
             "figures": [{"metric": "midband gain", "value": v, "unit": "dB"}]}
            for i, v in enumerate(values)]


AC_NEW = {"freq_hz": [10.0, 100.0, 1000.0], "gain_db": [1.0, 2.0, 3.0], "zin_ohm": 1e3}
AC_OLD = {"freq_hz": [10.0, 1000.0], "gain_db": [0.0, 2.0]}


def test_jobs_only_where_a_page_shows_a_figure():
    assert trend_job(rows(1.0)) is None  # one revision: no trend
    assert trend_job(rows(1.0, 2.0)) is not None
    history = rows(1.0, 2.0, 3.0)
    results = [{"ac": AC_NEW}, {"ac": None}, {"ac": AC_OLD}]
    assert response_job(history, results, 0) is None  # the older side has no response
    assert response_job(history, results, 1) is None
    job = response_job(history, [{"ac": AC_NEW}, {"ac": AC_OLD}], 0)
    assert job is not None and job.args[0] == AC_OLD
    assert job.args[1] == {"freq_hz": AC_NEW["freq_hz"], "gain_db": AC_NEW["gain_db"]}


@pytest.mark.parametrize("workers", [1, 2])
def test_drawn_figures_equal_direct_drawing_and_are_cached(tmp_path, monkeypatch, workers):
    history = rows(1.0, 2.0)
    jobs = [trend_job(history), response_job(history, [{"ac": AC_NEW}, {"ac": AC_OLD}], 0)]
    cache = ResultsCache(tmp_path)
    svgs = draw_missing(cache, jobs + jobs, workers)  # a repeated job is drawn once
    labels = [r["short"][:7] for r in reversed(history)]
    assert svgs[jobs[0].key] == trend_plot(labels, list(jobs[0].args[1]))
    assert svgs[jobs[1].key] == response_overlay(AC_OLD, AC_NEW, (labels[0], labels[1]))

    def no_drawing(job):
        raise AssertionError("a cached figure must not be drawn again")

    monkeypatch.setattr("docgen.history.drawing.draw", no_drawing)
    assert draw_missing(ResultsCache(tmp_path), jobs, 1) == svgs
