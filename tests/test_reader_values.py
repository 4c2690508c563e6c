"""What the reader makes of valid pages: parts, models, bench, requirements, header, page kinds."""

from __future__ import annotations

import math
from pathlib import Path

import pytest

from docgen.design import Bench
from docgen.diagnostics import InputError
from docgen.params import MODEL_KINDS
from docgen.reader import read_file, read_text
from docgen.record import builtin_page, load_record

PAGE = """\
---
title: Sensor preamp
status: approved
approved: 2024-03-18
owner: Ada
reviewers: Bo,  Cy ,
tags: preamp, bipolar
summary: A first stage.
---

```circuit
# name  kind       value / parameters          : connections
VB      supply     15 V                          : vbat gnd
VS      signal     3 mV rms 2 kHz source=1k5     : sens gnd   # stimulus
CI      capacitor  2u2 10% 50 V polarised=yes    : sens b1
RT      resistor   150k 1% 0.25 W tempco=100ppm  : vbat b1
RB      resistor   33 kΩ ±1%                     : b1 gnd
RL1     resistor   8k2                           : vbat c1
RD      resistor   1R8                           : e1 gnd
L1      inductor   10 mH resistance=2            : c1 gnd
Q1      npn        bench-npn                     : e=e1 c=c1 b=b1
```

```models
bench-npn  npn  saturation_current=10f beta=200 (120..300) early_voltage=80 V
```

```bench
input            VS
output           c1
load             47k || 100p
frequencies      20 Hz .. 200 kHz
points per decade 20
noise band       20 Hz .. 20 kHz
ambient          30 °C (-20 °C .. 60 °C)
boards           2000
seed             7
distribution     normal
distortion limit 0.5 %
step             1 V
```

```require
gain at 1 kHz                : 18 dB .. 22 dB
low corner                   : < 20 Hz across boards
output swing                 : > 4 V pp across all
Q1 collector current         : ≈ 1 mA ± 10 % across temperature
supply current               : ~ 2 mA +- 0.5 mA
```
"""


@pytest.fixture(scope="module")
def design():
    return read_text(PAGE, "p.md")


def test_parts(design) -> None:
    rt = design.part("RT")
    assert (rt.value, rt.value_text, rt.tolerance, rt.rating) == (150e3, "150k", 0.01, 0.25)
    assert rt.params["tempco"] == pytest.approx(1e-4, rel=1e-12)  # 100 ppm/K
    ci = design.part("CI")
    assert ci.value == pytest.approx(2.2e-6, rel=1e-15)  # IEC 60062 "2u2"
    assert (ci.tolerance, ci.rating, ci.params["polarised"]) == (0.1, 50.0, 1.0)
    assert design.part("RB").value == 33e3 and design.part("RB").tolerance == 0.01
    assert design.part("RB").value_text == "33 kΩ"
    assert design.part("RD").value == pytest.approx(1.8)
    assert design.part("RL1").tolerance is None and design.part("RL1").rating is None
    assert design.part("L1").params == {"resistance": 2.0}
    assert design.part("VB").terminals == (("p", "vbat"), ("n", "gnd"))


def test_signal_amplitude_is_peak(design) -> None:
    vs = design.part("VS")
    # A sine's peak is √2 times its rms value (definition of rms).
    assert vs.value == pytest.approx(3e-3 * math.sqrt(2), rel=1e-12)
    assert dict(vs.params) == {"source": 1500.0, "frequency": 2000.0}
    pp = read_text(PAGE.replace("3 mV rms", "6 mV pp"), "p.md").part("VS")
    assert pp.value == pytest.approx(3e-3, rel=1e-12)  # peak is half of peak-to-peak


def test_terminals_in_canonical_order(design) -> None:
    q1 = design.part("Q1")
    assert q1.terminals == (("c", "c1"), ("b", "b1"), ("e", "e1"))
    assert q1.model == "bench-npn" and q1.value is None
    assert q1.spans["net:e"].col == PAGE.splitlines()[20].index("e1") + 1


def test_models(design) -> None:
    (model,) = design.models
    assert (model.name, model.kind, model.source) == ("bench-npn", "npn", "p.md")
    beta = model.params["beta"]
    assert (beta.value, beta.low, beta.high) == (200.0, 120.0, 300.0)
    assert model.params["saturation_current"].value == pytest.approx(1e-14, rel=1e-15)
    assert model.params["early_voltage"].value == 80.0


def test_bench(design) -> None:
    bench = design.bench
    assert (bench.input, bench.output) == ("VS", "c1")
    assert (bench.load_resistance, bench.load_capacitance) == (47e3, pytest.approx(1e-10))
    assert (bench.f_start, bench.f_stop, bench.points_per_decade) == (20.0, 2e5, 20)
    assert bench.noise_band == (20.0, 2e4)
    assert (bench.ambient, bench.ambient_range) == (30.0, (-20.0, 60.0))
    assert (bench.boards, bench.seed, bench.distribution) == (2000, 7, "normal")
    assert bench.distortion_limit == pytest.approx(0.005)
    assert dict(bench.extra) == {"step": "1 V"}


@pytest.mark.parametrize(("text", "nominal", "span"), [
    ("25 °C", 25.0, None), ("-20 °C .. 60 °C", 25.0, (-20.0, 60.0)),
    ("298.15 K", pytest.approx(25.0), None), ("0 degC (-40 degC .. 85 degC)", 0.0, (-40.0, 85.0)),
])
def test_ambient_forms(text: str, nominal: float, span) -> None:
    bench = read_text(PAGE.replace("30 °C (-20 °C .. 60 °C)", text), "p.md").bench
    assert bench.ambient == nominal and bench.ambient_range == span


def test_bench_defaults_without_a_bench_block() -> None:
    page = "---\ntitle: t\n---\n```circuit\nV1 supply 5 V : a gnd\nR1 resistor 1k : a gnd\n```\n"
    assert read_text(page, "d.md").bench == Bench()


def test_requirements(design) -> None:
    got = [(r.metric, r.limit.kind, r.limit.low, r.limit.high, r.limit.unit, r.across)
           for r in design.requirements]
    assert got == [
        ("gain at 1 kHz", "between", 18.0, 22.0, "dB", ()),
        ("low corner", "below", None, 20.0, "Hz", ("boards",)),
        ("output swing", "above", 4.0, None, "V pp", ("boards", "temperature")),
        ("Q1 collector current", "approx", pytest.approx(0.9e-3), pytest.approx(1.1e-3), "A",
         ("temperature",)),
        ("supply current", "approx", pytest.approx(1.5e-3), pytest.approx(2.5e-3), "A", ()),
    ]
    first = design.requirements[0]
    line = PAGE.splitlines()[first.span.line - 1]
    assert line.startswith("gain at 1 kHz")
    assert first.limit_span.col == line.index("18 dB") + 1
    assert first.limit.text == "18 dB .. 22 dB"


def test_percent_limits_are_fractions() -> None:
    page = PAGE.replace("> 4 V pp across all", "< 1 %")
    assert read_text(page, "p.md").requirements[2].limit.high == pytest.approx(0.01)


def test_header(design) -> None:
    h = design.header
    assert (h.title, h.status, h.approved, h.owner) == ("Sensor preamp", "approved",
                                                         "2024-03-18", "Ada")
    assert h.reviewers == ("Bo", "Cy") and h.tags == ("preamp", "bipolar")
    assert h.summary == "A first stage."
    assert h.spans["title"].line == 2 and h.spans["title"].col == len("title: ") + 1


def test_quoted_header_value_is_unquoted_with_a_warning() -> None:
    design = read_text(PAGE.replace("title: Sensor preamp", 'title: "Sensor preamp"'), "p.md")
    assert design.header.title == "Sensor preamp"
    assert [d.message for d in design.warnings] == ["quotes are not needed in the header "
                                                     "(removed)"]


def test_page_kinds_and_blocks(design) -> None:
    assert design.kind == "design"
    assert [b.tag for b in design.blocks] == ["circuit", "models", "bench", "require"]
    assert design.blocks[0].first_line == 12
    library = read_text("# Parts\n\n```models\nx npn beta=100\n```\n", "lib.md")
    assert library.kind == "library" and library.models[0].name == "x"
    note = read_text("# Conventions\n\n```python\nprint(1)\n```\n", "n.md")
    assert note.kind == "note" and note.blocks[0].tag == "python"


def test_fence_inside_a_list_keeps_file_columns() -> None:
    page = ("---\ntitle: t\n---\n\n- a list item\n\n  ```circuit\n  V1 supply 5 V : a gnd\n"
            "  R1 resistr 1k : a gnd\n  ```\n")
    with pytest.raises(InputError) as caught:
        read_text(page, "l.md")
    (d,) = caught.value.diagnostics
    assert (d.line, d.col) == (9, 6)


def test_crlf_line_endings_read_the_same(design) -> None:
    crlf = read_text(PAGE.replace("\n", "\r\n"), "p.md")
    assert crlf.parts == design.parts and crlf.requirements == design.requirements


def test_design_nets(design) -> None:
    assert design.nets == ("vbat", "gnd", "sens", "b1", "c1", "e1")


def test_read_file_errors(tmp_path: Path) -> None:
    with pytest.raises(InputError) as caught:
        read_file(tmp_path / "missing.md")
    assert caught.value.diagnostics[0].line == 1
    bad = tmp_path / "latin1.md"
    bad.write_bytes("Widerstand 4,7 k\xa7".encode("latin-1"))
    with pytest.raises(InputError) as caught:
        read_file(bad)
    assert "UTF-8" in caught.value.diagnostics[0].message


def test_builtin_page_covers_every_model_kind() -> None:
    page = builtin_page()
    assert page.kind == "library" and page.warnings == ()
    assert {m.kind for m in page.models} == set(MODEL_KINDS)


def test_record(tmp_path: Path) -> None:
    (tmp_path / "sub").mkdir()
    (tmp_path / "sub" / "b.md").write_text(PAGE.replace("bench-npn  npn", "unused  npn"),
                                           encoding="utf-8")
    (tmp_path / "a.md").write_text(PAGE.replace("Q1      npn        bench-npn ",
                                                "Q1      npn        lib-npn   "), encoding="utf-8")
    (tmp_path / "lib.md").write_text("```models\nlib-npn npn beta=50\nbench-npn npn beta=1\n```\n",
                                     encoding="utf-8")
    (tmp_path / "broken.md").write_text("---\ntitle: x\n---\n```circuit\nR1 r 1k : a b\n```\n",
                                        encoding="utf-8")
    record = load_record(tmp_path)
    names = [Path(p.path).name for p in record.pages]
    assert names == ["a.md", "lib.md", "b.md"]  # sorted by path; the broken page is left out
    assert [Path(p).name for p in record.diagnostics] == ["broken.md"]
    assert [Path(d.path).name for d in record.designs] == ["a.md", "b.md"]
    a, b = record.designs
    assert [Path(p).name for p in record.uses[a.path]] == ["lib.md"]
    # b's own models block no longer defines bench-npn, so Q1 takes the library page's.
    assert [Path(p).name for p in record.uses[b.path]] == ["lib.md"]
    assert record.models_for(b)["bench-npn"].params["beta"].value == 1.0
    assert record.models_for(b)["unused"].source == b.path
    # lookup order: a design's own model comes before the library page's of the same name.
    own = read_text(PAGE, "own.md")
    assert record.models_for(own)["bench-npn"].params["beta"].value == 200.0
    assert record.library["generic-npn"].source == "<built-in>"


def test_replaced_by_must_name_a_page(tmp_path: Path) -> None:
    retired = PAGE.replace("status: approved\n", "status: retired\nreplaced-by: preamp-v3.md\n")
    (tmp_path / "preamp-v1.md").write_text(retired, encoding="utf-8")
    (tmp_path / "preamp-v2.md").write_text(PAGE, encoding="utf-8")
    (d,) = load_record(tmp_path).all_diagnostics
    assert (d.line, d.col, d.severity) == (4, len("replaced-by: ") + 1, "warning")
    assert d.message == "replaced-by names no page of the record: 'preamp-v3.md'"
    assert d.hint == "did you mean 'preamp-v2.md'?"
    (tmp_path / "preamp-v1.md").write_text(retired.replace("v3", "v2"), encoding="utf-8")
    assert load_record(tmp_path).all_diagnostics == ()
