"""A part's connections after the colon: nets in order, or ``terminal=net`` for each terminal."""

from __future__ import annotations

from docgen.diagnostics import Span, did_you_mean
from docgen.kinds import connects_by_position
from docgen.reader.common import NET_NAME, article
from docgen.reader.lexer import Word
from docgen.reader.part import PartBuilder


def read_connections(builder: PartBuilder, words: list[Word],
                      colon: Span) -> tuple[tuple[str, str], ...] | None:
    """The (terminal, net) pairs in canonical order, or None after reporting a problem."""
    terminals = builder.spec.terminals
    if connects_by_position(builder.kind):
        return _positional(builder, words, colon, terminals)
    return _named(builder, words, colon, terminals)


def _net_ok(builder: PartBuilder, net: str, span: Span) -> bool:
    if NET_NAME.match(net):
        return True
    builder.error(span, f"'{net}' is not a net name",
                  hint="a net name is a word of letters, digits, '_', '.', '+' or '-'")
    return False


def _positional(builder: PartBuilder, words: list[Word], colon: Span,
                terminals: tuple[str, ...]) -> tuple[tuple[str, str], ...] | None:
    line = builder.line.number
    named = [w for w in words if "=" in w.text]
    if named:
        builder.error(Span(line, named[0].col, len(named[0].text)),
                      f"{article(builder.kind)} connects by position: "
                      f"list its {len(terminals)} nets",
                      hint=f"e.g. '{builder.name.text} ... : a b'")
        return None
    if len(words) != len(terminals):
        where = (Span(line, words[len(terminals)].col, len(words[len(terminals)].text))
                 if len(words) > len(terminals) else colon)
        builder.error(where, f"{article(builder.kind)} connects to {len(terminals)} nets, "
                      f"not {len(words)}", hint=_order_hint(builder.kind))
        return None
    pairs = []
    for terminal, word in zip(terminals, words, strict=True):
        span = Span(line, word.col, len(word.text))
        if not _net_ok(builder, word.text, span):
            return None
        builder.spans[f"net:{terminal}"] = span
        pairs.append((terminal, word.text))
    return tuple(pairs)


def _order_hint(kind: str) -> str:
    return {"diode": "anode net first, then cathode net",
            "supply": "positive net first, then negative net",
            "signal": "positive net first, then negative net",
            "current": "the current flows from the first net to the second"}.get(
        kind, "the two nets the part sits between")


def _named(builder: PartBuilder, words: list[Word], colon: Span,
           terminals: tuple[str, ...]) -> tuple[tuple[str, str], ...] | None:
    line = builder.line.number
    example = " ".join(f"{t}=..." for t in terminals)
    found: dict[str, str] = {}
    for word in words:
        span = Span(line, word.col, len(word.text))
        terminal, eq, net = word.text.partition("=")
        if not eq:
            builder.error(span, f"{article(builder.kind)} names each terminal: '{example}'")
            continue
        if terminal not in terminals:
            builder.error(Span(line, word.col, max(1, len(terminal))),
                          f"{article(builder.kind)} has no terminal '{terminal}'",
                          hint=did_you_mean(terminal, terminals, cutoff=0.3)
                          or f"its terminals are {', '.join(terminals)}")
            continue
        if terminal in found:
            builder.error(span, f"terminal '{terminal}' is connected twice")
            continue
        net_span = Span(line, word.col + len(terminal) + 1, max(1, len(net)))
        if _net_ok(builder, net, net_span):
            found[terminal] = net
            builder.spans[f"net:{terminal}"] = net_span
    missing = [t for t in terminals if t not in found]
    if missing and builder.ok:
        builder.error(colon, f"{builder.name.text} leaves terminal(s) {', '.join(missing)} "
                      "unconnected", hint=f"{article(builder.kind)} is connected as '{example}'")
    if not builder.ok:
        return None
    return tuple((t, found[t]) for t in terminals)
