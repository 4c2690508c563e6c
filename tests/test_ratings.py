"""Rating cautions, end to end: small designs built to trip each check, solved by the real
operating-point solver, then held against the part and model ratings.

References (named beside each case): Joule's law P = V²/R and P = VCE·IC (any circuits
textbook); the emitter-follower bias IE = (VB − VBE)/RE with VBE ≈ 0.65 V (common practice);
resistor derating to half the rated power (common practice); extra-low-voltage limits 120 V
ripple-free DC and 50 V AC rms (IEC 61140, from memory).  The built-in models' ratings
(generic-npn: 0.5 W, 40 V, 200 mA; generic-nmos 60 V; generic-opamp 36 V) are docgen's
documented values in docgen/builtin/generic.md.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from docgen import pipeline
from docgen.check.ratings import DESIGN_AID
from docgen.record import load_record

HEADER = "---\ntitle: rating trip\nstatus: draft\n---\n\n```circuit\n"


def _cautions(tmp_path: Path, circuit: str, extra: str = "") -> list[dict]:
    """Solve a one-page design (circuit lines start on file line 7) and return its cautions."""
    (tmp_path / "trip.md").write_text(HEADER + circuit.strip() + "\n```\n" + extra,
                                      encoding="utf-8")
    record = load_record(str(tmp_path))
    assert not record.all_diagnostics, record.all_diagnostics
    design = record.designs[0]
    results = pipeline.run(design, record.models_for(design),
                           only=frozenset({"op", "cautions"}))
    assert results["errors"] == []
    for caution in results["cautions"]:
        assert caution["note"] == DESIGN_AID
    return [c for c in results["cautions"] if c["severity"] != "info"]


def _only(cautions: list[dict]) -> dict:
    assert len(cautions) == 1, cautions
    return cautions[0]


def test_resistor_over_its_rating(tmp_path: Path) -> None:
    """12 V across 100 Ω: P = V²/R = 1.44 W (Joule) against 0.25 W."""
    found = _only(_cautions(tmp_path, """
VA  supply    12 V            : vcc gnd
R1  resistor  100 1% 0.25 W   : vcc gnd
"""))
    assert (found["part"], found["severity"], found["line"]) == ("R1", "error", 8)
    assert found["value"] == pytest.approx(12 ** 2 / 100, rel=1e-6)
    assert found["limit"] == 0.25 and "over its" in found["message"]


def test_resistor_above_half_its_rating(tmp_path: Path) -> None:
    """12 V across 1 kΩ: 144 mW, above half of 0.25 W (common practice derating)."""
    found = _only(_cautions(tmp_path, """
VA  supply    12 V            : vcc gnd
R1  resistor  1k 1% 0.25 W    : vcc gnd
"""))
    assert found["severity"] == "warning" and found["limit"] == 0.125
    assert found["value"] == pytest.approx(0.144, rel=1e-6)
    assert "half" in found["message"]
    assert _cautions(tmp_path, """
VA  supply    12 V            : vcc gnd
R1  resistor  1k 1% 0.5 W     : vcc gnd
""") == []  # 144 mW is below half of 0.5 W


def test_capacitor_over_its_voltage_rating(tmp_path: Path) -> None:
    found = _only(_cautions(tmp_path, """
VA  supply     24 V            : vcc gnd
R1  resistor   10k 1% 0.25 W   : vcc gnd
C1  capacitor  100n 10% 16 V   : vcc gnd
"""))
    assert (found["part"], found["severity"], found["figure"]) == ("C1", "error", "voltage")
    assert found["value"] == pytest.approx(24.0, rel=1e-6) and found["limit"] == 16.0


def test_polarised_capacitor_reverse_biased(tmp_path: Path) -> None:
    found = _only(_cautions(tmp_path, """
VA  supply     12 V                       : vcc gnd
R1  resistor   10k 1% 0.25 W              : vcc gnd
C1  capacitor  10u 20% 25 V polarised=yes : gnd vcc
"""))
    assert (found["part"], found["figure"]) == ("C1", "reverse voltage")
    assert found["value"] == pytest.approx(-12.0, rel=1e-6)
    assert _cautions(tmp_path, """
VA  supply     12 V                       : vcc gnd
R1  resistor   10k 1% 0.25 W              : vcc gnd
C1  capacitor  10u 20% 25 V polarised=yes : vcc gnd
""") == []  # the right way round


def test_transistor_power_and_collector_current(tmp_path: Path) -> None:
    """Base held at 5 V, RE = 10 Ω: IE ≈ (5 − 0.65)/10 ≈ 435 mA (common practice), far over
    200 mA; dissipation VCE·IC ≈ (20 − 4.35) V × 0.43 A ≈ 6.8 W, over 0.5 W."""
    found = _cautions(tmp_path, """
VA  supply    20 V              : vcc gnd
VB  supply    5 V               : b gnd
RE  resistor  10 1% 5 W         : e gnd
Q1  npn       generic-npn       : c=vcc b=b e=e
""")
    by_figure = {c["figure"]: c for c in found if c["part"] == "Q1"}
    assert set(by_figure) == {"dissipation", "collector current"}
    assert by_figure["collector current"]["value"] == pytest.approx(0.435, rel=0.05)
    assert by_figure["dissipation"]["value"] == pytest.approx(15.65 * 0.435, rel=0.06)
    assert by_figure["dissipation"]["limit"] == 0.5
    assert by_figure["dissipation"]["line"] == 10


def test_transistor_collector_emitter_voltage(tmp_path: Path) -> None:
    """50 V supply, emitter near 4.35 V: VCE ≈ 45.6 V against the 40 V rating."""
    found = _only(_cautions(tmp_path, """
VA  supply    50 V              : vcc gnd
VB  supply    5 V               : b gnd
RE  resistor  1k 1% 0.25 W      : e gnd
Q1  npn       generic-npn       : c=vcc b=b e=e
"""))
    assert found["figure"] == "collector-emitter voltage" and found["limit"] == 40.0
    assert found["value"] == pytest.approx(50 - 4.35, abs=0.2)


def test_fet_drain_source_voltage(tmp_path: Path) -> None:
    """Gate at 0 V keeps the MOSFET off, so VDS is the whole 80 V against its 60 V rating."""
    found = _only(_cautions(tmp_path, """
VA  supply    80 V              : vdd gnd
RD  resistor  10k 1% 0.25 W     : vdd d
M1  nmos      generic-nmos      : d=d g=gnd s=gnd
"""))
    assert (found["part"], found["figure"], found["limit"]) == ("M1", "drain-source voltage",
                                                               60.0)
    assert found["value"] == pytest.approx(80.0, rel=1e-3)


def test_opamp_supply_over_its_rating(tmp_path: Path) -> None:
    found = _only(_cautions(tmp_path, """
VP  supply    20 V              : vp gnd
VN  supply    20 V              : gnd vn
RI  resistor  10k 1% 0.25 W     : gnd i
U1  opamp     generic-opamp     : in+=i in-=o out=o v+=vp v-=vn
RL  resistor  10k 1% 0.25 W     : o gnd
"""))
    assert (found["part"], found["limit"]) == ("U1", 36.0)
    assert found["value"] == pytest.approx(40.0, rel=1e-6)


def test_supply_beyond_extra_low_voltage_is_a_hazard(tmp_path: Path) -> None:
    """150 V DC is above 120 V ripple-free DC (IEC 61140, from memory)."""
    found = _only(_cautions(tmp_path, """
VH  supply    150 V             : hv gnd
R1  resistor  1M 1% 0.25 W      : hv gnd
"""))
    assert found["severity"] == "hazard" and found["limit"] == 120.0
    assert found["message"].startswith("HAZARDOUS VOLTAGE")
    assert "local codes" in found["note"]


def test_split_rails_count_between_them(tmp_path: Path) -> None:
    """±65 V: each rail is under 120 V to ground but 130 V lies between the rails."""
    found = _only(_cautions(tmp_path, """
VP  supply    65 V              : vp gnd
VN  supply    65 V              : gnd vn
R1  resistor  1M 1% 0.25 W      : vp vn
""")[:1])
    assert found["severity"] == "hazard" and found["value"] == pytest.approx(130.0)


def test_48_volts_is_not_a_hazard(tmp_path: Path) -> None:
    assert _cautions(tmp_path, """
VA  supply    48 V              : vcc gnd
R1  resistor  1M 1% 0.25 W      : vcc gnd
""") == []


def test_parts_without_rating_or_tolerance_are_noted(tmp_path: Path) -> None:
    (tmp_path / "trip.md").write_text(HEADER + "VA supply 5 V : vcc gnd\nR1 resistor 1k : vcc gnd"
                                      "\n```\n", encoding="utf-8")
    record = load_record(str(tmp_path))
    design = record.designs[0]
    results = pipeline.run(design, record.models_for(design), only=frozenset({"op",
                                                                              "cautions"}))
    (note,) = results["cautions"]
    assert (note["part"], note["severity"]) == ("R1", "info")
    assert "no power rating" in note["message"] and "no tolerance" in note["message"]


def test_signal_beyond_extra_low_voltage_ac_is_a_hazard(tmp_path: Path) -> None:
    """100 V peak is 70.7 V rms (÷√2 for a sine), above 50 V AC rms (IEC 61140, from memory);
    70 V peak (49.5 V rms) is not."""
    found = _only(_cautions(tmp_path, """
VS  signal    100 V 50 Hz       : in gnd
R1  resistor  1M 1% 0.25 W      : in gnd
"""))
    assert found["severity"] == "hazard" and found["unit"] == "V rms"
    assert found["value"] == pytest.approx(100 / 2 ** 0.5) and found["limit"] == 50.0
    assert _cautions(tmp_path, """
VS  signal    70 V 50 Hz        : in gnd
R1  resistor  1M 1% 0.25 W      : in gnd
""") == []


def _solved(tmp_path: Path, text: str, sections: set[str]) -> dict:
    (tmp_path / "trip.md").write_text(text, encoding="utf-8")
    record = load_record(str(tmp_path))
    design = record.designs[0]
    return pipeline.run(design, record.models_for(design), only=frozenset(sections))


SIGNAL_INTO_RESISTOR = HEADER + """VS  signal    10 V 1 kHz        : in gnd
R1  resistor  100 1% 0.25 W     : in gnd
```

```bench
input   VS
output  in
```
"""


def test_resistor_power_over_the_signal_cycle(tmp_path: Path) -> None:
    """10 V peak across 100 Ω: average power Vp²/(2R) = 0.5 W (sine, Joule), over 0.25 W;
    at the operating point the signal is zero, so only the large-signal average trips it."""
    static = _solved(tmp_path, SIGNAL_INTO_RESISTOR, {"op", "cautions"})
    assert [c for c in static["cautions"] if c["severity"] != "info"] == []
    results = _solved(tmp_path, SIGNAL_INTO_RESISTOR, {"op", "ac", "transient", "cautions"})
    found = _only([c for c in results["cautions"] if c["severity"] != "info"])
    assert found["value"] == pytest.approx(10 ** 2 / (2 * 100), rel=1e-3)
    assert "over the signal cycle" in found["message"]


BIAS_PLUS_SIGNAL = HEADER + """VB  supply     12 V              : vcc gnd
R1  resistor   10k 1% 0.25 W     : vcc n
VS  signal     6 V 1 kHz         : in gnd
CC  capacitor  10u 10% 50 V      : in n
C2  capacitor  1n 10% 16 V       : n gnd
```

```bench
input   VS
output  n
```
"""


def test_capacitor_voltage_with_the_signal_peak(tmp_path: Path) -> None:
    """C2 holds 12 V of bias, under its 16 V rating; the 6 V peak signal coupled onto it
    (CC's 16 Ω and C2's 159 kΩ at 1 kHz hardly divide it) brings the peak to about 18 V
    (superposition of bias and signal, common practice)."""
    static = _solved(tmp_path, BIAS_PLUS_SIGNAL, {"op", "cautions"})
    assert [c for c in static["cautions"] if c["severity"] != "info"] == []
    results = _solved(tmp_path, BIAS_PLUS_SIGNAL, {"op", "ac", "transient", "cautions"})
    found = _only([c for c in results["cautions"] if c["severity"] != "info"])
    assert (found["part"], found["figure"], found["limit"]) == ("C2", "voltage", 16.0)
    assert found["value"] == pytest.approx(18.0, abs=0.3)


def test_diode_forward_current_and_reverse_voltage(tmp_path: Path) -> None:
    """5 V through 10 Ω into a forward diode: I ≈ (5 − ~1 V)/10 Ω ≈ 0.4 A (Ohm's law, a
    silicon diode drop of about a volt at that current: common practice) against 200 mA;
    90 V across a reversed diode against its 75 V reverse rating (generic-diode)."""
    found = _only(_cautions(tmp_path, """
VA  supply    5 V               : vcc gnd
R1  resistor  10 1% 5 W         : vcc a
D1  diode     generic-diode     : a gnd
"""))
    assert (found["part"], found["figure"], found["limit"]) == ("D1", "forward current", 0.2)
    assert found["value"] == pytest.approx(0.4, rel=0.1)
    found = _only(_cautions(tmp_path, """
VA  supply    90 V              : vcc gnd
R1  resistor  1M 1% 0.25 W      : vcc k
D1  diode     generic-diode     : gnd k
"""))
    assert (found["part"], found["figure"], found["limit"]) == ("D1", "reverse voltage", 75.0)
    assert found["value"] == pytest.approx(90.0, rel=1e-3)
