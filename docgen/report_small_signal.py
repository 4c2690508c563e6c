"""Terminal printers for the ``ac`` and ``noise`` sections (registered in docgen.report)."""

from __future__ import annotations

import math
from typing import Any

from docgen.report import eng, heading, table

#: how many noise contributors the terminal lists (the results keep them all).
TOP_CONTRIBUTORS = 8


def _or_none(value: Any, unit: str) -> str:
    """A figure in engineering notation, or ``none`` (its reason is printed as a note)."""
    return eng(value, unit) if value is not None else "none"


def _notes(section: dict[str, Any], pairs: list[tuple[str, str]]) -> list[str]:
    """``label: reason`` lines for the figures a section leaves empty."""
    return [f"  {label}: {section[key]}" for label, key in pairs if section.get(key)]


def _decades(freq: list[float]) -> list[int]:
    """Indices of the sweep points nearest each whole decade (and the ends)."""
    if not freq:
        return []
    picks = {0, len(freq) - 1}
    low, high = math.ceil(math.log10(freq[0]) - 1e-9), math.floor(math.log10(freq[-1]) + 1e-9)
    for exponent in range(low, high + 1):
        target = 10.0**exponent
        picks.add(min(range(len(freq)), key=lambda i: abs(math.log10(freq[i] / target))))
    return sorted(picks)


def print_ac(ac: dict[str, Any], results: dict[str, Any]) -> list[str]:
    """Headline response figures, then gain, phase and impedances at each decade."""
    out = heading(f"Small-signal response: {ac['input']} → {ac['output']}")
    rows = [
        ["midband gain", f"{eng(ac['midband_gain_db'], 'dB')} at "
                         f"{eng(ac['midband_freq_hz'], 'Hz')}"],
        ["low corner (−3.01 dB)", _or_none(ac["f_low_hz"], "Hz")],
        ["high corner (−3.01 dB)", _or_none(ac["f_high_hz"], "Hz")],
        ["unity-gain frequency", _or_none(ac["unity_gain_hz"], "Hz")],
        [f"gain at {eng(ac['signal_freq_hz'], 'Hz')}",
         f"{eng(ac['gain_at_signal_db'], 'dB')}, phase {eng(ac.get('phase_at_signal_deg'), '°')}"],
        ["input impedance", _impedance(ac, "zin")],
        ["output impedance", _impedance(ac, "zout")],
    ]
    out += table(["figure", "value"], rows)
    out += _notes(ac, [("midband", "midband_note"), ("low corner", "f_low_reason"),
                       ("high corner", "f_high_reason"), ("unity gain", "unity_gain_reason"),
                       ("input impedance", "zin_reason"), ("output impedance", "zout_reason")])
    freq = ac["freq_hz"]
    curve_rows = [[eng(freq[i], "Hz"), eng(ac["gain_db"][i], "dB"), eng(ac["phase_deg"][i], "°"),
                   eng(ac["zin_curve_ohm"]["magnitude"][i], "Ω"),
                   eng(ac["zout_curve_ohm"]["magnitude"][i], "Ω")] for i in _decades(freq)]
    out += ["", "  Response at each decade (gain from the source's open-circuit voltage)"]
    out += table(["frequency", "gain", "phase", "|Zin|", "|Zout|"], curve_rows)
    return out


def _impedance(ac: dict[str, Any], name: str) -> str:
    magnitude = ac.get(f"{name}_ohm")
    if magnitude is None:
        return "none"
    return f"{eng(magnitude, 'Ω')} ∠ {eng(ac.get(f'{name}_phase_deg'), '°')}"


def print_noise(noise: dict[str, Any], results: dict[str, Any]) -> list[str]:
    """Integrated noise figures and the largest contributors."""
    low, high = noise["band_hz"]
    out = heading(f"Noise over {eng(low, 'Hz')} .. {eng(high, 'Hz')} at "
                  f"{eng(noise.get('temperature_c'), '°C')}")
    rows = [
        ["input-referred noise (rms)", _or_none(noise["input_rms_v"], "V")],
        ["output noise (rms)", _or_none(noise.get("output_rms_v"), "V")],
        ["signal-to-noise ratio", _or_none(noise["snr_db"], "dB")],
        ["noise figure (T0 = 290 K)", _or_none(noise["figure_db"], "dB")],
        [f"spot noise figure at {eng(results.get('ac', {}).get('signal_freq_hz'), 'Hz')}",
         _or_none(noise.get("figure_at_signal_db"), "dB")],
    ]
    out += table(["figure", "value"], rows)
    out += _notes(noise, [("input-referred noise", "input_rms_reason"),
                          ("signal-to-noise ratio", "snr_reason"),
                          ("noise figure", "figure_reason")])
    contributors = noise["contributors"][:TOP_CONTRIBUTORS]
    if contributors:
        out += ["", "  Largest contributors (share of output noise power over the band)"]
        out += table(["part", "mechanism", "output rms", "share"],
                     [[c["part"], c["mechanism"], eng(c["output_rms_v"], "V"),
                       f"{100 * c['share']:.1f} %"] for c in contributors])
    return out
