"""Tables of the format reference generated from the registries, so the docs cannot drift.

``docs/format.md`` holds each table between ``<!-- generated: NAME -->`` and
``<!-- end generated -->``; a test checks the page against :func:`tables`, and
``python -m docgen.reference docs/format.md`` rewrites them after a registry changes.
"""

from __future__ import annotations

import math
import re
import sys
from collections.abc import Callable
from pathlib import Path

from docgen.kinds import KINDS
from docgen.params import MODEL_KINDS, ParamSpec
from docgen.reader.common import article
from docgen.units import format_eng

_SECTION = re.compile(
    r"(<!-- generated: (?P<name>[\w-]+) -->\n)(?P<body>.*?)(<!-- end generated -->)", re.S)

# Kinds that share one parameter set are documented together.
_FAMILIES = [("diode", ("diode",)), ("npn, pnp", ("npn", "pnp")),
             ("njfet, pjfet", ("njfet", "pjfet")), ("nmos, pmos", ("nmos", "pmos")),
             ("opamp", ("opamp",))]


def _cell(text: str) -> str:
    """Text for a Markdown table cell (a bare ``|`` would end the cell)."""
    return text.replace("|", "\\|")


def _default(spec: ParamSpec) -> str:
    if math.isinf(spec.default):
        return "∞ (none)"
    if spec.unit in ("", "1/V", "A/V²", "V/√Hz", "A/√Hz", "V/s", "eV"):
        text = format_eng(spec.default)
        return f"{text} {spec.unit}".rstrip()
    return format_eng(spec.default, spec.unit)


def model_parameters() -> str:
    """One table per model family: parameter, unit, neutral default, > 0, meaning."""
    out = []
    for title, kinds in _FAMILIES:
        specs = MODEL_KINDS[kinds[0]]
        assert all(MODEL_KINDS[k] == specs for k in kinds)
        out.append(f"#### {title}\n")
        out.append("| parameter | unit | default | must be > 0 | meaning |")
        out.append("|---|---|---|---|---|")
        for spec in specs.values():
            out.append(f"| `{spec.name}` | {spec.unit or '—'} | {_default(spec)} | "
                       f"{'yes' if spec.positive else ''} | {_cell(spec.meaning)} |")
        out.append("")
    return "\n".join(out)


def part_kinds() -> str:
    """The part kinds: terminals, value, rating and settings."""
    out = ["| kind | connections | value | rating | settings | meaning |",
           "|---|---|---|---|---|---|"]
    for name, spec in KINDS.items():
        if spec.two_terminal or name == "diode":
            connections = "two nets in order"
        else:
            connections = " ".join(f"`{t}=`" for t in spec.terminals)
        value = spec.value_unit or f"{article(spec.model_kind or name)} model name"
        settings = ", ".join(f"`{k}` ({u})" for k, u in spec.params.items()) or "—"
        out.append(f"| `{name}` | {connections} | {value} | {spec.rating_unit or '—'} | "
                   f"{settings} | {_cell(spec.meaning)} |")
    return "\n".join(out) + "\n"


def bench_keys() -> str:
    """The bench keys, including the extra keys other analyses read."""
    from docgen.reader.bench import EXTRA_KEYS, KEYS

    out = ["| key | meaning |", "|---|---|"]
    out += [f"| `{key}` | {_cell(meaning)} |" for key, (_, meaning) in KEYS.items()]
    out += [f"| `{key}` | {_cell(meaning)} (kept as written for that analysis) |"
            for key, meaning in EXTRA_KEYS.items()]
    return "\n".join(out) + "\n"


def header_keys() -> str:
    """The header keys."""
    from docgen.reader.header import KEYS

    out = ["| key | meaning |", "|---|---|"]
    out += [f"| `{key}` | {meaning} |" for key, (_, meaning) in KEYS.items()]
    return "\n".join(out) + "\n"


GENERATORS: dict[str, Callable[[], str]] = {
    "model-parameters": model_parameters,
    "part-kinds": part_kinds,
    "bench-keys": bench_keys,
    "header-keys": header_keys,
}


def tables(text: str) -> dict[str, str]:
    """The generated sections as they stand in ``text``: name -> body."""
    return {m["name"]: m["body"] for m in _SECTION.finditer(text)}


def regenerate(text: str) -> str:
    """``text`` with every generated section rewritten from the registries."""
    return _SECTION.sub(lambda m: m.group(1) + GENERATORS[m["name"]]() + m.group(4), text)


if __name__ == "__main__":  # pragma: no cover - a maintenance tool
    for name in sys.argv[1:]:
        page = Path(name)
        page.write_text(regenerate(page.read_text(encoding="utf-8")), encoding="utf-8")
