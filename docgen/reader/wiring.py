"""Checks only a whole design can show: names, nets, ground, and what the bench points at."""

from __future__ import annotations

from collections import defaultdict

from docgen.design import Bench, ModelDef, Part
from docgen.diagnostics import Collector, Span, did_you_mean
from docgen.kinds import GROUND


def check_wiring(parts: list[Part], bench: Bench, collector: Collector,
                 circuit_span: Span, complete: bool = True) -> None:
    """Duplicate names, parts on one net, nets on one terminal, a missing ``gnd``, the bench.

    When some part lines could not be read (``complete`` false), the net checks are skipped:
    they would only repeat the first error in other words.
    """
    report_duplicates(parts, "part name", collector)
    _shorted(parts, collector)
    if not complete:
        return
    _dangling(parts, bench, collector)
    nets = {net for part in parts for net in part.nets}
    if parts and GROUND not in nets:
        collector.add(circuit_span, f"no part connects to '{GROUND}', the 0 V reference net",
                      hint=did_you_mean(GROUND, nets, cutoff=0.5)
                      or f"connect the return of the supply and the signal to '{GROUND}'")
    _bench_targets(parts, bench, nets, collector)


def report_duplicates(items: list[Part] | list[ModelDef], what: str,
                      collector: Collector) -> None:
    """Report every item whose ``name`` an earlier item already has."""
    first: dict[str, Span] = {}
    for item in items:
        if item.name in first:
            collector.add(item.span, f"{what} '{item.name}' is used twice",
                          hint=f"first used on line {first[item.name].line}")
        else:
            first[item.name] = item.span


def _shorted(parts: list[Part], collector: Collector) -> None:
    for part in parts:
        if len(set(part.nets)) == 1:
            collector.add(part.span, f"every terminal of {part.name} is on net '{part.nets[0]}'",
                          hint="a part needs at least two different nets")


def _dangling(parts: list[Part], bench: Bench, collector: Collector) -> None:
    touches: dict[str, list[tuple[Part, str]]] = defaultdict(list)
    for part in parts:
        for terminal, net in part.terminals:
            touches[net].append((part, terminal))
    for net, where in touches.items():
        if len(where) != 1 or net == GROUND or net == bench.output:
            continue
        part, terminal = where[0]
        span = part.spans.get(f"net:{terminal}", part.span)
        others = [n for n in touches if n != net]
        collector.add(span, f"net '{net}' touches only one terminal ({part.name})",
                      hint=did_you_mean(net, others) or "connect it to another part")


def _bench_targets(parts: list[Part], bench: Bench, nets: set[str],
                   collector: Collector) -> None:
    signals = [p.name for p in parts if p.kind == "signal"]
    if bench.input is not None:
        span = bench.spans.get("input", Span(1, 1))
        names = {p.name: p for p in parts}
        hint = did_you_mean(bench.input, signals) or (
            f"the circuit's signal is '{signals[0]}'" if len(signals) == 1
            else "the input is the part of kind 'signal' that drives the stage")
        if bench.input not in names:
            collector.add(span, f"bench input '{bench.input}' is not a part of the circuit",
                          hint=hint)
        elif names[bench.input].kind != "signal":
            collector.add(span, f"bench input '{bench.input}' is a {names[bench.input].kind}, "
                          "not a signal", hint=hint)
    if bench.output is not None and bench.output not in nets:
        collector.add(bench.spans.get("output", Span(1, 1)),
                      f"bench output '{bench.output}' is not a net of the circuit",
                      hint=did_you_mean(bench.output, nets))
