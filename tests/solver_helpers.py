"""Small helpers for the solver tests: a circuit from a few lines of the design format."""

from __future__ import annotations

from docgen.elaborate import Circuit, elaborate
from docgen.reader import read_text
from docgen.record import builtin_page
from docgen.solve.operating_point import OpSolution, require_converged, solve_op

_BUILTINS = {m.name: m for m in builtin_page().models}

#: A voltage-controlled current sink (op-amp driving a MOSFET with a 10 Ω sense resistor into a
#: load from 100 V): plain Newton from 0 V does not settle on it at 470 Ω; stepping does.
SINK = """
VH  supply   100 V         : vh gnd
VP  supply   15 V          : vp gnd
VR  supply   1 V           : ref gnd
U1  opamp    generic-opamp : in+=ref in-=s out=g v+=vp v-=gnd
M1  nmos     generic-nmos  : d=d g=g s=s
RS  resistor 10            : s gnd
RL  resistor 470           : vh d
"""


def design_text(circuit: str, models: str = "", bench: str = "") -> str:
    """A minimal design page with the given blocks."""
    text = "---\ntitle: solver test\n---\n\n```circuit\n" + circuit.strip() + "\n```\n"
    if models:
        text += "\n```models\n" + models.strip() + "\n```\n"
    if bench:
        text += "\n```bench\n" + bench.strip() + "\n```\n"
    return text


def make_circuit(circuit: str, models: str = "", bench: str = "",
                 path: str = "test.md") -> Circuit:
    """Read and elaborate a design made of the given blocks (built-in models available)."""
    design = read_text(design_text(circuit, models, bench), path)
    return elaborate(design, _BUILTINS)


def solve(circuit: str, models: str = "", bench: str = "", **kwargs) -> OpSolution:
    """Solve and insist that the (first) sample converged."""
    solution = solve_op(make_circuit(circuit, models, bench), **kwargs)
    require_converged(solution)
    return solution


def v(solution: OpSolution, net: str, sample: int = 0) -> float:
    """One net voltage of one sample."""
    return float(solution.voltage(net)[sample])
