"""Results sections for the large-signal and feedback analyses (registered on import)."""

from __future__ import annotations

import math
from typing import Any

from docgen import plots
from docgen.design import Design
from docgen.site.marks import marks_for
from docgen.site.sections import (
    BUILDERS,
    Results,
    Section,
    add_facts,
    curve_of,
    figure,
    named_curves,
    new_section,
    table,
)
from docgen.units import format_eng


def large_signal(design: Design, results: Results) -> Section | None:
    """The bench sine's waveform, its spectrum, THD, swing, headroom and clipping."""
    section = results.get("transient")
    if not isinstance(section, dict):
        return None
    out = new_section("large-signal", "Waveform and spectrum")
    add_facts(out, section, (
        ("THD at the bench amplitude", "thd_percent", "%"),
        ("largest output swing within the distortion limit (peak to peak)", "max_swing_vpp", "V"),
        ("input amplitude at that swing", "swing_limit_amplitude_v", "V"),
        ("headroom, positive", "headroom_pos_v", "V"),
        ("headroom, negative", "headroom_neg_v", "V"),
        ("output peak to peak at the bench amplitude", "output_vpp", "V"),
        ("fundamental gain at the bench amplitude", "fundamental_gain_db", "dB"),
        ("THD+N", "thd_n_percent", "%")))
    steady = section.get("steady_state")
    if isinstance(steady, dict) and "reached" in steady:
        words = "reached" if steady.get("reached") else "NOT reached (figures are approximate)"
        out["facts"].append(["steady state", f"{words} after {steady.get('periods', '?')} periods"])
    time = section.get("time_s")
    if isinstance(time, list) and time:
        traces = named_curves(section, (("output", "output_v"), ("input", "input_v")),
                              len(time))
        if traces:
            out["figures"].append(figure("waveform.svg", "Steady-state waveforms at the bench "
                                         "amplitude", plots.waveform(time, traces)))
    harmonics = [h for h in section.get("harmonics") or [] if isinstance(h, dict)
                 and isinstance(h.get("order"), int) and h["order"] >= 2]
    if harmonics:
        levels = [(h["order"], h.get("relative_db")) for h in harmonics]
        levels = [(o, float(v)) for o, v in levels if isinstance(v, (int, float))
                  and math.isfinite(v)]
        if levels:
            out["figures"].append(figure("spectrum.svg", "Harmonics relative to the fundamental",
                                         plots.spectrum([o for o, _ in levels],
                                                        [v for _, v in levels])))
        out["tables"].append(table("Harmonics (2nd..9th)", ["order", "amplitude", "relative"],
                                   [[str(h["order"]), format_eng(h.get("amplitude_v"), "V"),
                                     format_eng(h.get("relative_db"), "dB")]
                                    for h in harmonics if h["order"] <= 9]))
    events = [e for e in section.get("clipping") or [] if isinstance(e, dict)]
    if events:
        out["tables"].append(table("Clipping", ["part or net", "what", "at phase"],
                                   [[str(e.get("part", e.get("net", ""))),
                                     str(e.get("what", e.get("kind", ""))),
                                     format_eng(e.get("phase_deg"), "°")] for e in events],
                                   [False, False, True]))
    return out


def feedback(design: Design, results: Results) -> Section | None:
    """Loop gain with margins, the step response figures, supply and common-mode rejection."""
    section = results.get("feedback")
    if not isinstance(section, dict):
        return None
    out = new_section("feedback", "Feedback, stability and supply rejection")
    add_facts(out, section, (("crossover frequency", "crossover_hz", "Hz"),
                             ("phase margin", "phase_margin_deg", "°"),
                             ("gain margin", "gain_margin_db", "dB"),
                             ("PSRR at the signal frequency", "psrr_at_signal_db", "dB"),
                             ("step overshoot", "overshoot_percent", "%"),
                             ("step settling time", "settling_time_s", "s"),
                             ("output offset", "output_offset_v", "V"),
                             ("full-power bandwidth", "full_power_bandwidth_hz", "Hz")))
    step = section.get("step")
    if isinstance(step, dict):
        add_facts(out, step, (("step overshoot", "overshoot_percent", "%"),
                              ("step rise time", "rise_time_s", "s"),
                              ("step settling time", "settling_time_s", "s")))
    out["facts"] = list({fact[0]: fact for fact in out["facts"]}.values())
    _offset(out, section.get("offset"))
    freq = section.get("loop_freq_hz")
    if isinstance(freq, list) and freq:
        gain = curve_of(section, "loop_gain_db", len(freq))
        if gain is not None:
            phase = curve_of(section, "loop_phase_deg", len(freq))
            marks = marks_for(design, {"crossover": ("x", 0)})
            out["figures"].append(figure("loop-gain.svg", "Loop gain and phase",
                                         plots.frequency_response(freq, gain, phase,
                                                                  marks=marks)))
    _step_figure(out, section.get("step"))
    _rejection(design, out, section)
    return None if not (out["facts"] or out["figures"]) else out


def _step_figure(out: Section, step: Any) -> None:
    """The small step's output (``feedback.step.time_s`` / ``output_v``), from the time march."""
    if not isinstance(step, dict):
        return
    time = step.get("time_s")
    if isinstance(time, list) and time:
        traces = named_curves(step, (("output change", "output_v"),), len(time))
        if traces:
            out["figures"].append(figure("step.svg", "Step response: the output's change from "
                                         "its operating point", plots.waveform(time, traces)))


def _offset(out: Section, offset: Any) -> None:
    """The offset budget's worst case and its largest contributors (``feedback.offset``)."""
    if not isinstance(offset, dict):
        return
    add_facts(out, offset, (("output offset, linear worst case", "worst_case_v", "V"),))
    rows = [[str(c.get("part", "")), str(c.get("source", "")).replace("_", " "),
             format_eng(c.get("output_v"), "V"), format_eng(c.get("worst_output_v"), "V")]
            for c in offset.get("contributions") or [] if isinstance(c, dict)]
    if rows:
        out["tables"].append(table("Output offset budget", ["part", "source", "at its value",
                                                            "worst"], rows,
                                   [False, False, True, True]))


def _rejection(design: Design, out: Section, section: dict[str, Any]) -> None:
    """PSRR per supply and CMRR against frequency: ``psrr_db`` {supply: [dB]} and ``cmrr_db``
    over ``freq_hz`` (docs/results.md)."""
    freq = section.get("freq_hz")
    if not isinstance(freq, list) or not freq:
        return
    psrr = section.get("psrr_db")
    series = named_curves(psrr if isinstance(psrr, dict) else {},
                          [(f"PSRR {supply}", supply) for supply in sorted(psrr or {})],
                          len(freq))
    series += named_curves(section, (("CMRR", "cmrr_db"),), len(freq))
    if series:
        marks = marks_for(design, {"psrr_at": ("point", 0), "cmrr_at": ("point", 0)})
        out["figures"].append(figure("rejection.svg", "Supply and common-mode rejection",
                                     plots.curves(freq, series, unit="dB", ylabel="rejection",
                                                  log_y=False, marks=marks)))


BUILDERS.extend([large_signal, feedback])
