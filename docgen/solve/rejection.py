"""Supply and common-mode rejection from the small-signal network at the operating point.

Public API::

    h = branch_transfer(network, part, freq, output)      # (S, F) V(out)/V(in series with part)
    psrr = supply_rejection(network, freq, signal, output) # {supply: (S, F) PSRR as a ratio}
    ad, acm = differential_gains(network, (a, b), freq, output)
    common_mode_parts(circuit, text) -> (a, b)           # read the bench ``common mode`` line

Definitions (input-referred, as op-amp data sheets state them; Sedra & Smith, *Microelectronic
Circuits*, from memory):

- PSRR of a supply = |gain from the signal to the output| / |gain from a small voltage in series
  with that supply to the output|, at each frequency;
- CMRR = |Ad| / |Acm| with the two inputs ``a`` and ``b`` (voltage-defined parts: a signal or a
  supply) driven as ``v_a = v_cm + v_d/2``, ``v_b = v_cm − v_d/2``: Ad = (H_a − H_b)/2 and
  Acm = H_a + H_b, where H is the transfer from each part's series voltage to the output.

``output`` is a net, or a pair of nets for a differential output (their difference).
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from docgen.diagnostics import AnalysisError, Span
from docgen.elaborate import Circuit
from docgen.solve import phasor
from docgen.solve.linearise import SmallSignal

Array = np.ndarray
Output = str | tuple[str, str]
VOLTAGE_PARTS = ("signal", "supply")


def _probe(network: SmallSignal, output: Output) -> Array:
    """The row vector that reads the output from a solution."""
    probe = np.zeros((network.samples, network.size))
    nets = (output, None) if isinstance(output, str) else output
    for net, sign in zip(nets, (1.0, -1.0), strict=True):
        row = None if net is None else network.row(net)
        if row is not None:
            probe[:, row] += sign
    return probe


def branch_transfers(network: SmallSignal, parts: Sequence[str], freq: Array, output: Output
                     ) -> Array:
    """``(P, S, F)``: the output per volt in series with each voltage-defined part.

    One adjoint solve per frequency gives the transfer from every row at once
    (:func:`docgen.solve.phasor.adjoint`); a part's series voltage is its branch row.
    """
    y = phasor.adjoint(network.G, network.C, np.asarray(freq, dtype=float),
                       _probe(network, output))
    return np.stack([y[..., network.branch_row(part)] for part in parts])


def supply_rejection(network: SmallSignal, freq: Array, signal: str, output: Output
                     ) -> tuple[dict[str, Array], dict[str, Array]]:
    """PSRR (ratio) and supply-to-output gain, each ``{supply: (S, F)}``."""
    supplies = [d.name for d in network.solution.circuit.of_kind("supply")]
    transfers = branch_transfers(network, [signal, *supplies], freq, output)
    wanted = np.abs(transfers[0])
    psrr, supply_gain = {}, {}
    for k, name in enumerate(supplies):
        leak = np.abs(transfers[k + 1])
        with np.errstate(divide="ignore", invalid="ignore"):
            psrr[name] = wanted / leak
        supply_gain[name] = leak
    return psrr, supply_gain


def differential_gains(network: SmallSignal, inputs: tuple[str, str], freq: Array,
                       output: Output) -> tuple[Array, Array]:
    """``(Ad, Acm)``, each ``(S, F)`` complex, for the two input parts ``inputs``."""
    h = branch_transfers(network, list(inputs), freq, output)
    return (h[0] - h[1]) / 2.0, h[0] + h[1]


def common_mode_parts(circuit: Circuit, text: str) -> tuple[str, str]:
    """The two input parts of a bench ``common mode A B`` line (each a signal or a supply).

    :raises AnalysisError: not two names, or a name that is not a signal or supply part.
    """
    span = circuit.bench.spans.get("common mode", Span(1, 1))
    names = text.replace(",", " ").split()
    if len(names) != 2:
        raise AnalysisError(circuit.diagnostic(
            span, f"'common mode' needs the two input parts, got '{text}'",
            "write 'common mode VA VB': the signal or supply parts driving the two inputs"))
    for name in names:
        try:
            kind = circuit.device(name).kind
        except KeyError:
            kind = None
        if kind not in VOLTAGE_PARTS:
            what = "no part" if kind is None else f"a {kind}"
            raise AnalysisError(circuit.diagnostic(
                span, f"'common mode' names {name}, which is {what}, not a signal or supply",
                "name the signal or supply parts that drive the two inputs (a 0 V supply "
                "marks an input held at a fixed voltage)"))
    return names[0], names[1]
