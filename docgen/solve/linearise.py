"""The small-signal network at the operating point: real matrices G and C with (G + jωC)·x = b.

Public API::

    network = linearise(solution)        # solution: docgen.solve.operating_point.OpSolution
    network.G, network.C                 # (S, K, K) for the S samples of the solution
    network.row(net)                     # the row of a net (None for gnd)
    network.branch_row(part)             # the branch-current row of a voltage-defined part
    network.pole_row(opamp)              # the row of an op-amp's dominant-pole node
    nominal_network(ctx)                 # the nominal network of a pipeline context (cached)

There is one model of every device.  ``G`` is the DC Jacobian of the solver's own equations,
assembled at the converged operating point without limiting (:func:`docgen.solve.mna.assemble`):
gm, rπ, ro and the base resistance of a bipolar transistor (the Ebers–Moll derivatives), gm and
gds of a FET (square law), diode conductances, the op-amp's open-loop gain at its operating
point (smaller than A0 where its output is pressed against a limit), every resistor, and the
branch equations of supplies, the signal and inductors.  Supplies are therefore AC ground (their
branch equation keeps only their internal resistance); the signal branch carries the stimulus
on its right-hand side; current sources are open.  ``C`` adds what the DC equations leave out:

- capacitors (and the bench load capacitor), with their tempco about 25 °C;
- inductors: −L on their branch row (branch equation v_p − v_n − (R + jωL)·i = 0);
- bipolar: Cπ + Cμ = gm/(2π fT) (hybrid-π, Sedra & Smith), Cμ between the inner base and
  the collector, Cπ = gm/(2π fT) − Cμ (never below zero) between inner base and emitter;
- FETs: Cgs and Cgd; diodes: the junction capacitance across the junction;
- op-amps: a dominant pole at GBW/A0.  Each op-amp gets one extra unknown w, the output stage
  voltage before the pole: w·(1 + jω/ωp) = E_lin (the linearised output-stage voltage from the
  inputs and supply pins), and the output branch becomes v_out − w + Ro·i = 0.

Rows ``0..M-1`` are the solver's unknowns (:class:`docgen.solve.mna.Layout`: nets, internal
nodes, branch currents); rows ``M..K-1`` the op-amp pole nodes.  A right-hand side entry on a
node row is a current injected into that node; on a branch row it is a voltage in series with
the branch (the signal's stimulus, or a noise voltage).
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

import numpy as np

from docgen.elaborate import LOAD_CAPACITOR, LOAD_RESISTOR
from docgen.kinds import GROUND
from docgen.solve import mna
from docgen.solve.devices import opamp_output
from docgen.solve.operating_point import (
    OpSolution,
    part_quantities,
    require_converged,
    solve_op,
)

Array = np.ndarray


@dataclass(frozen=True)
class SmallSignal:
    """The linearised network of S samples: ``(G + jωC)·x = b``, shapes ``(S, K, K)``."""

    solution: OpSolution
    G: Array
    C: Array
    labels: tuple[str, ...]
    poles: Mapping[str, int]

    @property
    def size(self) -> int:
        """K, the number of unknowns."""
        return self.G.shape[-1]

    @property
    def samples(self) -> int:
        """S, the number of samples."""
        return self.G.shape[0]

    def row(self, net: str) -> int | None:
        """The row of ``net``'s voltage (``None`` for ``gnd``)."""
        return None if net == GROUND else self.solution.circuit.net_index[net]

    def branch_row(self, part: str) -> int:
        """The row of the branch current of a supply, signal, inductor or op-amp output."""
        return self.solution.problem.layout.branch[part]

    def pole_row(self, opamp: str) -> int:
        """The row of an op-amp's dominant-pole node w."""
        return self.poles[opamp]

    def unit(self, row: int | None, value: Array | float = 1.0) -> Array:
        """A right-hand side ``(S, K)`` with ``value`` on ``row`` (all zero for ``None``)."""
        rhs = np.zeros((self.samples, self.size))
        if row is not None:
            rhs[:, row] = value
        return rhs

    def without_load(self) -> tuple[Array, Array]:
        """``(G, C)`` with the bench load removed (for the output impedance)."""
        G, C = self.G.copy(), self.C.copy()
        circuit, values = self.solution.circuit, self.solution.problem.values
        for device in circuit.devices:
            if not device.bench:
                continue
            row = self.row(device.nets[0])
            if device.name == LOAD_RESISTOR:
                G[:, row, row] -= 1.0 / values[device.name]["value"]
            elif device.name == LOAD_CAPACITOR:
                C[:, row, row] -= values[device.name]["value"]
        return G, C


class _Stamper:
    """Padded ``(S, K+1, K+1)`` matrices with the ground slot last (index K).

    Stamps take network indices; :meth:`local` maps a device's solver indices (whose ground
    slot is M, the first pole row's number) onto them.
    """

    def __init__(self, samples: int, solver_size: int, size: int):
        self.solver_size, self.size = solver_size, size
        self.G = np.zeros((samples, size + 1, size + 1))
        self.C = np.zeros((samples, size + 1, size + 1))

    def local(self, indices: tuple[int, ...]) -> tuple[int, ...]:
        """A device's solver-local indices as network indices (ground → K)."""
        return tuple(self.size if i == self.solver_size else i for i in indices)

    def between(self, matrix: Array, a: int, b: int, value: Array) -> None:
        """Stamp an admittance-like ``value`` between network indices ``a`` and ``b``."""
        rows, cols = np.array([a, a, b, b]), np.array([a, b, a, b])
        np.add.at(matrix, (slice(None), rows, cols), np.stack([value, -value, -value, value], -1))

    def at(self, matrix: Array, row: int, column: int, value: Array) -> None:
        """Add ``value`` to one entry."""
        np.add.at(matrix, (slice(None), row, column), value)

    def matrices(self) -> tuple[Array, Array]:
        return self.G[:, :-1, :-1], self.C[:, :-1, :-1]


def capacitance_at(values: Mapping[str, Array], temperature_c: Array) -> Array:
    """A capacitor's capacitance at ``temperature_c`` (tempco linear about 25 °C)."""
    return values["value"] * (1.0 + values["tempco"] * (temperature_c - 25.0))


def linearise(solution: OpSolution) -> SmallSignal:
    """The small-signal network of every sample of ``solution`` (see the module docstring)."""
    problem = solution.problem
    layout = problem.layout
    G_dc, _, _, _ = mna.assemble(problem, solution.x, {}, limiting=False)
    opamps = [d.name for d in solution.circuit.devices if d.kind == "opamp"]
    size = layout.size + len(opamps)
    stamper = _Stamper(problem.samples, layout.size, size)
    stamper.G[:, : layout.size, : layout.size] = G_dc
    poles = {name: layout.size + k for k, name in enumerate(opamps)}
    for device in solution.circuit.devices:
        stamp = _REACTIVE.get(device.kind)
        if stamp is not None:
            stamp(stamper, solution, device, poles)
    G, C = stamper.matrices()
    labels = (*layout.labels, *(f"{name} pole node" for name in opamps))
    return SmallSignal(solution, G, C, labels, poles)


def _capacitor(stamper: _Stamper, solution: OpSolution, device: Any, poles: Any) -> None:
    values = solution.problem.values[device.name]
    local = stamper.local(solution.problem.layout.local[device.name])
    capacitance = capacitance_at(values, solution.problem.temperature_c)
    stamper.between(stamper.C, local[0], local[1], capacitance)


def _inductor(stamper: _Stamper, solution: OpSolution, device: Any, poles: Any) -> None:
    branch = stamper.local(solution.problem.layout.local[device.name])[2]
    stamper.at(stamper.C, branch, branch, -solution.problem.values[device.name]["value"])


def _diode(stamper: _Stamper, solution: OpSolution, device: Any, poles: Any) -> None:
    local = stamper.local(solution.problem.layout.local[device.name])
    junction = local[2] if len(local) == 3 else local[0]
    capacitance = solution.problem.values[device.name]["junction_capacitance"]
    stamper.between(stamper.C, junction, local[1], capacitance)


def bipolar_capacitances(solution: OpSolution, name: str) -> tuple[Array, Array]:
    """``(Cπ, Cμ)`` of a bipolar transistor at its operating point, each ``(S,)``.

    Cπ + Cμ = gm/(2π fT) (hybrid-π; Sedra & Smith), Cπ never below zero.
    """
    values = solution.problem.values[name]
    gm = part_quantities(solution, name)["gm_s"]
    c_mu = values["base_collector_capacitance"]
    c_pi = np.maximum(gm / (2.0 * math.pi * values["transition_frequency"]) - c_mu, 0.0)
    return c_pi, c_mu


def _bipolar(stamper: _Stamper, solution: OpSolution, device: Any, poles: Any) -> None:
    local = stamper.local(solution.problem.layout.local[device.name])
    collector, emitter = local[0], local[2]
    inner_base = local[3] if len(local) == 4 else local[1]
    c_pi, c_mu = bipolar_capacitances(solution, device.name)
    stamper.between(stamper.C, inner_base, emitter, c_pi)
    stamper.between(stamper.C, inner_base, collector, c_mu)


def _fet(stamper: _Stamper, solution: OpSolution, device: Any, poles: Any) -> None:
    drain, gate, source = stamper.local(solution.problem.layout.local[device.name])[:3]
    values = solution.problem.values[device.name]
    stamper.between(stamper.C, gate, source, values["gate_source_capacitance"])
    stamper.between(stamper.C, gate, drain, values["gate_drain_capacitance"])


def opamp_gain_at(solution: OpSolution, name: str) -> Any:
    """The op-amp's output-stage derivatives at the operating point (``OpampOutput``)."""
    values = solution.problem.values[name]
    pins = solution.local(solution.circuit.device(name))
    vd = pins[:, 0] - pins[:, 1] + values["input_offset_voltage"]
    return opamp_output(vd, pins[:, 3], pins[:, 4], values["open_loop_gain"],
                        values["output_headroom"])


def _opamp(stamper: _Stamper, solution: OpSolution, device: Any, poles: Mapping[str, int]
           ) -> None:
    values = solution.problem.values[device.name]
    in_p, in_n, _, v_pos, v_neg, branch = stamper.local(solution.problem.layout.local[device.name])
    w = poles[device.name]
    e = opamp_gain_at(solution, device.name)
    # Move E's dependence from the output branch row to the pole row: in the DC Jacobian the
    # branch row holds −∂E/∂v for the inputs and supply pins.
    for column, derivative in ((in_p, e.d_dvd), (in_n, -e.d_dvd), (v_pos, e.d_dvpos),
                               (v_neg, e.d_dvneg)):
        stamper.at(stamper.G, branch, column, derivative)
        stamper.at(stamper.G, w, column, -derivative)
    stamper.at(stamper.G, branch, w, -np.ones(stamper.G.shape[0]))
    stamper.at(stamper.G, w, w, np.ones(stamper.G.shape[0]))
    pole_hz = values["gain_bandwidth"] / values["open_loop_gain"]
    stamper.at(stamper.C, w, w, 1.0 / (2.0 * math.pi * pole_hz))


_REACTIVE = {
    "capacitor": _capacitor,
    "inductor": _inductor,
    "diode": _diode,
    "npn": _bipolar,
    "pnp": _bipolar,
    "njfet": _fet,
    "pjfet": _fet,
    "nmos": _fet,
    "pmos": _fet,
    "opamp": _opamp,
}

_CACHE_KEY = "_small_signal_network"


def nominal_network(ctx: Any) -> SmallSignal:
    """The nominal small-signal network of a pipeline context, built once and shared.

    The operating point is solved again here (the ``op`` section holds plain numbers only); the
    same deterministic solve gives the same point.  The network is kept in ``ctx.options`` so
    the response and noise analyses linearise once.
    """
    cached = ctx.options.get(_CACHE_KEY)
    if cached is not None:
        return cached
    options = ctx.options.get("solve_options")
    solution = solve_op(ctx.circuit, options=options)
    require_converged(solution)
    network = linearise(solution)
    ctx.options[_CACHE_KEY] = network
    return network
