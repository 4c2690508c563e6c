"""Page sections from results dicts shaped as docs/results.md documents them.

These check presentation only (which facts, tables and figures appear, and that limits reach
the plots they constrain); the numbers are inputs here, not results under test.  Statistics
are checked against numpy's own (mean, percentiles) as the outside reference.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from docgen.plots import LIMIT_COLOUR
from docgen.reader import read_text
from docgen.site.sections import build_sections

DESIGN = """---
title: Sections fixture
---

```circuit
VS  signal     100 mV 1 kHz source=50  : in gnd
R1  resistor   10k 1% 0.25 W            : in out
C1  capacitor  10n 5% 50 V              : out gnd
```

```bench
input   VS
output  out
```

```require
high corner     : 1 kHz .. 2 kHz  across boards
gain at 100 Hz  : > -1 dB
THD             : < 1 %
phase margin    : > 45°
```
"""

FREQ = [10 ** (1 + k / 20) for k in range(101)]


@pytest.fixture(scope="module")
def design():  # noqa: ANN201
    return read_text(DESIGN, "sections.md")


def _by_anchor(design, results):  # noqa: ANN001, ANN202
    return {s["anchor"]: s for s in build_sections(design, results)}


def test_nothing_computed_gives_no_sections(design) -> None:  # noqa: ANN001
    assert build_sections(design, {"schema": "docgen-results/1"}) == []


def test_response_section_marks_the_limits(design) -> None:  # noqa: ANN001
    ac = {"freq_hz": FREQ, "gain_db": [-10 * math.log10(1 + (f / 1600) ** 2) for f in FREQ],
          "phase_deg": [-math.degrees(math.atan(f / 1600)) for f in FREQ],
          "midband_gain_db": 0.0, "f_low_hz": None, "f_low_reason": "direct-coupled",
          "f_high_hz": 1600.0}
    section = _by_anchor(design, {"ac": ac})["response"]
    facts = dict(section["facts"])
    assert facts["high corner (−3.01 dB)"] == "1.6 kHz"
    assert facts["low corner (−3.01 dB)"] == "none (direct-coupled)"
    (figure,) = section["figures"]
    assert LIMIT_COLOUR in figure["svg"]  # the corner and the gain limit are drawn


def test_spread_section_statistics_and_histograms(design) -> None:  # noqa: ANN001
    rng = np.random.default_rng(7)
    corners = rng.normal(1600.0, 40.0, 200)
    samples = {"high corner": [*corners.tolist(), None],
               "gain at 100 Hz": rng.normal(-0.02, 0.001, 201).tolist()}
    section = _by_anchor(design, {"spread": {"samples": samples, "yield": 0.995,
                                             "boards": 201, "unsolved": 1}})["spread"]
    facts = dict(section["facts"])
    assert facts["boards"] == "201"
    assert facts["yield (every sampled requirement met)"] == "99.5 %"
    stats = section["tables"][0]
    row = stats["rows"][0]  # requirements order: high corner first
    assert row[0] == "high corner" and row[-1] == "1"  # one unsolved board
    assert row[4] == f"{np.mean(corners) / 1e3:.3g} kHz"  # no statistics given: numpy's
    assert row[3] == f"{np.percentile(corners, 1) / 1e3:.3g} kHz"
    files = [f["file"] for f in section["figures"]]
    assert files == ["spread-01.svg", "spread-02.svg"]
    assert all(f["small"] for f in section["figures"])
    assert LIMIT_COLOUR in section["figures"][0]["svg"]


def test_spread_section_uses_the_analysis_statistics(design) -> None:  # noqa: ANN001
    stats = {"unit": "Hz", "nominal": 1591.0, "min": 1500.0, "max": 1700.0, "mean": 1600.0,
             "std": 30.0, "percentiles": {"1": 1520.0, "99": 1680.0},
             "histogram": {"edges": [1500.0, 1600.0, 1700.0], "counts": [120, 80]}}
    spread = {"samples": {"high corner": [1500.0, 1700.0]}, "metrics": {"high corner": stats},
              "yield_by_requirement": {"high corner : 1 kHz .. 2 kHz": 1.0},
              "worst_case": {"high corner": {"parameters": ["R1", "C1"], "low": 1450.0,
                                             "high": 1750.0}},
              "not_sampled": ["THD"]}
    section = _by_anchor(design, {"spread": spread})["spread"]
    statistics, yields, worst = section["tables"]
    assert statistics["rows"][0] == ["high corner", "1.59 kHz", "1.5 kHz", "1.52 kHz", "1.6 kHz",
                                     "1.68 kHz", "1.7 kHz", "30 Hz", "0"]
    assert yields["rows"] == [["high corner : 1 kHz .. 2 kHz", "100 %"]]
    assert worst["rows"] == [["high corner", "1.45 kHz", "1.75 kHz", "R1, C1"]]
    assert "THD" in section["notes"][0]


def test_temperature_and_sensitivity_sections(design) -> None:  # noqa: ANN001
    results = {"temperature": {"ambient_c": [-20.0, 25.0, 70.0],
                               "samples": {"high corner": [1550.0, 1600.0, 1660.0]}},
               "sensitivity": [{"metric": "high corner", "parameter": "C1", "sensitivity": -1.0},
                               {"metric": "high corner", "parameter": "R1",
                                "sensitivity": -0.98},
                               {"metric": "high corner", "parameter": "VS.source",
                                "sensitivity": -0.005}]}
    sections = _by_anchor(design, results)
    drift = sections["temperature"]
    assert drift["tables"][0]["rows"] == [["high corner", "1.55 kHz", "1.66 kHz", "110 Hz"]]
    assert [f["file"] for f in drift["figures"]] == ["drift-01.svg"]
    ranking = sections["sensitivity"]["tables"][0]["rows"]
    assert ranking == [["high corner", "C1 \u22121 · R1 \u22120.98 · VS.source \u22120.005"]]


def test_large_signal_and_feedback_sections(design) -> None:  # noqa: ANN001
    time_s = [k * 1e-5 for k in range(100)]
    transient = {"time_s": time_s, "output_v": [math.sin(2 * math.pi * 1e3 * t) for t in time_s],
                 "thd_percent": 0.12, "max_swing_vpp": 8.4,
                 "harmonics": [{"order": k, "amplitude_v": 10 ** (-3 - k / 10),
                                "relative_db": -60.0 - k} for k in range(1, 12)],
                 "steady_state": {"reached": True, "periods": 3, "change": 1e-5}}
    feedback = {"freq_hz": FREQ, "psrr_db": {"VB": [60.0] * len(FREQ)},
                "cmrr_db": [70.0] * len(FREQ), "phase_margin_deg": 62.0,
                "loop_freq_hz": FREQ, "loop_gain_db": [40 - 20 * math.log10(f / 10) for f in FREQ]}
    sections = _by_anchor(design, {"transient": transient, "feedback": feedback})
    large = sections["large-signal"]
    assert dict(large["facts"])["THD at the bench amplitude"] == "0.12 %"
    assert [f["file"] for f in large["figures"]] == ["waveform.svg", "spectrum.svg"]
    assert [r[0] for r in large["tables"][0]["rows"]] == [str(k) for k in range(2, 10)]
    loop = sections["feedback"]
    assert dict(loop["facts"])["phase margin"] == "62 °"
    assert [f["file"] for f in loop["figures"]] == ["loop-gain.svg", "rejection.svg"]
