"""Random nonlinear circuits: the solver either refuses with a wiring diagnostic, or reports
non-convergence honestly, or returns a point that satisfies Kirchhoff's current law — never
NaN, never an unexpected exception.

Reference: Kirchhoff's current law at every net, evaluated with the device equations at the
returned point (any circuit-analysis textbook).
"""

from __future__ import annotations

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st
from solver_helpers import make_circuit

from docgen.diagnostics import AnalysisError, DocgenError
from docgen.solve.operating_point import op_section, require_converged, solve_op

KINDS = ("npn", "pnp", "nmos", "pmos", "njfet", "diode", "opamp")


@st.composite
def random_circuits(draw):
    nets = ["gnd", "vcc"] + [f"n{i}" for i in range(draw(st.integers(2, 5)))]
    lines = [f"VC supply {draw(st.sampled_from([5, 12, 30, 100]))} V : vcc gnd"]
    for k, net in enumerate(nets[2:]):
        value = draw(st.sampled_from(["100", "1k", "10k", "100k"]))
        lines.append(f"R{k} resistor {value} : {net} {draw(st.sampled_from(nets[:2]))}")
    for j in range(draw(st.integers(1, 4))):
        a, b, c = draw(st.permutations(nets))[:3]
        kind = draw(st.sampled_from(KINDS))
        if kind == "diode":
            lines.append(f"D{j} diode generic-diode : {a} {b}")
        elif kind == "opamp":
            lines.append(f"U{j} opamp generic-opamp : in+={a} in-={b} out={c} v+=vcc v-=gnd")
        elif kind in ("npn", "pnp"):
            lines.append(f"Q{j} {kind} generic-{kind} : c={a} b={b} e={c}")
        else:
            lines.append(f"M{j} {kind} generic-{kind} : d={a} g={b} s={c}")
    return "\n".join(lines)


@settings(max_examples=40, deadline=None)
@given(random_circuits())
def test_random_circuits_solve_honestly(text):
    try:
        circuit = make_circuit(text)
        solution = solve_op(circuit)
    except DocgenError:
        return  # the reader or the wiring check refused it, with a diagnostic
    assert np.isfinite(solution.x).all()
    if not solution.converged[0]:
        try:
            require_converged(solution)
        except AnalysisError as error:
            assert error.diagnostics[0].line >= 1
        return
    for net in circuit.nets:
        flows = [solution.currents[d.name][0, t] for d in circuit.devices
                 for t, n in enumerate(d.nets) if n == net]
        assert abs(sum(flows)) <= 1e-6 * max(1e-3, max(abs(f) for f in flows))
    section = op_section(solution)
    assert all(value is None or np.isfinite(value) for value in section["nets"].values())


@settings(max_examples=30, deadline=None)
@given(random_circuits(), st.integers(0, 2**32 - 1))
def test_assembled_matrix_is_the_jacobian_of_the_equations(text, seed):
    # The solver stamps all devices of one kind with one evaluation and adds them through a
    # scatter matrix (small batches) or entry by entry (large ones).  Either way, at any x the
    # assembled system must be the Newton linearisation of the circuit equations F:
    # A(x) = ∂F/∂x, checked against central finite differences (numerical analysis), with
    # F(x) = A(x)·x − b(x); and the two ways of adding stamps must agree.
    try:
        circuit = make_circuit(text)
    except DocgenError:
        return
    from docgen.solve import mna
    from docgen.solve.junctions import SMALL_BATCH

    problem = mna.build_problem(circuit)
    size = problem.layout.size
    x = np.random.default_rng(seed).uniform(-0.8, 0.8, size)

    def residual(at: np.ndarray) -> np.ndarray:
        matrix, rhs, _, _ = mna.assemble(problem, at[None, :], {}, limiting=False)
        return matrix[0] @ at - rhs[0]

    matrix = mna.assemble(problem, x[None, :], {}, limiting=False)[0][0]
    step = 1e-6
    numeric = np.column_stack([(residual(x + step * e) - residual(x - step * e)) / (2 * step)
                               for e in np.eye(size)])
    assert np.allclose(matrix, numeric, rtol=1e-4, atol=1e-6 * max(1.0, np.abs(matrix).max()))
    large = problem.subset(np.zeros(SMALL_BATCH + 1, dtype=int))
    batch = mna.assemble(large, np.repeat(x[None, :], SMALL_BATCH + 1, axis=0), {},
                         limiting=False)
    assert np.allclose(batch[0], matrix, rtol=1e-12, atol=0)
