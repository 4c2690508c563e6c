"""The metric vocabulary: one small language naming every quantity docgen computes.

The same words are used in ``require`` lines, in live values in prose, in ``estimate`` lines and
in the history and diff tables.  The grammar is the table :data:`FORMS`: each form is a sequence
of literal words and slots (``{freq}``, ``{band}``, ``{amplitude}``, ``{part}``, ``{net}``,
``{metric}``), the results section it reads and its unit.  :func:`parse` turns text into a
:class:`Metric`; :func:`docgen.metric_values.evaluate` reads its value from a results dict.

Units: every metric value is in SI base units, decibels for gains and ratios in dB, degrees for
phase, and a plain fraction for quantities shown in percent (THD, yield, overshoot): the unit
``%`` means "a fraction, shown ×100".
"""

from __future__ import annotations

import re
from collections.abc import Iterable
from dataclasses import dataclass, field
from typing import Any

from docgen.diagnostics import did_you_mean
from docgen.units import QuantityError, parse_quantity


@dataclass(frozen=True, slots=True)
class Form:
    """One form of the grammar.

    :param pattern: literal words and slots separated by single spaces.
    :param name: the form's identifier (used by evaluation).
    :param section: the results section the value is read from.
    :param unit: the metric's unit (``None``: the unit of the part quantity or inner metric).
    :param meaning: one line for the docs.
    """

    pattern: str
    name: str
    section: str
    unit: str | None
    meaning: str

    @property
    def words(self) -> tuple[str, ...]:
        """The pattern split into words and slots."""
        return tuple(self.pattern.split(" "))


#: part quantity words → (key in ``op.parts[name]``, unit, the part kinds it applies to)
PART_QUANTITIES: dict[str, tuple[str, str, frozenset[str]]] = {
    "current": ("current_a", "A", frozenset({"resistor", "capacitor", "inductor", "supply",
                                               "signal", "current", "diode"})),
    "power": ("power_w", "W", frozenset({"resistor", "inductor", "supply", "diode", "npn", "pnp",
                                         "njfet", "pjfet", "nmos", "pmos", "opamp", "current"})),
    "voltage": ("voltage_v", "V", frozenset({"resistor", "capacitor", "inductor", "diode",
                                             "current"})),
    "collector current": ("ic_a", "A", frozenset({"npn", "pnp"})),
    "base current": ("ib_a", "A", frozenset({"npn", "pnp"})),
    "emitter current": ("ie_a", "A", frozenset({"npn", "pnp"})),
    "base-emitter voltage": ("vbe_v", "V", frozenset({"npn", "pnp"})),
    "collector-emitter voltage": ("vce_v", "V", frozenset({"npn", "pnp"})),
    "collector-base voltage": ("vcb_v", "V", frozenset({"npn", "pnp"})),
    "drain current": ("id_a", "A", frozenset({"njfet", "pjfet", "nmos", "pmos"})),
    "gate-source voltage": ("vgs_v", "V", frozenset({"njfet", "pjfet", "nmos", "pmos"})),
    "drain-source voltage": ("vds_v", "V", frozenset({"njfet", "pjfet", "nmos", "pmos"})),
    "output voltage": ("out_v", "V", frozenset({"opamp"})),
    "output current": ("iout_a", "A", frozenset({"opamp"})),
    "supply current": ("supply_current_a", "A", frozenset({"opamp"})),
}

_F = Form
#: The grammar.  Literal forms come before the ``{part} ...`` forms so that ``supply current``
#: is the design's total, not a part called "supply".
FORMS: tuple[Form, ...] = (
    _F("gain at {freq}", "gain_at", "ac", "dB", "gain from the source to the output at a "
       "frequency"),
    _F("phase at {freq}", "phase_at", "ac", "°", "phase of the gain at a frequency"),
    _F("midband gain", "midband_gain", "ac", "dB", "the largest gain over the sweep"),
    _F("low corner", "low_corner", "ac", "Hz", "lower −3.01 dB frequency"),
    _F("high corner", "high_corner", "ac", "Hz", "upper −3.01 dB frequency"),
    _F("unity-gain frequency", "unity_gain", "ac", "Hz", "where the gain falls to 0 dB"),
    _F("input impedance", "zin", "ac", "Ω", "input impedance magnitude at the signal frequency"),
    _F("input impedance at {freq}", "zin_at", "ac", "Ω", "input impedance magnitude at a "
       "frequency"),
    _F("output impedance", "zout", "ac", "Ω", "output impedance magnitude at the signal "
       "frequency"),
    _F("output impedance at {freq}", "zout_at", "ac", "Ω", "output impedance magnitude at a "
       "frequency"),
    _F("voltage at {net}", "net_voltage", "op", "V", "operating-point voltage of a net to gnd"),
    _F("supply current", "supply_current", "op", "A", "total current delivered by all supplies"),
    _F("supply power", "supply_power", "op", "W", "total power delivered by all supplies"),
    _F("input noise density at {freq}", "input_noise_density", "noise", "V/√Hz",
       "input-referred noise density at a frequency"),
    _F("output noise density at {freq}", "output_noise_density", "noise", "V/√Hz",
       "output noise density at a frequency"),
    _F("input noise {band}", "input_noise_band", "noise", "V",
       "input-referred rms noise over a band"),
    _F("input noise", "input_noise", "noise", "V", "input-referred rms noise over the bench "
       "noise band"),
    _F("signal-to-noise ratio", "snr", "noise", "dB", "bench signal (rms) over the noise in "
       "the band, both at the output"),
    _F("noise figure", "noise_figure", "noise", "dB", "noise figure for the source resistance "
       "(T0 = 290 K)"),
    _F("THD at {amplitude}", "thd_at", "transient", "%", "total harmonic distortion at an input "
       "amplitude"),
    _F("THD", "thd", "transient", "%", "total harmonic distortion at the bench amplitude"),
    _F("output swing", "output_swing", "transient", "V pp", "largest output swing within the "
       "distortion limit"),
    _F("phase margin", "phase_margin", "feedback", "°", "180° plus the loop phase at crossover"),
    _F("gain margin", "gain_margin", "feedback", "dB", "loop gain below 0 dB where its phase "
       "reaches −180°"),
    _F("crossover frequency", "crossover", "feedback", "Hz", "where the loop gain is 0 dB"),
    _F("PSRR at {freq}", "psrr_at", "feedback", "dB", "supply rejection at a frequency (the "
       "worst supply)"),
    _F("CMRR at {freq}", "cmrr_at", "feedback", "dB", "common-mode rejection at a frequency"),
    _F("overshoot", "overshoot", "feedback", "%", "step-response overshoot"),
    _F("settling time", "settling_time", "feedback", "s", "step-response settling time"),
    _F("output offset", "output_offset", "feedback", "V", "output DC error from offsets and "
       "bias currents"),
    _F("yield", "yield", "spread", "%", "fraction of boards meeting every requirement"),
    _F("drift of {metric}", "drift", "spread", None, "change of a metric over the bench "
       "ambient range (largest minus smallest)"),
    *(_F("{part} " + words, "part:" + words, "op", unit, f"a part's {words}")
      for words, (_key, unit, _kinds) in PART_QUANTITIES.items()),
)

SLOT_UNITS = {"freq": "Hz", "amplitude": "V"}
#: Abbreviations people type, and the vocabulary's whole words for them (for hints only).
SHORT_FORMS = {"SNR": "signal-to-noise ratio", "NF": "noise figure", "Zin": "input impedance",
               "Zout": "output impedance", "Ic": "collector current", "Vce": "collector-emitter "
               "voltage", "Vbe": "base-emitter voltage", "Id": "drain current",
               "f3dB": "low corner' or 'high corner", "PM": "phase margin", "GM": "gain margin"}
_NAME = re.compile(r"[A-Za-z][A-Za-z0-9_]*\Z")


class TextError(ValueError):
    """A problem in a short text: the 1-based column (within the text), width, message, hint."""

    def __init__(self, message: str, col: int, width: int = 1, hint: str | None = None):
        super().__init__(message)
        self.message = message
        self.col = col
        self.width = width
        self.hint = hint


class MetricError(TextError):
    """Text that is not a metric."""


@dataclass(frozen=True, slots=True)
class Metric:
    """A parsed metric.

    :param form: the form's name (``gain_at``, ``part:collector current``, ...).
    :param text: the text as written.
    :param key: the canonical spelling (single spaces, quantities in SI): spread and
        temperature sections key their per-sample values by it.
    :param unit: the unit of the value.
    :param section: the results section read.
    :param args: slot values: ``freq`` (Hz), ``band`` ((Hz, Hz)), ``amplitude`` (V peak),
        ``part``, ``net``, ``metric`` (the inner :class:`Metric` of ``drift of``).
    """

    form: str
    text: str
    key: str
    unit: str
    section: str
    args: dict[str, Any] = field(default_factory=dict, hash=False, compare=False)

    @property
    def sections(self) -> frozenset[str]:
        """Every results section this metric reads."""
        inner = self.args.get("metric")
        own = {self.section} | ({"spread"} if self.form == "drift" else set())
        return frozenset(own | (inner.sections if inner else set()))

    @property
    def quantity_key(self) -> str | None:
        """For part metrics, the key inside ``op.parts[part]`` (``ic_a``...)."""
        if self.form.startswith("part:"):
            return PART_QUANTITIES[self.form[5:]][0]
        return None


def _tokens(text: str) -> list[tuple[str, int]]:
    """Words of ``text`` with their 1-based columns."""
    return [(m.group(), m.start() + 1) for m in re.finditer(r"\S+", text)]


def _quantity(tokens: list[tuple[str, int]], i: int, unit: str) -> tuple[float, int] | None:
    """A number with an SI prefix and ``unit`` starting at token ``i``: (value, tokens used)."""
    for used in (1, 2):
        if i + used > len(tokens):
            return None
        try:
            quantity = parse_quantity(" ".join(word for word, _ in tokens[i:i + used]))
        except QuantityError:
            continue
        if quantity.unit != unit:
            continue
        value = quantity.value
        if unit == "V" and i + used < len(tokens) and tokens[i + used][0] in ("rms", "pp"):
            value *= 2 ** 0.5 if tokens[i + used][0] == "rms" else 0.5
            used += 1
        return value, used
    return None


def _format_number(value: float) -> str:
    return f"{value:.6g}"


def _match(form: Form, tokens: list[tuple[str, int]], text: str) -> tuple[dict, int, set]:
    """Match ``form``; return (args, tokens matched, words expected at the failure point)."""
    args: dict[str, Any] = {}
    i = 0
    for word in form.words:
        if word.startswith("{"):
            slot = word[1:-1]
            if slot == "metric":
                if i >= len(tokens):
                    return args, i, {"<metric>"}
                args["metric"] = parse(text[tokens[i][1] - 1:], _offset=tokens[i][1] - 1)
                return args, len(tokens), set()
            if slot in ("part", "net"):
                if i >= len(tokens) or not _NAME.match(tokens[i][0]):
                    return args, i, {f"<{slot}>"}
                args[slot] = tokens[i][0]
                i += 1
                continue
            if slot == "band":
                low = _quantity(tokens, i, "Hz")
                sep = i + low[1] if low else i
                high = _quantity(tokens, sep + 1, "Hz") if low else None
                if not (low and sep < len(tokens) and tokens[sep][0] == ".." and high):
                    return args, i, {"<frequency> .. <frequency>"}
                args["band"] = (low[0], high[0])
                i = sep + 1 + high[1]
                continue
            found = _quantity(tokens, i, SLOT_UNITS[slot])
            if not found:
                return args, i, {f"<{slot}>"}
            args[slot] = found[0]
            i += found[1]
            continue
        if i >= len(tokens) or tokens[i][0] != word:
            return args, i, {word}
        i += 1
    if i < len(tokens):
        return args, i, {"<end>"}
    return args, i, set()


def _key(form: Form, args: dict[str, Any]) -> str:
    out = []
    for word in form.words:
        slot = word[1:-1] if word.startswith("{") else None
        if slot in ("freq", "amplitude"):
            out.append(f"{_format_number(args[slot])} {SLOT_UNITS[slot]}")
        elif slot == "band":
            low, high = args["band"]
            out.append(f"{_format_number(low)} Hz .. {_format_number(high)} Hz")
        elif slot == "metric":
            out.append(args["metric"].key)
        elif slot:
            out.append(args[slot])
        else:
            out.append(word)
    return " ".join(out)


def _vocabulary_words() -> set[str]:
    return {w for f in FORMS for w in f.words if not w.startswith("{")}


def parse(text: str, *, _offset: int = 0) -> Metric:
    """Parse metric ``text``; raise :class:`MetricError` naming the column of the first word
    no form accepts, with a close spelling from the vocabulary when there is one."""
    tokens = _tokens(text)
    if not tokens:
        raise MetricError("empty metric", _offset + 1, 1, "write a metric such as 'gain at 1 kHz'")
    failures: list[tuple[int, set[str], bool]] = []
    for form in FORMS:
        args, reached, wanted = _match(form, tokens, text)
        if not wanted:
            inner = args.get("metric")
            if inner is not None and inner.form == "drift":
                raise MetricError("'drift of' cannot be nested", _offset + tokens[2][1], 5)
            unit = form.unit or (inner.unit if inner else PART_QUANTITIES[form.name[5:]][1])
            return Metric(form.name, text.strip(), _key(form, args), unit, form.section, args)
        failures.append((reached, wanted, form.words[0] == "{part}"))
    best = max(reached for reached, _, _ in failures)
    literal = set().union(*(w for r, w, by_part in failures if r == best and not by_part))
    expected = literal or set().union(*(w for r, w, _ in failures if r == best))
    first_words = {f.words[0] for f in FORMS if not f.words[0].startswith("{")}
    if not literal and best == 1 and (len(tokens) == 1 or did_you_mean(tokens[0][0], first_words)):
        best, expected = 0, first_words  # 'gian at 1 kHz' is a misspelling, not a part
    raise _unknown(tokens, best, expected, _offset)


def _unknown(
    tokens: list[tuple[str, int]], at: int, expected: set[str], offset: int
) -> MetricError:
    literal = sorted(w for w in expected if not w.startswith("<"))
    if at >= len(tokens):
        col = tokens[-1][1] + len(tokens[-1][0])
        wanted = " or ".join(_SLOT_WORDS.get(w, f"'{w}'") for w in sorted(expected)[:4])
        return MetricError(f"metric ends too early; expected {wanted}", offset + col, 1)
    word, col = tokens[at]
    if expected == {"<end>"}:
        return MetricError(f"unexpected '{word}' after the metric", offset + col, len(word),
                           "remove the extra words")
    slots = [_SLOT_WORDS[w] for w in sorted(expected) if w in _SLOT_WORDS]
    if slots and not literal:
        return MetricError(f"expected {' or '.join(slots)} at '{word}'", offset + col, len(word),
                           _quantity_hint(tokens[at:at + 2]))
    hint = (f"write '{SHORT_FORMS[word]}'" if word in SHORT_FORMS
            else did_you_mean(word, literal or _vocabulary_words()))
    return MetricError(f"unknown word '{word}' in metric", offset + col, len(word),
                       hint or "see the Metrics section of docs/format.md")


_SLOT_WORDS = {"<freq>": "a frequency such as '1 kHz'",
               "<amplitude>": "an amplitude such as '100 mV'",
               "<frequency> .. <frequency>": "a band such as '20 Hz .. 20 kHz'",
               "<part>": "a part name", "<net>": "a net name", "<metric>": "a metric"}


def _quantity_hint(tokens: list[tuple[str, int]]) -> str:
    """What the units module says about a quantity that did not read, else a general hint."""
    for used in (2, 1):
        try:
            parse_quantity(" ".join(word for word, _ in tokens[:used]))
        except QuantityError as exc:
            if exc.hint:
                return exc.hint
    return "write a number with an SI prefix and a unit, e.g. '1 kHz' or '100 mV'"


def unknown_names(metric: Metric, parts: dict[str, str], nets: Iterable[str]) -> list[str]:
    """Problems with the names a metric uses, given ``parts`` {name: kind} and the nets.

    Returns messages (empty when all is well), each with a close spelling where one exists.
    """
    inner = metric.args.get("metric")
    if inner is not None:
        return unknown_names(inner, parts, nets)
    problems = []
    if "net" in metric.args and metric.args["net"] not in set(nets):
        net = metric.args["net"]
        hint = did_you_mean(net, nets)
        problems.append(f"no net called '{net}'" + (f"; {hint}" if hint else ""))
    if "part" in metric.args:
        part = metric.args["part"]
        if part not in parts:
            hint = did_you_mean(part, parts)
            problems.append(f"no part called '{part}'" + (f"; {hint}" if hint else ""))
        else:
            words = metric.form[5:]
            kinds = PART_QUANTITIES[words][2]
            if parts[part] not in kinds:
                problems.append(f"a {parts[part]} has no {words} ('{part}' is a {parts[part]})")
    return problems


def sections_needed(metrics: Iterable[Metric | str | Any]) -> set[str]:
    """The results sections the metrics read, with the sections those analyses build on.

    Items may be :class:`Metric`, metric text, or requirements (anything with a ``metric``
    text and an ``across`` tuple); text that does not parse is skipped (the checker reports
    it).  A requirement held ``across`` boards or temperature needs the spread analysis.
    """
    needed = {"op"}
    for item in metrics:
        if getattr(item, "across", None):
            needed.add("spread")
        text = item if isinstance(item, str) else getattr(item, "metric", None)
        if isinstance(text, str):
            try:
                item = parse(text)
            except MetricError:
                continue
        needed |= item.sections
    if needed & {"noise", "feedback", "spread"}:
        needed.add("ac")
    return needed
