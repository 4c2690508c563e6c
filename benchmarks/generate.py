"""A generated record for the build benchmark: N distinct designs, each with R revisions in git.

Every design is a common-emitter stage of the invented demo scenario with its own supply,
bias divider, collector and emitter resistors, coupling capacitors and bench (no two designs
share a circuit).  Each later revision adds a review note above the circuit and moves one value
to its E12 neighbour, one commit per revision, with fixed authors and dates so the repository
is the same on every run.  About one revision in five lands on the value it had (347 of 1 800
at 200 designs): a notes-only change, but one that moves the circuit's lines, so the history
solves it again (results carry line numbers, and so does the solve key).
"""

from __future__ import annotations

import os
import subprocess
from pathlib import Path

E12 = (1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2)
SUPPLIES = (9, 12, 15)


def _ohms(value: float) -> str:
    """E12 value in the design syntax (``4k7``, ``390``, ``82k``)."""
    if value >= 1000:
        whole, frac = divmod(round(value / 100), 10)
        return f"{whole}k{frac}" if frac and whole < 10 else f"{round(value / 1000)}k"
    return f"{round(value)}"


def _e12(index: int, decade: float) -> float:
    return E12[index % len(E12)] * decade


def design_values(number: int, revision: int) -> dict[str, str]:
    """The part values of design ``number`` at ``revision`` (0 = first commit)."""
    supply = SUPPLIES[number % 3]
    rc = _e12(number // 3 + 6, 1000)  # 3k3 .. 8k2 etc.
    values = {
        "supply": f"{supply} V",
        "R1": _ohms(_e12(number // 7 + 5, 10000) * supply / 12),
        "R2": _ohms(_e12(number // 5 + 2, 10000)),
        "RC": _ohms(rc),
        "RE1": _ohms(_e12(number // 11 + 3, 100)),
        "RE2": _ohms(_e12(number + 4, 1000)),
        "CI": ("1u", "2u2", "4u7", "10u")[number % 4],
        "signal": f"{10 + number % 50} mV {1 + number % 9} kHz",
    }
    # each revision nudges one value to its E12 neighbour (a review tweak)
    for step in range(1, revision + 1):
        key = ("RC", "RE1", "R2", "CI")[(number + step) % 4]
        if key == "CI":
            values["CI"] = ("1u", "2u2", "4u7", "10u")[(number + step) % 4]
        else:
            base = {"RC": 1000, "RE1": 100, "R2": 10000}[key]
            values[key] = _ohms(_e12(number + step * 5, base))
    return values


def design_text(number: int, revision: int) -> str:
    """The Markdown page of design ``number`` at ``revision``."""
    v = design_values(number, revision)
    notes = "".join(f"\nReview round {r}: one value moved to its E12 neighbour.\n"
                    for r in range(1, revision + 1))
    return f"""---
title: Generated stage {number:03d}
status: draft
owner: Bench Generator
tags: generated, common-emitter
summary: Common-emitter stage number {number} of the generated benchmark record.
---

# Generated stage {number:03d}

A degenerated common-emitter stage with divider bias, generated for the build benchmark.
{notes}
```circuit
VA      supply     {v['supply']}                 : vcc gnd
VS      signal     {v['signal']} source=600       : in gnd
CI      capacitor  {v['CI']} 10% 25 V             : in b1
R1      resistor   {v['R1']} 1% 0.125 W           : vcc b1
R2      resistor   {v['R2']} 1% 0.125 W           : b1 gnd
Q1      npn        generic-npn                   : c=c1 b=b1 e=e1
RC      resistor   {v['RC']} 1% 0.125 W           : vcc c1
RE1     resistor   {v['RE1']} 1% 0.125 W          : e1 e2
RE2     resistor   {v['RE2']} 1% 0.125 W          : e2 gnd
CE      capacitor  100u 20% 25 V polarised=yes   : e2 gnd
CO      capacitor  1u 10% 25 V                   : c1 out
```

```bench
input         VS
output        out
load          100k
frequencies   1 Hz .. 100 MHz
noise band    20 Hz .. 20 kHz
```

```require
low corner             : < 20 Hz
```
"""


def _git(repo: Path, *args: str, when: str | None = None) -> None:
    env = {"PATH": os.environ.get("PATH", ""), "HOME": str(repo), "LC_ALL": "C",
           "GIT_CONFIG_NOSYSTEM": "1", "GIT_AUTHOR_NAME": "Bench Generator",
           "GIT_AUTHOR_EMAIL": "bench@carrowfen.example",
           "GIT_COMMITTER_NAME": "Bench Generator",
           "GIT_COMMITTER_EMAIL": "bench@carrowfen.example"}
    if when:
        env["GIT_AUTHOR_DATE"] = env["GIT_COMMITTER_DATE"] = when
    subprocess.run(["git", *args], cwd=repo, env=env, check=True, capture_output=True)


def make_record(repo: Path, designs: int, revisions: int) -> Path:
    """Write the generated record into ``repo`` (a new git repository); return its designs
    folder.  Revision r of every design is committed together (R commits in all), so the
    history holds ``designs × revisions`` distinct design revisions."""
    folder = repo / "designs"
    folder.mkdir(parents=True)
    _git(repo, "init", "-q", "-b", "main")
    for revision in range(revisions):
        for number in range(designs):
            (folder / f"stage-{number:03d}.md").write_text(design_text(number, revision),
                                                            encoding="utf-8")
        _git(repo, "add", "designs")
        _git(repo, "commit", "-q", "-m", f"Revision {revision} of every generated stage",
             when=f"2026-10-{1 + revision % 28:02d}T09:00:00+00:00")
    return folder
