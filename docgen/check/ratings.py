"""Rating checks that need no requirement line: the ``cautions`` section.

Each caution names the part, the figure, its value and the limit, a severity and one plain
sentence, and carries :data:`DESIGN_AID` (results are design aids to be confirmed on the bench).
Figures come from the operating point (``op``) and, when the large-signal analysis ran, from
its cycle averages and waveform (``transient``); model ratings are the ``max_*`` parameters of
the elaborated circuit.

Severities: ``hazard`` (a supply beyond extra-low voltage: a shock risk), ``error`` (a part over
its rating, a polarised capacitor reverse-biased), ``warning`` (a resistor above half its power
rating, common practice derating), ``info`` (a part with no rating or tolerance to check).
"""

from __future__ import annotations

import math
from collections.abc import Iterator, Mapping
from typing import Any

from docgen.design import Design, Part

DESIGN_AID = ("Computed results are design aids, to be confirmed on the bench; for "
              "mains-connected or high-voltage work follow local codes and licensed practice.")
#: Extra-low-voltage limits of IEC 61140 (from memory): ripple-free DC and AC rms.
ELV_DC_V = 120.0
ELV_AC_RMS_V = 50.0
#: Resistors at no more than half their power rating (common practice derating).
DERATING = 0.5
#: A polarised capacitor counts as reverse-biased beyond this (a few mV is only solver noise).
REVERSE_V = 0.01

#: transistor and diode figures checked against model ratings:
#: (part kinds, figure key in op.parts, model rating parameter, what it is, unit)
MODEL_LIMITS: tuple[tuple[frozenset[str], str, str, str, str], ...] = (
    (frozenset({"npn", "pnp", "njfet", "pjfet", "nmos", "pmos", "diode"}), "power_w",
     "max_power", "dissipation", "W"),
    (frozenset({"npn", "pnp"}), "vce_v", "max_collector_emitter_voltage",
     "collector-emitter voltage", "V"),
    (frozenset({"npn", "pnp"}), "ic_a", "max_collector_current", "collector current", "A"),
    (frozenset({"njfet", "pjfet", "nmos", "pmos"}), "vds_v", "max_drain_source_voltage",
     "drain-source voltage", "V"),
    (frozenset({"diode"}), "current_a", "max_current", "forward current", "A"),
)


def caution(part: Part | None, figure: str, value: float | None, limit: float | None,
            unit: str, severity: str, message: str) -> dict[str, Any]:
    """One caution as plain data (``line``/``col`` point at the part's name)."""
    return {"part": part.name if part else None, "figure": figure, "value": value,
            "limit": limit, "unit": unit, "severity": severity, "message": message,
            "line": part.span.line if part else 1, "col": part.span.col if part else 1,
            "note": DESIGN_AID}


def _eng(value: float, unit: str) -> str:
    from docgen.units import format_eng

    return format_eng(value, unit)


def _net_voltage(op: Mapping[str, Any], net: str) -> float | None:
    return 0.0 if net == "gnd" else (op.get("nets") or {}).get(net)


def _across(op: Mapping[str, Any], part: Part) -> float | None:
    first, second = (_net_voltage(op, n) for n in part.nets[:2])
    return None if first is None or second is None else first - second


def supply_hazards(design: Design, op: Mapping[str, Any] | None) -> Iterator[dict[str, Any]]:
    """Supplies (and the signal) beyond extra-low voltage (IEC 61140, from memory)."""
    voltages = [v for v in ((op or {}).get("nets") or {}).values() if v is not None] + [0.0]
    spread = max(voltages) - min(voltages) if op else 0.0
    for part in design.parts:
        if part.kind == "supply" and part.value is not None and (
                abs(part.value) > ELV_DC_V or spread > ELV_DC_V):
            worst = max(abs(part.value), spread)
            yield caution(part, "supply voltage", worst, ELV_DC_V, "V", "hazard",
                          f"HAZARDOUS VOLTAGE: {_eng(worst, 'V')} DC is present in this design "
                          f"(supply {part.name}), above the extra-low-voltage limit of "
                          f"{_eng(ELV_DC_V, 'V')} ripple-free DC (IEC 61140, from memory). "
                          "Touching it can kill. Build and test it only under the rules for "
                          "hazardous voltages.")
        if part.kind == "signal" and part.value is not None and \
                abs(part.value) / math.sqrt(2) > ELV_AC_RMS_V:
            rms = abs(part.value) / math.sqrt(2)
            yield caution(part, "signal voltage", rms, ELV_AC_RMS_V, "V rms", "hazard",
                          f"HAZARDOUS VOLTAGE: the signal is {_eng(rms, 'V')} rms, above the "
                          f"extra-low-voltage limit of {_eng(ELV_AC_RMS_V, 'V')} AC rms "
                          "(IEC 61140, from memory).")


def resistor_power(part: Part, op_power: float | None, average: float | None
                   ) -> Iterator[dict[str, Any]]:
    """A resistor's power against its rating and against half of it."""
    if part.rating is None:
        return
    powers = [abs(p) for p in (op_power, average) if p is not None]
    if not powers:
        return
    power = max(powers)
    where = "over the signal cycle" if average is not None and abs(average) >= abs(
        op_power or 0) else "at the operating point"
    if power > part.rating:
        yield caution(part, "power", power, part.rating, "W", "error",
                      f"{part.name} dissipates {_eng(power, 'W')} {where}, over its "
                      f"{_eng(part.rating, 'W')} rating: it will overheat.")
    elif power > DERATING * part.rating:
        yield caution(part, "power", power, DERATING * part.rating, "W", "warning",
                      f"{part.name} dissipates {_eng(power, 'W')} {where}, above half its "
                      f"{_eng(part.rating, 'W')} rating (common practice derating); choose a "
                      "larger rating.")


def capacitor_voltage(part: Part, voltage: float | None, signal_peak: float
                      ) -> Iterator[dict[str, Any]]:
    """A capacitor's voltage against its rating, and a polarised one reverse-biased."""
    if voltage is None:
        return
    if part.params.get("polarised") and voltage < -REVERSE_V:
        yield caution(part, "reverse voltage", voltage, 0.0, "V", "error",
                      f"{part.name} is polarised but reverse-biased by {_eng(-voltage, 'V')} "
                      "at the operating point (its first net must be the more positive): it "
                      "can fail, vent or burst. Turn it round or use a non-polarised part.")
    if part.rating is None:
        return
    peak = abs(voltage) + signal_peak
    if peak > part.rating:
        extra = f" plus {_eng(signal_peak, 'V')} of signal" if signal_peak else ""
        yield caution(part, "voltage", peak, part.rating, "V", "error",
                      f"{part.name} sees {_eng(abs(voltage), 'V')}{extra}, over its "
                      f"{_eng(part.rating, 'V')} rating: choose a higher voltage rating.")


def model_ratings(part: Part, figures: Mapping[str, Any], values: Mapping[str, float]
                  ) -> Iterator[dict[str, Any]]:
    """A transistor's or diode's figures against its model's ``max_*`` ratings."""
    for kinds, key, rating_name, what, unit in MODEL_LIMITS:
        if part.kind not in kinds or figures.get(key) is None:
            continue
        limit = values.get(rating_name, math.inf)
        value = abs(float(figures[key]))
        if math.isfinite(limit) and value > limit:
            yield caution(part, what, value, limit, unit, "error",
                          f"{part.name}'s {what} is {_eng(value, unit)}, over the "
                          f"{_eng(limit, unit)} rating of its model {part.model}.")
    if part.kind == "diode":
        reverse = -float(figures.get("voltage_v") or 0.0)
        limit = values.get("max_reverse_voltage", math.inf)
        if math.isfinite(limit) and reverse > limit:
            yield caution(part, "reverse voltage", reverse, limit, "V", "error",
                          f"{part.name} blocks {_eng(reverse, 'V')}, over the "
                          f"{_eng(limit, 'V')} reverse rating of its model {part.model}.")


def opamp_supply(part: Part, op: Mapping[str, Any], values: Mapping[str, float]
                 ) -> Iterator[dict[str, Any]]:
    """An op-amp's total supply voltage against its model's rating."""
    plus, minus = (_net_voltage(op, part.net(t)) for t in ("v+", "v-"))
    limit = values.get("max_supply_voltage", math.inf)
    if plus is not None and minus is not None and math.isfinite(limit) and plus - minus > limit:
        total = plus - minus
        yield caution(part, "supply voltage", total, limit, "V", "error",
                      f"{part.name} is powered from {_eng(total, 'V')}, over the "
                      f"{_eng(limit, 'V')} supply rating of its model {part.model}.")


def unrated(part: Part, values: Mapping[str, float]) -> Iterator[dict[str, Any]]:
    """A note for parts whose rating or tolerance is not given (nothing to check against)."""
    missing = []
    if part.kind in ("resistor", "capacitor") and part.rating is None:
        missing.append("no " + ("power" if part.kind == "resistor" else "voltage") + " rating "
                       "(its rating check is skipped)")
    if part.kind in ("resistor", "capacitor", "inductor") and part.tolerance is None:
        missing.append("no tolerance (the spread analysis treats it as exact)")
    if part.model and values and not any(
            math.isfinite(v) for k, v in values.items() if k.startswith("max_")):
        missing.append(f"no ratings in its model {part.model} (its rating checks are skipped)")
    if missing:
        yield caution(part, "rating", None, None, "", "info",
                      f"{part.name} has " + " and ".join(missing) + ".")


def _signal_peak(results: Mapping[str, Any]) -> float:
    """Half the output's peak-to-peak at the bench amplitude: the largest signal in a stage
    is normally its output, so this bounds what a capacitor sees on top of its bias."""
    output = (results.get("transient") or {}).get("output_v") or []
    return (max(output) - min(output)) / 2 if output else 0.0


def cautions(design: Design, circuit: Any, results: Mapping[str, Any]) -> list[dict[str, Any]]:
    """Every caution of a design, in the order of its parts (hazards first)."""
    op = results.get("op")
    found = list(supply_hazards(design, op))
    values = {d.name: d.values for d in getattr(circuit, "devices", ())}
    averages = (results.get("transient") or {}).get("power_w") or {}
    signal_peak = _signal_peak(results)
    for part in design.parts:
        found += unrated(part, values.get(part.name, {}))
        if not op:
            continue
        figures = (op.get("parts") or {}).get(part.name) or {}
        if part.kind == "resistor":
            found += resistor_power(part, figures.get("power_w"), averages.get(part.name))
        elif part.kind == "capacitor":
            found += capacitor_voltage(part, _across(op, part), signal_peak)
        elif part.kind == "opamp":
            found += opamp_supply(part, op, values.get(part.name, {}))
        elif part.model:
            if averages.get(part.name) is not None and figures.get("power_w") is not None:
                # the larger of the bias and the cycle-average dissipation
                power = max(abs(figures["power_w"]), abs(averages[part.name]))
                figures = {**figures, "power_w": power}
            found += model_ratings(part, figures, values.get(part.name, {}))
    order = {"hazard": 0, "error": 1, "warning": 2, "info": 3}
    return sorted(found, key=lambda c: (order[c["severity"]], c["line"], c["col"]))


def analyse(ctx: Any) -> list[dict[str, Any]]:
    """The ``cautions`` section of the results."""
    return cautions(ctx.design, ctx.circuit, ctx.results)
