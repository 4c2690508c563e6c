"""The Design: what the reader makes of one Markdown page, and what every later stage consumes.

Everything here is immutable plain data in SI base units, with the source position of each
field kept so that a later stage (elaboration, checks, live values) can still point at the
place in the file.  Nothing in this module parses or computes.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from types import MappingProxyType
from typing import Literal

from docgen.diagnostics import Diagnostic, Span

PageKind = Literal["design", "library", "note"]
Status = Literal["draft", "review", "approved", "retired"]
LimitKind = Literal["below", "above", "between", "approx"]

EMPTY: Mapping[str, object] = MappingProxyType({})


def frozen_map(items: Mapping | None = None) -> Mapping:
    """A read-only view of a fresh dict (keeps Design values immutable)."""
    return MappingProxyType(dict(items or {}))


@dataclass(frozen=True, slots=True)
class Header:
    """The ``---`` header of a page.  Dates stay ISO text (``YYYY-MM-DD``)."""

    title: str | None = None
    status: Status = "draft"
    owner: str | None = None
    reviewers: tuple[str, ...] = ()
    approved: str | None = None
    tags: tuple[str, ...] = ()
    summary: str | None = None
    replaced_by: str | None = None
    spans: Mapping[str, Span] = field(default_factory=frozen_map)


@dataclass(frozen=True, slots=True)
class Part:
    """One line of a ``circuit`` block.

    :param name: unique part name (``Q1``, ``RL1``).
    :param kind: one of :data:`docgen.kinds.KINDS`.
    :param value: the primary value in SI units: ohms, farads, henries; volts for ``supply``,
        peak volts for ``signal``, amperes for ``current``.  ``None`` for model-based parts.
    :param value_text: the value exactly as the author wrote it (kept for tidy and for display).
    :param model: model name for ``diode``, transistors and ``opamp``.
    :param tolerance: relative tolerance as a fraction (``0.01`` for 1 %), ``None`` if exact.
    :param rating: power rating in W (resistors), voltage rating in V (capacitors), or ``None``.
    :param params: further ``key=value`` settings in SI units (``frequency``, ``source``,
        ``resistance``, ``tempco`` in 1/K, ``polarised`` as 1.0/0.0, ...).
    :param terminals: ``(terminal, net)`` pairs in the kind's canonical terminal order.
    :param span: position of the part name.
    :param spans: positions of the other fields: ``value``, ``tolerance``, ``rating``,
        ``model``, each param key, and ``net:<terminal>`` for each connection.
    """

    name: str
    kind: str
    value: float | None
    value_text: str | None
    model: str | None
    tolerance: float | None
    rating: float | None
    params: Mapping[str, float]
    terminals: tuple[tuple[str, str], ...]
    span: Span
    spans: Mapping[str, Span] = field(default_factory=frozen_map)

    def net(self, terminal: str) -> str:
        """The net on ``terminal``."""
        return dict(self.terminals)[terminal]

    @property
    def nets(self) -> tuple[str, ...]:
        """The nets in canonical terminal order."""
        return tuple(n for _, n in self.terminals)


@dataclass(frozen=True, slots=True)
class ModelParam:
    """A model parameter value with its optional production spread ``(low .. high)``."""

    value: float
    low: float | None = None
    high: float | None = None
    span: Span | None = None


@dataclass(frozen=True, slots=True)
class ModelDef:
    """One line of a ``models`` block: a named parameter set for a device kind."""

    name: str
    kind: str
    params: Mapping[str, ModelParam]
    span: Span
    source: str  # the page that defines it ("<built-in>" for docgen's own)


@dataclass(frozen=True, slots=True)
class Bench:
    """The ``bench`` block: the conditions the design is exercised under.

    Every field has a documented default so an empty block is valid.
    """

    input: str | None = None
    output: str | None = None
    load_resistance: float | None = None
    load_capacitance: float | None = None
    f_start: float = 10.0
    f_stop: float = 1e6
    points_per_decade: int = 50
    noise_band: tuple[float, float] | None = None
    ambient: float = 25.0
    ambient_range: tuple[float, float] | None = None
    boards: int = 500
    seed: int = 1
    distribution: Literal["uniform", "normal"] = "uniform"
    distortion_limit: float = 0.01
    extra: Mapping[str, str] = field(default_factory=frozen_map)
    spans: Mapping[str, Span] = field(default_factory=frozen_map)


@dataclass(frozen=True, slots=True)
class Limit:
    """A requirement's limit, in SI units of its metric (dB for gains)."""

    kind: LimitKind
    low: float | None = None
    high: float | None = None
    unit: str = ""
    text: str = ""


@dataclass(frozen=True, slots=True)
class Requirement:
    """One line of a ``require`` block: ``metric : limit [across boards|temperature|all]``."""

    metric: str
    limit: Limit
    across: tuple[str, ...]
    span: Span
    metric_span: Span
    limit_span: Span


@dataclass(frozen=True, slots=True)
class Block:
    """A fenced block as found in the page: its tag, text and the line of its first content line."""

    tag: str
    text: str
    first_line: int


@dataclass(frozen=True, slots=True)
class Design:
    """One page of the record, read but not yet elaborated.

    :param path: the file path as given (relative paths stay relative).
    :param kind: ``design`` (has a circuit), ``library`` (models only) or ``note``.
    :param source: the full text of the file (kept for downloads, diffs and live values).
    :param blocks: every fenced block in the page, in order (prose rendering uses them).
    :param warnings: the reader's warnings for this page (errors raise instead).
    """

    path: str
    kind: PageKind
    header: Header
    parts: tuple[Part, ...] = ()
    models: tuple[ModelDef, ...] = ()
    bench: Bench = field(default_factory=Bench)
    requirements: tuple[Requirement, ...] = ()
    blocks: tuple[Block, ...] = ()
    source: str = ""
    warnings: tuple[Diagnostic, ...] = ()

    def part(self, name: str) -> Part:
        """The part called ``name`` (``KeyError`` if none)."""
        for p in self.parts:
            if p.name == name:
                return p
        raise KeyError(name)

    @property
    def nets(self) -> tuple[str, ...]:
        """Every net named by a part, in order of first appearance."""
        seen: dict[str, None] = {}
        for p in self.parts:
            for n in p.nets:
                seen.setdefault(n, None)
        return tuple(seen)
