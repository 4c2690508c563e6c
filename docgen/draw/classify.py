"""What the layouts need to know about a circuit's structure: rails, signal order, labels.

Plain graph facts from the parts list (and, optionally, the operating point), no geometry.
"""

from __future__ import annotations

from collections import deque
from collections.abc import Mapping

from docgen.design import Design, Part
from docgen.kinds import GROUND

ACTIVE = {"npn", "pnp", "njfet", "pjfet", "nmos", "pmos", "opamp"}
INPUT_TERMINALS = {"b", "g", "in+", "in-"}
UNREACHED = 10_000


def rails(design: Design, op_voltages: Mapping[str, float] | None = None) -> dict[str, str]:
    """Rail nets and the symbol each is drawn with: ``ground``, ``up`` or ``down``.

    Rails are ground and every net of a ``supply`` part.  A supply net is a positive rail
    (``up``) when it is above ground: by the operating point if given, else by the supply's
    polarity (the first net is the positive one).
    """
    out: dict[str, str] = {GROUND: "ground"}
    volts = dict(op_voltages or {})
    for part in design.parts:
        if part.kind != "supply":
            continue
        positive, negative = part.nets
        for net, sign in ((positive, 1), (negative, -1)):
            if net == GROUND or net in out:
                continue
            if net in volts:
                out[net] = "up" if volts[net] >= 0 else "down"
            elif sign < 0 and positive == GROUND:
                out[net] = "down"
            else:
                out[net] = "up" if sign > 0 else "down"
    return out


def input_net(design: Design) -> str | None:
    """The net the bench's signal source drives (its first net)."""
    sources = [p for p in design.parts if p.kind == "signal"]
    named = [p for p in sources if p.name == design.bench.input]
    chosen = named or sources
    if not chosen:
        return None
    return next((n for n in chosen[0].nets if n != GROUND), chosen[0].nets[0])


def signal_ranks(design: Design, rail_nets: Mapping[str, str]) -> dict[str, int]:
    """Breadth-first distance of each non-rail net from the input net, along the parts.

    Transistors and op-amps conduct from their input terminals to the others; two-terminal
    parts both ways.  Nets the input never reaches rank after all others.
    """
    links: dict[str, set[str]] = {}
    for part in design.parts:
        if part.kind == "supply":
            continue
        nets = [n for n in part.nets if n not in rail_nets]
        for a in nets:
            for b in nets:
                if a != b:
                    links.setdefault(a, set()).add(b)
    start = input_net(design)
    ranks: dict[str, int] = {}
    if start is not None and start not in rail_nets:
        ranks[start] = 0
        queue = deque([start])
        while queue:
            net = queue.popleft()
            for nxt in sorted(links.get(net, ())):
                if nxt not in ranks:
                    ranks[nxt] = ranks[net] + 1
                    queue.append(nxt)
    for net in design.nets:
        if net not in rail_nets:
            ranks.setdefault(net, UNREACHED)
    return ranks


OUTPUT_TERMINALS = {"c", "e", "d", "s", "out"}


def feeds_back(design: Design, rail_nets: Mapping[str, str], part: Part) -> bool:
    """True if the two-terminal ``part`` joins two nets that the circuit already links through
    an amplifying device (input to output), i.e. it closes a feedback loop."""
    a, b = part.nets
    return _amplified_path(design, rail_nets, part, a, b) or _amplified_path(
        design, rail_nets, part, b, a)


def _amplified_path(design: Design, rail_nets: Mapping[str, str], skip: Part, start: str,
                    goal: str) -> bool:
    steps: dict[str, list[tuple[str, bool]]] = {}
    for other in design.parts:
        if other is skip or other.kind == "supply":
            continue
        if other.kind in ACTIVE:
            ins = [n for t, n in other.terminals if t in INPUT_TERMINALS]
            outs = [n for t, n in other.terminals if t in OUTPUT_TERMINALS]
            pairs = [(i, o, True) for i in ins for o in outs]
            pairs += [(o, q, False) for o in outs for q in outs if o != q]
        else:
            x, y = other.nets
            pairs = [(x, y, False), (y, x, False)]
        for x, y, amplified in pairs:
            if x not in rail_nets and y not in rail_nets:
                steps.setdefault(x, []).append((y, amplified))
    seen = {(start, False)}
    queue = deque(seen)
    while queue:
        net, amplified = queue.popleft()
        if net == goal and amplified:
            return True
        for nxt, through in steps.get(net, ()):
            state = (nxt, amplified or through)
            if state not in seen:
                seen.add(state)
                queue.append(state)
    return False


def input_rank(part: Part, ranks: Mapping[str, int]) -> int:
    """The rank of the net a part takes its signal from."""
    if part.kind in ACTIVE:
        inputs = [n for t, n in part.terminals if t in INPUT_TERMINALS and n in ranks]
    else:
        inputs = [n for n in part.nets if n in ranks]
    return min((ranks[n] for n in inputs), default=UNREACHED)


def value_text(part: Part) -> str:
    """The part's value for its label, in engineering notation with its unit."""
    from docgen.kinds import KINDS

    if part.kind in ACTIVE or part.kind == "diode":
        return part.model or ""
    unit = KINDS[part.kind].value_unit or ""
    text = format_eng(part.value, unit) if part.value is not None else (part.value_text or "")
    if part.kind == "signal" and "frequency" in part.params:
        text += " " + format_eng(part.params["frequency"], "Hz")
    return text


def format_eng(value: float, unit: str) -> str:
    """Engineering notation with an SI prefix: ``150 kΩ``, ``2.2 µF``, ``15 V``."""
    try:
        from docgen.units import format_eng as shared
    except ImportError:  # the shared formatter is not in this build yet
        shared = None
    if shared is not None:
        return shared(value, unit)
    return _format_eng(value, unit)


def _format_eng(value: float, unit: str) -> str:
    if value == 0:
        return f"0 {unit}".strip()
    prefixes = {-15: "f", -12: "p", -9: "n", -6: "µ", -3: "m", 0: "", 3: "k", 6: "M", 9: "G"}
    import math

    exponent = max(-15, min(9, 3 * math.floor(math.log10(abs(value)) / 3)))
    mantissa = value / 10 ** exponent
    number = f"{mantissa:.3g}"
    return f"{number} {prefixes[exponent]}{unit}".strip()
