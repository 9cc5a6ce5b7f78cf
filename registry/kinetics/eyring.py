"""The Eyring equation both ways: k = κ·(k_B·T/h)·exp(−ΔG‡/RT) and its inverse.

Transition-state theory (H. Eyring, J. Chem. Phys. 3, 107 (1935)); κ is the transmission
coefficient, 1 unless the user has a reason for another value. Both functions take scalars
or numpy arrays (broadcast against each other) and return the same shape.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray

from registry.kinetics.checks import Invalid, check_finite, checked, scalar_or_array
from registry.kinetics.constants import KB_OVER_H_PER_S_K, R_KJ_MOL_K


def eyring_rate(
    dg_kj_mol: ArrayLike, t_k: ArrayLike, kappa: float = 1.0, *, invalid: Invalid = "raise"
) -> float | NDArray[np.float64]:
    """First-order rate constant (s⁻¹) for a free-energy barrier ΔG‡ (kJ/mol) at T (K)."""
    dg = check_finite("dg_kj_mol", dg_kj_mol, invalid=invalid)
    t = checked("t_k", t_k, invalid=invalid, what="must be above 0 K")
    kap = checked("kappa", kappa, what="must be > 0")
    with np.errstate(over="ignore", under="ignore"):
        k = kap * KB_OVER_H_PER_S_K * t * np.exp(-dg / (R_KJ_MOL_K * t))
    return scalar_or_array(k)


def eyring_barrier(
    k_per_s: ArrayLike, t_k: ArrayLike, kappa: float = 1.0, *, invalid: Invalid = "raise"
) -> float | NDArray[np.float64]:
    """Free-energy barrier ΔG‡ (kJ/mol) for a first-order rate constant k (s⁻¹) at T (K).

    ΔG‡ = RT·ln(κ·k_B·T / (h·k)); the inverse of :func:`eyring_rate`.
    """
    k = checked("k_per_s", k_per_s, invalid=invalid, what="must be > 0 s⁻¹")
    t = checked("t_k", t_k, invalid=invalid, what="must be above 0 K")
    kap = checked("kappa", kappa, what="must be > 0")
    dg = R_KJ_MOL_K * t * (np.log(kap * KB_OVER_H_PER_S_K * t) - np.log(k))
    return scalar_or_array(dg)


def dg_from_dh_ds(
    dh_kj_mol: ArrayLike, ds_j_mol_k: ArrayLike, t_k: ArrayLike
) -> float | NDArray[np.float64]:
    """ΔG‡(T) = ΔH‡ − T·ΔS‡ in kJ/mol (ΔS‡ in J/(mol·K)), activation parameters held constant."""
    dh = check_finite("dh_kj_mol", dh_kj_mol)
    ds = check_finite("ds_j_mol_k", ds_j_mol_k)
    t = checked("t_k", t_k, what="must be above 0 K")
    return scalar_or_array(dh - t * ds / 1000.0)


def barrier_with_error(
    k_per_s: float,
    t_k: float,
    *,
    k_err_per_s: float | None = None,
    t_err_k: float | None = None,
    kappa: float = 1.0,
) -> tuple[float, float | None]:
    """ΔG‡ (kJ/mol) of one rate constant at T, and its first-order σ from σk and σT.

    ∂ΔG‡/∂k = −RT/k; ∂ΔG‡/∂T = ΔG‡/T + R (differentiating RT·ln(κ·k_B·T/(h·k)) at fixed k).
    The σ is None when neither σk nor σT is known.
    """
    dg = float(eyring_barrier(k_per_s, t_k, kappa))
    if k_err_per_s is None and t_err_k is None:
        return dg, None
    from_k = R_KJ_MOL_K * t_k * (k_err_per_s or 0.0) / k_per_s
    from_t = (dg / t_k + R_KJ_MOL_K) * (t_err_k or 0.0)
    return dg, float(np.hypot(from_k, from_t))
