"""Least-squares bookkeeping shared by the exchange and time-course fits: the parameter
covariance from a Jacobian, and linear propagation of a covariance through any function.

Convention (as in :mod:`.fits`): when the data carry their own σ (``absolute=True``) the
covariance is (JᵀJ)⁻¹ of the σ-weighted residuals, trusting σ; otherwise it is scaled by the
scatter, s²·(JᵀJ)⁻¹ with s² = SSR/(N − p) (the usual unweighted estimate, e.g. W. H. Press et
al., Numerical Recipes, 3rd ed. (2007), §15.4–15.5). Propagation is first order: for outputs
y = f(x), cov_y = G·cov_x·Gᵀ with G = ∂f/∂x by central differences, which is exact for the
linear part and adequate while the relative errors are small (the results say when they are
not). numpy only.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

FloatArray = NDArray[np.float64]

#: relative step of the central differences (≈ cube root of the float epsilon, scaled)
RELATIVE_STEP = 1e-6


@dataclass(frozen=True)
class Covariance:
    """A parameter covariance and how it was scaled."""

    matrix: FloatArray | None  # None: the data do not determine every parameter
    chi2: float
    dof: int
    absolute: bool

    @property
    def chi2_reduced(self) -> float | None:
        return self.chi2 / self.dof if self.dof > 0 else None

    def sigma(self, i: int) -> float | None:
        """Standard error of parameter ``i`` (None when not determined)."""
        if self.matrix is None or not np.isfinite(self.matrix[i, i]) or self.matrix[i, i] < 0:
            return None
        return math.sqrt(float(self.matrix[i, i]))


def covariance(jac: FloatArray, residuals: FloatArray, *, absolute: bool) -> Covariance:
    """Covariance of the fitted parameters from the Jacobian of the (weighted) residuals.

    JᵀJ is inverted with its columns scaled to unit length (well conditioned unless the
    parameters are truly degenerate), by eigen-decomposition; a near-zero eigenvalue means a
    parameter the data do not determine, and the covariance is then None.
    """
    n, p = jac.shape
    chi2 = float(residuals @ residuals)
    dof = n - p
    norms = np.sqrt(np.einsum("ij,ij->j", jac, jac))
    if dof < 0 or (not absolute and dof == 0) or not (norms > 0).all():
        return Covariance(None, chi2, dof, absolute)
    scaled = jac / norms
    evals, evecs = np.linalg.eigh(scaled.T @ scaled)
    if evals[0] <= 1e-12 * evals[-1]:
        return Covariance(None, chi2, dof, absolute)
    inv = (evecs / evals) @ evecs.T / np.outer(norms, norms)
    if not absolute:
        inv = inv * (chi2 / dof)
    return Covariance(inv, chi2, dof, absolute)


def jacobian(fn: Callable[[FloatArray], FloatArray], x: FloatArray) -> FloatArray:
    """∂fn/∂x by central differences, step RELATIVE_STEP·max(|xᵢ|, typical |x|)."""
    x = np.asarray(x, dtype=float)
    scale = float(np.max(np.abs(x))) if x.size else 1.0
    f0 = np.asarray(fn(x), dtype=float)
    out = np.empty((f0.size, x.size))
    for i in range(x.size):
        h = RELATIVE_STEP * max(abs(x[i]), 1e-3 * scale, 1e-300)
        up, down = x.copy(), x.copy()
        up[i] += h
        down[i] -= h
        out[:, i] = (np.asarray(fn(up), dtype=float) - np.asarray(fn(down), dtype=float)) / (2 * h)
    return out


def propagate(fn: Callable[[FloatArray], FloatArray], x: FloatArray, cov: FloatArray) -> FloatArray:
    """Covariance of fn(x) given the covariance of x (first order, central differences)."""
    g = jacobian(fn, x)
    return g @ cov @ g.T


def sigmas(cov: FloatArray | None) -> FloatArray | None:
    """√diag of a covariance (NaN where the diagonal is negative from round-off)."""
    if cov is None:
        return None
    d = np.diag(cov).copy()
    d[d < 0] = np.nan
    return np.sqrt(d)
