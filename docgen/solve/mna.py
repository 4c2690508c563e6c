"""Modified nodal analysis, dense and batched: the DC system of a circuit for S samples at once.

Public API::

    problem = build_problem(circuit, overrides=None, temperature_c=None)
    matrix, rhs, state, limited = assemble(problem, x, state, source_scale=1.0, node_gmin=0.0,
                                           limiting=True, linear=None)
    linear = assemble_linear(problem, source_scale=1.0, node_gmin=0.0)  # reused per iteration
    device_currents(problem, x) -> {part: (S, T) currents into each terminal}
    resistance_at(values, temperature_c)

Unknowns ``x`` are shaped ``(S, M)``: the node voltages of the circuit's nets (in
``circuit.nets`` order), then internal nodes (a diode's junction behind its series resistance,
a transistor's inner base behind its base resistance), then branch currents of voltage-defined
parts (supply, signal, inductor, op-amp output).  ``layout.labels`` names every unknown.

Each device contributes to the equations an affine companion ``J·x_local + c`` (currents leaving
each node into the device; for a branch row, the branch equation).  Linear parts contribute
constants; junction devices are linearised at the *limited* junction voltages (the solver's
state), so ``assemble`` returns the new state and a per-sample flag telling whether limiting
changed anything.  Arrays carry a ground slot at index M that is dropped before solving.

Branch current sign: a branch current flows into the part's first terminal from the circuit
and through the part to its second terminal (the two-terminal convention of DEVELOPERS.md);
for an op-amp it is the current out of the output pin.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import dataclass, field
from functools import lru_cache
from typing import Any

import numpy as np

from docgen.elaborate import Circuit, Device
from docgen.kinds import GROUND
from docgen.solve.companions import limit_opamp, opamp_residual
from docgen.solve.junctions import KINDS as JUNCTION_KINDS
from docgen.solve.junctions import (
    SMALL_BATCH,
    add_per_entry,
    group_of,
    junction_groups,
    positions,
)
from docgen.solve.physical import ZERO_CELSIUS

Array = np.ndarray
#: ``(part, value name)`` → value(s); arrays are shaped ``(S,)``.
Overrides = Mapping[tuple[str, str], Any]

VOLTAGE_DEFINED = ("supply", "signal", "inductor")
#: Smallest series resistance used when an internal node exists (a sample overriding it to 0).
MIN_SERIES_RESISTANCE = 1e-6


@dataclass(frozen=True)
class Layout:
    """Where each device's terminals, internal nodes and branch current sit in ``x``.

    :param size: the number of unknowns M (the ground slot is index M).
    :param node_count: nets plus internal nodes (the first ``node_count`` unknowns are voltages).
    :param local: device name → indices of its terminals, then internal node, then branch.
    :param labels: a human label for every unknown (net name, or part + what it is).
    """

    size: int
    node_count: int
    local: Mapping[str, tuple[int, ...]]
    internal: Mapping[str, int]
    branch: Mapping[str, int]
    labels: tuple[str, ...]


@dataclass(frozen=True)
class Problem:
    """A circuit with its values resolved to arrays of shape ``(S,)`` at a temperature."""

    circuit: Circuit
    layout: Layout
    values: Mapping[str, Mapping[str, Array]]
    temperature_c: Array
    samples: int
    #: what depends only on the values and is reused by every Newton iteration (device model
    #: constants, the linear parts' matrix); never copied by ``replace`` or ``subset``
    memo: dict[Any, Any] = field(default_factory=dict, init=False, compare=False, repr=False)

    def remember(self, key: Any, make: Callable[[], Any]) -> Any:
        """``make()`` once per problem and key (the values must not change in place after)."""
        if key not in self.memo:
            self.memo[key] = make()
        return self.memo[key]

    @property
    def temperature_k(self) -> Array:
        """The temperature of every sample in kelvin."""
        return self.temperature_c + ZERO_CELSIUS

    def subset(self, index: Array) -> Problem:
        """The same problem restricted to the samples in ``index``."""
        values = {d: {k: v[index] for k, v in vals.items()} for d, vals in self.values.items()}
        return Problem(self.circuit, self.layout, values, self.temperature_c[index], len(index))


def has_internal_node(device: Device) -> bool:
    """True when the device's series resistance (diode) or base resistance needs a node."""
    if device.kind not in SERIES:
        return False
    name = SERIES[device.kind][1]
    return device.values[name] > 0 or device.spreads.get(name, (0.0, 0.0))[1] > 0


def build_layout(circuit: Circuit) -> Layout:
    """Number the unknowns: nets, internal nodes, branch currents."""
    labels = list(circuit.nets)
    internal: dict[str, int] = {}
    for d in circuit.devices:
        if has_internal_node(d):
            internal[d.name] = len(labels)
            labels.append(f"{d.name} internal node")
    node_count = len(labels)
    branch: dict[str, int] = {}
    for d in circuit.devices:
        if d.kind in VOLTAGE_DEFINED or d.kind == "opamp":
            branch[d.name] = len(labels)
            labels.append(f"{d.name} current")
    size = len(labels)
    local: dict[str, tuple[int, ...]] = {}
    for d in circuit.devices:
        idx = [size if n == GROUND else circuit.net_index[n] for n in d.nets]
        if d.name in internal:
            idx.append(internal[d.name])
        if d.name in branch:
            idx.append(branch[d.name])
        local[d.name] = tuple(idx)
    return Layout(size, node_count, local, internal, branch, tuple(labels))


def build_problem(
    circuit: Circuit,
    overrides: Overrides | None = None,
    temperature_c: Array | float | None = None,
) -> Problem:
    """Resolve nominal values and overrides into ``(S,)`` arrays.

    :param overrides: ``(part, name) -> value or (S,) array``; names as in ``Device.values``.
    :param temperature_c: the temperature (°C), scalar or ``(S,)``; default the bench ambient.
    :raises KeyError: an override names a part or value the circuit does not have.
    """
    overrides = dict(overrides or {})
    temperature = np.atleast_1d(np.asarray(
        circuit.temperature_c if temperature_c is None else temperature_c, dtype=float))
    sizes = {np.size(v) for v in overrides.values()} | {temperature.size}
    samples = max(sizes)
    if any(s not in (1, samples) for s in sizes):
        raise ValueError(f"override arrays disagree in length: {sorted(sizes)}")
    values: dict[str, dict[str, Array]] = {}
    for d in circuit.devices:
        values[d.name] = {k: np.full(samples, float(v)) for k, v in d.values.items()}
    for (part, name), value in overrides.items():
        if part not in values or name not in values[part]:
            raise KeyError(f"no value '{name}' on part '{part}'")
        values[part][name] = np.broadcast_to(np.asarray(value, dtype=float), (samples,)).copy()
    return Problem(circuit, build_layout(circuit), values,
                   np.broadcast_to(temperature, (samples,)).copy(), samples)


# --------------------------------------------------------------------------- stamping


class _System:
    """The padded batched matrix and right-hand side being assembled."""

    def __init__(self, samples: int, size: int):
        self.matrix = np.zeros((samples, size + 1, size + 1))
        self.rhs = np.zeros((samples, size + 1))

    def add(self, idx: tuple[int, ...], jacobian: Array, constant: Array) -> None:
        """Add ``jacobian·x_local + constant`` to the rows ``idx`` (moves ``constant`` right).

        A small batch with distinct rows: one indexed add for the whole stamp (per numpy call
        is the cost there).  Otherwise one strided add per entry, which also sums repeated rows
        (two terminals on one net) and is the faster way over a large batch.
        """
        rows, cols, distinct = _scatter(idx)
        if distinct and self.matrix.shape[0] <= SMALL_BATCH:
            count = len(idx)
            self.matrix[:, rows, cols] += np.broadcast_to(
                jacobian, (self.matrix.shape[0], count, count)).reshape(-1, count * count)
            self.rhs[:, list(idx)] -= constant
            return
        add_per_entry(self.matrix, self.rhs, idx, jacobian, constant)


@lru_cache(maxsize=4096)
def _scatter(idx: tuple[int, ...]) -> tuple[Array, Array, bool]:
    """Row and column indices of every entry of a stamp on ``idx``, and whether they differ."""
    array = np.asarray(idx, dtype=np.intp)
    return np.repeat(array, len(idx)), np.tile(array, len(idx)), len(set(idx)) == len(idx)


def _resistance_at(values: Mapping[str, Array], temperature_c: Array) -> Array:
    return values["value"] * (1.0 + values["tempco"] * (temperature_c - 25.0))


def resistance_at(values: Mapping[str, Array], temperature_c: Array) -> Array:
    """A resistor's resistance at ``temperature_c`` (its tempco is linear about 25 °C)."""
    return _resistance_at(values, temperature_c)


def _conductance_stamp(g: Array) -> Array:
    return np.stack([np.stack([g, -g], -1), np.stack([-g, g], -1)], -2)


def _stamp_resistor(ctx: _StampContext) -> None:
    g = 1.0 / _resistance_at(ctx.values, ctx.problem.temperature_c)
    ctx.add((0, 1), _conductance_stamp(g), np.zeros((ctx.samples, 2)))


def _stamp_current(ctx: _StampContext) -> None:
    current = ctx.values["value"] * ctx.source_scale
    ctx.add((0, 1), np.zeros((ctx.samples, 2, 2)), np.stack([current, -current], -1))


def branch_source(device: Device, values: Mapping[str, Array]) -> tuple[Array, Array]:
    """The DC voltage and series resistance of a voltage-defined part."""
    zero = np.zeros_like(values["value"])
    if device.kind == "supply":
        return values["value"], values["resistance"]
    if device.kind == "signal":
        return values["offset"], values["source"]
    return zero, values["resistance"]  # inductor: a short with its winding resistance


def _stamp_branch(ctx: _StampContext) -> None:
    voltage, resistance = branch_source(ctx.device, ctx.values)
    scale = ctx.source_scale if ctx.device.kind != "inductor" else 1.0
    jac = np.zeros((ctx.samples, 3, 3))
    jac[:, 0, 2], jac[:, 1, 2] = 1.0, -1.0
    jac[:, 2, 0], jac[:, 2, 1], jac[:, 2, 2] = 1.0, -1.0, -resistance
    constant = np.zeros((ctx.samples, 3))
    constant[:, 2] = -voltage * scale
    ctx.add((0, 1, 2), jac, constant)


def _stamp_series(ctx: _StampContext, outer: int, inner: int, resistance: Array) -> None:
    g = 1.0 / np.maximum(resistance, MIN_SERIES_RESISTANCE)
    ctx.add((outer, inner), _conductance_stamp(g), np.zeros((ctx.samples, 2)))


@dataclass
class _StampContext:
    problem: Problem
    device: Device
    values: Mapping[str, Array]
    idx: tuple[int, ...]
    x_full: Array
    state: Mapping[str, Array]
    new_state: dict[str, Array]
    limited: Array
    system: _System
    source_scale: Array
    limiting: bool = True
    record: Array | None = None

    @property
    def samples(self) -> int:
        return self.problem.samples

    def add(self, positions: tuple[int, ...], jacobian: Array, constant: Array) -> None:
        """Stamp ``jacobian·x + constant`` on the device's local unknowns ``positions``."""
        self.system.add(tuple(self.idx[p] for p in positions), jacobian, constant)
        if self.record is not None:  # the device's own equations, evaluated at x
            local = self.x_full[:, [self.idx[p] for p in positions]]
            self.record[:, list(positions)] += np.einsum("sij,sj->si", jacobian, local) + constant


# ---------------------------------------------------------------- junction devices


def _stamp_junction(ctx: _StampContext) -> None:
    """A diode or transistor alone (its group of one): its Newton companion."""
    companion = group_of(ctx.problem, ctx.device.name).linearise(ctx.x_full, ctx.state,
                                                                 ctx.limiting)
    ctx.new_state.update(companion.state)
    ctx.limited |= companion.limited
    ctx.add(positions(ctx.device.kind, len(ctx.idx)), companion.jac[:, 0],
            companion.constant[:, 0])


#: the linear series resistance inside a junction device: (outer, inner) local positions and
#: the value's name; stamped with the linear parts, not every Newton iteration
SERIES = {"diode": ((0, 2), "series_resistance"), "npn": ((1, 3), "base_resistance"),
          "pnp": ((1, 3), "base_resistance")}


def _stamp_inner_series(ctx: _StampContext) -> None:
    """The series (diode) or base (bipolar) resistance to the device's internal node."""
    (outer, inner), name = SERIES[ctx.device.kind]
    if len(ctx.idx) > inner:
        _stamp_series(ctx, outer, inner, ctx.values[name])


# ------------------------------------------------------------------------- op-amp


def _stamp_opamp(ctx: _StampContext) -> None:
    x_local = ctx.x_full[:, list(ctx.idx)]
    vd_at = None
    if ctx.limiting:
        vd = x_local[:, 0] - x_local[:, 1] + ctx.values["input_offset_voltage"] * ctx.source_scale
        start = 0.5 * (x_local[:, 3] + x_local[:, 4]) / ctx.values["open_loop_gain"]
        old = ctx.state.get(ctx.device.name, start[:, None])[:, 0]
        vd_at = limit_opamp(ctx.values, x_local, vd, old)
        ctx.new_state[ctx.device.name] = vd_at[:, None]
        ctx.limited |= np.abs(vd_at - vd) * ctx.values["open_loop_gain"] > 1e-9
    residual, jac = opamp_residual(ctx.values, x_local, ctx.source_scale, vd_at)
    ctx.add(tuple(range(6)), jac, residual - np.einsum("sij,sj->si", jac, x_local))


STAMPS: dict[str, Callable[[_StampContext], None]] = {
    "resistor": _stamp_resistor,
    "capacitor": lambda ctx: None,  # open at DC
    "current": _stamp_current,
    "supply": _stamp_branch,
    "signal": _stamp_branch,
    "inductor": _stamp_branch,
    "diode": _stamp_junction,
    "npn": _stamp_junction,
    "pnp": _stamp_junction,
    "njfet": _stamp_junction,
    "pjfet": _stamp_junction,
    "nmos": _stamp_junction,
    "pmos": _stamp_junction,
    "opamp": _stamp_opamp,
}


def pad(x: Array) -> Array:
    """``x`` with the ground slot (0 V) appended."""
    return np.concatenate([x, np.zeros((x.shape[0], 1))], axis=1)


LINEAR_KINDS = frozenset({"resistor", "capacitor", "current", "supply", "signal", "inductor"})


def _stamp_all(problem: Problem, devices: list[Device], system: _System, x_full: Array,
               state: Mapping[str, Array], source_scale: Array | float, limiting: bool,
               stamps: Mapping[str, Callable[[_StampContext], None]] = STAMPS
               ) -> tuple[dict[str, Array], Array]:
    """Stamp ``devices`` at the padded unknowns ``x_full`` (see :func:`pad`)."""
    samples = problem.samples
    scale = np.broadcast_to(np.asarray(source_scale, dtype=float), (samples,))
    new_state: dict[str, Array] = {}
    limited = np.zeros(samples, dtype=bool)
    for device in devices:
        ctx = _StampContext(problem, device, problem.values[device.name],
                            problem.layout.local[device.name], x_full, state, new_state,
                            limited, system, scale, limiting)
        stamps[device.kind](ctx)
    return new_state, limited


def _stamp_whole(ctx: _StampContext) -> None:
    """Every equation of one device: its linear series resistance too (for the currents)."""
    if ctx.device.kind in SERIES:
        _stamp_inner_series(ctx)
    STAMPS[ctx.device.kind](ctx)


def assemble_linear(problem: Problem, source_scale: Array | float = 1.0,
                    node_gmin: Array | float = 0.0) -> tuple[Array, Array]:
    """The padded matrix and right-hand side of the linear parts alone (plus node gmin).

    They do not change between Newton iterations, so the solver builds them once per attempt
    and passes them to :func:`assemble` as ``linear``; for a scalar scale and gmin they are
    made once per problem (read-only arrays: :func:`assemble` copies them).
    """
    if np.ndim(source_scale) == 0 and np.ndim(node_gmin) == 0:
        key = ("linear", float(source_scale), float(node_gmin))
        return problem.remember(key, lambda: _read_only(
            _assemble_linear(problem, float(source_scale), float(node_gmin))))
    return _assemble_linear(problem, source_scale, node_gmin)


def _read_only(arrays: tuple[Array, Array]) -> tuple[Array, Array]:
    for array in arrays:
        array.setflags(write=False)
    return arrays


def _assemble_linear(problem: Problem, source_scale: Array | float,
                     node_gmin: Array | float) -> tuple[Array, Array]:
    samples, size = problem.samples, problem.layout.size
    system = _System(samples, size)
    linear = [d for d in problem.circuit.devices if d.kind in LINEAR_KINDS]
    zeros = np.zeros((samples, size + 1))
    _stamp_all(problem, linear, system, zeros, {}, source_scale, True)
    inner = [d for d in problem.circuit.devices if d.kind in SERIES]
    _stamp_all(problem, inner, system, zeros, {}, source_scale, True,
               dict.fromkeys(SERIES, _stamp_inner_series))
    nodes = np.arange(problem.layout.node_count)
    gmin = np.broadcast_to(np.asarray(node_gmin, dtype=float), (samples,))
    system.matrix[:, nodes, nodes] += gmin[:, None]
    return system.matrix, system.rhs


def assemble(
    problem: Problem,
    x: Array,
    state: Mapping[str, Array],
    source_scale: Array | float = 1.0,
    node_gmin: Array | float = 0.0,
    limiting: bool = True,
    linear: tuple[Array, Array] | None = None,
) -> tuple[Array, Array, dict[str, Array], Array]:
    """The linearised system ``A·x_next = b`` at ``x`` (shapes ``(S, M, M)`` and ``(S, M)``).

    :param state: the previous limited junction voltages per device (empty at the start).
    :param source_scale: factor on every independent source, scalar or ``(S,)`` (source
        stepping).
    :param node_gmin: conductance from every node to ground, scalar or ``(S,)`` (gmin stepping).
    :param limiting: ``False`` linearises every device exactly at ``x`` (no junction or output
        stage limiting): at a converged ``x`` the matrix is then the small-signal conductance
        matrix the response and noise analyses start from.
    :param linear: :func:`assemble_linear` for the same scale and gmin, if already built.
    :returns: matrix, right-hand side, new limiting state, and a ``(S,)`` flag that is true where
        junction limiting changed a voltage (the step cannot be trusted as converged).
    """
    size = problem.layout.size
    base = linear if linear is not None else assemble_linear(problem, source_scale, node_gmin)
    system = _System(problem.samples, size)
    system.matrix, system.rhs = base[0].copy(), base[1].copy()
    others = [d for d in problem.circuit.devices
              if d.kind not in LINEAR_KINDS and d.kind not in JUNCTION_KINDS]
    x_full = pad(x)
    new_state, limited = _stamp_all(problem, others, system, x_full, state, source_scale,
                                    limiting)
    for group in junction_groups(problem):  # every device of a kind in one evaluation
        companion = group.linearise(x_full, state, limiting)
        companion.scatter(system.matrix, system.rhs)
        new_state.update(companion.state)
        limited |= companion.limited
    return system.matrix[:, :size, :size], system.rhs[:, :size], new_state, limited


def device_currents(problem: Problem, x: Array) -> dict[str, Array]:
    """Each device's currents at the solution ``x``, shaped ``(S, T)`` per device.

    Entry ``t`` is the current flowing from terminal ``t``'s net into the part (the same
    equations the solver stamps, evaluated without limiting).
    """
    samples, size = problem.samples, problem.layout.size
    system = _System(samples, size)
    scale = np.ones(samples)
    x_full = pad(x)
    out: dict[str, Array] = {}
    for device in problem.circuit.devices:
        idx = problem.layout.local[device.name]
        record = np.zeros((samples, len(idx)))
        ctx = _StampContext(problem, device, problem.values[device.name], idx, x_full, {}, {},
                            np.zeros(samples, dtype=bool), system, scale, limiting=False,
                            record=record)
        _stamp_whole(ctx)
        out[device.name] = record[:, :len(device.terminals)]
    return out
