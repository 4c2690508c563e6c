"""Batched complex solves: shapes, agreement with numpy.linalg per frequency, and an RC network
stamped by hand against scipy.signal.freqs of its analytic transfer function."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.signal import freqs

from docgen.solve.curves import log_sweep
from docgen.solve.phasor import adjoint, solve


def rc_low_pass(r, c):
    """Nodes [in, out] and the source branch current: source 1 V at in, R in→out, C out→gnd."""
    g = 1.0 / r
    G = np.array([[g, -g, 1.0], [-g, g, 0.0], [1.0, 0.0, 0.0]])
    C = np.zeros((3, 3))
    C[1, 1] = c
    return G, C, np.array([0.0, 0.0, 1.0])


def test_rc_low_pass_matches_freqs():
    # H = 1/(1 + sRC) (circuit theory); reference scipy.signal.freqs.
    r, c = 1.5e3, 22e-9
    G, C, rhs = rc_low_pass(r, c)
    freq = log_sweep(10.0, 1e6, 50)
    x = solve(G, C, freq, rhs)
    _, reference = freqs([1.0], [r * c, 1.0], worN=2 * math.pi * freq)
    assert x.shape == (len(freq), 3)
    assert np.allclose(x[:, 1], reference, rtol=1e-12, atol=0)


def test_sample_axis_matches_single_solves():
    # (S, N, N) matrices with (S, N) right-hand sides give (S, F, N); each sample agrees with
    # numpy.linalg.solve on its own matrix.
    rng = np.random.default_rng(7)
    samples, freq = 5, np.array([10.0, 1e3, 1e5])
    G = rng.normal(size=(samples, 4, 4)) + 4 * np.eye(4)
    C = rng.normal(size=(samples, 4, 4)) * 1e-6
    rhs = rng.normal(size=(samples, 4))
    x = solve(G, C, freq, rhs)
    assert x.shape == (samples, 3, 4)
    for s in range(samples):
        for k, f in enumerate(freq):
            direct = np.linalg.solve(G[s] + 2j * math.pi * f * C[s], rhs[s])
            assert np.allclose(x[s, k], direct, rtol=1e-12, atol=1e-15)


def test_adjoint_is_row_of_inverse():
    # y = row `out` of (G + jωC)⁻¹: every source's transfer to the output in one solve.
    G, C, _ = rc_low_pass(1e3, 1e-6)
    freq = np.array([1.0, 159.0, 1e4])
    probe = np.array([0.0, 1.0, 0.0])
    y = adjoint(G, C, freq, probe)
    for k, f in enumerate(freq):
        inverse = np.linalg.inv(G + 2j * math.pi * f * C)
        assert np.allclose(y[k], inverse[1], rtol=1e-12)


def test_singular_network_raises():
    G = np.array([[1.0, 0.0], [0.0, 0.0]])
    with pytest.raises(np.linalg.LinAlgError):
        solve(G, np.zeros((2, 2)), np.array([1.0]), np.array([1.0, 0.0]))
