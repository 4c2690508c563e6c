"""Terminal printer for the ``transient`` section (registered in docgen.report)."""

from __future__ import annotations

from typing import Any

from docgen.report import eng, heading, table


def _percent(value: Any) -> str:
    return "n/a" if value is None else f"{float(value):.4g} %"


def _events(events: list[dict[str, Any]]) -> list[list[str]]:
    return [[str(e.get("part", e.get("net", ""))), str(e.get("what", "")),
             f"{eng(e.get('phase_deg'), '°')} .. {eng(e.get('phase_end_deg'), '°')}"]
            for e in events]


def print_transient(section: dict[str, Any], results: dict[str, Any]) -> list[str]:
    """Distortion, swing and headroom, the harmonics, clipping and steady-state facts."""
    out = heading(f"Large signal at {eng(section.get('amplitude_v'), 'V')} peak, "
                  f"{eng(section.get('frequency_hz'), 'Hz')}")
    steady = section.get("steady_state") or {}
    reached = "reached" if steady.get("reached") else "NOT reached (figures approximate)"
    rows = [
        ["THD", _percent(section.get("thd_percent"))],
        ["THD+N (noise band)", _percent(section.get("thd_n_percent"))],
        ["fundamental gain", eng(section.get("fundamental_gain_db"), "dB")],
        ["output peak-to-peak", eng(section.get("output_vpp"), "V")],
        [f"largest swing within {_percent(section.get('distortion_limit_percent'))} THD",
         eng(section.get("max_swing_vpp"), "V") + " pp"],
        ["  at input amplitude", eng(section.get("swing_limit_amplitude_v"), "V")],
        ["headroom above / below bias", f"{eng(section.get('headroom_pos_v'), 'V')} / "
                                        f"{eng(section.get('headroom_neg_v'), 'V')}"],
        ["steady state", f"{reached} after {steady.get('periods', '?')} periods"],
        ["integration rule", str(section.get("method", "?"))],
    ]
    out += table(["figure", "value"], rows)
    if section.get("swing_reason"):
        out.append(f"  swing: {section['swing_reason']}")
    harmonics = [h for h in section.get("harmonics") or [] if h.get("order", 0) >= 2]
    if harmonics:
        out.append("")
        out += table(["harmonic", "amplitude", "relative"],
                     [[str(h["order"]), eng(h.get("amplitude_v"), "V"),
                       eng(h.get("relative_db"), "dB")] for h in harmonics])
    rows = [[eng(r.get("amplitude_v"), "V"), _percent(r.get("thd_percent")),
             eng(r.get("output_vpp"), "V")] for r in section.get("amplitudes") or []]
    if rows:
        out.append("")
        out += table(["input amplitude", "THD", "output pp"], rows)
    for title, key in (("clipping at the bench amplitude", "clipping"),
                       ("clipping when overdriven", "overdrive_clipping")):
        events = section.get(key) or []
        if events:
            out += ["", f"  {title}:"]
            out += table(["part or net", "what", "phase"], _events(events))
    return out
