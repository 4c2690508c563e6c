"""The part kinds a ``circuit`` block may use: their terminals, value unit and settings.

One table serves the reader (what may be written), elaboration (how parts map to devices),
the drawing (terminal names) and the docs.
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True, slots=True)
class KindSpec:
    """What a part kind accepts.

    :param terminals: canonical terminal names; two-terminal kinds use ``p`` and ``n`` (the
        first and second net as written), multi-terminal kinds are connected by name.
    :param value_unit: the SI unit symbol of the primary value, or ``None`` if the part takes a
        model name instead of a value.
    :param rating_unit: unit of the rating field (``W`` or ``V``) or ``None``.
    :param params: allowed ``key=value`` settings and the unit each takes (``""`` = plain
        number, ``"flag"`` = ``yes``/``no``).
    :param model_kind: the kind of model the part refers to (``npn`` for ``npn``...).
    :param meaning: one line for the docs.
    """

    terminals: tuple[str, ...]
    value_unit: str | None
    rating_unit: str | None
    params: dict[str, str]
    model_kind: str | None
    meaning: str

    @property
    def two_terminal(self) -> bool:
        """True for parts connected by position (two nets after the colon)."""
        return self.terminals == ("p", "n")


TWO = ("p", "n")

KINDS: dict[str, KindSpec] = {
    "resistor": KindSpec(TWO, "Ω", "W", {"tempco": "ppm/K"}, None, "a resistor"),
    "capacitor": KindSpec(
        TWO, "F", "V", {"tempco": "ppm/K", "polarised": "flag"}, None,
        "a capacitor; polarised=yes marks an electrolytic (first net is +)",
    ),
    "inductor": KindSpec(TWO, "H", None, {"resistance": "Ω"}, None, "an inductor with optional "
                         "series resistance"),
    "supply": KindSpec(TWO, "V", None, {"resistance": "Ω"}, None,
                       "a DC voltage source, positive net first"),
    "signal": KindSpec(TWO, "V", None, {"source": "Ω", "offset": "V"}, None,
                       "the stimulus: amplitude and frequency, positive net first"),
    "current": KindSpec(TWO, "A", None, {}, None,
                        "a DC current source; current flows through it from first net to second"),
    "diode": KindSpec(("anode", "cathode"), None, None, {}, "diode", "a junction diode"),
    "npn": KindSpec(("c", "b", "e"), None, None, {}, "npn", "an npn bipolar transistor"),
    "pnp": KindSpec(("c", "b", "e"), None, None, {}, "pnp", "a pnp bipolar transistor"),
    "njfet": KindSpec(("d", "g", "s"), None, None, {}, "njfet", "an n-channel JFET"),
    "pjfet": KindSpec(("d", "g", "s"), None, None, {}, "pjfet", "a p-channel JFET"),
    "nmos": KindSpec(("d", "g", "s"), None, None, {}, "nmos", "an n-channel enhancement MOSFET"),
    "pmos": KindSpec(("d", "g", "s"), None, None, {}, "pmos", "a p-channel enhancement MOSFET"),
    "opamp": KindSpec(("in+", "in-", "out", "v+", "v-"), None, None, {}, "opamp",
                      "an operational amplifier with supply pins"),
}

# Diodes connect by position (anode first) although their terminals carry names.
POSITIONAL = {"diode"}

GROUND = "gnd"


def connects_by_position(kind: str) -> bool:
    """True when the kind's nets are written in order, not as ``terminal=net``."""
    return KINDS[kind].two_terminal or kind in POSITIONAL
