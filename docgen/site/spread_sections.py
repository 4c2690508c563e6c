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
MAX_SENSITIVITIES = 4


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


def _histogram(design: Design, key: str, stats: dict[str, Any], values: list[float],
               unit: str, index: int) -> dict[str, Any]:
    """One metric's histogram (the analysis's own bins when it gave them) with its limits."""
    scale = 100.0 if unit == "%" else 1.0
    shown_unit = _shown(1.0, unit)[1]
    marks = [plots.Mark(m.where, None if m.low is None else m.low * scale,
                        None if m.high is None else m.high * scale, m.label)
             for m in marks_for_key(design, key)]
    histogram = stats.get("histogram") if isinstance(stats.get("histogram"), dict) else {}
    edges, counts = histogram.get("edges"), histogram.get("counts")
    if isinstance(edges, list) and isinstance(counts, list) and len(edges) == len(counts) + 1:
        svg = plots.histogram([], unit=shown_unit, label=key, marks=marks, counts=counts,
                              edges=[e * scale for e in edges])
    else:
        svg = plots.histogram([v * scale for v in values], unit=shown_unit, label=key,
                              marks=marks)
    return figure(_file_name("spread", index), f"{key} across boards", svg, small=True)


def _statistics_row(key: str, stats: dict[str, Any], values: list[float], unit: str,
                    unsolved: int) -> list[str]:
    """nominal, min, 1 %, mean, 99 %, max, std dev: the analysis's statistics when given, else
    computed from the samples (numpy)."""
    data = np.array(values, dtype=float)
    percentiles = stats.get("percentiles") if isinstance(stats.get("percentiles"), dict) else {}
    figures = [stats.get("nominal"), stats.get("min", data.min()),
               percentiles.get("1", np.percentile(data, 1)), stats.get("mean", data.mean()),
               percentiles.get("99", np.percentile(data, 99)), stats.get("max", data.max()),
               stats.get("std", data.std(ddof=1) if len(data) > 1 else 0.0)]
    shown_unit = _shown(1.0, unit)[1]
    cells = [format_eng(None if f is None else _shown(float(f), unit)[0], shown_unit)
             for f in figures]
    return [key, *cells, str(unsolved)]


def spread(design: Design, results: Results) -> Section | None:
    """Distribution of each sampled metric across boards: statistics, histograms with the
    requirement limits, yield, and the explicit worst-case corners."""
    section = results.get("spread")
    if not isinstance(section, dict) or not isinstance(section.get("samples"), dict):
        return None
    samples: dict[str, Any] = section["samples"]
    stats_by_key = section.get("metrics") if isinstance(section.get("metrics"), dict) else {}
    out = new_section("spread", "Spread across boards")
    boards = section.get("boards") or max((len(v) for v in samples.values()
                                           if isinstance(v, list)), default=0)
    distribution = f" ({section['distribution']})" if section.get("distribution") else ""
    out["facts"].append(["boards", f"{boards}{distribution}"])
    if isinstance(section.get("unsolved"), int):
        out["facts"].append(["boards that did not solve (counted as failing)",
                             str(section["unsolved"])])
    if isinstance(section.get("yield"), (int, float)):
        out["facts"].append(["yield (every sampled requirement met)",
                             format_eng(section["yield"] * 100, "%")])
    rows = []
    for index, key in enumerate(_ordered_keys(design, samples)):
        values = [v for v in samples[key] or [] if isinstance(v, (int, float))]
        if not values:
            continue
        stats = stats_by_key.get(key) if isinstance(stats_by_key.get(key), dict) else {}
        unit = str(stats.get("unit") or _unit(key))
        rows.append(_statistics_row(key, stats, values, unit,
                                    len(samples[key] or []) - len(values)))
        if index < MAX_HISTOGRAMS:
            out["figures"].append(_histogram(design, key, stats, values, unit, index))
    if rows:
        out["tables"].append(table("Statistics across boards (1 % and 99 % are percentiles)",
                                   ["metric", "nominal", "min", "1 %", "mean", "99 %", "max",
                                    "std dev", "unsolved"], rows))
    _yield_table(out, section)
    _worst_case_table(out, section, stats_by_key)
    if section.get("not_sampled"):
        out["notes"].append("Not sampled per board (their yield is not included): "
                            + ", ".join(map(str, section["not_sampled"])) + ".")
    return out


def _yield_table(out: Section, section: dict[str, Any]) -> None:
    by_requirement = section.get("yield_by_requirement")
    if isinstance(by_requirement, dict) and by_requirement:
        out["tables"].append(table("Yield by requirement", ["requirement", "boards meeting it"],
                                   [[name, format_eng(value * 100, "%")]
                                    for name, value in by_requirement.items()
                                    if isinstance(value, (int, float))]))


def _worst_case_table(out: Section, section: dict[str, Any], stats: dict[str, Any]) -> None:
    worst = section.get("worst_case")
    if not isinstance(worst, dict):
        return
    rows = []
    for key, case in worst.items():
        if not isinstance(case, dict):
            continue
        unit = str((stats.get(key) or {}).get("unit") or _unit(key))
        shown_unit = _shown(1.0, unit)[1]
        low, high = case.get("low"), case.get("high")
        rows.append([key, format_eng(None if low is None else _shown(low, unit)[0], shown_unit),
                     format_eng(None if high is None else _shown(high, unit)[0], shown_unit),
                     ", ".join(map(str, case.get("parameters") or []))])
    if rows:
        out["tables"].append(table("Worst case: every low/high combination of the values that "
                                   "move each metric most, the rest nominal",
                                   ["metric", "lowest", "highest", "varied"], rows,
                                   [False, True, True, False]))


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
                                                     label=key, marks=marks), small=True))
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


def _signed(value: float) -> str:
    return f"{value:+.2g}".replace("-", "\u2212")


def sensitivity(design: Design, results: Results) -> Section | None:
    """Which parts or parameters move each metric most: (dM/M)/(dp/p), largest first."""
    raw = results.get("sensitivity", (results.get("spread") or {}).get("sensitivity"))
    rows = _sensitivity_rows(raw)
    if not rows:
        return None
    out = new_section("sensitivity", "Sensitivity")
    by_metric: dict[str, list[tuple[str, float]]] = {}
    for metric, name, value in rows:
        by_metric.setdefault(metric, []).append((name, value))
    table_rows = []
    for metric in _ordered_keys(design, by_metric):
        ranked = sorted(by_metric[metric], key=lambda item: (-abs(item[1]), item[0]))
        table_rows.append([metric, " · ".join(f"{name} {_signed(value)}"
                                              for name, value in ranked[:MAX_SENSITIVITIES])])
    out["tables"].append(table("Normalised sensitivity (dM/M)/(dp/p), the largest first: +1 "
                               "means the metric rises 1 % for each 1 % the value rises",
                               ["metric", "parts and parameters that move it most"],
                               table_rows, [False, False]))
    return out


BUILDERS.extend([spread, drift, sensitivity])
