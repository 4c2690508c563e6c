"""The transfer solve with a sample axis (what the spread analysis uses), and a property test of
random RC ladders against an independent two-port calculation.

References: the single-pole RC low-pass 1/(1 + sRC) (circuit theory) per sample; the ABCD
(chain) matrix of a cascade of series and shunt elements, H = 1/A(s) for an open output
(e.g. Pozar, *Microwave Engineering*, two-port networks), multiplied out with
numpy.polynomial and evaluated by scipy.signal.freqs.
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from numpy.polynomial import polynomial as P
from response_helpers import TWO_PI
from scipy.signal import freqs
from solver_helpers import make_circuit

from docgen.solve.linearise import linearise
from docgen.solve.operating_point import solve_op
from docgen.solve.response import transfer

RC = """
VS  signal    1 V 1 kHz : in gnd
R1  resistor  1k        : in out
C1  capacitor 100n      : out gnd
"""


def test_transfer_with_a_sample_axis_matches_each_sample():
    rng = np.random.default_rng(3)
    r = rng.uniform(500, 2000, size=400)
    c = rng.uniform(50e-9, 200e-9, size=400)
    circuit = make_circuit(RC, bench="input VS\noutput out")
    network = linearise(solve_op(circuit, overrides={("R1", "value"): r, ("C1", "value"): c}))
    freq = np.array([100.0, 1e3, 1e4])
    h = transfer(network, freq, "VS", "out")
    assert h.shape == (400, 3)
    expected = 1 / (1 + 1j * TWO_PI * freq[None, :] * (r * c)[:, None])
    assert np.allclose(h, expected, rtol=1e-12)


def ladder_text(sections):
    lines = ["VS  signal    1 V 1 kHz : n0 gnd"]
    for k, (r, c) in enumerate(sections):
        lines.append(f"R{k}  resistor  {r:.6g} : n{k} n{k + 1}")
        lines.append(f"C{k}  capacitor {c:.6g} : n{k + 1} gnd")
    return "\n".join(lines)


def ladder_denominator(sections):
    """A(s) of the chain matrix Π [[1, R], [0, 1]]·[[1, 0], [sC, 1]] (coefficients low → high).

    Only the first row (A, B) of the running product is needed: H = 1/A for an open output.
    """
    a, b = np.array([1.0]), np.array([0.0])
    for r, c in sections:
        b = P.polyadd(P.polymul(a, [r]), b)  # × [[1, R], [0, 1]]
        a = P.polyadd(a, P.polymul(b, [0.0, c]))  # × [[1, 0], [sC, 1]]
    return a


@settings(max_examples=25, deadline=None)
@given(st.lists(st.tuples(st.floats(100.0, 100e3), st.floats(1e-9, 1e-6)), min_size=1,
                max_size=4))
def test_random_rc_ladders_match_two_port_chain(sections):
    sections = [(float(f"{r:.6g}"), float(f"{c:.6g}")) for r, c in sections]  # as written
    circuit = make_circuit(ladder_text(sections), bench=f"input VS\noutput n{len(sections)}")
    network = linearise(solve_op(circuit))
    freq = np.logspace(0, 6, 25)
    h = transfer(network, freq, "VS", f"n{len(sections)}")[0]
    denominator = ladder_denominator(sections)[::-1]  # scipy wants high → low
    _, reference = freqs([1.0], denominator, worN=TWO_PI * freq)
    assert np.allclose(h, reference, rtol=1e-8, atol=1e-14)


def test_ladder_denominator_of_one_section_is_first_order():
    # Sanity of the reference itself: one section gives 1 + sRC.
    assert ladder_denominator([(1e3, 1e-6)]) == pytest.approx([1.0, 1e-3])
