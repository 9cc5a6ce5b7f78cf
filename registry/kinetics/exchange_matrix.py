"""Longitudinal magnetization of exchanging sites: the Bloch–McConnell equations for z.

For n sites with first-order rate constants k_ij (a molecule at site i goes to site j) and
longitudinal relaxation rates R1_i = 1/T1_i, the deviations from equilibrium obey
(H. M. McConnell, J. Chem. Phys. 28, 430 (1958))

    dΔM/dt = L·ΔM,   L_ii = −R1_i − Σ_j k_ij,   L_ij = k_ji (i ≠ j).

At equilibrium detailed balance holds, p_i·k_ij = p_j·k_ji with p the site populations, so
L·diag(p) is symmetric and L is similar to the symmetric matrix D^(−½)·L·D^(½) (D = diag(p)).
The propagator exp(L·t) is therefore computed from a symmetric eigen-decomposition — exact,
real and cheap (numpy ``eigh``), with no general matrix exponential. One convention holds in
this package: ``k[i, j]`` is k(i→j), the rate constant of one molecule leaving i for j; the
diagonal of ``k`` is ignored.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray

FloatArray = NDArray[np.float64]


def generator(k: ArrayLike, r1: ArrayLike) -> FloatArray:
    """L of dΔM/dt = L·ΔM from k(i→j) and R1 (s⁻¹); any k, detailed balance or not."""
    rates = np.array(k, dtype=float)
    np.fill_diagonal(rates, 0.0)
    out = rates.T.copy()
    out[np.diag_indices_from(out)] = -rates.sum(axis=1) - np.asarray(r1, dtype=float)
    return out


def balanced_rates(upper: ArrayLike, populations: ArrayLike) -> FloatArray:
    """The full k(i→j) matrix from the rate constants above the diagonal (i < j, in row order)
    and the populations: k(j→i) = k(i→j)·p_i/p_j (detailed balance)."""
    p = np.asarray(populations, dtype=float)
    n = p.size
    rows, cols = np.triu_indices(n, 1)
    k = np.zeros((n, n))
    k[rows, cols] = upper
    k[cols, rows] = k[rows, cols] * p[rows] / p[cols]
    return k


def propagators(
    k: ArrayLike, r1: ArrayLike, populations: ArrayLike, times_s: ArrayLike
) -> FloatArray:
    """exp(L·t) for each t (shape T×n×n), for rates that obey detailed balance with ``populations``.

    exp(L·t) = D^½·V·exp(Λt)·Vᵀ·D^(−½), where V·Λ·Vᵀ is the symmetric D^(−½)·L·D^½.
    """
    p = np.asarray(populations, dtype=float)
    root = np.sqrt(p)
    lmat = generator(k, r1)
    sym = lmat * root[None, :] / root[:, None]
    evals, vecs = np.linalg.eigh(0.5 * (sym + sym.T))
    t = np.atleast_1d(np.asarray(times_s, dtype=float))
    decay = np.exp(np.outer(t, evals))  # T×n
    core = np.einsum("ik,tk,jk->tij", vecs, decay, vecs)
    return core * root[None, :, None] / root[None, None, :]
