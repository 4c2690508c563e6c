"""Batched complex solves of a linear network: (G + jωC)·x = b for every frequency at once.

The small-signal network is two real matrices, conductances ``G`` and the susceptance
coefficients ``C`` (capacitances, and −L in inductor branch rows), so that the system matrix at
angular frequency ω is ``G + jωC``.  Everything here broadcasts over leading axes:

- ``G``, ``C``: ``(N, N)`` or ``(S, N, N)`` (``S`` Monte Carlo samples);
- ``freq``: ``(F,)`` in Hz, or ``(S, F)`` (each sample at its own frequencies);
- right-hand sides: ``(N,)`` or ``(S, N)``;
- results: ``(F, N)`` or ``(S, F, N)``.

One ``numpy.linalg.solve`` call handles the whole ``(S, F, N, N)`` stack; there is no Python loop
per frequency or per sample.  The spread analysis calls :func:`solve` with thousands of samples at
a few frequencies; the response and noise analyses call it with one sample at a few hundred.

A singular system (a node that floats at some frequency) raises
:class:`numpy.linalg.LinAlgError`; callers turn it into a diagnostic.
"""

from __future__ import annotations

import numpy as np


def system_matrix(G: np.ndarray, C: np.ndarray, freq: np.ndarray) -> np.ndarray:
    """``G + j·2πf·C`` for every frequency: shape ``(..., F, N, N)``.

    ``freq`` is ``(F,)`` shared by every sample, or ``(S, F)``: each sample at its own
    frequencies (the spread analysis narrows each board's corner on its own grid).
    """
    G = np.asarray(G, dtype=float)
    C = np.asarray(C, dtype=float)
    omega = 2.0 * np.pi * np.asarray(freq, dtype=float)
    shape = (np.broadcast_shapes(G.shape[:-2], C.shape[:-2], omega.shape[:-1])
             + omega.shape[-1:] + G.shape[-2:])
    matrix = np.empty(shape, dtype=complex)  # filled in place: no complex temporaries
    matrix.real[...] = G[..., None, :, :]
    matrix.imag[...] = omega[..., None, None] * C[..., None, :, :]
    return matrix


def solve(G: np.ndarray, C: np.ndarray, freq: np.ndarray, rhs: np.ndarray) -> np.ndarray:
    """Node vector ``x`` with ``(G + jωC)·x = rhs`` at each frequency: shape ``(..., F, N)``."""
    matrix = system_matrix(G, C, freq)
    rhs = np.asarray(rhs)
    vector = np.broadcast_to(rhs[..., None, :], matrix.shape[:-1]).astype(complex)
    return np.linalg.solve(matrix, vector[..., None])[..., 0]


def adjoint(G: np.ndarray, C: np.ndarray, freq: np.ndarray, probe: np.ndarray) -> np.ndarray:
    """Row vector ``y`` with ``y·x = probe·x`` for every excitation: solves ``Aᵀ·y = probe``.

    With ``probe`` selecting the output node, ``y[k]`` is the output produced by a unit current
    injected into row ``k`` (the transfer impedance), for all ``k`` at once: one solve per
    frequency gives the transfer of every noise source (Tellegen's theorem / the adjoint network).
    """
    matrix = np.swapaxes(system_matrix(G, C, freq), -1, -2)
    probe = np.asarray(probe)
    vector = np.broadcast_to(probe[..., None, :], matrix.shape[:-1]).astype(complex)
    return np.linalg.solve(matrix, vector[..., None])[..., 0]
