"""Reading a metric's value from a results dict (never re-solving anything).

:func:`evaluate` returns a :class:`Value`: the number in the metric's unit, or ``None`` with the
reason (most often "not computed: the <section> analysis did not run").  The results keys read
here are listed in ``docs/results.md`` ("Keys the metric vocabulary reads").
"""

from __future__ import annotations

import math
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

from docgen.metrics import Metric

Results = Mapping[str, Any]


@dataclass(frozen=True, slots=True)
class Value:
    """A metric's value (``None`` when it cannot be read, with the reason)."""

    value: float | None
    unit: str
    reason: str | None = None

    @property
    def ok(self) -> bool:
        """True when there is a number."""
        return self.value is not None


class _Missing(Exception):
    """Raised inside readers when a value is not available; carries the reason."""


def _section(results: Results, name: str) -> Mapping[str, Any]:
    section = results.get(name)
    if not isinstance(section, Mapping):
        failed = [e for e in results.get("errors") or () if e.get("analysis") == name]
        if failed:
            raise _Missing(f"the '{name}' analysis failed: {failed[0].get('message')}")
        raise _Missing(f"not computed: the '{name}' analysis did not run")
    return section


def _field(section: Mapping[str, Any], key: str, name: str) -> Any:
    value = section.get(key)
    if value is None:
        reason = section.get(key.rsplit("_", 1)[0] + "_reason") or section.get(f"{key}_reason")
        if reason is None and key in section:
            reason = f"the analysis gave no value for '{name}.{key}'"
        raise _Missing(reason or f"not computed: '{name}.{key}' is not in the results")
    return value


def _hz(value: float) -> str:
    return f"{value:.6g} Hz"


def interpolate_log_f(freq: Sequence[float], values: Sequence[float], f: float) -> float:
    """Linear interpolation of ``values`` against log-frequency at ``f`` (inside the sweep)."""
    freq_array = np.asarray(freq, dtype=float)
    if not len(freq_array) or f < freq_array[0] * (1 - 1e-9) or f > freq_array[-1] * (1 + 1e-9):
        span = f"{_hz(freq_array[0])} .. {_hz(freq_array[-1])}" if len(freq_array) else "empty"
        raise _Missing(f"{_hz(f)} is outside the computed sweep ({span})")
    points = np.array([np.nan if v is None else v for v in values], dtype=float)
    value = float(np.interp(math.log10(f), np.log10(freq_array), points))
    if not math.isfinite(value):
        raise _Missing(f"the curve has no value at {_hz(f)}")
    return value


def band_rms(freq: Sequence[float], density: Sequence[float], low: float, high: float) -> float:
    """√(∫ density² df) over ``low .. high``, density interpolated log–log on a fine grid."""
    freq_array = np.asarray(freq, dtype=float)
    if low >= high:
        raise _Missing("the band's first frequency must be below its second")
    if low < freq_array[0] * (1 - 1e-9) or high > freq_array[-1] * (1 + 1e-9):
        raise _Missing(f"the band {_hz(low)} .. {_hz(high)} is outside the computed noise curve")
    grid = np.logspace(math.log10(low), math.log10(high), 2000)
    log_density = np.log(np.maximum(np.asarray(density, float), 1e-300))
    on_grid = np.exp(np.interp(np.log(grid), np.log(freq_array), log_density))
    return float(math.sqrt(np.trapezoid(on_grid ** 2, grid)))


def _curve_at(results: Results, section: str, key: str, f: float, freq_key: str = "freq_hz"):
    data = _section(results, section)
    curve = _field(data, key, section)
    if isinstance(curve, Mapping):  # {magnitude: [...], phase_deg: [...]} curves
        curve = curve.get("magnitude", curve.get("magnitude_ohm"))
    return interpolate_log_f(_field(data, freq_key, section), curve, f)


def _signal_or_curve(results: Results, point_key: str, curve_key: str, f: float) -> float:
    ac = _section(results, "ac")
    signal = ac.get("signal_freq_hz")
    if signal and abs(signal - f) <= 1e-9 * f and ac.get(point_key) is not None:
        value = ac[point_key]
        return float(value["magnitude"] if isinstance(value, Mapping) else value)
    return _curve_at(results, "ac", curve_key, f)


def _part(results: Results, metric: Metric) -> float:
    op = _section(results, "op")
    name, key = metric.args["part"], metric.quantity_key
    supplies = op.get("supplies") or {}
    if name in supplies and key in ("current_a", "power_w"):
        return float(_field(supplies[name], key, f"op.supplies.{name}"))
    parts = op.get("parts") or {}
    if name not in parts:
        raise _Missing(f"no part called '{name}' in the operating point")
    return float(_field(parts[name], key, f"op.parts.{name}"))


def _sum_supplies(results: Results, key: str) -> float:
    supplies = _section(results, "op").get("supplies") or {}
    if not supplies:
        raise _Missing("the design has no supply")
    return float(sum(_field(s, key, "op.supplies") for s in supplies.values()))


def _psrr(results: Results, f: float) -> float:
    feedback = _section(results, "feedback")
    curves = _field(feedback, "psrr_db", "feedback")
    freq = _field(feedback, "freq_hz", "feedback")
    values = []
    for curve in curves.values():
        try:
            values.append(interpolate_log_f(freq, curve, f))
        except _Missing:  # no supply signal reaches the output: that supply does not limit
            continue
    if not values:
        raise _Missing(f"no supply's signal reaches the output at {_hz(f)}")
    return min(values)


def _thd_at(results: Results, amplitude: float) -> float:
    transient = _section(results, "transient")
    # published numbers keep 6 significant figures, so match to 1e-5
    for row in transient.get("amplitudes") or ():
        if abs(row.get("amplitude_v", -1) - amplitude) <= 1e-5 * amplitude:
            return float(_field(row, "thd_percent", "transient.amplitudes")) / 100
    raise _Missing(f"not computed: THD at {amplitude:.6g} V peak is not among the bench "
                   "amplitudes (add it to the bench 'amplitudes' line)")


def _drift(results: Results, metric: Metric) -> float:
    values = [v for v in temperature_samples(results, metric.args["metric"]) if v is not None]
    if not values:
        raise _Missing("no converged temperature point")
    return max(values) - min(values)


def temperature_section(results: Results) -> Mapping[str, Any]:
    """The temperature results, at top level or nested in ``spread``."""
    if isinstance(results.get("temperature"), Mapping):
        return results["temperature"]
    spread = results.get("spread")
    if isinstance(spread, Mapping) and isinstance(spread.get("temperature"), Mapping):
        return spread["temperature"]
    raise _Missing("not computed: the temperature analysis did not run (give the bench an "
                   "ambient range)")


def temperature_samples(results: Results, metric: Metric) -> list[float | None]:
    """The metric at each ambient temperature point (``temperature.samples[metric.key]``)."""
    samples = temperature_section(results).get("samples") or {}
    if metric.key not in samples:
        raise _Missing(f"not computed: the temperature analysis has no values of '{metric.key}'")
    return list(samples[metric.key])


def spread_samples(results: Results, metric: Metric) -> list[float | None]:
    """The metric on each board of the spread analysis (``spread.samples[metric.key]``)."""
    samples = _section(results, "spread").get("samples") or {}
    if metric.key not in samples:
        raise _Missing(f"not computed: the spread analysis has no values of '{metric.key}'")
    return list(samples[metric.key])


def _a(key: str) -> Callable[[Results, Metric], float]:
    return lambda r, m: float(_field(_section(r, "ac"), key, "ac"))


def _f(section: str, key: str, scale: float = 1.0) -> Callable[[Results, Metric], float]:
    return lambda r, m: float(_field(_section(r, section), key, section)) * scale


READERS: dict[str, Callable[[Results, Metric], float]] = {
    "gain_at": lambda r, m: _signal_or_curve(r, "gain_at_signal_db", "gain_db", m.args["freq"]),
    "phase_at": lambda r, m: _signal_or_curve(r, "phase_at_signal_deg", "phase_deg",
                                              m.args["freq"]),
    "midband_gain": _a("midband_gain_db"),
    "low_corner": _a("f_low_hz"),
    "high_corner": _a("f_high_hz"),
    "unity_gain": _a("unity_gain_hz"),
    "zin": _a("zin_ohm"),
    "zout": _a("zout_ohm"),
    "zin_at": lambda r, m: _signal_or_curve(r, "zin_ohm", "zin_curve_ohm", m.args["freq"]),
    "zout_at": lambda r, m: _signal_or_curve(r, "zout_ohm", "zout_curve_ohm", m.args["freq"]),
    "net_voltage": lambda r, m: float(_field(_field(_section(r, "op"), "nets", "op"),
                                             m.args["net"], "op.nets")),
    "supply_current": lambda r, m: _sum_supplies(r, "current_a"),
    "supply_power": lambda r, m: _sum_supplies(r, "power_w"),
    "input_noise_density": lambda r, m: _curve_at(r, "noise", "input_density_v_per_rthz",
                                                  m.args["freq"]),
    "output_noise_density": lambda r, m: _curve_at(r, "noise", "output_density_v_per_rthz",
                                                   m.args["freq"]),
    "input_noise_band": lambda r, m: _noise_band(r, *m.args["band"]),
    "input_noise": _f("noise", "input_rms_v"),
    "snr": _f("noise", "snr_db"),
    "noise_figure": _f("noise", "figure_db"),
    "thd_at": lambda r, m: _thd_at(r, m.args["amplitude"]),
    "thd": _f("transient", "thd_percent", 0.01),
    "output_swing": _f("transient", "max_swing_vpp"),
    "phase_margin": _f("feedback", "phase_margin_deg"),
    "gain_margin": _f("feedback", "gain_margin_db"),
    "crossover": _f("feedback", "crossover_hz"),
    "psrr_at": lambda r, m: _psrr(r, m.args["freq"]),
    "cmrr_at": lambda r, m: _curve_at(r, "feedback", "cmrr_db", m.args["freq"]),
    "overshoot": _f("feedback", "overshoot_percent", 0.01),
    "settling_time": _f("feedback", "settling_time_s"),
    "output_offset": _f("feedback", "output_offset_v"),
    "yield": _f("spread", "yield"),
    "drift": _drift,
}


def _noise_band(results: Results, low: float, high: float) -> float:
    noise = _section(results, "noise")
    band = noise.get("band_hz")
    if band and abs(band[0] - low) <= 1e-9 * low and abs(band[1] - high) <= 1e-9 * high:
        return float(_field(noise, "input_rms_v", "noise"))
    return band_rms(_field(noise, "freq_hz", "noise"),
                    _field(noise, "input_density_v_per_rthz", "noise"), low, high)


def evaluate(metric: Metric, results: Results) -> Value:
    """The value of ``metric`` read from ``results`` (or ``None`` with the reason)."""
    reader = _part if metric.form.startswith("part:") else READERS[metric.form]
    try:
        value = reader(results, metric)
    except _Missing as missing:
        return Value(None, metric.unit, str(missing))
    except (KeyError, TypeError, ValueError, IndexError) as exc:
        return Value(None, metric.unit, f"the results do not have this value ({exc!r})")
    if not math.isfinite(value):
        return Value(None, metric.unit, "the computed value is not a finite number")
    return Value(value, metric.unit)


def samples(
    metric: Metric, results: Results, across: str
) -> tuple[list[float | None] | None, str]:
    """Per-board (``across='boards'``) or per-temperature values of ``metric``, or (None, why)."""
    try:
        if across == "temperature":
            return temperature_samples(results, metric), ""
        return spread_samples(results, metric), ""
    except _Missing as missing:
        return None, str(missing)
