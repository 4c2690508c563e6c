"""Junction devices (diodes, bipolar and field-effect transistors) linearised a kind at a time.

Public API::

    groups = junction_groups(problem)          # made once per problem (memoised on it)
    group.linearise(x_full, state, limiting) -> Companion   # every device of the group at once
    companion.scatter(matrix, rhs)            # add the group's stamps to a padded system

Every device of one kind in a circuit shares its equations (:mod:`docgen.solve.companions`);
only its parameter values and its unknowns differ.  A group stacks the values of its D devices
sample-major, ``(S·D,)``, so one call of the model evaluates them all, and adds their Newton
companions ``J·x + c`` into the matrix with one product by a fixed 0/1 scatter matrix (which
also sums the entries of devices that share a net, where indexed adds would drop them).  Per
Newton iteration that is a handful of numpy calls for the whole circuit instead of dozens per
device: a time step of a small stage is dominated by such call overhead.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

from docgen.solve import devices as physics
from docgen.solve.companions import (
    BIPOLAR_PROJECTION,
    DIODE_PROJECTION,
    FET_PROJECTION,
    POLARITY,
    Evaluate,
    Limit,
    bipolar_model,
    diode_model,
    fet_model,
    fet_threshold,
)

if TYPE_CHECKING:
    from docgen.solve.mna import Problem

Array = np.ndarray
KINDS = ("diode", "npn", "pnp", "njfet", "pjfet", "nmos", "pmos")
#: up to this many samples the stamps are added with one matrix product (see ``scatter``)
SMALL_BATCH = 64


@dataclass(frozen=True)
class Companion:
    """The linearised equations of a group: ``jac`` (S, D, T, T), ``constant`` (S, D, T)."""

    group: JunctionGroup
    jac: Array
    constant: Array
    state: dict[str, Array]
    limited: Array

    def scatter(self, matrix: Array, rhs: Array) -> None:
        """Add ``J·x + c`` to the padded ``matrix`` (S, M+1, M+1) and ``rhs`` (S, M+1).

        A small batch (a time step) pays per numpy call: one product by the scatter matrices.
        A large one (tolerance boards) pays per element: one strided add per entry then.
        """
        samples = matrix.shape[0]
        if samples <= SMALL_BATCH:
            flat = matrix.reshape(samples, -1)
            flat += self.jac.reshape(samples, -1) @ self.group.matrix_scatter
            rhs -= self.constant.reshape(samples, -1) @ self.group.rhs_scatter
            return
        for d, unknowns in enumerate(self.group.unknowns.tolist()):
            add_per_entry(matrix, rhs, unknowns, self.jac[:, d], self.constant[:, d])


def add_per_entry(matrix: Array, rhs: Array, idx: Sequence[int], jacobian: Array,
                  constant: Array) -> None:
    """Add one stamp ``jacobian·x + constant`` on the rows ``idx``, one strided add per entry
    over the whole batch: repeated rows (two terminals on one net) add up, and over a large
    batch it is the faster way."""
    for i, row in enumerate(idx):
        for j, col in enumerate(idx):
            matrix[:, row, col] += jacobian[..., i, j]
        rhs[:, row] -= constant[..., i]


@dataclass(frozen=True)
class JunctionGroup:
    """The devices of one kind: where their unknowns sit and their stacked model."""

    kind: str
    names: tuple[str, ...]
    unknowns: Array  # (D, T) indices into the padded unknowns, in the model's terminal order
    projection: Array
    polarity: float
    evaluate: Evaluate
    limit: Limit
    matrix_scatter: Array  # (D·T·T, (M+1)²)
    rhs_scatter: Array  # (D·T, M+1)

    def linearise(self, x_full: Array, state: Mapping[str, Array], limiting: bool = True
                  ) -> Companion:
        """Every device's Newton companion at the padded unknowns ``x_full`` (S, M+1).

        :param state: the limited controls of the last iteration by group :attr:`key`
            (absent at the start: the start point is trusted).
        :param limiting: ``False`` linearises exactly at ``x_full`` (the small-signal matrix).
        """
        samples, count = x_full.shape[0], len(self.names)
        u_new = self.polarity * x_full[:, self.unknowns] @ self.projection.T  # (S, D, C)
        u = u_new
        if limiting:
            u_old = state.get(self.key, u_new)  # first iteration: trust the start point
            u = self.limit(u_new.reshape(samples * count, -1),
                           u_old.reshape(samples * count, -1)).reshape(u_new.shape)
        limited = np.any(np.abs(u - u_new) > 1e-12, axis=(1, 2))
        current, d_du = self.evaluate(u.reshape(samples * count, -1))
        terminals = current.shape[-1]
        d_du = d_du.reshape(samples, count, terminals, -1)
        current = current.reshape(samples, count, terminals)
        jac = d_du @ self.projection
        constant = self.polarity * (current - np.einsum("sdtc,sdc->sdt", d_du, u))
        return Companion(self, jac, constant, {self.key: u}, limited)

    @property
    def key(self) -> str:
        """The group's entry in the solver's limiting state: its controls ``(S, D, C)``."""
        return f"{self.kind} {' '.join(self.names)}"


def junction_groups(problem: Problem) -> list[JunctionGroup]:
    """The circuit's junction devices grouped by kind (in circuit order), memoised on the
    problem (:meth:`docgen.solve.mna.Problem.remember`)."""
    return problem.remember("junction groups", lambda: _groups(problem))


def group_of(problem: Problem, name: str) -> JunctionGroup:
    """A group of the one device ``name`` (its equations alone, e.g. for its currents)."""
    return problem.remember(("junction", name), lambda: _group(problem, [name]))


def positions(kind: str, local_count: int) -> tuple[int, ...]:
    """The device's local unknowns in its model's terminal order: behind its series (diode)
    or base (bipolar) resistance when it has an internal node."""
    if kind == "diode":
        return (2, 1) if local_count == 3 else (0, 1)
    if kind in ("npn", "pnp") and local_count == 4:
        return (0, 3, 2)
    return (0, 1, 2)


def _groups(problem: Problem) -> list[JunctionGroup]:
    by_kind: dict[str, list[str]] = {}
    for device in problem.circuit.devices:
        if device.kind in KINDS:
            by_kind.setdefault(device.kind, []).append(device.name)
    return [_group(problem, names) for names in by_kind.values()]


def _group(problem: Problem, names: list[str]) -> JunctionGroup:
    layout = problem.layout
    kind = next(d.kind for d in problem.circuit.devices if d.name == names[0])
    values = _stacked([problem.values[n] for n in names])
    temperature_k = np.repeat(problem.temperature_k, len(names))
    unknowns = np.array([[layout.local[n][p] for p in positions(kind, len(layout.local[n]))]
                         for n in names], dtype=np.intp)
    if kind == "diode":
        evaluate, limit = diode_model(values, temperature_k)
        projection, polarity = DIODE_PROJECTION, 1.0
    elif kind in ("npn", "pnp"):
        evaluate, limit = bipolar_model(values, temperature_k)
        projection, polarity = BIPOLAR_PROJECTION, POLARITY[kind]
    else:
        evaluate, limit = fet_model(kind, values), _channel_limit(fet_threshold(kind, values))
        projection, polarity = FET_PROJECTION, POLARITY[kind]
    padded = layout.size + 1
    return JunctionGroup(kind, tuple(names), unknowns, projection, polarity, evaluate, limit,
                         *_scatter_matrices(unknowns, padded))


def _stacked(per_device: list[Mapping[str, Array]]) -> dict[str, Array]:
    """Each value of D devices, ``(S,)`` each, as one ``(S·D,)`` array, sample-major."""
    return {key: np.stack([values[key] for values in per_device], axis=1).reshape(-1)
            for key in per_device[0]}


def _channel_limit(threshold: Array) -> Limit:
    def limit(u_new: Array, u_old: Array) -> Array:
        return physics.limit_channel(u_new, u_old, threshold)

    return limit


def _scatter_matrices(unknowns: Array, padded: int) -> tuple[Array, Array]:
    """0/1 matrices taking a group's flattened stamps to the flattened padded system."""
    count, terminals = unknowns.shape
    rows = np.broadcast_to(unknowns[:, :, None], (count, terminals, terminals)).reshape(-1)
    cols = np.broadcast_to(unknowns[:, None, :], (count, terminals, terminals)).reshape(-1)
    matrix = np.zeros((rows.size, padded * padded))
    matrix[np.arange(rows.size), rows * padded + cols] = 1.0
    rhs = np.zeros((count * terminals, padded))
    rhs[np.arange(count * terminals), unknowns.reshape(-1)] = 1.0
    return matrix, rhs
