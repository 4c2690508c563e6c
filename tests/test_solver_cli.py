"""``docgen solve`` and the results contract: JSON validates against our JSON Schema.

Reference: JSON Schema draft 2020-12 (open standard) via the ``jsonschema`` library.
"""

from __future__ import annotations

import json
from importlib import resources

import jsonschema
import pytest
from solver_helpers import design_text

from docgen.cli import main

SCHEMA = json.loads(resources.files("docgen").joinpath("schema/results.schema.json")
                    .read_text(encoding="utf-8"))

MIXED = """
VP  supply    12 V              : vp gnd
VN  supply    12 V              : gnd vn
VS  signal    1 mV 1 kHz offset=0.2 : in gnd
U1  opamp     generic-opamp     : in+=in in-=fb out=out v+=vp v-=vn
RF  resistor  9k                : out fb
RG  resistor  1k                : fb gnd
R1  resistor  10k               : vp c
Q1  npn       generic-npn       : c=c b=out e=e
RE  resistor  4k7               : e gnd
Q2  pnp       generic-pnp       : c=vn b=e e=pe
R2  resistor  10k               : vp pe
J1  njfet     generic-njfet     : d=vp g=gnd s=js
RS  resistor  1k                : js gnd
M1  pmos      generic-pmos      : d=md g=gnd s=vp
RD  resistor  1k                : md gnd
D1  diode     generic-diode     : vp dk
RK  resistor  2k2               : dk gnd
I1  current   1m                : gnd ci
RI  resistor  1k                : ci gnd
L1  inductor  1m resistance=1   : vp li
RL  resistor  1k                : li gnd
CO  capacitor 1u                : out gnd
"""


def _write(tmp_path, circuit, bench="input VS\noutput out\nload 10k", name="d.md"):
    path = tmp_path / name
    path.write_text(design_text(circuit, bench=bench), encoding="utf-8")
    return str(path)


def test_schema_is_a_valid_draft_2020_12_schema():
    jsonschema.Draft202012Validator.check_schema(SCHEMA)


def test_json_output_validates_and_has_the_op_section(tmp_path, capsys):
    path = _write(tmp_path, MIXED)
    assert main(["solve", path, "--json"]) == 0
    results = json.loads(capsys.readouterr().out)
    jsonschema.Draft202012Validator(SCHEMA).validate(results)
    op = results["op"]
    assert set(op["nets"]) >= {"vp", "vn", "out", "c", "e"}
    assert op["parts"]["Q1"]["region"] in ("active", "saturation", "cut-off", "reverse")
    assert op["supplies"]["VP"]["current_a"] > 0
    assert op["load"]["resistance_ohm"] == 10e3
    assert "ideality" in op["assumed"]["Q1"]


def test_schema_rejects_a_broken_op_section(tmp_path, capsys):
    path = _write(tmp_path, MIXED)
    main(["solve", path, "--json"])
    results = json.loads(capsys.readouterr().out)
    results["op"]["parts"]["Q1"]["region"] = "happy"
    with pytest.raises(jsonschema.ValidationError):
        jsonschema.Draft202012Validator(SCHEMA).validate(results)


def test_table_output_is_aligned_engineering_notation(tmp_path, capsys):
    path = _write(tmp_path, MIXED)
    assert main(["solve", path]) == 0
    out = capsys.readouterr().out
    assert "Operating point at 25 °C" in out
    lines = out.splitlines()
    header = next(i for i, line in enumerate(lines) if line.split()[:2] == ["net", "voltage"])
    block = lines[header:header + 5]
    assert len({len(line) for line in block}) == 1  # right-aligned numbers share a width
    assert any(" mA" in line for line in lines) and "Bipolar transistors" in out


def test_same_input_gives_identical_output(tmp_path, capsys):
    path = _write(tmp_path, MIXED)
    main(["solve", path, "--json"])
    first = capsys.readouterr().out
    main(["solve", path, "--json"])
    assert capsys.readouterr().out == first


def test_unsolvable_design_exits_2_with_a_positioned_message(tmp_path, capsys):
    path = _write(tmp_path, """
VS  signal    1 mV 1 kHz : in gnd
C1  capacitor 1u         : in x
C2  capacitor 1u         : x out
R1  resistor  1k         : out gnd
""")
    assert main(["solve", path]) == 2
    err = capsys.readouterr().err
    assert f"{path}:7:1: error:" in err and "'x'" in err


def test_missing_file_exits_2(tmp_path, capsys):
    assert main(["solve", str(tmp_path / "nothing.md")]) == 2
