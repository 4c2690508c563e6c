"""Value text in and out: SI quantities, the IEC 60062 code, percentages and engineering notation.

The one place where docgen turns text into numbers and numbers into text.  Inside docgen every
value is a float in SI base units; this module is the edge.

- Prefixes are case-sensitive as the SI Brochure (BIPM) defines them: ``f p n u/µ m k M G T``.
- The letter-and-digit code of IEC 60062 (``4k7``, ``2R2``, ``R47``, ``4n7``, ``1M5``) is read
  as the same number.
- Errors are :class:`QuantityError` (a ``ValueError``) with the offset of the offending
  characters inside the text, so the reader can point at the column.
- Negative numbers are written with the real minus sign U+2212 on output; both it and the
  hyphen are accepted on input.
"""

from __future__ import annotations

import math
import re
from collections.abc import Iterable, Mapping
from dataclasses import dataclass

import numpy as np

from docgen.diagnostics import did_you_mean

MINUS = "\u2212"

#: SI prefixes accepted on input (SI Brochure, BIPM); ``u`` is the ASCII spelling of micro.
PREFIXES: dict[str, float] = {
    "f": 1e-15, "p": 1e-12, "n": 1e-9, "u": 1e-6, "µ": 1e-6, "μ": 1e-6,
    "m": 1e-3, "k": 1e3, "M": 1e6, "G": 1e9, "T": 1e12,
}

#: canonical unit -> the spellings accepted for it.
UNIT_SPELLINGS: dict[str, tuple[str, ...]] = {
    "Ω": ("Ω", "\u2126", "ohm", "ohms", "Ohm", "Ohms"),
    "F": ("F",), "H": ("H",), "V": ("V",), "A": ("A",), "W": ("W",), "Hz": ("Hz",),
    "s": ("s",), "dB": ("dB",), "%": ("%",), "°": ("°", "deg"),
    "°C": ("°C", "degC", "\u2103"), "K": ("K",), "ppm": ("ppm",),
    "ppm/K": ("ppm/K", "ppm/°C", "ppm/degC"),
    "V/s": ("V/s",), "1/V": ("1/V",), "A/V²": ("A/V²", "A/V^2", "A/V2"),
    "V/√Hz": ("V/√Hz", "V/rtHz"), "A/√Hz": ("A/√Hz", "A/rtHz"), "eV": ("eV",),
}

#: units that take an SI prefix (the others are written as they are: ``3 dB``, ``25 °C``).
PREFIXABLE = frozenset({"Ω", "F", "H", "V", "A", "W", "Hz", "s", "V/s", "1/V", "A/V²",
                        "V/√Hz", "A/√Hz", "eV"})

_SPELLING_TO_UNIT = {s: unit for unit, spellings in UNIT_SPELLINGS.items() for s in spellings}

_NUMBER = r"[+\-\u2212]?(?:\d+\.?\d*|\.\d+)(?:[eE][+\-]?\d+)?"
_NUMBER_RE = re.compile(rf"^(?P<num>{_NUMBER})(?P<rest>.*)$", re.S)
# IEC 60062: digits, a multiplier letter standing for the decimal point, digits (4k7, R47, 2R2).
_CODE_RE = re.compile(r"^(?P<sign>[+\-\u2212]?)(?P<head>\d*)(?P<letter>[RpnuµμmkMGT])"
                      r"(?P<tail>\d*) ?(?P<unit>[^\d\s.].*)?$")


class QuantityError(ValueError):
    """A value text that cannot be read.

    :param message: what is wrong.
    :param hint: how to fix it, or ``None``.
    :param offset: 0-based offset of the offending characters within the text.
    :param width: how many characters are wrong.
    """

    def __init__(self, message: str, hint: str | None = None, offset: int = 0, width: int = 0):
        super().__init__(message)
        self.message = message
        self.hint = hint
        self.offset = offset
        self.width = width


@dataclass(frozen=True, slots=True)
class Quantity:
    """A number read from text: its SI value and the canonical unit written (``""`` if none)."""

    value: float
    unit: str


def _number(text: str) -> float:
    return float(text.replace(MINUS, "-"))


def _scaled(number: str, scale: float) -> float:
    """``number × scale`` computed in decimal, so ``4n7`` is exactly the float of 4.7e-9."""
    if scale == 1.0 or "e" in number.lower():
        return _number(number) * scale
    return float(f"{number.replace(MINUS, '-')}e{round(math.log10(scale))}")


def _unit_part(rest: str, offset: int, number: str) -> tuple[float, str]:
    """(multiplier, canonical unit) for the text after the number."""
    if rest == "":
        return 1.0, ""
    if rest in _SPELLING_TO_UNIT:
        return 1.0, _SPELLING_TO_UNIT[rest]
    if rest in PREFIXES:
        return PREFIXES[rest], ""
    head, tail = rest[0], rest[1:]
    if head in PREFIXES and tail in _SPELLING_TO_UNIT:
        unit = _SPELLING_TO_UNIT[tail]
        if unit not in PREFIXABLE:
            raise QuantityError(f"'{tail}' does not take an SI prefix", f"write '{number} {tail}'",
                                offset, len(rest))
        return PREFIXES[head], unit
    raise _unknown_unit(rest, offset, number)


def _unknown_unit(rest: str, offset: int, number: str) -> QuantityError:
    width = len(rest)
    if rest.lower().startswith("meg"):
        fixed = f"{number}M{rest[3:]}"
        return QuantityError(f"'{rest[:3]}' is not an SI prefix", f"did you mean '{fixed}'?",
                             offset, 3)
    if rest[0] == "K" and (rest[1:] == "" or rest[1:] in _SPELLING_TO_UNIT):
        return QuantityError("'K' is the kelvin, not a prefix; kilo is a lower-case 'k'",
                             f"did you mean '{number}k{rest[1:]}'?", offset, 1)
    if rest[0] == "U" and (rest[1:] == "" or rest[1:] in _SPELLING_TO_UNIT):
        return QuantityError("'U' is not an SI prefix; micro is 'u' or 'µ'",
                             f"did you mean '{number}u{rest[1:]}'?", offset, 1)
    if rest.endswith(("pp", "rms")) and rest not in ("pp", "rms"):
        qualifier = "pp" if rest.endswith("pp") else "rms"
        return QuantityError(f"unknown unit '{rest}'",
                             f"write '{number} {rest[: -len(qualifier)]} {qualifier}'",
                             offset, width)
    if rest == "C":
        return QuantityError("'C' is the coulomb; a temperature is written in °C, degC or K",
                             f"did you mean '{number} °C'?", offset, 1)
    spellings = list(_SPELLING_TO_UNIT) + [p + s for p in ("k", "M", "m", "u", "n", "p")
                                           for s in ("Ω", "ohm", "F", "H", "V", "A", "Hz")]
    hint = did_you_mean(rest, spellings)
    return QuantityError(f"unknown unit '{rest}'", hint, offset, width)


def parse_quantity(text: str) -> Quantity:
    """Read ``text`` (``2.2 kΩ``, ``4k7``, ``100n``, ``5 mV``, ``25 °C``) as a :class:`Quantity`.

    The unit is optional and may follow the number after one space.  Raises
    :class:`QuantityError` for anything else.
    """
    stripped = text.strip()
    lead = len(text) - len(text.lstrip())
    if not stripped:
        raise QuantityError("a value is missing", None, 0, max(1, len(text)))
    code = _CODE_RE.match(stripped)
    if code and (code["head"] or code["tail"]) and (code["tail"] or code["letter"] == "R"):
        number = f"{code['sign']}{code['head'] or '0'}.{code['tail'] or '0'}"
        letter = code["letter"]
        scale = 1.0 if letter == "R" else PREFIXES[letter]
        unit = ""
        if code["unit"]:
            offset = lead + code.start("unit")
            if code["unit"] not in _SPELLING_TO_UNIT:
                raise _unknown_unit(code["unit"], offset, stripped[: code.start("unit")])
            unit = _SPELLING_TO_UNIT[code["unit"]]
        return Quantity(_scaled(number, scale), unit)
    match = _NUMBER_RE.match(stripped)
    if not match:
        hint = "a value starts with a number, e.g. '4.7k' or '4k7'"
        if stripped.lower().lstrip("+-\u2212") in ("inf", "infinity", "∞"):
            hint = "leave the setting out: its default is the neutral value (infinite here)"
        raise QuantityError(f"'{stripped}' is not a number", hint, lead, len(stripped))
    number = match["num"]
    rest = match["rest"]
    offset = lead + match.start("rest")
    if rest.startswith(" "):
        offset += len(rest) - len(rest.lstrip(" "))
        rest = rest.lstrip(" ")
    scale, unit = _unit_part(rest, offset, number)
    return Quantity(_scaled(number, scale), unit)


def parse_value(text: str, unit: str | Iterable[str], what: str = "this value") -> Quantity:
    """Read a quantity whose unit, if written, must be ``unit`` (or one of several).

    A value without a unit is taken in the first expected unit.  ``what`` names the thing for
    the error message (``"a resistor's value"``).
    """
    allowed = (unit,) if isinstance(unit, str) else tuple(unit)
    quantity = parse_quantity(text)
    if quantity.unit == "":
        return Quantity(quantity.value, allowed[0])
    if quantity.unit not in allowed:
        expected = " or ".join(a or "a plain number" for a in allowed)
        offset = len(text.rstrip()) - _unit_width(text)
        hint = None
        if quantity.unit == "K" and "K" not in allowed:
            hint = "kilo is a lower-case 'k'"
        raise QuantityError(f"unit '{quantity.unit}' does not fit {what} (expected {expected})",
                            hint, offset, _unit_width(text))
    return quantity


def _unit_width(text: str) -> int:
    """Width of the trailing unit letters of a value text (for the caret)."""
    stripped = text.rstrip()
    i = len(stripped)
    while i > 0 and not (stripped[i - 1].isdigit() or stripped[i - 1] in ". "):
        i -= 1
    return max(1, len(stripped) - i)


def parse_temperature(text: str) -> float:
    """A temperature in °C (``25 °C``, ``25 degC``, ``298.15 K``); a unit is required."""
    quantity = parse_quantity(text)
    if quantity.unit == "°C":
        return quantity.value
    if quantity.unit == "K":
        return quantity.value - 273.15
    if quantity.unit == "":
        raise QuantityError("a temperature needs its unit", f"write '{text.strip()} °C'",
                            0, len(text.strip()))
    raise QuantityError(f"unit '{quantity.unit}' is not a temperature unit (°C, degC or K)",
                        None, 0, len(text.strip()))


def parse_percent(text: str) -> float:
    """A percentage (``1%``, ``±1 %``, ``+-0.5%``) as a fraction (``0.01``)."""
    body = text.strip()
    for sign in ("±", "+-", "+/-"):
        if body.startswith(sign):
            body = body[len(sign):].lstrip()
            break
    if not body.endswith("%"):
        raise QuantityError(f"'{text.strip()}' is not a percentage", "write it as e.g. '1%'",
                            0, len(text.strip()))
    number = body[:-1].strip()
    if not re.fullmatch(_NUMBER, number):
        raise QuantityError(f"'{text.strip()}' is not a percentage", "write it as e.g. '1%'",
                            0, len(text.strip()))
    return _number(number) / 100.0


def parse_ppm(text: str) -> float:
    """A temperature coefficient (``100ppm``, ``50 ppm/K``) as a fraction per kelvin."""
    quantity = parse_quantity(text)
    if quantity.unit not in ("ppm", "ppm/K"):
        raise QuantityError(f"'{text.strip()}' is not a temperature coefficient",
                            "write it in ppm, e.g. '100ppm'", 0, len(text.strip()))
    return float(f"{quantity.value!r}e-6")


# ---------------------------------------------------------------- output

_OUT_PREFIXES = [(1e12, "T"), (1e9, "G"), (1e6, "M"), (1e3, "k"), (1.0, ""), (1e-3, "m"),
                 (1e-6, "µ"), (1e-9, "n"), (1e-12, "p"), (1e-15, "f")]


def _plain(value: float, digits: int) -> str:
    """``value`` to ``digits`` significant figures without trailing zeros or exponent."""
    if value == 0:
        return "0"
    decimals = max(0, digits - 1 - math.floor(math.log10(abs(value))))
    text = f"{value:.{decimals}f}"
    if "." in text:
        text = text.rstrip("0").rstrip(".")
    return text


def format_eng(value: float | None, unit: str = "", digits: int = 3) -> str:
    """Engineering notation: ``4.7 kΩ``, ``2.2 µF``, ``−3 dB``, ``25 °C``.

    ``digits`` significant figures, trailing zeros dropped, the real minus sign for negative
    numbers.  Units that take no prefix (dB, %, °, °C, ppm) are printed plainly.  ``None`` and
    NaN print as ``n/a``, infinities as ``∞``.
    """
    suffix = f" {unit}" if unit else ""
    if value is None or (isinstance(value, float) and math.isnan(value)):
        return "n/a"
    value = float(value)
    if math.isinf(value):
        return ("" if value > 0 else MINUS) + "∞" + suffix
    sign = MINUS if value < 0 else ""
    magnitude = abs(float(f"{abs(value):.{digits - 1}e}"))  # rounded first, then scaled
    if unit and unit not in PREFIXABLE:
        return f"{sign}{_plain(magnitude, digits)}{suffix}"
    if magnitude == 0:
        return f"0{suffix}"
    chosen = next(((s, p) for s, p in _OUT_PREFIXES if magnitude >= s * (1 - 1e-12)), None)
    if chosen is None:  # below the femto range: plain scientific notation
        mantissa, exponent = f"{magnitude:.{digits - 1}e}".split("e")
        return f"{sign}{_plain(float(mantissa), digits)}e{int(exponent)}{suffix}"
    scale, prefix = chosen
    text = _plain(magnitude / scale, digits)
    if unit:
        return f"{sign}{text} {prefix}{unit}"
    return f"{sign}{text}{prefix}"


def round_sig(x: float, n: int = 6) -> float:
    """``x`` rounded to ``n`` significant figures (0, infinities and NaN unchanged)."""
    x = float(x)
    if x == 0 or not math.isfinite(x):
        return x
    return float(f"{x:.{n - 1}e}")


def round_results(obj: object, n: int = 6) -> object:
    """A copy of a results structure with every float rounded to ``n`` significant figures.

    Dicts, lists and tuples are walked (tuples become lists, as JSON has them); numpy scalars
    and arrays become plain Python numbers and lists.  Ints, bools, strings and ``None`` pass.
    NaN and infinities become ``None`` (JSON has no such numbers; results files say ``null``
    for a value that does not exist).
    """
    if isinstance(obj, bool) or obj is None or isinstance(obj, str):
        return obj
    if isinstance(obj, (float, np.floating)):
        return round_sig(float(obj), n) if math.isfinite(obj) else None
    if isinstance(obj, (int, np.integer)):
        return int(obj)
    if isinstance(obj, np.ndarray):
        return round_results(obj.tolist(), n)
    if isinstance(obj, Mapping):
        return {key: round_results(value, n) for key, value in obj.items()}
    if isinstance(obj, (list, tuple)):
        return [round_results(item, n) for item in obj]
    if isinstance(obj, np.bool_):
        return bool(obj)
    return obj
