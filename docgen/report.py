"""Terminal rendering of a results dict: aligned tables in engineering notation.

``render(results) -> str`` prints the design's header line, then every section present, in
pipeline order, each by its printer, then any analysis errors.  Printers are small functions
``printer(section, results) -> list[str]`` registered in :data:`SECTION_PRINTERS` by module
path, exactly like the analyses in :mod:`docgen.pipeline` (add a line for a new section; a
section without a printer falls back to a plain listing of its numbers).  Helpers for tables
live here so every printer looks the same.
"""

from __future__ import annotations

import importlib
from collections.abc import Callable, Sequence
from typing import Any

from docgen.units import format_eng

Printer = Callable[[dict[str, Any], dict[str, Any]], list[str]]

#: (section name, "module:function") in print order.
SECTION_PRINTERS: list[tuple[str, str]] = [
    ("op", "docgen.report:print_op"),
    ("ac", "docgen.report_small_signal:print_ac"),
    ("noise", "docgen.report_small_signal:print_noise"),
    ("transient", "docgen.report_large_signal:print_transient"),
    ("feedback", "docgen.report_feedback:print_feedback"),
    ("checks", "docgen.report_checks:print_checks"),
    ("cautions", "docgen.report_checks:print_cautions"),
    ("estimates", "docgen.report_checks:print_estimates"),
    ("spread", "docgen.report_spread:print_spread"),  # the detail after the verdicts
]

#: Sections that are not results of an analysis (never printed as a section).
META = {"schema", "design", "errors"}


def table(headers: Sequence[str], rows: Sequence[Sequence[str]], indent: str = "  ") -> list[str]:
    """Rows aligned in columns: text left-aligned in the first column, the rest right-aligned."""
    if not rows:
        return []
    widths = [max(len(str(r[i])) for r in [headers, *rows]) for i in range(len(headers))]

    def line(cells: Sequence[str]) -> str:
        parts = [str(c).ljust(w) if i == 0 else str(c).rjust(w)
                 for i, (c, w) in enumerate(zip(cells, widths, strict=True))]
        return (indent + "  ".join(parts)).rstrip()

    return [line(headers), *(line(r) for r in rows)]


def heading(text: str) -> list[str]:
    """A section heading followed by a rule of the same length."""
    return ["", text, "─" * len(text)]


def eng(value: Any, unit: str = "", digits: int = 4) -> str:
    """A number in engineering notation (``n/a`` for missing values)."""
    if value is None or isinstance(value, bool | str):
        return "n/a" if value is None else str(value)
    return format_eng(float(value), unit, digits)


# ------------------------------------------------------------------ the op printer

_TWO_TERMINAL = ("resistor", "capacitor", "inductor", "supply", "signal", "current", "diode")


def _kind_of(name: str, figures: dict[str, Any]) -> str:
    if "ic_a" in figures:
        return "bipolar"
    if "id_a" in figures:
        return "fet"
    if "out_v" in figures:
        return "opamp"
    return "two-terminal"


def print_op(op: dict[str, Any], results: dict[str, Any]) -> list[str]:
    """The operating point: nets, supplies, parts by family, assumed model parameters."""
    out = heading(f"Operating point at {eng(op.get('temperature_c'), '°C')}"
                  f" (solved by {op.get('method', '?')}, {op.get('iterations', '?')} iterations)")
    if op.get("unstable"):
        out += ["  WARNING: this operating point is unstable: positive feedback balances here only",
                "  on paper, and the circuit will leave it (a latch or Schmitt trigger settles in",
                "  one of its states). The figures below describe the balance point."]
    out += table(["net", "voltage"], [[n, eng(v, "V")] for n, v in op["nets"].items()])
    if op.get("supplies"):
        out += ["", "  Supplies (delivered)"]
        out += table(["supply", "current", "power"],
                     [[n, eng(s["current_a"], "A"), eng(s["power_w"], "W")]
                      for n, s in op["supplies"].items()])
    groups: dict[str, list[tuple[str, dict[str, Any]]]] = {}
    for name, figures in op["parts"].items():
        groups.setdefault(_kind_of(name, figures), []).append((name, figures))
    for kind, printer in _GROUP_PRINTERS:
        if kind in groups:
            out += printer(groups[kind])
    if op.get("load"):
        load = op["load"]
        out += ["", f"  Bench load {eng(load['resistance_ohm'], 'Ω')}: "
                    f"{eng(load['current_a'], 'A')}, {eng(load['power_w'], 'W')}"]
    if op.get("assumed"):
        out += ["", "  Assumed model parameters (neutral defaults)"]
        out += [f"    {part}: {', '.join(names)}" for part, names in op["assumed"].items()]
    return out


def _siemens(value: Any) -> str:
    """A transconductance in mS (the unit designers quote gm in)."""
    return "n/a" if value is None else format_eng(1e3 * float(value), "mS", 4)


def _two_terminal_rows(parts: list[tuple[str, dict[str, Any]]]) -> list[str]:
    rows = [[n, eng(f.get("voltage_v"), "V"), eng(f.get("current_a"), "A"),
             eng(f.get("power_w"), "W")] for n, f in parts]
    return ["", "  Two-terminal parts (current from first net to second; power absorbed)",
            *table(["part", "voltage", "current", "power"], rows)]


def _bipolar_rows(parts: list[tuple[str, dict[str, Any]]]) -> list[str]:
    rows = [[n, f["region"], eng(f["ic_a"], "A"), eng(f["ib_a"], "A"), eng(f["vbe_v"], "V"),
             eng(f["vce_v"], "V"), eng(f["power_w"], "W"), _siemens(f["gm_s"]),
             eng(f["rpi_ohm"], "Ω"), eng(f["ro_ohm"], "Ω")] for n, f in parts]
    return ["", "  Bipolar transistors",
            *table(["part", "region", "IC", "IB", "VBE", "VCE", "power", "gm", "rπ", "ro"],
                   rows)]


def _fet_rows(parts: list[tuple[str, dict[str, Any]]]) -> list[str]:
    rows = [[n, f["region"], eng(f["id_a"], "A"), eng(f["vgs_v"], "V"), eng(f["vds_v"], "V"),
             eng(f["power_w"], "W"), _siemens(f["gm_s"])] for n, f in parts]
    return ["", "  Field-effect transistors",
            *table(["part", "region", "ID", "VGS", "VDS", "power", "gm"], rows)]


def _opamp_rows(parts: list[tuple[str, dict[str, Any]]]) -> list[str]:
    rows = [[n, eng(f["out_v"], "V"), eng(f["iout_a"], "A"), eng(f["supply_current_a"], "A"),
             eng(f["power_w"], "W"), "yes" if f.get("output_limited") else "no"]
            for n, f in parts]
    return ["", "  Op-amps",
            *table(["part", "output", "output current", "supply current", "power",
                    "at its limit"], rows)]


_GROUP_PRINTERS: list[tuple[str, Callable[[list[tuple[str, dict[str, Any]]]], list[str]]]] = [
    ("two-terminal", _two_terminal_rows),
    ("bipolar", _bipolar_rows),
    ("fet", _fet_rows),
    ("opamp", _opamp_rows),
]


# ---------------------------------------------------------------------- rendering


def print_plain(name: str, section: Any) -> list[str]:
    """Fallback for a section without a printer: its top-level numbers and words."""
    out = heading(name)
    if isinstance(section, dict):
        rows = [[k, eng(v) if not isinstance(v, str) else v] for k, v in section.items()
                if v is None or isinstance(v, int | float | str)]
        out += table(["field", "value"], rows)
    elif isinstance(section, list):
        out.append(f"  {len(section)} entries")
    return out


def _printer(target: str) -> Printer | None:
    module_name, func_name = target.split(":")
    try:
        module = importlib.import_module(module_name)
    except ModuleNotFoundError as exc:
        if exc.name and module_name.startswith(exc.name):
            return None
        raise
    return getattr(module, func_name, None)


def render(results: dict[str, Any]) -> str:
    """The whole results dict as terminal text."""
    design = results.get("design", {})
    out = [f"{design.get('title') or design.get('path', '')} — {design.get('path', '')}"
           f" ({design.get('status', 'draft')})"]
    printed = set(META)
    for name, target in SECTION_PRINTERS:
        if name in results:
            printer = _printer(target)
            out += printer(results[name], results) if printer else print_plain(name, results[name])
            printed.add(name)
    for name, section in results.items():
        if name not in printed:
            out += print_plain(name, section)
    if results.get("errors"):
        out += heading("Analyses that could not finish")
        out += [f"  {e['analysis']}: {e['path']}:{e['line']}:{e['col']}: {e['message']}"
                for e in results["errors"]]
    return "\n".join(out) + "\n"
