"""`docgen check` reports mistakes in a design's `layout` block before anything is drawn."""

from __future__ import annotations

from pathlib import Path

from docgen.cli import main

PAGE = """---
title: Follower with a layout hint
---

```circuit
VA  supply    9 V           : vcc gnd
VS  signal    10 mV 1 kHz   : in gnd
RB  resistor  100k 1%       : in b
Q1  npn       generic-npn   : c=vcc b=b e=out
RE  resistor  4k7 1%        : out gnd
```

```layout
{hint}
```
"""


def test_a_bad_hint_is_an_input_error_at_its_line(tmp_path: Path, capsys) -> None:
    page = tmp_path / "follower.md"
    page.write_text(PAGE.format(hint="Q9 mirrored"), encoding="utf-8")
    assert main(["check", str(page)]) == 2
    err = capsys.readouterr()
    text = err.out + err.err
    line = PAGE.splitlines().index("{hint}") + 1
    assert f"follower.md:{line}:1: error:" in text
    assert "Q9" in text


def test_a_good_hint_passes(tmp_path: Path, capsys) -> None:
    page = tmp_path / "follower.md"
    page.write_text(PAGE.format(hint="Q1 mirrored"), encoding="utf-8")
    assert main(["check", str(page)]) == 0
