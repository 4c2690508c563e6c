"""Results sections for the spread analysis: histograms and yield, temperature drift,
sensitivity ranking (registered on import).

Per-board and per-temperature values are keyed by a metric's canonical spelling
(``spread.samples``, ``temperature.samples``; see docs/results.md).  The statistics shown are
plain summaries of those samples (numpy); nothing is re-solved.
"""

from __future__ import annotations

from typing import Any

import numpy as np

from docgen import plots
from docgen.design import Design
from docgen.site.marks import marks_for_key, metric_keys
from docgen.site.sections import BUILDERS, Results, Section, figure, new_section, table
from docgen.units import format_eng

MAX_HISTOGRAMS = 8
MAX_DRIFT_PLOTS = 6
MAX_SENSITIVITIES = 12


def _unit(key: str) -> str:
    try:
        from docgen import metrics

        return metrics.parse(key).unit
    except (ImportError, ValueError):
        return ""


def _shown(value: float, unit: str) -> tuple[float, str]:
    """Fractions shown in percent; ``V pp`` plotted in volts."""
    if unit == "%":
        return value * 100, "%"
    return value, unit.split(" ")[0]


def _ordered_keys(design: Design, samples: dict[str, Any]) -> list[str]:
    """Sampled metrics, those the requirements name first, then the rest alphabetically."""
    first = [k for k in dict.fromkeys(metric_keys(design)) if k in samples]
    return first + sorted(k for k in samples if k not in first)


def _file_name(prefix: str, index: int) -> str:
    return f"{prefix}-{index + 1:02d}.svg"


def spread(design: Design, results: Results) -> Section | None:
    """Distribution of each sampled metric across boards, with yield and unsolved boards."""
    section = results.get("spread")
    if not isinstance(section, dict) or not isinstance(section.get("samples"), dict):
        return None
    samples: dict[str, Any] = section["samples"]
    out = new_section("spread", "Spread across boards")
    boards = max((len(v) for v in samples.values() if isinstance(v, list)), default=0)
    out["facts"].append(["boards", str(boards)])
    if isinstance(section.get("yield"), (int, float)):
        out["facts"].append(["yield (every requirement met)",
                             format_eng(section["yield"] * 100, "%")])
    rows = []
    for index, key in enumerate(_ordered_keys(design, samples)):
        values = [v for v in samples[key] or [] if isinstance(v, (int, float))]
        unsolved = len(samples[key] or []) - len(values)
        if not values:
            continue
        unit = _unit(key)
        data = np.array([_shown(v, unit)[0] for v in values])
        shown_unit = _shown(1.0, unit)[1]
        rows.append([key, *(format_eng(float(x), shown_unit) for x in (
            data.min(), np.percentile(data, 1), data.mean(), np.percentile(data, 99),
            data.max())), format_eng(float(data.std()), shown_unit), str(unsolved)])
        if index < MAX_HISTOGRAMS:
            scale = 100.0 if unit == "%" else 1.0
            marks = [plots.Mark(m.where, None if m.low is None else m.low * scale,
                                None if m.high is None else m.high * scale, m.label)
                     for m in marks_for_key(design, key)]
            svg = plots.histogram(data.tolist(), unit=shown_unit, label=key, marks=marks)
            out["figures"].append(figure(_file_name("spread", index), f"{key} across boards",
                                         svg))
    if rows:
        out["tables"].append(table("Statistics across boards (1 % and 99 % are percentiles)",
                                   ["metric", "min", "1 %", "mean", "99 %", "max", "std dev",
                                    "unsolved"], rows))
    return out


def _temperature_section(results: Results) -> dict[str, Any] | None:
    section = results.get("temperature")
    if not isinstance(section, dict):
        section = (results.get("spread") or {}).get("temperature")
    return section if isinstance(section, dict) else None


def drift(design: Design, results: Results) -> Section | None:
    """Each sampled metric against ambient temperature."""
    section = _temperature_section(results)
    if section is None or not isinstance(section.get("samples"), dict):
        return None
    ambient = section.get("ambient_c")
    if not isinstance(ambient, list) or not ambient:
        return None
    out = new_section("temperature", "Temperature drift")
    out["facts"].append(["ambient range", f"{format_eng(min(ambient), '°C')} .. "
                                          f"{format_eng(max(ambient), '°C')}"])
    rows = []
    for index, key in enumerate(_ordered_keys(design, section["samples"])):
        values = section["samples"][key]
        if not isinstance(values, list) or len(values) != len(ambient):
            continue
        pairs = [(t, v) for t, v in zip(ambient, values, strict=True)
                 if isinstance(v, (int, float))]
        if len(pairs) < 2:
            continue
        unit = _unit(key)
        shown = [(t, _shown(v, unit)[0]) for t, v in pairs]
        shown_unit = _shown(1.0, unit)[1]
        change = max(v for _, v in shown) - min(v for _, v in shown)
        rows.append([key, format_eng(shown[0][1], shown_unit), format_eng(shown[-1][1],
                                                                          shown_unit),
                     format_eng(change, shown_unit)])
        if index < MAX_DRIFT_PLOTS:
            marks = [plots.Mark("y", m.low, m.high, m.label) for m in marks_for_key(design, key)]
            if unit == "%":
                marks = []  # limits are fractions; the plot is in percent
            out["figures"].append(figure(_file_name("drift", index), f"{key} against ambient",
                                         plots.drift([t for t, _ in shown],
                                                     [v for _, v in shown], unit=shown_unit,
                                                     label=key, marks=marks)))
    if rows:
        out["tables"].append(table("Drift over the ambient range", ["metric", "coldest",
                                                                    "hottest", "change"], rows))
    return out


def _sensitivity_rows(section: Any) -> list[tuple[str, str, float]]:
    """(metric, parameter, normalised sensitivity) from a list or a nested mapping."""
    rows: list[tuple[str, str, float]] = []
    if isinstance(section, dict):
        section = section.get("ranking", section)
    if isinstance(section, list):
        for item in section:
            if isinstance(item, dict):
                value = item.get("sensitivity", item.get("value"))
                name = item.get("parameter") or item.get("part") or ""
                if isinstance(value, (int, float)):
                    rows.append((str(item.get("metric", "")), str(name), float(value)))
    elif isinstance(section, dict):
        for metric, ranking in section.items():
            for name, value in (ranking.items() if isinstance(ranking, dict) else []):
                if isinstance(value, (int, float)):
                    rows.append((str(metric), str(name), float(value)))
    return rows


def sensitivity(design: Design, results: Results) -> Section | None:
    """Which part or parameter moves each metric most: (dM/M)/(dp/p), largest first."""
    raw = results.get("sensitivity", (results.get("spread") or {}).get("sensitivity"))
    rows = _sensitivity_rows(raw)
    if not rows:
        return None
    out = new_section("sensitivity", "Sensitivity")
    by_metric: dict[str, list[tuple[str, float]]] = {}
    for metric, name, value in rows:
        by_metric.setdefault(metric, []).append((name, value))
    table_rows = []
    for metric in sorted(by_metric):
        ranked = sorted(by_metric[metric], key=lambda item: (-abs(item[1]), item[0]))
        for name, value in ranked[:MAX_SENSITIVITIES]:
            table_rows.append([metric, name, f"{value:+.3g}"])
    out["tables"].append(table("Normalised sensitivity (dM/M)/(dp/p): +1 means the metric "
                               "moves 1 % for each 1 % of the part", ["metric", "part or "
                                                                      "parameter",
                                                                      "sensitivity"],
                               table_rows, [False, False, True]))
    return out


BUILDERS.extend([spread, drift, sensitivity])
