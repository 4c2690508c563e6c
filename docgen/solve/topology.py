"""Structural checks before solving: problems an analog designer would call wiring errors.

Public API::

    check_dc_topology(circuit)   # raises CircuitError listing every problem found

Checked, with the nets and parts named in the message and the diagnostic at the part's span:

- a net with no DC path to ``gnd``.  Capacitors are open at DC, a FET gate and an op-amp input
  draw no (or only a bias) current, so a net reached only through them is floating: a real
  design error (a missing bias resistor), not something to paper over with a hidden resistor;
- a net that a current source feeds but that has no DC path to take the current (current
  sources in series, a current source into an open input): Kirchhoff's current law cannot hold;
- a loop of voltage-defined parts: supplies and signals without internal resistance, inductors
  without winding resistance, op-amp outputs without output resistance (their voltages would
  fight, and the currents around the loop are undefined);
- a resistor of zero or negative resistance, and no ``gnd`` at all.
"""

from __future__ import annotations

from collections import defaultdict, deque

from docgen.diagnostics import CircuitError, Diagnostic
from docgen.elaborate import Circuit, Device
from docgen.kinds import GROUND

#: Terminal pairs that conduct at DC, per kind (an op-amp output is driven against ``gnd``).
CONDUCTING = {
    "resistor": [("p", "n")],
    "inductor": [("p", "n")],
    "supply": [("p", "n")],
    "signal": [("p", "n")],
    "diode": [("anode", "cathode")],
    "npn": [("c", "b"), ("b", "e")],
    "pnp": [("c", "b"), ("b", "e")],
    "njfet": [("d", "s")],
    "pjfet": [("d", "s")],
    "nmos": [("d", "s")],
    "pmos": [("d", "s")],
    "opamp": [("out", None)],
}

#: Terminals through which only a fixed current can flow at DC.
CURRENT_TERMINALS = {"current": ("p", "n"), "opamp": ("in+", "in-", "v+", "v-")}

_ROLE = {"capacitor": "capacitor {name}", "njfet": "the gate of {name}",
         "pjfet": "the gate of {name}", "nmos": "the gate of {name}",
         "pmos": "the gate of {name}", "opamp": "op-amp {name} ({terminal} pin)",
         "current": "current source {name}"}


class _Sets:
    """Union–find over net names."""

    def __init__(self) -> None:
        self.parent: dict[str, str] = {}

    def find(self, a: str) -> str:
        self.parent.setdefault(a, a)
        while self.parent[a] != a:
            self.parent[a] = self.parent[self.parent[a]]
            a = self.parent[a]
        return a

    def union(self, a: str, b: str) -> bool:
        ra, rb = self.find(a), self.find(b)
        if ra == rb:
            return False
        self.parent[ra] = rb
        return True


def _net(device: Device, terminal: str | None) -> str:
    return GROUND if terminal is None else device.net(terminal)


def check_dc_topology(circuit: Circuit) -> None:
    """Raise :class:`CircuitError` with one diagnostic per wiring problem found."""
    problems = _bad_values(circuit) + _source_loops(circuit) + _floating(circuit)
    if problems:
        raise CircuitError(problems)


def _bad_values(circuit: Circuit) -> list[Diagnostic]:
    out = []
    for d in circuit.of_kind("resistor"):
        if not d.values["value"] > 0:
            out.append(circuit.diagnostic(d.span, f"resistor {d.name} has a resistance of "
                                          f"{d.values['value']:g} Ω; it must be positive",
                                          "join the two nets by giving them one name instead"))
    if circuit.devices and GROUND not in {n for d in circuit.devices for n in d.nets}:
        first = circuit.devices[0]
        out.append(circuit.diagnostic(first.span, "the circuit has no 'gnd' net, so no net "
                                      "voltage is defined", "name the reference net 'gnd'"))
    return out


def _voltage_edges(circuit: Circuit) -> list[tuple[Device, str, str]]:
    edges = []
    for d in circuit.devices:
        series = {"supply": "resistance", "inductor": "resistance", "signal": "source"}
        if d.kind in series and d.values.get(series[d.kind], 0.0) == 0.0:
            edges.append((d, d.net("p"), d.net("n")))
        elif d.kind == "opamp" and d.values["output_resistance"] == 0.0:
            edges.append((d, d.net("out"), GROUND))
    return edges


def _describe(d: Device) -> str:
    if d.kind == "opamp":
        return f"op-amp {d.name}'s output"
    return f"{d.kind} {d.name}"


def _path(adjacency: dict[str, list[tuple[str, Device]]], start: str, goal: str
          ) -> list[Device]:
    """The parts along a path from ``start`` to ``goal`` (breadth-first)."""
    came: dict[str, tuple[str, Device] | None] = {start: None}
    queue = deque([start])
    while queue:
        net = queue.popleft()
        if net == goal:
            break
        for other, device in adjacency[net]:
            if other not in came:
                came[other] = (net, device)
                queue.append(other)
    parts, net = [], goal
    while came.get(net) is not None:
        net, device = came[net]  # type: ignore[misc]
        parts.append(device)
    return parts


def _source_loops(circuit: Circuit) -> list[Diagnostic]:
    sets = _Sets()
    adjacency: dict[str, list[tuple[str, Device]]] = defaultdict(list)
    out = []
    for device, a, b in _voltage_edges(circuit):
        if not sets.union(a, b):
            loop = [device, *_path(adjacency, a, b)]
            names = ", ".join(_describe(d) for d in loop)
            nets = sorted({n for d in loop for n in d.nets} | ({GROUND} if a == b else set()))
            out.append(circuit.diagnostic(
                device.span,
                f"a loop of voltage sources: {names} (nets {', '.join(nets)}); their voltages "
                "fight and the loop current is undefined",
                "give one of them a series resistance (supply resistance=, signal source=, "
                "inductor resistance=) or break the loop"))
        adjacency[a].append((b, device))
        adjacency[b].append((a, device))
    return out


def _floating(circuit: Circuit) -> list[Diagnostic]:
    sets = _Sets()
    sets.find(GROUND)
    for d in circuit.devices:
        for a, b in CONDUCTING.get(d.kind, []):
            sets.union(_net(d, a), _net(d, b))
    grounded = sets.find(GROUND)
    groups: dict[str, list[str]] = defaultdict(list)
    for net in circuit.nets:
        if sets.find(net) != grounded:
            groups[sets.find(net)].append(net)
    return [_floating_message(circuit, nets) for nets in groups.values()]


def _words(items: list[str]) -> str:
    """``a``, ``a and b``, ``a, b and c``."""
    if len(items) < 2:
        return "".join(items)
    return ", ".join(items[:-1]) + " and " + items[-1]


def _sources(sources: list[Device]) -> str:
    names = list(dict.fromkeys(d.name for d in sources))
    if len(names) == 1:
        return f"current source {names[0]} drives"
    return f"current sources {_words(names)} drive"


def _floating_message(circuit: Circuit, nets: list[str]) -> Diagnostic:
    members = set(nets)
    touching = [(d, t) for d in circuit.devices for t, n in zip(d.terminals, d.nets, strict=True)
                if n in members]
    one = len(nets) == 1
    label = ("net " if one else "nets ") + _words([f"'{n}'" for n in nets])
    has, it, connects = ("has", "it", "connects") if one else ("have", "them", "connect")
    blocked = [(d, t) for d, t in touching if d.kind in _ROLE
               and not any(t in pair for pair in CONDUCTING.get(d.kind, []))]
    sources = [d for d, t in touching if d.kind == "current"]
    others = [(d, t) for d, t in blocked if d.kind != "current"]
    through = _words(list(dict.fromkeys(_ROLE[d.kind].format(name=d.name, terminal=t)
                                        for d, t in (others if sources else blocked))))
    if sources:
        first = sources[0]
        also = f" (otherwise {'it' if one else 'they'} {connects} only through {through})" \
            if through else ""
        return circuit.diagnostic(
            first.span,
            f"{label} {has} no DC path to gnd, yet {_sources(sources)} current "
            f"into {it}{also}; that current has nowhere to go",
            "give the current a path: a resistor or transistor from the net, or remove the "
            "source in series")
    first = touching[0][0] if touching else circuit.devices[0]
    return circuit.diagnostic(
        first.span,
        f"{label} {has} no DC path to gnd: {'it' if one else 'they'} {connects} only through "
        f"{through or 'nothing else'} (capacitors are open at DC), so "
        f"{'its' if one else 'their'} DC voltage is undefined",
        "add a resistor that sets its DC voltage (a bias resistor to gnd or to a supply)")
