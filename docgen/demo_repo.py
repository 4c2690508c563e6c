"""A demo git repository with a scripted, realistic history of some of the bundled designs.

:func:`make_demo_repo` replays the front-end team's story from ``designs/``: first cuts, a
rewiring found in review, value tweaks, a rename, approvals, a retirement and a change after
approval.  Every commit has a fixed author and date (``GIT_AUTHOR_DATE``/``GIT_COMMITTER_DATE``)
and git runs without the user's or the system's configuration, so the same docgen gives the same
commit ids on every machine.  The history and diff pages use it as their showcase and test bed.

Each step derives an earlier revision from the current design text by exact replacements; a
replacement that no longer matches raises :class:`DemoScriptError`, so the script cannot drift
silently from the designs it replays.
"""

from __future__ import annotations

import os
import re
import shutil
import subprocess
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path

#: Where the demo repository goes when no path is given.
DEFAULT_PATH = Path("build/demo-repo")
#: The bundled designs the script replays: ``designs/`` in the working folder (the project's
#: own checkout, as for ``docgen build``), else beside the package in a source checkout.
DEFAULT_SOURCE = Path("designs")
_CHECKOUT_SOURCE = Path(__file__).resolve().parent.parent / "designs"

PEOPLE = {
    "Ines": ("Ines Okafor", "ines.okafor@carrowfen.example"),
    "Hedda": ("Hedda Lindqvist", "hedda.lindqvist@carrowfen.example"),
    "Tomasz": ("Tomasz Wren", "tomasz.wren@carrowfen.example"),
    "Rafael": ("Rafael Munro", "rafael.munro@carrowfen.example"),
}


class DemoScriptError(RuntimeError):
    """The scripted history no longer fits the designs it is derived from."""


def replaced(text: str, *pairs: tuple[str, str]) -> str:
    """``text`` with each ``(old, new)`` replaced exactly once; raise if ``old`` is missing."""
    for old, new in pairs:
        if text.count(old) != 1:
            raise DemoScriptError(f"expected exactly one {old!r} in the design text")
        text = text.replace(old, new)
    return text


def with_header(text: str, **values: str | None) -> str:
    """``text`` with header keys set (``None`` removes the key); ``replaced_by`` → replaced-by."""
    head, sep, body = text.partition("\n---\n")
    lines = head.split("\n")
    for key, value in values.items():
        name = key.replace("_", "-")
        found = [i for i, line in enumerate(lines) if line.startswith(f"{name}:")]
        if value is None:
            lines = [line for i, line in enumerate(lines) if i not in found]
        elif found:
            lines[found[0]] = f"{name}: {value}"
        else:
            lines.insert(2, f"{name}: {value}")  # after '---' and 'title:'
    return "\n".join(lines) + sep + body


@dataclass(frozen=True)
class Step:
    """One commit: who, when, why, and what it does to the working tree."""

    when: str  # ISO 8601 with offset
    who: str
    message: str
    writes: dict[str, Callable[[], str]] = field(default_factory=dict)
    renames: tuple[tuple[str, str], ...] = ()


def _script(read: Callable[[str], str]) -> list[Step]:
    """The team's story, oldest first.  ``read(path)`` gives a current design's text."""
    buffer, preamp = read("hydrophone-buffer.md"), read("hydrophone-preamp.md")
    mic, v1, driver = read("mic-preamp.md"), read("cell-driver-v1.md"), read("cell-driver.md")
    follower = read("preamp-follower.md")
    co_1u = ("CO      capacitor  2u2 10% 25 V                : src out",
             "CO      capacitor  1u 10% 25 V                 : src out")
    ce_all = ("CE      capacitor  100u 20% 16 V polarised=yes : e2 gnd",
              "CE      capacitor  100u 20% 16 V polarised=yes : e1 gnd")
    re1_470 = ("RE1     resistor   390 1% 0.125 W              : e1 e2",
               "RE1     resistor   470 1% 0.125 W              : e1 e2")
    ci_2u2 = ("CI      capacitor  4u7 10% 25 V                : in b1",
              "CI      capacitor  2u2 10% 25 V                : in b1")
    draft = {"status": "draft", "reviewers": None, "approved": None}
    review = {"status": "review", "approved": None}
    divider = (("R1      resistor   270k 1% 0.125 W             : vcc b1",
                "R1      resistor   100k 1% 0.125 W             : vcc b1"),
               ("R2      resistor   47k 1% 0.125 W              : b1 gnd",
                "R2      resistor   18k 1% 0.125 W              : b1 gnd"))
    # first approvals, before the chain's noise budget added a requirement to three stages
    buffer_old = _without_paragraph(replaced(
        buffer,
        ("RG      resistor   12M 5% 0.125 W ", "RG      resistor   10M 5% 0.125 W "),
        ("RS      resistor   4k7 1% 0.125 W ", "RS      resistor   2k2 1% 0.125 W "),
        ("gain at 1 kHz      : > -3 dB across boards", "gain at 1 kHz      : > -3 dB"),
        ("low corner         : < 18 Hz across boards", "low corner         : < 18 Hz")),
        "Tomasz asked whether JFET spread")
    buffer_09 = with_header(_without_line(buffer_old, "input noise 20 Hz .. 20 kHz :"),
                            approved="2026-09-14")
    preamp_09 = with_header(_without_line(preamp, "input noise 20 Hz .. 20 kHz :"),
                            approved="2026-09-21")
    mic_10 = with_header(_without_line(mic, "signal-to-noise ratio  :"), approved="2026-10-02")
    v1_live = with_header(v1, status="review", replaced_by=None,
                          summary="Single emitter follower with a 180 Ω emitter resistor "
                                  "driving the conductivity cell.")
    return [
        Step("2026-08-03T09:12:00+01:00", "Ines", "Team library page and design conventions",
             {"library/stock-parts.md": lambda: read("library/stock-parts.md"),
              "conventions.md": lambda: read("conventions.md")}),
        Step("2026-08-10T14:05:00+01:00", "Hedda", "Hydrophone buffer: first cut",
             {"hydrophone-buffer.md": lambda: with_header(replaced(buffer_09, co_1u), **draft)}),
        Step("2026-08-17T10:30:00+01:00", "Hedda", "Hydrophone preamp: first cut",
             {"ce-preamp.md": lambda: with_header(replaced(preamp_09, ce_all, re1_470),
                                                  **draft)}),
        Step("2026-08-19T16:45:00+01:00", "Hedda",
             "Preamp: bypass only RE2 (CE was across the whole emitter, so re alone set the gain)",
             {"ce-preamp.md": lambda: with_header(replaced(preamp_09, re1_470), **draft)}),
        Step("2026-08-24T11:20:00+01:00", "Hedda", "Preamp: RE1 470 → 390 Ω for the 20 dB budget",
             {"ce-preamp.md": lambda: with_header(preamp_09, **draft)}),
        Step("2026-08-31T09:00:00+01:00", "Hedda",
             "Buffer: CO 1 → 2.2 µF so RG alone sets the low corner; ready for review",
             {"hydrophone-buffer.md": lambda: with_header(buffer_09, **review)}),
        Step("2026-09-07T13:10:00+01:00", "Hedda",
             "Rename ce-preamp.md to hydrophone-preamp.md; ready for review",
             {"hydrophone-preamp.md": lambda: with_header(preamp_09, **review)},
             renames=(("ce-preamp.md", "hydrophone-preamp.md"),)),
        Step("2026-09-10T15:20:00+01:00", "Tomasz", "Hydrophone line driver (emitter follower)",
             {"preamp-follower.md": lambda: with_header(follower, **review)}),
        Step("2026-09-14T17:30:00+01:00", "Ines", "Approve the hydrophone buffer",
             {"hydrophone-buffer.md": lambda: buffer_09}),
        Step("2026-09-15T10:00:00+01:00", "Rafael", "Conductivity-cell driver: class-A follower",
             {"cell-driver-v1.md": lambda: v1_live}),
        Step("2026-09-21T16:00:00+01:00", "Ines", "Approve the hydrophone preamp and line driver",
             {"hydrophone-preamp.md": lambda: preamp_09,
              "preamp-follower.md": lambda: follower}),
        Step("2026-10-01T11:00:00+01:00", "Tomasz", "Mic preamp: feedback pair, first cut",
             {"mic-preamp.md": lambda: with_header(replaced(mic_10, *divider), **draft)}),
        Step("2026-10-02T09:40:00+01:00", "Tomasz",
             "Mic preamp: divider 270k/47k so the capsule is not loaded; approved",
             {"mic-preamp.md": lambda: mic_10}),
        Step("2026-10-20T15:00:00+01:00", "Rafael",
             "Push-pull cell driver replaces the class-A follower (RE ran above half rating)",
             {"cell-driver.md": lambda: driver, "cell-driver-v1.md": lambda: v1}),
        Step("2026-11-04T10:15:00+00:00", "Hedda",
             "Preamp: CI 4.7 → 2.2 µF film capacitor to fit the new footprint",
             {"hydrophone-preamp.md": lambda: replaced(preamp_09, ci_2u2)}),
        Step("2026-11-12T14:30:00+00:00", "Rafael", "ADC driver for the 5 V board, for review",
             {"adc-driver.md": lambda: read("adc-driver.md")}),
        Step("2026-11-18T09:30:00+00:00", "Ines", "Geophone differential amplifier, for review",
             {"geophone-amp.md": lambda: read("geophone-amp.md")}),
        Step("2026-11-19T16:10:00+00:00", "Hedda",
             "Low-power preamp draft (fails its low corner so far)",
             {"hydrophone-preamp-lowpower.md": lambda: read("hydrophone-preamp-lowpower.md")}),
        Step("2026-11-20T11:00:00+00:00", "Ines", "Signal-chain overview page",
             {"signal-chain.md": lambda: read("signal-chain.md")}),
        Step("2026-11-24T15:45:00+00:00", "Ines",
             "Noise budget: noise requirements for the buffer and the mic preamp; mic preamp "
             "re-approved, buffer back to review",
             {"hydrophone-buffer.md": lambda: with_header(buffer_old, status="review",
                                                          approved=None),
              "mic-preamp.md": lambda: mic}),
        Step("2026-11-30T10:05:00+00:00", "Hedda",
             "Buffer: RS 2.2k → 4.7k and RG 10M → 12M so gain and corner hold on every board; "
             "re-approved",
             {"hydrophone-buffer.md": lambda: buffer}),
    ]


def _without(text: str, start: str, separator: str, what: str) -> str:
    """``text`` split at ``separator`` without its one piece starting with ``start``."""
    pieces = text.split(separator)
    found = [i for i, piece in enumerate(pieces) if piece.startswith(start)]
    if len(found) != 1:
        raise DemoScriptError(f"expected exactly one {what} starting {start!r}")
    del pieces[found[0]]
    return separator.join(pieces)


def _without_line(text: str, start: str) -> str:
    """``text`` without its one line starting with ``start``."""
    return _without(text, start, "\n", "line")


def _without_paragraph(text: str, start: str) -> str:
    """``text`` without the one paragraph (lines up to a blank line) that starts with ``start``."""
    return _without(text, start, "\n\n", "paragraph")


def _environment(step: Step) -> dict[str, str]:
    name, email = PEOPLE[step.who]
    env = {key: value for key, value in os.environ.items() if not key.startswith("GIT_")}
    env.update({
        "GIT_AUTHOR_NAME": name, "GIT_AUTHOR_EMAIL": email, "GIT_AUTHOR_DATE": step.when,
        "GIT_COMMITTER_NAME": name, "GIT_COMMITTER_EMAIL": email,
        "GIT_COMMITTER_DATE": step.when,
        # the user's and the system's git settings (signing, hooks, templates) stay out
        "GIT_CONFIG_NOSYSTEM": "1", "GIT_CONFIG_GLOBAL": os.devnull, "LC_ALL": "C",
    })
    return env


def _git(repo: Path, env: dict[str, str], *args: str) -> None:
    subprocess.run(["git", *args], cwd=repo, env=env, check=True, capture_output=True)


def make_demo_repo(path: str | Path = DEFAULT_PATH, source: str | Path = DEFAULT_SOURCE) -> Path:
    """Create a fresh git repository at ``path`` replaying the demo history; return its path.

    The repository has one branch, ``main``, whose ``designs/`` folder ends as ``source``
    except for the hydrophone preamp, which is changed after its first approval (its input
    capacitor) and never re-approved.  An existing folder
    at ``path`` is replaced, but only if it is empty or a repository this function made (it
    has ``.demo-repo``).
    """
    repo, source = Path(path), Path(source)
    if source == DEFAULT_SOURCE and not (source / "library").is_dir():
        source = _CHECKOUT_SOURCE  # an editable install run from another folder
    if not (source / "library").is_dir():
        raise DemoScriptError(f"no designs to replay in {source}")
    _clear(repo)
    steps = _script(lambda name: (source / name).read_text(encoding="utf-8"))
    first = _environment(steps[0])
    _git(repo, first, "init", "--quiet", "--initial-branch=main")
    (repo / ".demo-repo").write_text("made by docgen.demo_repo.make_demo_repo\n",
                                     encoding="utf-8")
    (repo / ".gitignore").write_text("site/\n.demo-repo\n", encoding="utf-8")
    _git(repo, first, "add", ".gitignore")
    for step in steps:
        _apply(repo, step)
    return repo


def _clear(repo: Path) -> None:
    if repo.exists():
        if any(repo.iterdir()) and not (repo / ".demo-repo").exists():
            raise DemoScriptError(f"{repo} exists and is not a demo repository; not touching it")
        shutil.rmtree(repo)
    repo.mkdir(parents=True)


def _apply(repo: Path, step: Step) -> None:
    env = _environment(step)
    for old, new in step.renames:
        _git(repo, env, "mv", f"designs/{old}", f"designs/{new}")
    for name, make in step.writes.items():
        target = repo / "designs" / name
        target.parent.mkdir(parents=True, exist_ok=True)
        target.write_bytes(make().encode("utf-8"))
        _git(repo, env, "add", f"designs/{name}")
    _git(repo, env, "commit", "--quiet", "--no-verify", "-m", step.message)


def main(argv: list[str] | None = None) -> int:
    """``python -m docgen.demo_repo [PATH]``: build the demo repository and say where."""
    import sys

    args = sys.argv[1:] if argv is None else argv
    repo = make_demo_repo(args[0] if args else DEFAULT_PATH)
    print(f"demo repository with {_count(repo)} commits in {repo}")
    return 0


def _count(repo: Path) -> int:
    out = subprocess.run(["git", "rev-list", "--count", "HEAD"], cwd=repo, check=True,
                         capture_output=True, text=True, env=_environment(
                             Step("2026-01-01T00:00:00+00:00", "Ines", ""))).stdout
    return int(re.sub(r"\D", "", out))


if __name__ == "__main__":  # pragma: no cover
    raise SystemExit(main())
