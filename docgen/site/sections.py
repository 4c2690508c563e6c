"""Results sections of a design page: facts, tables and figures made from one results dict.

Each builder takes the design and its results and returns a section (plain JSON data, cached
with the results) or ``None`` when the analysis it presents was not computed.  The page
template renders every section the same way, so adding one is adding a builder to
:data:`BUILDERS`.  Figures are SVG text from :mod:`docgen.plots`; numbers are formatted with
:func:`docgen.units.format_eng` here, once.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from typing import Any

from docgen import plots
from docgen.design import Design
from docgen.site.marks import marks_for
from docgen.units import format_eng

Section = dict[str, Any]
MAX_CONTRIBUTORS = 10
Results = dict[str, Any]


def new_section(anchor: str, title: str) -> Section:
    """An empty section: facts (label, text), tables, figures and notes."""
    return {"anchor": anchor, "title": title, "facts": [], "tables": [], "figures": [],
            "notes": []}


def table(caption: str, columns: Sequence[str], rows: list[list[str]],
          numeric: Sequence[bool] | None = None) -> dict[str, Any]:
    """A table: ``numeric`` marks right-aligned columns (default: all but the first)."""
    flags = list(numeric) if numeric is not None else [False] + [True] * (len(columns) - 1)
    return {"caption": caption, "columns": list(columns), "rows": rows, "numeric": flags}


def figure(file: str, caption: str, svg: str, small: bool = False) -> dict[str, Any]:
    """A figure stored as ``file`` in the page's files folder; ``small`` ones sit side by side."""
    return {"file": file, "caption": caption, "svg": svg, "small": small}


def curve_of(section: dict[str, Any], key: str, length: int) -> list[float] | None:
    """A curve of ``length`` numbers at ``key`` (a list, or a dict holding a magnitude list);
    ``None`` when absent or malformed."""
    value = section.get(key)
    if isinstance(value, dict):
        value = next((v for k, v in sorted(value.items()) if "mag" in k or k == "ohm"), None)
    if isinstance(value, list) and len(value) == length and all(
            isinstance(v, (int, float)) for v in value):
        return [float(v) for v in value]
    return None


def named_curves(section: dict[str, Any], names: Sequence[tuple[str, str]],
                 length: int) -> list[tuple[str, list[float]]]:
    """The curves present among ``names`` ((label, key) pairs), as (label, values)."""
    return [(label, values) for label, key in names
            if (values := curve_of(section, key, length)) is not None]


def add_facts(out: Section, section: dict[str, Any],
              rows: Sequence[tuple[str, str, str]]) -> None:
    """Add a fact per (label, key, unit) whose key holds a number in ``section``."""
    for label, key, unit in rows:
        add_fact(out, label, section.get(key), unit)


def add_fact(section: Section, label: str, value: Any, unit: str,
             reason: str | None = None) -> None:
    """Add ``label: value`` in engineering notation; a missing value shows ``reason`` if given."""
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        section["facts"].append([label, format_eng(value, unit)])
    elif reason:
        section["facts"].append([label, f"none ({reason})"])


# --- operating point ---------------------------------------------------------------------

_TRANSISTOR_COLUMNS = {
    "bipolar": (("ic_a", "IC", "A"), ("ib_a", "IB", "A"), ("vbe_v", "VBE", "V"),
                ("vce_v", "VCE", "V"), ("power_w", "power", "W")),
    "fet": (("id_a", "ID", "A"), ("vgs_v", "VGS", "V"), ("vds_v", "VDS", "V"),
            ("power_w", "power", "W")),
}


def operating_point(design: Design, results: Results) -> Section | None:
    """Net voltages, transistor bias, part currents and powers, supplies."""
    op = results.get("op")
    if not isinstance(op, dict):
        return None
    out = new_section("operating-point", "Operating point")
    add_fact(out, "temperature", op.get("temperature_c"), "°C")
    nets = op.get("nets") or {}
    out["tables"].append(table("Net voltages (to gnd)", ["net", "voltage"],
                               [[n, format_eng(v, "V")] for n, v in sorted(nets.items())]))
    parts = op.get("parts") or {}
    for family, columns in _TRANSISTOR_COLUMNS.items():
        key = columns[0][0]
        rows = [[name, str(p.get("region", ""))] + [format_eng(p.get(k), u) for k, _, u in columns]
                for name, p in sorted(parts.items()) if isinstance(p, dict) and key in p]
        if rows:
            caption = "Bipolar transistors" if family == "bipolar" else "Field-effect transistors"
            out["tables"].append(table(caption, ["part", "region", *[c[1] for c in columns]],
                                       rows, [False, False] + [True] * len(columns)))
    rows = [[name, format_eng(p.get("current_a"), "A"), format_eng(p.get("power_w"), "W")]
            for name, p in sorted(parts.items())
            if isinstance(p, dict) and "current_a" in p and name not in (op.get("supplies") or {})]
    if rows:
        out["tables"].append(table("Two-terminal parts (current from first net to second; "
                                   "power absorbed)", ["part", "current", "power"], rows))
    supplies = op.get("supplies") or {}
    if supplies:
        out["tables"].append(table("Supplies (current and power delivered)",
                                   ["supply", "current", "power"],
                                   [[n, format_eng(s.get("current_a"), "A"),
                                     format_eng(s.get("power_w"), "W")]
                                    for n, s in sorted(supplies.items())]))
    return out


# --- small-signal response and impedance -------------------------------------------------

_RESPONSE_MARKS = {"gain_at": ("point", 0), "phase_at": ("point", 1), "midband_gain": ("y", 0),
                   "low_corner": ("x", 0), "high_corner": ("x", 0), "unity_gain": ("x", 0)}


def response(design: Design, results: Results) -> Section | None:
    """Gain and phase against frequency with the corners and the limits that constrain them."""
    ac = results.get("ac")
    if not isinstance(ac, dict) or not isinstance(ac.get("freq_hz"), list):
        return None
    freq = ac["freq_hz"]
    out = new_section("response", "Frequency response")
    add_facts(out, ac, (("midband gain", "midband_gain_db", "dB"),
                        ("midband at", "midband_freq_hz", "Hz"),
                        ("gain at the signal frequency", "gain_at_signal_db", "dB")))
    add_fact(out, "low corner (−3.01 dB)", ac.get("f_low_hz"), "Hz", ac.get("f_low_reason"))
    add_fact(out, "high corner (−3.01 dB)", ac.get("f_high_hz"), "Hz", ac.get("f_high_reason"))
    add_fact(out, "unity-gain frequency", ac.get("unity_gain_hz"), "Hz")
    gain = curve_of(ac, "gain_db", len(freq))
    if gain is not None:
        phase = curve_of(ac, "phase_deg", len(freq))
        svg = plots.frequency_response(freq, gain, phase,
                                       marks=marks_for(design, _RESPONSE_MARKS))
        out["figures"].append(figure("response.svg", "Gain (from the source's open-circuit "
                                     "voltage to the output, load in place) and phase", svg))
    return out


def impedance(design: Design, results: Results) -> Section | None:
    """Input and output impedance at the signal frequency and against frequency."""
    ac = results.get("ac")
    if not isinstance(ac, dict) or ("zin_ohm" not in ac and "zout_ohm" not in ac):
        return None
    out = new_section("impedance", "Input and output impedance")
    signal = ac.get("signal_freq_hz")
    at = f" at {format_eng(signal, 'Hz')}" if isinstance(signal, (int, float)) else ""
    for key, label in (("zin_ohm", "input impedance"), ("zout_ohm", "output impedance")):
        value = ac.get(key)
        if isinstance(value, dict):
            value = value.get("magnitude_ohm", value.get("magnitude"))
        add_fact(out, label + at, value, "Ω")
    freq = ac.get("freq_hz") or []
    series = named_curves(ac, (("input", "zin_curve_ohm"), ("output", "zout_curve_ohm")),
                          len(freq))
    if series:
        forms = {"zin_at": ("point", 0), "zout_at": ("point", 0), "zin": ("point", 0),
                 "zout": ("point", 0)}
        marks = marks_for(design, forms, {"zin": signal, "zout": signal})
        out["figures"].append(figure("impedance.svg", "Impedance magnitude against frequency",
                                     plots.curves(freq, series, unit="Ω", ylabel="|Z|",
                                                  marks=marks)))
    return out


# --- noise -------------------------------------------------------------------------------

def noise(design: Design, results: Results) -> Section | None:
    """Noise densities, integrated input noise, SNR, noise figure and the main contributors."""
    section = results.get("noise")
    if not isinstance(section, dict):
        return None
    out = new_section("noise", "Noise")
    band = section.get("band_hz")
    band_text = (f" ({format_eng(band[0], 'Hz')} .. {format_eng(band[1], 'Hz')})"
                 if isinstance(band, list) and len(band) == 2 else "")
    add_facts(out, section, (("input noise" + band_text, "input_rms_v", "V"),
                             ("signal-to-noise ratio", "snr_db", "dB"),
                             ("noise figure (T0 = 290 K)", "figure_db", "dB")))
    freq = section.get("freq_hz") or []
    series = named_curves(section, (("output", "output_density_v_per_rthz"),
                                    ("input-referred", "input_density_v_per_rthz")), len(freq))
    if series:
        marks = marks_for(design, {"input_noise_density": ("point", 0),
                                   "output_noise_density": ("point", 0)})
        out["figures"].append(figure("noise.svg", "Noise density against frequency",
                                     plots.curves(freq, series, unit="V/√Hz",
                                                  ylabel="density", marks=marks)))
    rows = []
    for item in (section.get("contributors") or [])[:MAX_CONTRIBUTORS]:
        if isinstance(item, dict):
            share = item.get("share")
            rows.append([str(item.get("part", "")), str(item.get("mechanism", "")),
                         format_eng(share * 100 if isinstance(share, (int, float)) else None,
                                    "%")])
    if rows:
        out["tables"].append(table("Largest contributors, up to ten (share of output noise power "
                                   "over the band; results.json lists all)",
                                   ["part", "mechanism", "share"], rows,
                                   [False, False, True]))
    return out


#: (section builder) in page order; spread, temperature and sensitivity builders are added by
#: docgen.site.spread_sections, feedback by docgen.site.feedback_sections.
BUILDERS: list[Callable[[Design, Results], Section | None]] = [
    operating_point, response, impedance, noise,
]


def build_sections(design: Design, results: Results) -> list[Section]:
    """Every section the results allow, in page order."""
    from docgen.site import more_sections, spread_sections  # noqa: F401 - register builders

    return [s for builder in BUILDERS if (s := builder(design, results)) is not None]
