"""The one registry of device model parameters: names, units, neutral defaults and meaning.

The reader validates ``models`` lines against it, the solver takes defaults from it and the
format reference is generated from it.  Parameter names are whole descriptive words of
docgen's own; the physics behind them keeps its published names (Shockley, Ebers–Moll,
Shichman–Hodges).  A parameter a model omits takes its *neutral* value, the one that switches
the effect off, and pages list it as "assumed".
"""

from __future__ import annotations

import math
from dataclasses import dataclass


@dataclass(frozen=True, slots=True)
class ParamSpec:
    """One model parameter.

    :param name: the parameter's name in ``models`` lines.
    :param unit: SI unit symbol the value is given in (``""`` for a plain number).
    :param default: the neutral value used when a model omits it.
    :param meaning: one sentence for the docs, naming the published model it belongs to.
    :param positive: the value must be > 0 (checked by the reader).
    """

    name: str
    unit: str
    default: float
    meaning: str
    positive: bool = False


INF = math.inf


def _p(name: str, unit: str, default: float, meaning: str, positive: bool = False) -> ParamSpec:
    return ParamSpec(name, unit, default, meaning, positive)


_JUNCTION_TEMPERATURE = [
    _p("bandgap_energy", "eV", 1.11, "bandgap used in the saturation current's temperature "
       "dependence (silicon 1.11 eV)", True),
    _p("saturation_current_exponent", "", 3.0, "exponent of T in the saturation current's "
       "temperature dependence"),
    _p("flicker_corner", "Hz", 0.0, "1/f noise corner frequency of the device's current noise "
       "(0: no 1/f noise)"),
]

_BIPOLAR = [
    _p("saturation_current", "A", 1e-16, "transport saturation current IS of the Ebers–Moll "
       "model", True),
    _p("beta", "", 100.0, "forward current gain βF (IC/IB in the active region)", True),
    _p("beta_reverse", "", 1.0, "reverse current gain βR", True),
    _p("early_voltage", "V", INF, "forward Early voltage VA (output resistance ro = VA/IC)", True),
    _p("ideality", "", 1.0, "emission coefficient of the base–emitter junction", True),
    _p("transition_frequency", "Hz", INF, "transition frequency fT; sets Cπ + Cμ = gm/(2π fT)",
       True),
    _p("base_collector_capacitance", "F", 0.0, "base–collector (Miller) capacitance Cμ"),
    _p("base_resistance", "Ω", 0.0, "ohmic base spreading resistance rb"),
    _p("beta_temperature_exponent", "", 0.0, "β varies as (T/T0) to this power"),
    *_JUNCTION_TEMPERATURE,
    _p("max_power", "W", INF, "rating: largest continuous dissipation", True),
    _p("max_collector_emitter_voltage", "V", INF, "rating: largest collector–emitter voltage",
       True),
    _p("max_collector_current", "A", INF, "rating: largest continuous collector current", True),
]

_DIODE = [
    _p("saturation_current", "A", 1e-14, "saturation current IS of the Shockley equation", True),
    _p("ideality", "", 1.0, "emission coefficient n of the Shockley equation", True),
    _p("series_resistance", "Ω", 0.0, "ohmic series resistance"),
    _p("breakdown_voltage", "V", INF, "reverse breakdown voltage (infinite: no breakdown)", True),
    _p("junction_capacitance", "F", 0.0, "small-signal junction capacitance"),
    *_JUNCTION_TEMPERATURE,
    _p("max_power", "W", INF, "rating: largest continuous dissipation", True),
    _p("max_reverse_voltage", "V", INF, "rating: largest reverse voltage", True),
    _p("max_current", "A", INF, "rating: largest continuous forward current", True),
]

# Shared by junction and insulated-gate FETs (after each kind's own square-law pair).
_FET_COMMON = [
    _p("channel_length_modulation", "1/V", 0.0, "λ: drain current grows as (1 + λ·VDS)"),
    _p("gate_source_capacitance", "F", 0.0, "small-signal gate–source capacitance Cgs"),
    _p("gate_drain_capacitance", "F", 0.0, "small-signal gate–drain capacitance Cgd"),
    _p("flicker_corner", "Hz", 0.0, "1/f noise corner of the channel noise (0: none)"),
    _p("max_power", "W", INF, "rating: largest continuous dissipation", True),
    _p("max_drain_source_voltage", "V", INF, "rating: largest drain–source voltage", True),
]

_JFET = [
    _p("drain_saturation_current", "A", 1e-3, "IDSS: drain current at VGS = 0 in saturation "
       "(Shichman–Hodges square law)", True),
    _p("pinch_off_voltage", "V", 2.0, "magnitude of the pinch-off voltage |VP|", True),
    *_FET_COMMON,
]

_MOSFET = [
    _p("threshold_voltage", "V", 2.0, "magnitude of the threshold voltage |VT|", True),
    _p("transconductance_coefficient", "A/V²", 0.1, "K in the square law ID = K·(VGS − VT)² "
       "(Shichman–Hodges)", True),
    *_FET_COMMON,
]

_OPAMP = [
    _p("open_loop_gain", "", 1e5, "DC open-loop voltage gain A0 (V/V)", True),
    _p("gain_bandwidth", "Hz", 1e6, "gain–bandwidth product; sets the dominant pole at "
       "GBW/A0", True),
    _p("input_offset_voltage", "V", 0.0, "input offset voltage Vos (added at in+)"),
    _p("input_bias_current", "A", 0.0, "current into each input"),
    _p("input_offset_current", "A", 0.0, "difference of the two input bias currents"),
    _p("output_resistance", "Ω", 0.0, "open-loop output resistance"),
    _p("output_headroom", "V", 0.0, "closest approach of the output to each supply pin"),
    _p("input_headroom", "V", 0.0, "closest approach of the input common-mode voltage to each "
       "supply pin"),
    _p("slew_rate", "V/s", INF, "largest rate of change of the output", True),
    _p("supply_current", "A", 0.0, "quiescent supply current"),
    _p("voltage_noise_density", "V/√Hz", 0.0, "input voltage noise density (white)"),
    _p("current_noise_density", "A/√Hz", 0.0, "input current noise density per input (white)"),
    _p("flicker_corner", "Hz", 0.0, "1/f corner of the voltage noise (0: none)"),
    _p("max_supply_voltage", "V", INF, "rating: largest total supply voltage v+ − v−", True),
]

MODEL_KINDS: dict[str, dict[str, ParamSpec]] = {
    "diode": {p.name: p for p in _DIODE},
    "npn": {p.name: p for p in _BIPOLAR},
    "pnp": {p.name: p for p in _BIPOLAR},
    "njfet": {p.name: p for p in _JFET},
    "pjfet": {p.name: p for p in _JFET},
    "nmos": {p.name: p for p in _MOSFET},
    "pmos": {p.name: p for p in _MOSFET},
    "opamp": {p.name: p for p in _OPAMP},
}


def defaults(kind: str) -> dict[str, float]:
    """The neutral value of every parameter of a model kind."""
    return {name: spec.default for name, spec in MODEL_KINDS[kind].items()}
