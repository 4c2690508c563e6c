"""Layout hints: an optional ``layout`` block in a design file that nudges the drawing.

One hint per line; ``#`` starts a comment::

    Q2 right-of Q1      # Q2 stands right of Q1 in the signal row (also: left-of)
    Q2 mirrored         # a transistor drawn with its base/gate on the right
    CE turned           # a two-terminal part drawn end for end
    label b1 c2         # name flags on these nets (input and output always get one)
    arrange layered     # skip the amplifier layout, use the general layered one

Unknown parts, nets and words are diagnostics at file:line:col with a "did you mean" hint.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from docgen.design import Design, Part
from docgen.diagnostics import Collector, Span, did_you_mean
from docgen.draw.classify import ACTIVE

ORDER_WORDS = ("right-of", "left-of")
PART_WORDS = ("mirrored", "turned", *ORDER_WORDS)
ARRANGEMENTS = ("amplifier", "layered")


@dataclass
class Hints:
    """The hints of one design, checked against its parts and nets."""

    after: list[tuple[str, str]] = field(default_factory=list)  # (part, must be right of part)
    mirror: set[str] = field(default_factory=set)
    turn: set[str] = field(default_factory=set)
    labels: list[str] = field(default_factory=list)
    arrangement: str = "amplifier"

    def mirrored(self, name: str) -> bool:
        """True if the part is to be drawn mirrored."""
        return name in self.mirror

    def turned(self, name: str) -> bool:
        """True if the two-terminal part is to be drawn end for end."""
        return name in self.turn

    def order(self, parts: list[Part]) -> list[Part]:
        """``parts`` reordered so each ``A right-of B`` holds (when both are in the list)."""
        out = list(parts)
        for _ in range(len(self.after) + 1):
            changed = False
            for right, left in self.after:
                names = [p.name for p in out]
                if right in names and left in names and names.index(right) < names.index(left):
                    moving = out.pop(names.index(right))
                    out.insert([p.name for p in out].index(left) + 1, moving)
                    changed = True
            if not changed:
                break
        return out


def read_hints(design: Design) -> Hints:
    """The hints in the design's ``layout`` block(s); raises ``InputError`` on a bad line."""
    hints = Hints()
    lines = design.source.splitlines()
    collector = Collector(design.path, lines)
    parts = {p.name: p for p in design.parts}
    nets = set(design.nets)
    for block in design.blocks:
        if block.tag != "layout":
            continue
        for offset, raw in enumerate(block.text.splitlines()):
            line_number = block.first_line + offset
            _read_line(raw, line_number, _indent(lines, line_number, raw), hints, parts, nets,
                       collector)
    collector.raise_if_errors()
    return hints


def _indent(lines: list[str], line_number: int, raw: str) -> int:
    """Column offset of the block's text within the file line (blocks may be indented)."""
    if 0 < line_number <= len(lines):
        found = lines[line_number - 1].find(raw.strip()) if raw.strip() else 0
        return max(0, found - (len(raw) - len(raw.lstrip())))
    return 0


def _tokens(raw: str) -> list[tuple[str, int]]:
    """Words of a line with their 1-based columns, comments removed."""
    text = raw.split("#", 1)[0]
    out, column = [], 0
    for word in text.split():
        column = text.index(word, column)
        out.append((word, column + 1))
        column += len(word)
    return out


def _read_line(raw: str, line: int, indent: int, hints: Hints, parts: dict[str, Part],
               nets: set[str], collector: Collector) -> None:
    words = _tokens(raw)
    if not words:
        return

    def span(index: int) -> Span:
        word, column = words[index]
        return Span(line, column + indent, len(word))

    head = words[0][0]
    if head == "label":
        if len(words) == 1:
            collector.add(span(0), "'label' needs one or more net names", hint="label b1 c2")
        for index, (net, _) in enumerate(words[1:], start=1):
            if net in nets:
                hints.labels.append(net)
            else:
                collector.add(span(index), f"no net '{net}' in the circuit",
                              hint=did_you_mean(net, nets))
        return
    if head == "arrange":
        if len(words) != 2 or words[1][0] not in ARRANGEMENTS:
            collector.add(span(min(1, len(words) - 1)), "'arrange' takes one word: "
                          + " or ".join(ARRANGEMENTS),
                          hint=did_you_mean(words[1][0], ARRANGEMENTS) if len(words) > 1 else None)
        else:
            hints.arrangement = words[1][0]
        return
    if head not in parts:
        collector.add(span(0), f"no part '{head}' in the circuit (a hint starts with a part "
                      "name, 'label' or 'arrange')",
                      hint=did_you_mean(head, [*parts, "label", "arrange"]))
        return
    _read_part_hint(words, span, hints, parts, collector)


def _read_part_hint(words: list[tuple[str, int]], span, hints: Hints,  # noqa: ANN001
                    parts: dict[str, Part], collector: Collector) -> None:
    name = words[0][0]
    if len(words) < 2:
        collector.add(span(0), f"what about {name}? expected one of: " + ", ".join(PART_WORDS))
        return
    verb = words[1][0]
    if verb not in PART_WORDS:
        collector.add(span(1), f"unknown layout word '{verb}'",
                      hint=did_you_mean(verb, PART_WORDS) or "use one of: " + ", ".join(PART_WORDS))
        return
    expected = 3 if verb in ORDER_WORDS else 2
    if len(words) != expected:
        where = span(min(len(words), expected) - 1 if len(words) < expected else expected)
        collector.add(where, f"'{verb}' takes {'one part name' if expected == 3 else 'nothing'}"
                      " after it")
        return
    if verb in ORDER_WORDS:
        other = words[2][0]
        if other not in parts:
            collector.add(span(2), f"no part '{other}' in the circuit",
                          hint=did_you_mean(other, parts))
        elif other == name:
            collector.add(span(2), f"{name} cannot be placed relative to itself")
        else:
            hints.after.append((name, other) if verb == "right-of" else (other, name))
    elif verb == "mirrored":
        if parts[name].kind not in ACTIVE or parts[name].kind == "opamp":
            collector.add(span(1), f"only transistors can be mirrored ({name} is a "
                          f"{parts[name].kind})", hint=f"use '{name} turned' to swap its ends"
                          if parts[name].kind not in ACTIVE else None)
        else:
            hints.mirror.add(name)
    elif parts[name].kind in ACTIVE:
        collector.add(span(1), f"only two-terminal parts can be turned ({name} is a "
                      f"{parts[name].kind})", hint=f"use '{name} mirrored'"
                      if parts[name].kind != "opamp" else None)
    else:
        hints.turn.add(name)
