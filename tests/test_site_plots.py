"""Plots: deterministic SVG, engineering-notation axes with units, log frequency, limit marks.

References: the SVG produced must be well-formed XML (W3C XML 1.0, checked with the standard
library's parser); tick labels use SI prefixes per the SI Brochure (BIPM).
"""

from __future__ import annotations

import math
import xml.etree.ElementTree as ElementTree

import pytest

from docgen import plots

FREQ = [10 ** (1 + k / 10) for k in range(51)]  # 10 Hz .. 1 MHz
GAIN = [20 - 10 * math.log10(1 + (f / 20e3) ** 2) for f in FREQ]
PHASE = [-math.degrees(math.atan(f / 20e3)) for f in FREQ]


def _texts(svg: str) -> list[str]:
    root = ElementTree.fromstring(svg)
    return ["".join(e.itertext()) for e in root.iter() if e.tag.endswith("text")]


def test_same_input_gives_identical_bytes() -> None:
    first = plots.frequency_response(FREQ, GAIN, PHASE)
    second = plots.frequency_response(FREQ, GAIN, PHASE)
    assert first == second
    assert "<dc:date>" not in first and "Date" not in first


def test_frequency_axis_is_logarithmic_with_si_prefixes() -> None:
    texts = _texts(plots.frequency_response(FREQ, GAIN, PHASE))
    for label in ("10 Hz", "100 Hz", "1 kHz", "10 kHz", "100 kHz", "1 MHz"):
        assert label in texts, label
    assert "gain (dB)" in texts and "phase (°)" in texts


def test_decibel_ticks_take_no_prefix() -> None:
    texts = _texts(plots.histogram([-0.9, -0.5, -0.1, -0.2], unit="dB", label="gain"))
    assert not any("mdB" in t for t in texts)
    assert any(t.endswith(" dB") for t in texts)


def test_impedance_axis_in_ohms_with_prefix() -> None:
    texts = _texts(plots.curves(FREQ, [("input", [47e3] * len(FREQ))], unit="Ω",
                                ylabel="|Z|", log_y=False))
    assert any(t.endswith("kΩ") for t in texts)


@pytest.mark.parametrize("mark", [
    plots.Mark("point", 18.0, 22.0, "gain at 1 kHz : 18 dB .. 22 dB", at=1e3),
    plots.Mark("x", None, 20.0, "low corner : < 20 Hz"),
    plots.Mark("y", 19.0, None, "midband gain : > 19 dB"),
])
def test_requirement_limits_are_drawn(mark: plots.Mark) -> None:
    plain = plots.frequency_response(FREQ, GAIN, PHASE)
    marked = plots.frequency_response(FREQ, GAIN, PHASE, marks=[mark])
    assert plots.LIMIT_COLOUR not in plain
    assert plots.LIMIT_COLOUR in marked
    assert "requirement limit" in _texts(marked)


def test_limit_joins_the_curve_names_in_the_legend() -> None:
    """A limit mark on a plot of named curves keeps the names beside the limit's entry."""
    texts = _texts(plots.curves(FREQ, [("input", [47e3] * 51), ("output", [50.0] * 51)],
                                unit="Ω", ylabel="|Z|",
                                marks=[plots.Mark("point", 10e3, None, "zin", at=1e3)]))
    assert {"input", "output", "requirement limit"} <= set(texts)


def test_every_plot_kind_is_well_formed_svg() -> None:
    svgs = [
        plots.waveform([k * 1e-5 for k in range(100)],
                       [("output", [math.sin(k / 10) for k in range(100)])]),
        plots.spectrum([2, 3, 4], [-40.0, -55.0, -70.0]),
        plots.histogram([1.0, 2.0, 2.5], unit="V", label="voltage at out", counts=[1, 2],
                        edges=[0.5, 1.5, 2.5]),
        plots.drift([-20, 25, 60], [1e-3, 1.1e-3, 1.2e-3], unit="A", label="Q1 collector current"),
    ]
    for svg in svgs:
        ElementTree.fromstring(svg)


def _canvas_cases() -> list[tuple[str, object]]:
    """Calls of every figure kind in an order that leaves different state behind each time:
    wider and narrower ranges, marks of each form, legends of one and two curves, other
    units, log and linear y, one and two panels."""
    narrow = FREQ[10:30]
    wave = [k * 1e-5 for k in range(100)]
    point = plots.Mark("point", 18.0, 22.0, "gain at 1 kHz", at=1e3)
    return [
        ("response", lambda: plots.frequency_response(FREQ, GAIN, PHASE, marks=[point])),
        ("response", lambda: plots.frequency_response(narrow, GAIN[10:30])),
        ("response", lambda: plots.frequency_response(
            FREQ, [g - 40 for g in GAIN], PHASE, marks=[plots.Mark("x", 20.0, 2e5, "band"),
                                                        plots.Mark("point", None, -80.0, "p",
                                                                   at=1e4, panel=1)])),
        ("response", lambda: plots.frequency_response(narrow, GAIN[10:30], PHASE[10:30])),
        ("curves", lambda: plots.curves(FREQ, [("input", [47e3] * 51), ("output", GAIN)],
                                        unit="Ω", ylabel="|Z|", log_y=False)),
        ("curves", lambda: plots.curves(narrow, [("output", [1e-8 * (1 + k) for k in range(20)])],
                                        unit="V/√Hz", ylabel="density",
                                        marks=[plots.Mark("point", None, 5e-8, "n", at=1e3)])),
        ("curves", lambda: plots.curves(FREQ, [("a", [10.0 ** (k / 10) for k in range(51)]),
                                               ("b", [2.0] * 51)], unit="Ω", ylabel="|Z|")),
        ("curves", lambda: plots.curves(narrow, [("supply", GAIN[10:30])], unit="dB",
                                        ylabel="rejection", log_y=False,
                                        marks=[plots.Mark("y", 19.0, None, "r")])),
        ("waveform", lambda: plots.waveform(wave, [("in", [math.sin(k / 10) for k in range(100)]),
                                                   ("out", [3 * math.sin(k / 10) for k in
                                                            range(100)])])),
        ("waveform", lambda: plots.waveform(wave[:40], [("out", [0.01 * k for k in range(40)])])),
        ("spectrum", lambda: plots.spectrum([2, 3, 4, 5, 6], [-40.0, -55.0, -70.0, -80, -90])),
        ("spectrum", lambda: plots.spectrum([2, 3], [-10.0, -150.0])),
        ("histogram", lambda: plots._histogram_figure([1, 2], [0.5, 1.5, 2.5], unit="V",
                                                      label="voltage at out",
                                                      marks=[plots.Mark("x", 0.7, 2.4, "v")])),
        ("histogram", lambda: plots._histogram_figure([3, 1, 4, 1], [0.0, 0.1, 0.2, 0.3, 0.4],
                                                      unit="dB", label="gain")),
        ("histogram", lambda: plots._histogram_figure(
            [5, 0, 300, 2], [1e-3, 2e-3, 3e-3, 4e-3, 5e-3], unit="A", label="current",
            marks=[plots.Mark("x", None, 4.5e-3, "i"), plots.Mark("y", 50, None, "n")])),
        ("drift", lambda: plots.drift([-20, 25, 60], [1e-3, 1.1e-3, 1.2e-3], unit="A",
                                      label="Q1 collector current",
                                      marks=[plots.Mark("y", 0.9e-3, 1.3e-3, "c")])),
        ("drift", lambda: plots.drift([0, 25, 40, 70], [20.0, 19.0, 18.5, 17.0], unit="dB",
                                      label="gain")),
    ]


def test_reused_figures_give_the_bytes_of_fresh_ones() -> None:
    """Each figure kind is drawn on one figure kept per process; whatever was drawn on it
    before, its SVG must be byte for byte what a newly built figure gives (the reference:
    the same call inside plots.fresh_figures())."""
    cases = _canvas_cases()
    for index, (kind, draw) in enumerate(cases + cases[:4] + cases[::-1]):
        reused = draw()
        with plots.fresh_figures():
            fresh = draw()
        assert reused == fresh, (index, kind)


# --- the histogram written directly as SVG, against matplotlib's drawing of it -------------

HISTOGRAMS = [  # (counts, edges, unit, label, marks): shapes, units and limits of many kinds
    ([1, 2], [0.5, 1.5, 2.5], "V", "voltage at out", [plots.Mark("x", 0.7, 2.4, "v")]),
    ([3, 9, 27, 30, 12, 2], [12.4 + 0.05 * k for k in range(7)], "dB", "gain at 1000 Hz",
     [plots.Mark("x", 12.2, 13.2, "g")]),
    ([5, 0, 300, 2], [1e-3, 2e-3, 3e-3, 4e-3, 5e-3], "A", "Q1 collector current",
     [plots.Mark("x", None, 4.5e-3, "i")]),
    ([40] * 10 + [1], [-5.0 + k for k in range(12)], "%", "distortion", []),
    ([0, 0, 0], [47e3, 47.5e3, 48e3, 48.5e3], "Ω", "input impedance", []),
    ([2, 50, 7], [8.1e-7, 8.4e-7, 8.7e-7, 9.0e-7], "V", "input noise", [
        plots.Mark("x", 7.9e-7, None, "n")]),
    ([1, 1, 1, 1], [-1.0, -0.5, 0.0, 0.5, 1.0], "°", "phase", [plots.Mark("x", 0.9, 0.95, "p")]),
]


def _geometry(svg: str) -> tuple[list[tuple[str, float, float]], list[list[float]], list[float]]:
    """Texts with their anchor points, the bars' path coordinates and the limit lines' x."""
    import re

    root = ElementTree.fromstring(svg)
    texts = [("".join(e.itertext()), float(e.get("x")), float(e.get("y")))
             for e in root.iter() if e.tag.endswith("text")]
    bars, limits = [], []
    for element in root.iter():
        style, path = element.get("style") or "", element.get("d") or ""
        numbers = [float(v) for v in re.findall(r"-?[\d.]+", path)]
        if f"fill: {plots.CURVE_COLOURS[0]}" in style:
            bars.append(numbers[:8])
        elif f"stroke: {plots.LIMIT_COLOUR}" in style and "clip-path" in element.attrib:
            limits.append(numbers[0])
    return texts, bars, limits


@pytest.mark.parametrize("case", range(len(HISTOGRAMS)))
def test_direct_histogram_matches_matplotlib(case: int) -> None:
    """The histogram is written as SVG without matplotlib's figure; matplotlib's own drawing
    of the same figure is the reference: the same texts (tick labels, axis labels, legend) at
    the same places, the same bars and limit lines, within 0.05 pt (a fiftieth of a pixel)."""
    counts, edges, unit, label, marks = HISTOGRAMS[case]
    direct = plots.histogram([], unit=unit, label=label, counts=counts, edges=edges, marks=marks)
    assert "matplotlib" not in direct  # written directly, not by the fallback
    reference = plots._histogram_figure(counts, edges, unit=unit, label=label, marks=marks)
    texts, bars, limits = _geometry(direct)
    expected_texts, expected_bars, expected_limits = _geometry(reference)
    assert [t[0] for t in texts] == [t[0] for t in expected_texts]
    for got, want in zip(texts, expected_texts, strict=True):
        assert got[1:] == pytest.approx(want[1:], abs=0.05), got[0]
    assert len(bars) == len(expected_bars)  # every bin, empty ones too
    for got, want in zip(bars, expected_bars, strict=True):
        assert got == pytest.approx(want, abs=0.05)
    assert limits == pytest.approx(expected_limits, abs=0.05)


def test_direct_histogram_from_samples_bins_as_numpy_does() -> None:
    """Raw samples are binned by numpy.histogram (the reference) into ``bins`` equal bins."""
    import numpy as np

    samples = [math.sin(k) ** 3 for k in range(500)]
    counts, edges = np.histogram(samples, bins=12)
    from_samples = plots.histogram(samples, unit="V", label="v", bins=12)
    assert from_samples == plots.histogram([], unit="V", label="v", counts=counts.tolist(),
                                           edges=edges.tolist())
    assert len(_geometry(from_samples)[1]) == 12


def test_histogram_with_other_marks_is_drawn_by_matplotlib() -> None:
    """Only vertical limits are written directly; a horizontal one goes to matplotlib."""
    svg = plots.histogram([], unit="V", label="v", counts=[1, 2], edges=[0.0, 1.0, 2.0],
                          marks=[plots.Mark("y", 1.5, None, "n")])
    assert "matplotlib.axis" in svg and plots.LIMIT_COLOUR in svg
