"""Terminal printer for the ``feedback`` section (registered in docgen.report)."""

from __future__ import annotations

from typing import Any

from docgen.report import eng, heading, table
from docgen.report_small_signal import _decades, _notes, _or_none


def print_feedback(section: dict[str, Any], results: dict[str, Any]) -> list[str]:
    """Loop margins, step, rejection, offset budget and op-amp limits."""
    out = heading("Feedback, stability and supply behaviour")
    out += _loops(section)
    out += _step(section)
    out += _rejection(section)
    out += _offset(section.get("offset") or {})
    out += _opamps(section.get("opamps") or {})
    return out


def _loops(section: dict[str, Any]) -> list[str]:
    loops = section.get("loops") or []
    if not loops:
        return [f"  loop: {section.get('loop_reason') or 'none'}"]
    rows = [[loop["part"], eng(loop.get("dc_loop_gain_db"), "dB"),
             _or_none(loop["crossover_hz"], "Hz"), _or_none(loop["phase_margin_deg"], "°"),
             _or_none(loop["gain_margin_db"], "dB")] for loop in loops]
    out = ["", f"  Loop gain ({section.get('loop_method')})"]
    out += table(["loop at", "low-frequency T", "crossover", "phase margin", "gain margin"],
                 rows)
    for loop in loops:
        if not loop.get("negative_feedback", True):
            out.append(f"  {loop['part']}: WARNING: positive feedback at low frequency; the "
                       "margins do not describe stability")
        out += [f"  {loop['part']}: {line}" for line in
                _notes(loop, [("crossover", "crossover_reason"),
                              ("gain margin", "gain_margin_reason")])]
    return out


def _step(section: dict[str, Any]) -> list[str]:
    step = section.get("step") or {}
    if "amplitude_v" not in step:
        return [f"  step: {step.get('reason', 'not computed')}"]
    rows = [["step height (input)", eng(step["amplitude_v"], "V")],
            ["overshoot", _or_none(step.get("overshoot_percent"), "%")],
            ["rise time (10–90 %)", _or_none(step.get("rise_time_s"), "s")],
            [f"settling time ({eng(100 * step['band'], '%')} band)",
             _or_none(step.get("settling_time_s"), "s")]]
    slew = section.get("slew_step")
    if slew:
        rows.append(["steepest slope of a large step",
                     f"{eng(slew['steepest_slope_v_per_s'], 'V/s')} "
                     f"(slew rate {eng(slew['slew_rate_v_per_s'], 'V/s')})"])
    out = ["", "  Step response (large-signal time march)"]
    out += table(["figure", "value"], rows)
    if step.get("reason"):
        out.append(f"  step: {step['reason']}")
    return out


def _rejection(section: dict[str, Any]) -> list[str]:
    freq = section.get("freq_hz") or []
    psrr = section.get("psrr_db") or {}
    columns = list(psrr)
    cmrr = section.get("cmrr_db")
    if not columns and cmrr is None:
        return []
    headers = ["frequency", *(f"PSRR {name}" for name in columns)]
    if cmrr is not None:
        headers.append("CMRR")
    rows = []
    for i in _decades(freq):
        row = [eng(freq[i], "Hz"), *(_or_none(psrr[name][i], "dB") for name in columns)]
        if cmrr is not None:
            row.append(_or_none(cmrr[i], "dB"))
        rows.append(row)
    out = ["", "  Supply and common-mode rejection (input-referred; none: no path)"]
    return out + table(headers, rows)


def _offset(offset: dict[str, Any]) -> list[str]:
    if not offset:
        return []
    rows = [[f"{row['part']} {row['source'].replace('_', ' ')}",
             _or_none(row["output_v"], "V"), _or_none(row["worst_output_v"], "V")]
            for row in offset.get("contributions", [])]
    rows.append(["total", _or_none(offset.get("output_offset_v"), "V"),
                 _or_none(offset.get("worst_case_v"), "V")])
    out = ["", f"  Output offset budget at {offset.get('output')}"]
    return out + table(["source", "offset", "worst case"], rows)


def _opamps(opamps: dict[str, Any]) -> list[str]:
    if not opamps:
        return []
    rows = []
    for name, limits in opamps.items():
        rows.append([name, _or_none(limits["slew_rate_v_per_s"], "V/s"),
                     _or_none(limits["full_power_bandwidth_hz"], "Hz"),
                     "yes" if limits["slew_limited"] else "no",
                     "yes" if limits["input_in_range_over_signal"] else "NO",
                     "yes" if limits["output_in_range_over_signal"] else "NO"])
    out = ["", "  Op-amp limits at the bench signal"]
    return out + table(["op-amp", "slew rate", "full-power bandwidth", "slew-limited",
                        "input in range", "output in range"], rows)
