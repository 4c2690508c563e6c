"""Drawings of hand-written amplifier stages: faithful, readable and laid out by the policy.

Every property is read from the finished drawing's geometry (``readback.geometry``): pins from
element anchors, ports from symbols.  The topologies are the textbook ones of Sedra & Smith,
*Microelectronic Circuits* (BJT and MOSFET amplifier chapters) and Horowitz & Hill, *The Art
of Electronics* (ch. 2–4), with invented values.  The layout conventions checked (positive
rail up, ground down, signal left to right, transistors upright, bias resistors vertical,
coupling capacitors horizontal) are common practice, as drawn in those books.
"""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import draw_circuits as circuits
import pytest

from docgen.diagnostics import InputError
from docgen.draw import draw, draw_svg, readback

AMPLIFIER_DRAWN = ["common_emitter", "emitter_follower", "feedback_pair", "differential_pair",
                   "jfet_buffer", "opamp_noninverting", "opamp_inverting", "pnp_stage",
                   "complementary_follower"]


@pytest.fixture(scope="module")
def drawn() -> dict:
    """Each hand-written circuit drawn once."""
    return {f.__name__: (f(), draw(f())) for f in circuits.HAND_WRITTEN}


@pytest.mark.parametrize("name", [f.__name__ for f in circuits.HAND_WRITTEN])
def test_faithful_and_readable(drawn: dict, name: str) -> None:
    _, schematic = drawn[name]
    assert schematic.report.faults == []
    assert schematic.report.problems == []
    assert schematic.placement.flagged == []  # every net drawn with wires or rail symbols


@pytest.mark.parametrize("name", AMPLIFIER_DRAWN)
def test_amplifier_layout_is_used(drawn: dict, name: str) -> None:
    assert drawn[name][1].placement.style == "amplifier"


def _geometry(schematic) -> readback.Geometry:  # noqa: ANN001
    return readback.geometry(schematic.drawing)


@pytest.mark.parametrize("name", AMPLIFIER_DRAWN)
def test_rail_resistors_stand_vertical_with_the_rail_outside(drawn: dict, name: str) -> None:
    design, schematic = drawn[name]
    pins = _geometry(schematic).pins
    rails = {"gnd": -1, "vcc": 1, "vbat": 1, "vdd": 1, "vee": -1}
    for part in design.parts:
        if part.kind != "resistor" or not any(n in rails for n in part.nets):
            continue
        (px, py), (nx, ny) = pins[(part.name, "p")], pins[(part.name, "n")]
        assert px == pytest.approx(nx), part.name  # vertical
        rail_terminal = "p" if part.nets[0] in rails else "n"
        direction = rails[part.net(rail_terminal)]
        rail_y = py if rail_terminal == "p" else ny
        other_y = ny if rail_terminal == "p" else py
        assert (rail_y - other_y) * direction > 0, part.name


@pytest.mark.parametrize("name", AMPLIFIER_DRAWN)
def test_transistors_upright_and_signal_left_to_right(drawn: dict, name: str) -> None:
    design, schematic = drawn[name]
    geo = _geometry(schematic)
    for part in design.parts:
        if part.kind in ("npn", "njfet", "nmos"):
            top, bottom = ("c", "e") if part.kind == "npn" else ("d", "s")
        elif part.kind in ("pnp", "pjfet", "pmos"):
            top, bottom = ("e", "c") if part.kind == "pnp" else ("s", "d")
        else:
            continue
        assert geo.pins[(part.name, top)][1] > geo.pins[(part.name, bottom)][1]
    source = next(p for p in design.parts if p.kind == "signal")
    source_x = geo.pins[(source.name, "p")][0]
    assert source_x <= min(x for (_, _), (x, _) in geo.pins.items()) + 1e-9
    out_flags = [p for net, p in geo.ports if net == design.bench.output]
    assert out_flags and out_flags[0][0] > source_x


def test_push_pull_pair_stands_as_a_totem(drawn: dict) -> None:
    pins = _geometry(drawn["complementary_follower"][1]).pins
    # npn above pnp in one column, emitters facing; the bias string in a column to the left
    assert pins[("Q1", "e")][0] == pytest.approx(pins[("Q2", "e")][0])
    assert pins[("Q1", "e")][1] > pins[("Q2", "e")][1]
    assert pins[("D1", "anode")][0] == pytest.approx(pins[("D2", "cathode")][0])
    assert pins[("D1", "anode")][0] < pins[("Q1", "b")][0]
    assert pins[("D1", "anode")][1] > pins[("D2", "cathode")][1]


def test_differential_pair_bases_face_outwards_over_the_tail(drawn: dict) -> None:
    pins = _geometry(drawn["differential_pair"][1]).pins
    assert pins[("Q1", "b")][0] < pins[("Q1", "c")][0] < pins[("Q2", "c")][0] < pins[("Q2", "b")][0]
    # the tail source stands below the emitters, between the two devices
    assert pins[("IT", "p")][1] < pins[("Q1", "e")][1]
    assert pins[("Q1", "c")][0] < pins[("IT", "p")][0] < pins[("Q2", "c")][0]


def test_coupling_capacitors_lie_horizontal(drawn: dict) -> None:
    for name in ("common_emitter", "emitter_follower", "jfet_buffer", "pnp_stage"):
        pins = _geometry(drawn[name][1]).pins
        assert pins[("CI", "p")][1] == pytest.approx(pins[("CI", "n")][1])
        assert pins[("CI", "p")][0] < pins[("CI", "n")][0]  # input side on the left


def test_opamp_inputs_left_output_right(drawn: dict) -> None:
    for name in ("opamp_noninverting", "opamp_inverting"):
        pins = _geometry(drawn[name][1]).pins
        assert pins[("U1", "in+")][0] < pins[("U1", "out")][0]
        assert pins[("U1", "in-")][0] < pins[("U1", "out")][0]
        assert pins[("U1", "v+")][1] > pins[("U1", "v-")][1]


def test_positive_rail_symbols_above_ground_symbols(drawn: dict) -> None:
    for name in ("common_emitter", "feedback_pair", "pnp_stage"):
        ports = _geometry(drawn[name][1]).ports
        supply = [p[1] for net, p in ports if net in ("vcc", "vbat")]
        ground = [p[1] for net, p in ports if net == "gnd"]
        assert min(supply) > max(ground)


def test_labels_carry_name_and_value_with_unit(drawn: dict) -> None:
    texts = [t for t, _ in _geometry(drawn["common_emitter"][1]).texts]
    assert "RT\n150 kΩ" in texts
    assert "CI 2.2 µF" in texts
    assert "Q1\ngeneric-npn" in texts
    assert {"sens", "out", "vbat"} <= set(texts)  # input and output flags, rail names


def test_two_draws_give_identical_bytes() -> None:
    design = circuits.common_emitter()
    assert draw_svg(design) == draw_svg(design)


def test_identical_bytes_in_another_process() -> None:
    script = ("import sys; sys.path.insert(0, 'tests'); import draw_circuits as c; "
              "from docgen.draw import draw_svg; sys.stdout.write(draw_svg(c.feedback_pair()))")
    env = dict(os.environ, PYTHONHASHSEED="12345")
    other = subprocess.run([sys.executable, "-c", script], capture_output=True, text=True,
                           env=env, cwd=Path(__file__).parent.parent, check=True).stdout
    assert other == draw_svg(circuits.feedback_pair())


def test_operating_point_decides_rail_direction() -> None:
    design = circuits.common_emitter()
    # a (hypothetical) negative supply net drawn as a downward rail when its solved voltage
    # is below ground
    geo = readback.geometry(draw(design, {"vbat": -15.0}).drawing)
    assert readback.connectivity(geo) == readback.netlist_nets(design)
    downs = [p for net, p in geo.ports if net == "vbat"]
    assert downs and all(y < 0 for _, y in downs[:-1] or downs)


def test_hint_mirrored_and_order() -> None:
    design = circuits.differential_pair()  # its layout block: Q2 right-of Q1, Q2 mirrored
    pins = _geometry(draw(design)).pins
    assert pins[("Q2", "b")][0] > pins[("Q2", "c")][0]  # base on the right
    assert pins[("Q1", "b")][0] < pins[("Q1", "c")][0]
    assert pins[("Q2", "c")][0] > pins[("Q1", "c")][0]


def test_hint_turned_and_layered() -> None:
    base = circuits.common_emitter()
    turned = circuits.design("ce", list(base.parts), "out", layout="RT turned")
    pins = _geometry(draw(turned)).pins
    assert pins[("RT", "p")][1] < pins[("RT", "n")][1]
    layered = circuits.design("ce", list(base.parts), "out", layout="arrange layered")
    schematic = draw(layered)
    assert schematic.placement.style == "layered" and schematic.report.ok


@pytest.mark.parametrize(("text", "where", "words"), [
    ("Q9 mirrored", (2, 1), ["no part 'Q9'"]),
    ("Q1 mirorred", (2, 4), ["unknown layout word 'mirorred'", "did you mean 'mirrored'"]),
    ("Q1 right-of", (2, 4), ["takes one part name"]),
    ("RT mirrored", (2, 4), ["only transistors can be mirrored", "RT turned"]),
    ("label sense", (2, 7), ["no net 'sense'", "did you mean 'sens'"]),
    ("arrange sideways", (2, 9), ["'arrange' takes one word"]),
])
def test_hint_diagnostics(text: str, where: tuple[int, int], words: list[str]) -> None:
    base = circuits.common_emitter()
    bad = circuits.design("ce", list(base.parts), "out", layout=text)
    with pytest.raises(InputError) as caught:
        draw(bad)
    diagnostic = caught.value.diagnostics[0]
    assert (diagnostic.line, diagnostic.col) == where
    rendered = diagnostic.render()
    for word in words:
        assert word in rendered


def test_documented_layout_example_reads() -> None:
    import re

    from docgen.draw.hints import read_hints
    from docgen.reader import read_text

    doc = (Path(__file__).parent.parent / "docs" / "format.md").read_text(encoding="utf-8")
    example = re.search(r"^```layout\n(.*?)^```$", doc, re.S | re.M).group(1)
    circuit = "\n".join(
        ["VP supply 12 V : vcc gnd", "VS signal 1 mV 1 kHz : in gnd",
         "CI capacitor 1u : in b1", "R1 resistor 10k : vcc b1", "R2 resistor 10k : b1 gnd",
         "Q1 npn generic-npn : c=c1 b=b1 e=gnd", "RC resistor 10k : vcc c1",
         "Q2 pnp generic-pnp : c=c2 b=c1 e=vcc", "CE capacitor 1u : c2 gnd"])
    page = (f"---\ntitle: t\n---\n\n```circuit\n{circuit}\n```\n\n```bench\ninput VS\n"
            f"output c2\n```\n\n```layout\n{example}```\n")
    hints = read_hints(read_text(page, "t.md"))
    assert hints.after == [("Q2", "Q1")] and hints.mirror == {"Q2"}
    assert hints.turn == {"CE"} and hints.labels == ["b1", "c2"]
    assert hints.arrangement == "layered"
