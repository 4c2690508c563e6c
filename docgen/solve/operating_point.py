"""The DC operating point: the pipeline's ``op`` section and the solver API other analyses use.

Public API::

    solution = solve_op(circuit, overrides=None, temperature=None, options=None, start=None)
    solution.voltages          # (S, N) node voltages in circuit.nets order
    solution.voltage("c1")     # (S,)
    solution.currents["R1"]    # (S, T) current from each terminal's net into the part
    solution.converged         # (S,) booleans; solution.method (S,) stage names
    solution.problem           # values (S,) per part and the temperature, as solved
    part_quantities(solution, "Q1")  # {"ic_a": (S,), ..., "region": (S,) strings}
    require_converged(solution)      # raises AnalysisError naming the part that would not settle
    analyse(ctx) -> dict             # the pipeline's ``op`` section (sample 0 of a nominal solve)

``overrides`` maps ``(part, value name)`` to a scalar or an ``(S,)`` array (names as in
:attr:`docgen.elaborate.Device.values`: ``value`` for the primary value, model parameter names
for devices); ``temperature`` is °C, scalar or ``(S,)``.  A batch is solved in one go: the
spread and temperature analyses call this with thousands of samples.  The solver never puts
NaN in a converged sample; failed samples are flagged, never dropped.

Per-part quantities follow DEVELOPERS.md: a two-terminal part's current flows from its first
net to its second through it; power is absorbed; transistor quantities read positive in normal
operation for either polarity.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

import numpy as np

from docgen.diagnostics import AnalysisError
from docgen.elaborate import Circuit, Device
from docgen.kinds import GROUND
from docgen.solve import companions, mna
from docgen.solve.newton import METHODS, DcResult, SolveOptions, solve_dc
from docgen.solve.topology import check_dc_topology

Array = np.ndarray

#: A silicon junction counts as forward-biased above this voltage when naming a transistor's
#: region (common practice: VCE(sat) ≈ 0.2–0.3 V, so saturation when vBC exceeds ≈ 0.4 V).
JUNCTION_ON_V = 0.4


@dataclass
class OpSolution:
    """The solved operating point of S samples of one circuit."""

    circuit: Circuit
    problem: mna.Problem
    dc: DcResult
    currents: dict[str, Array]

    @property
    def x(self) -> Array:
        """All unknowns ``(S, M)`` (see :class:`docgen.solve.mna.Layout`)."""
        return self.dc.x

    @property
    def voltages(self) -> Array:
        """Node voltages ``(S, N)`` in ``circuit.nets`` order."""
        return self.dc.x[:, : len(self.circuit.nets)]

    @property
    def converged(self) -> Array:
        """``(S,)`` True where the sample's operating point converged."""
        return self.dc.converged

    @property
    def method(self) -> Array:
        """``(S,)`` the stage that converged each sample (``"none"`` where it failed)."""
        names = np.array([*METHODS, "none"])
        return names[self.dc.method]

    @property
    def temperature_c(self) -> Array:
        """``(S,)`` the temperature each sample was solved at."""
        return self.problem.temperature_c

    def voltage(self, net: str) -> Array:
        """The voltage of ``net`` (``gnd`` is 0) for every sample."""
        if net == GROUND:
            return np.zeros(self.problem.samples)
        return self.dc.x[:, self.circuit.net_index[net]]

    def terminal_voltages(self, device: Device) -> Array:
        """``(S, T)`` the voltage on each terminal of ``device``."""
        return np.stack([self.voltage(n) for n in device.nets], axis=-1)

    def local(self, device: Device) -> Array:
        """``(S, L)`` the device's local unknowns (terminals, internal node, branch current)."""
        return mna.pad(self.dc.x)[:, list(self.problem.layout.local[device.name])]


def solve_op(
    circuit: Circuit,
    overrides: mna.Overrides | None = None,
    temperature: Array | float | None = None,
    options: SolveOptions | None = None,
    start: OpSolution | Array | None = None,
) -> OpSolution:
    """Solve the operating point of ``circuit`` for every sample (see the module docstring).

    :param start: a solution (its first sample) or unknowns ``(M,)``/``(S, M)`` to start plain
        Newton from: the nominal point makes tolerance samples converge in a few iterations.

    :raises CircuitError: the wiring cannot have an operating point (floating net, source
        loop, current source with no path); checked before any solving.
    """
    check_dc_topology(circuit)
    problem = mna.build_problem(circuit, overrides, temperature)
    if isinstance(start, OpSolution):
        start = start.x[0]
    dc = solve_dc(problem, options, start)
    currents = mna.device_currents(problem, dc.x)
    finite = np.all(np.isfinite(dc.x), axis=1)
    for value in currents.values():
        finite &= np.all(np.isfinite(value), axis=1)
    dc.converged &= finite
    dc.method = np.where(dc.converged, dc.method, -1)
    return OpSolution(circuit, problem, dc, currents)


def _parts_on(circuit: Circuit, net: str) -> list[Device]:
    on = [d for d in circuit.devices if net in d.nets and not d.bench]
    nonlinear = [d for d in on if d.kind not in ("resistor", "capacitor", "current", "supply",
                                                  "signal", "inductor")]
    return nonlinear + [d for d in on if d not in nonlinear]


def _subject(solution: OpSolution, index: int) -> tuple[str, str, list[Device]]:
    """(quantity, equation, parts) in user words for the unknown at ``index``."""
    circuit, layout = solution.circuit, solution.problem.layout
    if 0 <= index < len(circuit.nets):
        net = circuit.nets[index]
        parts = _parts_on(circuit, net)
        names = ", ".join(d.name for d in parts)
        return (f"the voltage of net '{net}' (parts {names})",
                f"the currents at net '{net}' (parts {names})", parts)
    owner = next((name for name, i in {**layout.internal, **layout.branch}.items()
                  if i == index), None)
    if owner is None:
        return "the circuit's unknowns", "the circuit's equations", list(circuit.devices[:1])
    return (f"the current of part {owner}", f"the equation of part {owner}",
            [circuit.device(owner)])


def require_converged(solution: OpSolution, sample: int = 0) -> None:
    """Raise :class:`AnalysisError` if ``sample`` did not converge, naming what would not settle.

    A singular system (checked on the sample's last iterate) names the net or part whose value
    nothing fixes; otherwise the unknown that still moved most in the last Newton step.
    """
    if solution.converged[sample]:
        return
    circuit, dc = solution.circuit, solution.dc
    null_unknown = _singular_unknown(solution, sample)
    index = null_unknown if null_unknown is not None else int(dc.unsettled[sample])
    quantity, equation, parts = _subject(solution, index)
    tried = ", then ".join(dc.attempts)
    if null_unknown is not None:
        message = (f"the operating point has no unique solution: nothing fixes {quantity} "
                   f"(the equations are singular; tried {tried})")
        hint = "look for a net whose only connections carry no current (every device there off)"
    else:
        message = (f"the operating point did not converge: {equation} would not settle after "
                   f"{int(dc.iterations[sample])} Newton iterations (tried {tried})")
        hint = ("check for positive feedback with no stable state, a part connected the wrong "
                "way round, or values off by a prefix")
    span = parts[0].span if parts else circuit.devices[0].span
    raise AnalysisError(circuit.diagnostic(span, message, hint))


def _singular_unknown(solution: OpSolution, sample: int) -> int | None:
    """The unknown a singular system leaves undefined (largest entry of the null vector).

    Only for the error message: the matrix of this one sample at its last iterate, by SVD.
    """
    index = np.array([sample])
    problem = solution.problem.subset(index)
    x = np.nan_to_num(solution.x[index])
    matrix, _, _, _ = mna.assemble(problem, x, {}, limiting=False)
    singular_values, vectors = np.linalg.svd(matrix[0])[1:]
    if singular_values[-1] > 1e-13 * singular_values[0]:
        return None
    return int(np.argmax(np.abs(vectors[-1])))


def dc_unstable(solution: OpSolution) -> Array:
    """``(S,)`` True where the operating point is certainly unstable (a positive-feedback
    balance point, like a latch or a Schmitt trigger poised exactly between its states).

    Criterion (small-signal theory): with the nodal conductance matrix G at the point and any
    positive capacitances C, the natural frequencies are the eigenvalues of −C⁻¹G; if all lie
    in the left half-plane their product has the sign (−1)^n, so det G > 0.  Hence det G < 0
    means a real growing mode whatever the capacitances.  det G is read from the MNA matrix,
    each supply, signal and inductor branch flipping its sign once.  ``False`` does not prove
    stability: an oscillator's growing modes come in complex pairs this test cannot see (the
    response and feedback analyses look at those).
    """
    matrix, _, _, _ = mna.assemble(solution.problem, solution.x, {}, limiting=False)
    sign, _ = np.linalg.slogdet(matrix)
    branches = sum(1 for d in solution.circuit.devices if d.kind in mna.VOLTAGE_DEFINED)
    return (sign * (-1.0) ** branches < 0) & solution.converged


# ------------------------------------------------------------------- per-part figures


def _two_terminal(sol: OpSolution, d: Device) -> dict[str, Array]:
    v = sol.terminal_voltages(d)
    i = sol.currents[d.name][:, 0]
    voltage = v[:, 0] - v[:, 1]
    return {"voltage_v": voltage, "current_a": i, "power_w": voltage * i}


def _power(sol: OpSolution, d: Device) -> Array:
    return np.sum(sol.terminal_voltages(d) * sol.currents[d.name], axis=-1)


def _bipolar(sol: OpSolution, d: Device) -> dict[str, Array]:
    p = companions.POLARITY[d.kind]
    v, i = sol.terminal_voltages(d), sol.currents[d.name]
    evaluate, _ = companions.bipolar_model(sol.problem.values[d.name], sol.problem.temperature_k)
    local = sol.local(d)
    inner = local[:, [0, 3, 2]] if local.shape[1] == 4 else local[:, :3]
    _, d_du = evaluate(p * inner @ companions.BIPOLAR_PROJECTION.T)
    gm = d_du[:, 0, 0] + d_du[:, 0, 1]  # ∂iC/∂vBE at constant vCE
    g_pi = d_du[:, 1, 0] + d_du[:, 1, 1]
    g_out = -d_du[:, 0, 1]
    vbe, vbc = p * (v[:, 1] - v[:, 2]), p * (v[:, 1] - v[:, 0])
    region = np.select(
        [(vbe >= JUNCTION_ON_V) & (vbc < JUNCTION_ON_V), (vbe >= JUNCTION_ON_V),
         (vbc >= JUNCTION_ON_V)],
        ["active", "saturation", "reverse"], "cut-off")
    ic, ib = p * i[:, 0], p * i[:, 1]
    return {"ic_a": ic, "ib_a": ib, "ie_a": -p * i[:, 2], "vbe_v": vbe,
            "vce_v": p * (v[:, 0] - v[:, 2]), "vcb_v": -vbc, "region": region,
            "power_w": _power(sol, d), "gm_s": gm, "rpi_ohm": 1.0 / g_pi,
            "ro_ohm": 1.0 / g_out, "beta_dc": ic / np.where(ib != 0, ib, np.nan)}


def _fet(sol: OpSolution, d: Device) -> dict[str, Array]:
    p = companions.POLARITY[d.kind]
    v, i = sol.terminal_voltages(d), sol.currents[d.name]
    values = sol.problem.values[d.name]
    u = p * v @ companions.FET_PROJECTION.T
    _, d_du = companions.fet_model(d.kind, values)(u)
    if d.kind in ("njfet", "pjfet"):
        threshold = -values["pinch_off_voltage"]
    else:
        threshold = values["threshold_voltage"]
    vgs, vds = u[:, 0], u[:, 1]
    overdrive = np.where(vds >= 0, vgs, vgs - vds) - threshold
    region = np.select([overdrive <= 0, np.abs(vds) >= overdrive], ["cut-off", "saturation"],
                       "triode")
    return {"id_a": p * i[:, 0], "vgs_v": vgs, "vds_v": vds, "region": region,
            "power_w": _power(sol, d), "gm_s": d_du[:, 0, 0], "gds_s": d_du[:, 0, 1]}


def _diode(sol: OpSolution, d: Device) -> dict[str, Array]:
    return _two_terminal(sol, d)


def _opamp(sol: OpSolution, d: Device) -> dict[str, Array]:
    from docgen.solve.devices import opamp_output

    v, i = sol.terminal_voltages(d), sol.currents[d.name]
    values = sol.problem.values[d.name]
    vd = v[:, 0] - v[:, 1] + values["input_offset_voltage"]
    e = opamp_output(vd, v[:, 3], v[:, 4], values["open_loop_gain"], values["output_headroom"])
    limited = e.d_dvd < 0.5 * values["open_loop_gain"]  # the smooth limit has taken over
    return {"out_v": v[:, 2], "iout_a": -i[:, 2], "supply_current_a": i[:, 3],
            "input_voltage_v": v[:, 0] - v[:, 1], "output_limited": limited,
            "power_w": _power(sol, d)}


def part_quantities(solution: OpSolution, name: str) -> dict[str, Array]:
    """The operating-point figures of one part, each an ``(S,)`` array (see module docstring)."""
    device = solution.circuit.device(name)
    kind = device.kind
    if kind in ("npn", "pnp"):
        return _bipolar(solution, device)
    if kind in ("njfet", "pjfet", "nmos", "pmos"):
        return _fet(solution, device)
    if kind == "opamp":
        return _opamp(solution, device)
    return _two_terminal(solution, device)


# ------------------------------------------------------------------ the op section


#: Voltages, currents and powers smaller than this are rounding residue of the solve (the
#: solver's own tolerance is 1 nV / 1 pA), published as exactly 0.
RESIDUE = 1e-15


def _plain(value: Any, residue: bool = False) -> Any:
    """A JSON-ready scalar: floats stay floats, non-finite become ``None``.

    With ``residue``, magnitudes below :data:`RESIDUE` become 0 (a net that carries no current
    reads 0 V, not 3e-18 V).
    """
    if isinstance(value, np.bool_ | bool):
        return bool(value)
    if isinstance(value, np.str_ | str):
        return str(value)
    number = float(value) + 0.0  # + 0.0 turns −0.0 into 0.0
    if residue and abs(number) < RESIDUE:
        return 0.0
    return number if np.isfinite(number) else None


def _figure(key: str, value: Any) -> Any:
    return _plain(value, residue=key.endswith(("_v", "_a", "_w")))


def op_section(solution: OpSolution, sample: int = 0) -> dict[str, Any]:
    """The ``op`` results section for one sample of ``solution`` (plain JSON data)."""
    circuit = solution.circuit
    parts: dict[str, dict[str, Any]] = {}
    supplies: dict[str, dict[str, Any]] = {}
    for d in circuit.devices:
        if d.bench:
            continue
        figures = {k: _figure(k, v[sample])
                   for k, v in part_quantities(solution, d.name).items()}
        parts[d.name] = figures
        if d.kind == "supply":
            supplies[d.name] = {"current_a": _plain(-figures["current_a"]),
                                "power_w": _plain(-figures["power_w"])}
    load = None
    loads = [d for d in circuit.devices if d.bench and d.kind == "resistor"]
    if loads:
        figures = part_quantities(solution, loads[0].name)
        load = {"resistance_ohm": loads[0].values["value"],
                **{k: _figure(k, v[sample]) for k, v in figures.items()}}
    return {
        "temperature_c": _plain(solution.temperature_c[sample]),
        "nets": {net: _plain(solution.voltage(net)[sample], residue=True)
                 for net in circuit.nets},
        "parts": parts,
        "supplies": supplies,
        "load": load,
        "assumed": {d.name: list(d.assumed) for d in circuit.devices if d.assumed},
        "unstable": bool(dc_unstable(solution)[sample]),
        "method": str(solution.method[sample]),
        "iterations": int(solution.dc.iterations[sample]),
    }


def analyse(ctx: Any) -> dict[str, Any]:
    """The pipeline's ``op`` section: the nominal operating point at the bench temperature."""
    options = ctx.options.get("solve_options") if isinstance(ctx.options, Mapping) else None
    solution = solve_op(ctx.circuit, options=options)
    require_converged(solution)
    return op_section(solution)
