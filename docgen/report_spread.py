"""Terminal printer for the ``spread`` section (registered in docgen.report): statistics across
boards beside the worst-case corners, yield, the largest sensitivities and temperature drift."""

from __future__ import annotations

from typing import Any

from docgen.report import eng, heading, table

#: Sensitivities listed per metric in the terminal (the results keep all of them).
TOP_SENSITIVITIES = 3


def _value(value: Any, unit: str) -> str:
    if unit == "%" and isinstance(value, int | float):
        return eng(value * 100, "%")
    return eng(value, unit)


def _statistics_rows(section: dict[str, Any]) -> list[list[str]]:
    rows = []
    worst = section.get("worst_case") or {}
    for key, figures in (section.get("metrics") or {}).items():
        unit = figures.get("unit", "")
        if not figures.get("solved"):
            rows.append([key, _value(figures.get("nominal"), unit), *["n/a"] * 7])
            continue
        percentiles = figures.get("percentiles") or {}
        corner = worst.get(key) or {}
        rows.append([key, _value(figures.get("nominal"), unit), _value(figures["min"], unit),
                     _value(percentiles.get("1"), unit), _value(figures["mean"], unit),
                     _value(percentiles.get("99"), unit), _value(figures["max"], unit),
                     _value(figures["std"], unit),
                     f"{_value(corner.get('low'), unit)} .. {_value(corner.get('high'), unit)}"
                     if corner else "—"])
    return rows


def _sensitivity_lines(section: dict[str, Any]) -> list[str]:
    ranking = (section.get("sensitivity") or {}).get("ranking") or []
    by_metric: dict[str, list[str]] = {}
    for item in ranking:
        listed = by_metric.setdefault(item["metric"], [])
        if len(listed) < TOP_SENSITIVITIES:
            listed.append(f"{item['parameter']} {item['sensitivity']:+.3g}")
    if not by_metric:
        return []
    return ["", "  Largest sensitivities (dM/M)/(dp/p)",
            *table(["metric", "parameters"], [[k, ", ".join(v)] for k, v in by_metric.items()])]


def _per_degree(value: Any, unit: str) -> str:
    """A slope in engineering notation with its unit per °C (``954.2 nA/°C``)."""
    text = _value(value, unit)
    return text if value is None else f"{text}/°C"


def _temperature_lines(section: dict[str, Any]) -> list[str]:
    temperature = section.get("temperature")
    if not isinstance(temperature, dict) or not temperature.get("ambient_c"):
        return []
    ambient = temperature["ambient_c"]
    units = {k: v.get("unit", "") for k, v in (section.get("metrics") or {}).items()}
    rows = []
    for key, values in (temperature.get("samples") or {}).items():
        unit = units.get(key, "")
        drift = (temperature.get("drift") or {}).get(key) or {}
        rows.append([key, _value(values[0], unit), _value(values[-1], unit),
                     _value(drift.get("change"), unit),
                     _per_degree(drift.get("per_degree"), unit)])
    out = heading(f"Temperature: {eng(ambient[0], '°C')} .. {eng(ambient[-1], '°C')} "
                  f"({len(ambient)} points, nominal parts)")
    if temperature.get("unsolved"):
        out.append(f"  {temperature['unsolved']} ambient points did not solve")
    return out + table(["metric", "coldest", "hottest", "change", "slope"], rows)


def print_spread(section: dict[str, Any], results: dict[str, Any]) -> list[str]:
    """Boards, yield, statistics with worst-case corners, sensitivities and temperature."""
    out = heading(f"Spread across {section.get('boards')} boards "
                  f"({section.get('distribution')} within tolerances and ranges, "
                  f"seed {section.get('seed')})")
    unsolved = section.get("unsolved") or 0
    if unsolved:
        listed = ", ".join(str(b) for b in section.get("unsolved_boards") or [])
        out.append(f"  {unsolved} boards did not solve (counted as failing): {listed}")
    if section.get("yield") is not None:
        out.append(f"  yield (every requirement met): {_value(section['yield'], '%')}")
    each = section.get("yield_by_requirement") or {}
    out += table(["requirement", "yield"], [[k, _value(v, "%")] for k, v in each.items()],
                 indent="    ")
    if section.get("not_sampled"):
        out.append("  not computed per board: " + ", ".join(section["not_sampled"]))
    out += ["", "  Across boards (worst case: corners of the values that move each metric most)"]
    out += table(["metric", "nominal", "min", "1 %", "mean", "99 %", "max", "std dev",
                  "worst case"], _statistics_rows(section))
    out += _sensitivity_lines(section)
    return out + _temperature_lines(section)
