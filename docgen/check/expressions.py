"""The small expression language of ``estimate`` lines, parsed by recursive descent.

Grammar (whole input must match ``sum``)::

    sum      := product (("+" | "-") product)*
    product  := unary (("*" | "/") unary)*
    unary    := ("-" | "+") unary | power
    power    := atom ("^" unary)?                       right-associative
    atom     := NUMBER | NAME | NAME "." NAME | NAME "(" [sum ("," sum)*] ")"
              | "(" sum ")" | "[" metric words "]"

``×`` and ``·`` are accepted for ``*``, ``−`` for ``-``.  A NUMBER may carry an SI prefix and a
unit (``4k7``, ``0.65 V`` is written ``0.65V``).  Nothing here runs Python code: the parser
builds a tree of tuples and :func:`evaluate` walks it with arithmetic on floats only.  Input
length, nesting depth and the size of every intermediate result are bounded.
"""

from __future__ import annotations

import math
import re
from collections.abc import Callable, Mapping
from dataclasses import dataclass

from docgen.metrics import TextError
from docgen.units import QuantityError, parse_quantity

MAX_LENGTH = 400
MAX_DEPTH = 40
LIMIT = 1e100  # intermediate results beyond this are an error, not an overflow


class ExpressionError(TextError):
    """A problem in an expression (column within the expression text)."""


def _parallel(*values: float) -> float:
    """Resistors in parallel: 1 / Σ(1/x)."""
    if any(v == 0 for v in values):
        return 0.0
    return 1.0 / sum(1.0 / v for v in values)


def _decibels(x: float) -> float:
    return 20.0 * math.log10(abs(x))


#: function name -> (function, least arguments, most arguments (None: any))
FUNCTIONS: dict[str, tuple[Callable[..., float], int, int | None]] = {
    "parallel": (_parallel, 2, None),
    "sqrt": (math.sqrt, 1, 1),
    "log10": (math.log10, 1, 1),
    "ln": (math.log, 1, 1),
    "exp": (math.exp, 1, 1),
    "abs": (abs, 1, 1),
    "dB": (_decibels, 1, 1),
    "min": (min, 1, None),
    "max": (max, 1, None),
}

_TOKEN = re.compile(
    r"(?P<space>\s+)|(?P<number>(?:\d+\.?\d*|\.\d+)[eE][+-]?\d+|\d[\w.]*%?|\.\d[\w.]*)"
    r"|(?P<name>[A-Za-z][A-Za-z0-9_]*)|(?P<op>[-+*/^(),.\[\]×·−])"
)


@dataclass(frozen=True, slots=True)
class Token:
    """A token: its kind (number, name, op, metric, end), its text and its 1-based column."""

    kind: str
    text: str
    col: int


def tokenize(text: str) -> list[Token]:
    """Split ``text`` into tokens; ``[...]`` is one metric token."""
    if len(text) > MAX_LENGTH:
        raise ExpressionError(f"expression longer than {MAX_LENGTH} characters", MAX_LENGTH + 1)
    tokens, i = [], 0
    while i < len(text):
        if text[i] == "[":
            end = text.find("]", i)
            if end < 0:
                raise ExpressionError("'[' without its ']'", i + 1, hint="write '[metric]'")
            tokens.append(Token("metric", text[i + 1:end], i + 2))
            i = end + 1
            continue
        match = _TOKEN.match(text, i)
        if not match:
            raise ExpressionError(f"unexpected character '{text[i]}'", i + 1,
                                  hint="an estimate uses numbers, part names, + - * / ^, "
                                  "parentheses and functions such as parallel(a, b)")
        kind = match.lastgroup or "op"
        if kind != "space":
            word = {"×": "*", "·": "*", "−": "-"}.get(match.group(), match.group())
            tokens.append(Token(kind, word, i + 1))
        i = match.end()
    tokens.append(Token("end", "", len(text) + 1))
    return tokens


class _Parser:
    """Recursive descent over the token list, building tuples: ('num', v), ('name', n, col),
    ('param', part, param, col), ('metric', text, col), ('call', f, args, col),
    ('neg', x), ('bin', op, a, b, col)."""

    def __init__(self, tokens: list[Token]):
        self.tokens = tokens
        self.at = 0
        self.depth = 0

    @property
    def token(self) -> Token:
        return self.tokens[self.at]

    def take(self, text: str | None = None) -> Token:
        token = self.token
        if text is not None and token.text != text:
            shown = token.text or "the end"
            raise ExpressionError(f"expected '{text}' but found '{shown}'", token.col,
                                  max(1, len(token.text)))
        self.at += 1
        return token

    def nested(self) -> None:
        self.depth += 1
        if self.depth > MAX_DEPTH:
            raise ExpressionError(f"expression nested deeper than {MAX_DEPTH} levels",
                                  self.token.col)

    def sum(self) -> tuple:
        node = self.product()
        while self.token.text in ("+", "-"):
            op = self.take()
            node = ("bin", op.text, node, self.product(), op.col)
        return node

    def product(self) -> tuple:
        node = self.unary()
        while self.token.text in ("*", "/"):
            op = self.take()
            node = ("bin", op.text, node, self.unary(), op.col)
        return node

    def unary(self) -> tuple:
        if self.token.text in ("-", "+"):
            sign = self.take()
            self.nested()
            operand = self.unary()
            self.depth -= 1
            return ("neg", operand) if sign.text == "-" else operand
        return self.power()

    def power(self) -> tuple:
        base = self.atom()
        if self.token.text == "^":
            op = self.take()
            self.nested()
            exponent = self.unary()
            self.depth -= 1
            return ("bin", "^", base, exponent, op.col)
        return base

    def atom(self) -> tuple:
        token = self.token
        if token.kind == "number":
            self.take()
            return ("num", _number(token))
        if token.kind == "metric":
            self.take()
            return ("metric", token.text, token.col)
        if token.text == "(":
            self.take()
            self.nested()
            node = self.sum()
            self.depth -= 1
            self.take(")")
            return node
        if token.kind == "name":
            return self.name()
        shown = token.text or "the end of the expression"
        hint = "powers are written with '^'" if token.text == "*" else None
        raise ExpressionError(f"expected a number, a name or '(' but found '{shown}'",
                              token.col, max(1, len(token.text)), hint)

    def name(self) -> tuple:
        token = self.take()
        if self.token.text == ".":
            self.take()
            param = self.token
            if param.kind != "name":
                raise ExpressionError("expected a model parameter name after '.'", param.col)
            self.take()
            return ("param", token.text, param.text, param.col)
        if self.token.text != "(":
            return ("name", token.text, token.col)
        if token.text not in FUNCTIONS:
            from docgen.diagnostics import did_you_mean

            raise ExpressionError(f"unknown function '{token.text}'", token.col, len(token.text),
                                  did_you_mean(token.text, FUNCTIONS) or
                                  "functions: " + ", ".join(FUNCTIONS))
        self.take("(")
        self.nested()
        args = [] if self.token.text == ")" else [self.sum()]
        while self.token.text == ",":
            self.take()
            args.append(self.sum())
        self.depth -= 1
        self.take(")")
        _, least, most = FUNCTIONS[token.text]
        if len(args) < least or (most is not None and len(args) > most):
            raise ExpressionError(f"{token.text}() takes {least}"
                                  + ("" if most == least else " or more")
                                  + f" argument{'s' if least > 1 else ''}, got {len(args)}",
                                  token.col, len(token.text))
        return ("call", token.text, tuple(args), token.col)


def _number(token: Token) -> float:
    try:
        if token.text.endswith("%"):
            return float(token.text[:-1]) / 100
        return parse_quantity(token.text).value
    except (QuantityError, ValueError) as exc:
        hint = getattr(exc, "hint", None)
        raise ExpressionError(f"'{token.text}' is not a number", token.col, len(token.text),
                              hint) from None


def parse(text: str) -> tuple:
    """Parse ``text`` into an expression tree (raises :class:`ExpressionError`)."""
    parser = _Parser(tokenize(text))
    node = parser.sum()
    if parser.token.kind != "end":
        token = parser.token
        raise ExpressionError(f"unexpected '{token.text}'", token.col, len(token.text),
                              "an operator such as + - * / is missing, or a ')' is extra")
    return node


Lookup = Callable[[tuple], float]


def evaluate(node: tuple, lookup: Lookup) -> float:
    """The value of an expression tree.  ``lookup`` resolves ``name``, ``param`` and
    ``metric`` nodes (raising :class:`ExpressionError` when it cannot)."""
    kind = node[0]
    if kind == "num":
        return node[1]
    if kind in ("name", "param", "metric"):
        return _bounded(lookup(node), node[-1])
    if kind == "neg":
        return -evaluate(node[1], lookup)
    if kind == "call":
        func = FUNCTIONS[node[1]][0]
        args = [evaluate(a, lookup) for a in node[2]]
        return _bounded(_apply(lambda: func(*args), node[1], node[3]), node[3])
    _, op, left_node, right_node, col = node
    left, right = evaluate(left_node, lookup), evaluate(right_node, lookup)
    return _bounded(_apply(lambda: _OPERATORS[op](left, right), op, col), col)


def _apply(compute: Callable[[], float], what: str, col: int) -> float:
    try:
        return float(compute())
    except ZeroDivisionError:
        raise ExpressionError("division by zero", col) from None
    except (OverflowError, ValueError, TypeError):
        raise ExpressionError(f"'{what}' has no real value here (out of range or undefined)",
                              col) from None


def _power(base: float, exponent: float) -> float:
    if abs(exponent) > 1000:
        raise OverflowError
    result = base ** exponent
    if isinstance(result, complex):
        raise ValueError
    return result


_OPERATORS: Mapping[str, Callable[[float, float], float]] = {
    "+": lambda a, b: a + b,
    "-": lambda a, b: a - b,
    "*": lambda a, b: a * b,
    "/": lambda a, b: a / b,
    "^": _power,
}


def _bounded(value: float, col: int) -> float:
    if not math.isfinite(value) or abs(value) > LIMIT:
        raise ExpressionError("the result is out of range", col)
    return value


def is_decibels(node: tuple) -> bool:
    """True when the expression's outermost operation is ``dB(...)``."""
    return node[0] == "call" and node[1] == "dB"
