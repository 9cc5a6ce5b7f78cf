"""The Eyring equation as the global line-shape fit uses it: ln k(T) from ΔH‡ and ΔS‡.

k = κ·(k_B·T/h)·exp(ΔS‡/R)·exp(−ΔH‡/RT) (Eyring, J. Chem. Phys. 3, 107 (1935)), κ = 1, with
the CODATA constants of :mod:`registry.kinetics.constants`. Energies are kJ/mol and entropies
J/(mol·K), the registry's canonical units. (The Eyring *line* through per-temperature rates
is :func:`registry.kinetics.fits.fit_eyring`.)

ΔH‡ and ΔS‡ from rates over a narrow temperature range are strongly correlated; the global
fit works internally with ΔG‡ at the mean temperature T_m = n/Σ(1/T) and ΔH‡, which are nearly
uncorrelated, and reports ΔH‡, ΔS‡ with their full covariance (an exact linear change of
variables, so the best fit and its errors are those of a fit in ΔH‡, ΔS‡ directly).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import asdict, dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from registry.kinetics.constants import LN_KB_OVER_H, R_J_MOL_K, R_KJ_MOL_K
from registry.kinetics.constants import STANDARD_TEMPERATURE_K as T_STANDARD_K


def eyring_ln_rate(t_k: ArrayLike, dh_kj_mol: float, ds_j_mol_k: float) -> NDArray[np.float64]:
    """ln(k / s⁻¹) at temperature(s) T (K) for ΔH‡ (kJ/mol) and ΔS‡ (J/(mol·K)), κ = 1."""
    t = np.asarray(t_k, dtype=float)
    return LN_KB_OVER_H + np.log(t) + ds_j_mol_k / R_J_MOL_K - dh_kj_mol / (R_KJ_MOL_K * t)


def ln_rate_from_dg_dh(
    t_k: ArrayLike, dg_tm_kj_mol: float, dh_kj_mol: float, t_mean_k: float
) -> NDArray[np.float64]:
    """ln k written with ΔG‡(T_m) and ΔH‡ (the decorrelated pair; see module docstring)."""
    t = np.asarray(t_k, dtype=float)
    return (
        LN_KB_OVER_H
        + np.log(t)
        - dg_tm_kj_mol / (R_KJ_MOL_K * t_mean_k)
        - dh_kj_mol / R_KJ_MOL_K * (1.0 / t - 1.0 / t_mean_k)
    )


def harmonic_mean_temperature(t_k: Sequence[float]) -> float:
    return float(len(t_k) / np.sum(1.0 / np.asarray(t_k, dtype=float)))


@dataclass(frozen=True)
class EyringParameters:
    """Activation parameters with standard errors, and how they were obtained."""

    dh_kj_mol: float
    dh_err_kj_mol: float | None
    ds_j_mol_k: float
    ds_err_j_mol_k: float | None
    cov_dh_ds: float | None
    t_mean_k: float
    dg_tm_kj_mol: float
    dg_tm_err_kj_mol: float | None
    dg_298_kj_mol: float
    dg_298_err_kj_mol: float | None
    n_temperatures: int
    chi2_reduced: float | None
    method: str

    def to_dict(self) -> dict[str, object]:
        return asdict(self)

    def ln_rate(self, t_k: ArrayLike) -> NDArray[np.float64]:
        return eyring_ln_rate(t_k, self.dh_kj_mol, self.ds_j_mol_k)


def parameters_from_dg_dh(
    dg_tm: float,
    dh: float,
    cov_gh: NDArray[np.float64] | None,
    t_mean_k: float,
    n: int,
    chi2_reduced: float | None,
    method: str,
) -> EyringParameters:
    """ΔH‡, ΔS‡, ΔG‡(298.15 K) and their errors from ΔG‡(T_m), ΔH‡ and their covariance."""
    ds = (dh - dg_tm) * 1000.0 / t_mean_k
    # [ΔH, ΔS] = A·[ΔG_m, ΔH];  ΔG(298.15) = ΔH − 298.15·ΔS/1000 = b·[ΔG_m, ΔH]
    a = np.array([[0.0, 1.0], [-1000.0 / t_mean_k, 1000.0 / t_mean_k]])
    b = np.array([T_STANDARD_K / t_mean_k, 1.0 - T_STANDARD_K / t_mean_k])
    dg_298 = float(b @ np.array([dg_tm, dh]))
    if cov_gh is None:
        errs: tuple[float | None, ...] = (None, None, None, None, None)
    else:
        cov_hs = a @ cov_gh @ a.T
        errs = (
            math.sqrt(cov_hs[0, 0]),
            math.sqrt(cov_hs[1, 1]),
            float(cov_hs[0, 1]),
            math.sqrt(cov_gh[0, 0]),
            math.sqrt(float(b @ cov_gh @ b)),
        )
    return EyringParameters(
        dh_kj_mol=float(dh),
        dh_err_kj_mol=errs[0],
        ds_j_mol_k=float(ds),
        ds_err_j_mol_k=errs[1],
        cov_dh_ds=errs[2],
        t_mean_k=t_mean_k,
        dg_tm_kj_mol=float(dg_tm),
        dg_tm_err_kj_mol=errs[3],
        dg_298_kj_mol=dg_298,
        dg_298_err_kj_mol=errs[4],
        n_temperatures=n,
        chi2_reduced=chi2_reduced,
        method=method,
    )
