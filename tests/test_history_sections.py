"""Old revisions are solved for what their requirements read plus the small-signal headline."""

from __future__ import annotations

from docgen.history.snapshot import history_sections
from docgen.reader import read_text

PAGE = """---
title: Follower
---

```circuit
VA  supply    9 V           : vcc gnd
VS  signal    10 mV 1 kHz   : in gnd
CI  capacitor 1u 10%        : in b
RB  resistor  100k 1%       : vcc b
RB2 resistor  100k 1%       : b gnd
Q1  npn       generic-npn   : c=vcc b=b e=out
RE  resistor  4k7 1%        : out gnd
```

```bench
input  VS
output out
```

```require
{requirement}
```
"""


def sections(requirement: str) -> frozenset[str]:
    return history_sections(read_text(PAGE.format(requirement=requirement), "f.md"))


def test_small_signal_requirements_skip_the_large_signal_and_spread_analyses() -> None:
    found = sections("gain at 1 kHz : -1 dB .. 0 dB")
    assert {"op", "ac", "noise", "checks", "cautions"} <= found
    assert "transient" not in found and "spread" not in found


def test_a_swing_or_board_requirement_brings_its_analysis_along() -> None:
    assert "transient" in sections("output swing : > 1 V pp")
    assert "spread" in sections("gain at 1 kHz : -1 dB .. 0 dB across boards")
