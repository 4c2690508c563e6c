"""Elaboration: a read :class:`~docgen.design.Design` becomes a solvable :class:`Circuit`.

Public API::

    elaborate(design, library) -> Circuit

A :class:`Circuit` is plain immutable data: the nets (``gnd`` is the reference and has no
index), every part as a :class:`Device` with its resolved nominal values (the part's value and
settings plus every model parameter, defaults from :mod:`docgen.params` filled in), the names
of the parameters that were *assumed* (not given by the model), the production spreads and the
part tolerance, the bench and the temperature.  The bench load (resistor and capacitor from the
output net to ``gnd``) is added as devices named ``bench-load`` and ``bench-load-capacitor``
(a hyphen cannot appear in a part name, so they never collide) with ``bench=True``.

Each device's values live in ``Device.values`` under the model parameter's name, or ``value``
for the part's primary value (Ω, F, H, V, A), or the part setting's name (``resistance``,
``source``, ``offset``, ``frequency``, ``tempco``).  Analyses that vary values (spread,
temperature) pass overrides keyed ``(part, name)`` to the solver; the circuit itself never
changes.

Model lookup order: the design's own ``models`` block, then ``library`` (the record supplies
the team's library pages and the built-in generic models in it).

``variations(circuit)`` lists every value with a tolerance or production range (part, name,
nominal, low, high) for the spread analysis.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field

from docgen import params as param_registry
from docgen.design import Bench, Design, ModelDef, Part, frozen_map
from docgen.diagnostics import CircuitError, Diagnostic, Span, did_you_mean
from docgen.kinds import GROUND, KINDS

#: Settings of two-terminal parts and their neutral value when the part omits them.
PART_SETTING_DEFAULTS: dict[str, dict[str, float]] = {
    "resistor": {"tempco": 0.0},
    "capacitor": {"tempco": 0.0, "polarised": 0.0},
    "inductor": {"resistance": 0.0},
    "supply": {"resistance": 0.0},
    "signal": {"source": 0.0, "offset": 0.0, "frequency": 1e3},
    "current": {},
}

LOAD_RESISTOR = "bench-load"
LOAD_CAPACITOR = "bench-load-capacitor"


@dataclass(frozen=True, slots=True)
class Device:
    """One part of the circuit with everything the solver needs.

    :param name: the part name (or ``bench-load...`` for the bench load).
    :param kind: the part kind (:data:`docgen.kinds.KINDS`).
    :param terminals: terminal names in canonical order.
    :param nets: the net on each terminal.
    :param values: nominal values in SI units (see the module docstring for the keys).
    :param spreads: ``name -> (low, high)`` production range of a model parameter.
    :param tolerance: relative tolerance of the primary value, ``None`` if exact.
    :param assumed: model parameters the model did not give (their neutral default is used).
    :param model: the model name, for model-based kinds.
    :param model_source: the page that defines the model (``<built-in>`` for docgen's own).
    :param span: the position of the part name in the design file.
    :param bench: ``True`` for devices added from the bench block (the load).
    """

    name: str
    kind: str
    terminals: tuple[str, ...]
    nets: tuple[str, ...]
    values: Mapping[str, float]
    spreads: Mapping[str, tuple[float, float]] = field(default_factory=frozen_map)
    tolerance: float | None = None
    assumed: tuple[str, ...] = ()
    model: str | None = None
    model_source: str | None = None
    span: Span = Span(1, 1)
    bench: bool = False

    def net(self, terminal: str) -> str:
        """The net on ``terminal``."""
        return self.nets[self.terminals.index(terminal)]


@dataclass(frozen=True, slots=True)
class Circuit:
    """An elaborated design: nets, devices, bench and temperature.

    :param path: the design file (diagnostics point into it).
    :param lines: the design file's lines (for the caret display of diagnostics).
    :param nets: every net except ``gnd``, in order of first appearance; ``net_index`` maps a
        net to its position (node voltages are reported in this order).
    :param devices: every part in the order written, then the bench load devices.
    """

    path: str
    lines: tuple[str, ...]
    nets: tuple[str, ...]
    devices: tuple[Device, ...]
    bench: Bench
    temperature_c: float
    net_index: Mapping[str, int] = field(default_factory=frozen_map)

    def device(self, name: str) -> Device:
        """The device called ``name`` (``KeyError`` if none)."""
        for d in self.devices:
            if d.name == name:
                return d
        raise KeyError(name)

    def of_kind(self, *kinds: str) -> tuple[Device, ...]:
        """The devices of the given kinds, in circuit order."""
        return tuple(d for d in self.devices if d.kind in kinds)

    def diagnostic(self, span: Span, message: str, hint: str | None = None) -> Diagnostic:
        """An error diagnostic at ``span`` in the design file, with its source line."""
        line = self.lines[span.line - 1] if 0 < span.line <= len(self.lines) else None
        return Diagnostic(self.path, span, "error", message, hint, line)


@dataclass(frozen=True, slots=True)
class Variation:
    """One value that varies from board to board: a part tolerance or a model's range.

    :param part: the part name.
    :param name: the key in ``Device.values`` (``value`` for the primary value).
    :param nominal: the design value.
    :param low: the smallest value within tolerance or range.
    :param high: the largest.
    :param origin: ``tolerance`` (the part's ± percentage) or ``model range`` (the model's
        production spread in brackets).
    """

    part: str
    name: str
    nominal: float
    low: float
    high: float
    origin: str


def variations(circuit: Circuit) -> tuple[Variation, ...]:
    """Every value of ``circuit`` that has a tolerance or a production range, in part order.

    The spread analysis draws samples within these bounds and passes them to the solver as
    overrides keyed ``(part, name)``; the bench load never varies.
    """
    out: list[Variation] = []
    for d in circuit.devices:
        if d.bench:
            continue
        if d.tolerance:
            nominal = d.values["value"]
            ends = sorted((nominal * (1 - d.tolerance), nominal * (1 + d.tolerance)))
            out.append(Variation(d.name, "value", nominal, ends[0], ends[1], "tolerance"))
        for name, (low, high) in d.spreads.items():
            out.append(Variation(d.name, name, d.values[name], low, high, "model range"))
    return tuple(out)


def elaborate(design: Design, library: Mapping[str, ModelDef]) -> Circuit:
    """Resolve every part of ``design`` into a :class:`Device`; raise on missing models.

    :raises CircuitError: a part names a model that exists nowhere or is of another kind
        (all such parts are reported at once).
    """
    lines = tuple(design.source.splitlines())
    own = {m.name: m for m in design.models}
    devices: list[Device] = []
    problems: list[Diagnostic] = []
    for part in design.parts:
        try:
            devices.append(_device(part, own, library))
        except _ModelProblem as problem:
            line = lines[problem.span.line - 1] if 0 < problem.span.line <= len(lines) else None
            problems.append(Diagnostic(design.path, problem.span, "error", problem.message,
                                       problem.hint, line))
    if problems:
        raise CircuitError(problems)
    devices.extend(_load_devices(design))
    nets = tuple(n for n in _nets_in_order(devices) if n != GROUND)
    return Circuit(
        path=design.path,
        lines=lines,
        nets=nets,
        devices=tuple(devices),
        bench=design.bench,
        temperature_c=float(design.bench.ambient),
        net_index=frozen_map({n: i for i, n in enumerate(nets)}),
    )


class _ModelProblem(Exception):
    def __init__(self, span: Span, message: str, hint: str | None = None):
        super().__init__(message)
        self.span, self.message, self.hint = span, message, hint


def _nets_in_order(devices: list[Device]) -> list[str]:
    seen: dict[str, None] = {}
    for d in devices:
        for n in d.nets:
            seen.setdefault(n, None)
    return list(seen)


def _device(part: Part, own: Mapping[str, ModelDef], library: Mapping[str, ModelDef]) -> Device:
    spec = KINDS[part.kind]
    terminals = tuple(t for t, _ in part.terminals)
    nets = tuple(n for _, n in part.terminals)
    if spec.model_kind is None:
        values = dict(PART_SETTING_DEFAULTS.get(part.kind, {}))
        values.update(part.params)
        values["value"] = float(part.value if part.value is not None else 0.0)
        return Device(part.name, part.kind, terminals, nets, frozen_map(values),
                      tolerance=part.tolerance, span=part.span)
    model = _find_model(part, own, library)
    values = param_registry.defaults(model.kind)
    given = {name: p for name, p in model.params.items()}
    values.update({name: float(p.value) for name, p in given.items()})
    spreads = {name: (float(p.low), float(p.high)) for name, p in given.items()
               if p.low is not None and p.high is not None}
    assumed = tuple(name for name in param_registry.MODEL_KINDS[model.kind] if name not in given)
    return Device(part.name, part.kind, terminals, nets, frozen_map(values),
                  frozen_map(spreads), part.tolerance, assumed, model.name, model.source,
                  part.span)


def _find_model(part: Part, own: Mapping[str, ModelDef], library: Mapping[str, ModelDef]
                ) -> ModelDef:
    span = part.spans.get("model", part.span)
    name = part.model or ""
    model = own.get(name) or library.get(name)
    if model is None:
        wanted = KINDS[part.kind].model_kind
        same_kind = [m.name for m in [*own.values(), *library.values()] if m.kind == wanted]
        hint = did_you_mean(name, same_kind)
        raise _ModelProblem(span, f"part {part.name}: no model named '{name}' in this design, "
                            "the library pages or the built-in models", hint)
    wanted = KINDS[part.kind].model_kind
    if model.kind != wanted:
        raise _ModelProblem(span, f"part {part.name} is a {part.kind} but model '{name}' is a "
                            f"{model.kind} model", f"use a model of kind {wanted}")
    return model


def _load_devices(design: Design) -> list[Device]:
    bench = design.bench
    output = bench.output
    if output is None:
        return []
    span = bench.spans.get("load", Span(1, 1))
    loads = []
    if bench.load_resistance:
        loads.append(Device(LOAD_RESISTOR, "resistor", ("p", "n"), (output, GROUND),
                            frozen_map({"value": float(bench.load_resistance), "tempco": 0.0}),
                            span=span, bench=True))
    if bench.load_capacitance:
        loads.append(Device(LOAD_CAPACITOR, "capacitor", ("p", "n"), (output, GROUND),
                            frozen_map({"value": float(bench.load_capacitance), "tempco": 0.0,
                                        "polarised": 0.0}),
                            span=span, bench=True))
    return loads
