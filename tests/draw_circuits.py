"""Hand-written amplifier circuits for the drawing tests, built as ``Design`` objects directly.

Each is a textbook topology (Sedra & Smith, *Microelectronic Circuits*, ch. on BJT and FET
amplifier configurations; Horowitz & Hill, *The Art of Electronics*, ch. 2–4), with invented
values: only the connections matter to the drawing.
"""

from __future__ import annotations

from docgen.design import Bench, Block, Design, Header, Part
from docgen.diagnostics import Span
from docgen.kinds import KINDS, connects_by_position


def part(line: int, name: str, kind: str, value: float | None, *nets: str,
         **params: float) -> Part:
    """A part; ``nets`` by position for two-terminal kinds, ``t=net`` strings otherwise."""
    if connects_by_position(kind):
        terminals = tuple(zip(KINDS[kind].terminals, nets, strict=True))
    else:
        pairs = dict(n.split("=", 1) for n in nets)
        terminals = tuple((t, pairs[t]) for t in KINDS[kind].terminals)
    model = f"generic-{kind}" if KINDS[kind].model_kind else None
    return Part(name, kind, value, None, model, None, None, params, terminals, Span(line, 1))


def design(name: str, parts: list[Part], output: str, layout: str | None = None) -> Design:
    """A design page around ``parts`` with a bench naming the signal source and output."""
    source = [p.name for p in parts if p.kind == "signal"]
    blocks: tuple[Block, ...] = ()
    text = ""
    if layout is not None:
        text = "```layout\n" + layout + "\n```\n"
        blocks = (Block("layout", layout, 2),)
    return Design(f"{name}.md", "design", Header(title=name), tuple(parts),
                  bench=Bench(input=source[0] if source else None, output=output),
                  blocks=blocks, source=text)


def common_emitter() -> Design:
    """CE stage, divider bias, emitter resistor with bypass capacitor, coupled output."""
    return design("common-emitter", [
        part(1, "VB", "supply", 15, "vbat", "gnd"),
        part(2, "VS", "signal", 3e-3, "sens", "gnd", frequency=2e3),
        part(3, "CI", "capacitor", 2.2e-6, "sens", "b1"),
        part(4, "RT", "resistor", 150e3, "vbat", "b1"),
        part(5, "RB", "resistor", 33e3, "b1", "gnd"),
        part(6, "RC", "resistor", 8.2e3, "vbat", "c1"),
        part(7, "RE", "resistor", 1.8e3, "e1", "gnd"),
        part(8, "CE", "capacitor", 47e-6, "e1", "gnd", polarised=1.0),
        part(9, "Q1", "npn", None, "c=c1", "b=b1", "e=e1"),
        part(10, "CO", "capacitor", 1e-6, "c1", "out"),
        part(11, "RL", "resistor", 47e3, "out", "gnd"),
    ], "out")


def emitter_follower() -> Design:
    """Emitter follower with divider bias."""
    return design("emitter-follower", [
        part(1, "VB", "supply", 12, "vcc", "gnd"),
        part(2, "VS", "signal", 0.1, "in", "gnd", frequency=1e3),
        part(3, "CI", "capacitor", 1e-6, "in", "b"),
        part(4, "R1", "resistor", 47e3, "vcc", "b"),
        part(5, "R2", "resistor", 47e3, "b", "gnd"),
        part(6, "Q1", "npn", None, "c=vcc", "b=b", "e=out"),
        part(7, "RE", "resistor", 2.2e3, "out", "gnd"),
    ], "out")


def feedback_pair() -> Design:
    """Two direct-coupled CE stages with series feedback from the output to the first emitter."""
    return design("feedback-pair", [
        part(1, "VB", "supply", 15, "vcc", "gnd"),
        part(2, "VS", "signal", 1e-3, "in", "gnd", frequency=1e3),
        part(3, "CI", "capacitor", 1e-6, "in", "b1"),
        part(4, "R1", "resistor", 100e3, "vcc", "b1"),
        part(5, "R2", "resistor", 22e3, "b1", "gnd"),
        part(6, "RC1", "resistor", 10e3, "vcc", "c1"),
        part(7, "RE1", "resistor", 470, "e1", "gnd"),
        part(8, "Q1", "npn", None, "c=c1", "b=b1", "e=e1"),
        part(9, "Q2", "npn", None, "c=out", "b=c1", "e=e2"),
        part(10, "RC2", "resistor", 4.7e3, "vcc", "out"),
        part(11, "RE2", "resistor", 1e3, "e2", "gnd"),
        part(12, "RF", "resistor", 10e3, "out", "e1"),
    ], "out")


def differential_pair() -> Design:
    """Long-tailed pair on split supplies with a tail current source."""
    return design("differential-pair", [
        part(1, "VP", "supply", 12, "vcc", "gnd"),
        part(2, "VN", "supply", 12, "gnd", "vee"),
        part(3, "VS", "signal", 1e-3, "in", "gnd", frequency=1e3),
        part(4, "RB1", "resistor", 10e3, "in", "b1"),
        part(5, "RB2", "resistor", 10e3, "b2", "gnd"),
        part(6, "Q1", "npn", None, "c=c1", "b=b1", "e=tail"),
        part(7, "Q2", "npn", None, "c=out", "b=b2", "e=tail"),
        part(8, "RC1", "resistor", 10e3, "vcc", "c1"),
        part(9, "RC2", "resistor", 10e3, "vcc", "out"),
        part(10, "IT", "current", 1e-3, "tail", "vee"),
    ], "out", layout="Q2 right-of Q1\nQ2 mirrored")


def jfet_buffer() -> Design:
    """JFET source follower with self-bias and gate leak resistor."""
    return design("jfet-buffer", [
        part(1, "VB", "supply", 15, "vdd", "gnd"),
        part(2, "VS", "signal", 0.1, "in", "gnd", frequency=1e3),
        part(3, "CI", "capacitor", 100e-9, "in", "g"),
        part(4, "RG", "resistor", 1e6, "g", "gnd"),
        part(5, "J1", "njfet", None, "d=vdd", "g=g", "s=out"),
        part(6, "RS", "resistor", 3.3e3, "out", "gnd"),
    ], "out")


def opamp_noninverting() -> Design:
    """Non-inverting op-amp stage, gain set by RF and RG."""
    return design("opamp-noninverting", [
        part(1, "VP", "supply", 15, "vcc", "gnd"),
        part(2, "VN", "supply", 15, "gnd", "vee"),
        part(3, "VS", "signal", 0.1, "in", "gnd", frequency=1e3),
        part(4, "U1", "opamp", None, "in+=in", "in-=fb", "out=out", "v+=vcc", "v-=vee"),
        part(5, "RF", "resistor", 9e3, "out", "fb"),
        part(6, "RG", "resistor", 1e3, "fb", "gnd"),
    ], "out")


def opamp_inverting() -> Design:
    """Inverting op-amp stage on a single supply with a mid-rail reference."""
    return design("opamp-inverting", [
        part(1, "VP", "supply", 15, "vcc", "gnd"),
        part(2, "VN", "supply", 15, "gnd", "vee"),
        part(3, "VS", "signal", 0.1, "in", "gnd", frequency=1e3),
        part(4, "RI", "resistor", 10e3, "in", "inv"),
        part(5, "RF", "resistor", 100e3, "inv", "out"),
        part(6, "U1", "opamp", None, "in+=gnd", "in-=inv", "out=out", "v+=vcc", "v-=vee"),
    ], "out")


def pnp_stage() -> Design:
    """PNP common-emitter stage (emitter towards the positive rail)."""
    return design("pnp-stage", [
        part(1, "VB", "supply", 12, "vcc", "gnd"),
        part(2, "VS", "signal", 5e-3, "in", "gnd", frequency=1e3),
        part(3, "CI", "capacitor", 1e-6, "in", "b"),
        part(4, "R1", "resistor", 33e3, "vcc", "b"),
        part(5, "R2", "resistor", 100e3, "b", "gnd"),
        part(6, "RE", "resistor", 2.2e3, "vcc", "e"),
        part(7, "CE", "capacitor", 47e-6, "vcc", "e"),
        part(8, "Q1", "pnp", None, "c=out", "b=b", "e=e"),
        part(9, "RC", "resistor", 4.7e3, "out", "gnd"),
    ], "out")


def complementary_follower() -> Design:
    """Complementary emitter-follower output stage biased by two diodes."""
    return design("complementary-follower", [
        part(1, "VP", "supply", 12, "vcc", "gnd"),
        part(2, "VN", "supply", 12, "gnd", "vee"),
        part(3, "VS", "signal", 1, "in", "gnd", frequency=1e3),
        part(4, "R1", "resistor", 4.7e3, "vcc", "bn"),
        part(5, "D1", "diode", None, "bn", "in"),
        part(6, "D2", "diode", None, "in", "bp"),
        part(7, "R2", "resistor", 4.7e3, "bp", "vee"),
        part(8, "Q1", "npn", None, "c=vcc", "b=bn", "e=out"),
        part(9, "Q2", "pnp", None, "c=vee", "b=bp", "e=out"),
        part(10, "RL", "resistor", 100, "out", "gnd"),
    ], "out")


HAND_WRITTEN = [common_emitter, emitter_follower, feedback_pair, differential_pair, jfet_buffer,
                opamp_noninverting, opamp_inverting, pnp_stage, complementary_follower]
