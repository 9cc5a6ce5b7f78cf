"""Exchange rate constants and barriers at the coalescence temperature of two NMR signals.

* Two equally populated, uncoupled sites: k_c = π·Δν/√2 (H. S. Gutowsky and C. H. Holm,
  J. Chem. Phys. 25, 1228 (1956)).
* Two coupled sites (AB system): k_c = π·√(Δν² + 6J²)/√2 (R. J. Kurland, M. B. Rubin and
  W. B. Wise, J. Chem. Phys. 40, 2426 (1964)); Δν is the shift difference of A and B, not
  the separation of the outer lines.
* Two unequally populated, uncoupled sites: H. Shanan-Atidi and K. H. Bar-Eli, J. Phys.
  Chem. 74, 961 (1970). With Δp = p_A − p_B and X = 2π·Δν·τ, τ = 1/(k_AB + k_BA), the
  coalescence condition is Δp = ((X² − 2)/3)^(3/2) / X; then k_AB = p_B/τ, k_BA = p_A/τ.

ΔG‡(Tc) comes from the Eyring equation at Tc; its standard uncertainty is propagated to
first order from independent uncertainties of Tc, Δν (and J, and the population ratio):
∂ΔG‡/∂Tc = ΔG‡/Tc + R and ∂ΔG‡/∂ln k_c = −R·Tc. Everything is vectorized over arrays.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from registry.kinetics.checks import (
    Invalid,
    check_finite,
    checked,
    optional_error,
    scalar_or_array,
)
from registry.kinetics.constants import LN_KB_OVER_H, R_KJ_MOL_K

_SQRT2 = np.sqrt(2.0)
Number = float | NDArray[np.float64]


@dataclass(frozen=True)
class CoalescenceBarrier:
    """k_c and ΔG‡ at the coalescence temperature of two equally populated sites.

    ``dg_err_kj_mol`` combines the parts from Tc, Δν and J (listed separately so a user
    can see which measurement limits the result).
    """

    tc_k: Number
    dnu_hz: Number
    j_hz: Number
    k_c_per_s: Number
    dg_kj_mol: Number
    dg_err_kj_mol: Number
    dg_err_from_tc_kj_mol: Number
    dg_err_from_dnu_kj_mol: Number
    dg_err_from_j_kj_mol: Number


@dataclass(frozen=True)
class UnequalPopulationBarriers:
    """Both directions of exchange between a major site A and a minor site B at coalescence.

    ``ratio`` is p_A/p_B ≥ 1; ``k_ab_per_s`` is the rate constant for leaving the major site
    (the higher barrier ``dg_ab_kj_mol``), ``k_ba_per_s`` for leaving the minor one.
    ΔG‡_AB − ΔG‡_BA = R·Tc·ln(ratio), the free-energy difference of the two sites.
    """

    tc_k: Number
    dnu_hz: Number
    ratio: Number
    delta_p: Number
    x: Number
    k_ab_per_s: Number
    k_ba_per_s: Number
    dg_ab_kj_mol: Number
    dg_ba_kj_mol: Number
    dg_ab_err_kj_mol: Number
    dg_ba_err_kj_mol: Number


def coalescence_rate(
    dnu_hz: ArrayLike, j_hz: ArrayLike = 0.0, *, invalid: Invalid = "raise"
) -> Number:
    """Exchange rate constant k_c (s⁻¹) at coalescence: π·√(Δν² + 6J²)/√2.

    With J = 0 this is the Gutowsky–Holm result π·Δν/√2 for uncoupled sites.
    """
    dnu = checked("dnu_hz", dnu_hz, invalid=invalid, what="must be > 0 Hz")
    j = check_finite("j_hz", j_hz, invalid=invalid)
    return scalar_or_array(np.pi * np.sqrt(dnu * dnu + 6.0 * j * j) / _SQRT2)


def _dg_at(tc: NDArray, k: NDArray, kappa: float) -> NDArray:
    """Eyring barrier in kJ/mol without re-checking inputs (the callers have)."""
    return R_KJ_MOL_K * tc * (LN_KB_OVER_H + np.log(kappa * tc) - np.log(k))


def coalescence_barrier(
    tc_k: ArrayLike,
    dnu_hz: ArrayLike,
    j_hz: ArrayLike | None = None,
    tc_err_k: ArrayLike | None = None,
    dnu_err_hz: ArrayLike | None = None,
    *,
    j_err_hz: ArrayLike | None = None,
    kappa: float = 1.0,
    invalid: Invalid = "raise",
) -> CoalescenceBarrier:
    """ΔG‡ at Tc for two equally populated sites, with its propagated standard uncertainty.

    Inputs broadcast against each other; uncertainties that are not given count as zero.
    """
    tc = checked("tc_k", tc_k, invalid=invalid, what="must be above 0 K")
    dnu = checked("dnu_hz", dnu_hz, invalid=invalid, what="must be > 0 Hz")
    j = np.asarray(0.0) if j_hz is None else check_finite("j_hz", j_hz, invalid=invalid)
    kap = float(checked("kappa", kappa, what="must be > 0"))
    tc_err = optional_error("tc_err_k", tc_err_k, invalid)
    dnu_err = optional_error("dnu_err_hz", dnu_err_hz, invalid)
    j_err = optional_error("j_err_hz", j_err_hz, invalid)

    s2 = dnu * dnu + 6.0 * j * j
    k_c = np.pi * np.sqrt(s2) / _SQRT2
    dg = _dg_at(tc, k_c, kap)
    rt = R_KJ_MOL_K * tc
    from_tc = np.abs(dg / tc + R_KJ_MOL_K) * tc_err
    from_dnu = rt * dnu / s2 * dnu_err
    from_j = rt * 6.0 * np.abs(j) / s2 * j_err
    total = np.sqrt(from_tc**2 + from_dnu**2 + from_j**2)
    out = scalar_or_array
    return CoalescenceBarrier(
        tc_k=out(tc),
        dnu_hz=out(dnu),
        j_hz=out(j),
        k_c_per_s=out(k_c),
        dg_kj_mol=out(dg),
        dg_err_kj_mol=out(total),
        dg_err_from_tc_kj_mol=out(from_tc),
        dg_err_from_dnu_kj_mol=out(from_dnu),
        dg_err_from_j_kj_mol=out(from_j),
    )


def shanan_atidi_x(delta_p: ArrayLike) -> Number:
    """Solve the coalescence condition Δp = ((X² − 2)/3)^(3/2)/X for X ≥ √2, vectorized.

    With u = X² − 2 the condition is the cubic u³ − 27Δp²·u − 54Δp² = 0, which has one real
    root for 0 ≤ Δp < 1 (Cardano): u = 3·Δp^(2/3)·[(1 + s)^(1/3) + (1 − s)^(1/3)], s = √(1 − Δp²).
    1 − s is formed as Δp²/(1 + s) so that small Δp loses no digits.
    """
    dp = np.asarray(delta_p, dtype=np.float64)
    dp2 = dp * dp
    s = np.sqrt(1.0 - dp2)
    u = 3.0 * np.cbrt(dp2) * (np.cbrt(1.0 + s) + np.cbrt(dp2 / (1.0 + s)))
    return scalar_or_array(np.sqrt(2.0 + u))


def _unequal_rates(dnu: NDArray, ratio: NDArray) -> tuple[NDArray, NDArray, NDArray, NDArray]:
    p_a = ratio / (1.0 + ratio)
    p_b = 1.0 / (1.0 + ratio)
    dp = p_a - p_b
    x = np.asarray(shanan_atidi_x(dp))
    inv_tau = 2.0 * np.pi * dnu / x  # τ = X/(2πΔν), 1/τ = k_AB + k_BA
    return p_b * inv_tau, p_a * inv_tau, dp, x


def unequal_population_barriers(
    tc_k: ArrayLike,
    dnu_hz: ArrayLike,
    ratio: ArrayLike,
    tc_err_k: ArrayLike | None = None,
    dnu_err_hz: ArrayLike | None = None,
    ratio_err: ArrayLike | None = None,
    *,
    kappa: float = 1.0,
    invalid: Invalid = "raise",
) -> UnequalPopulationBarriers:
    """Rate constants and ΔG‡ in both directions for unequally populated sites at Tc.

    ``ratio`` is the population ratio major/minor (≥ 1) measured at slow exchange; ratio 1
    gives back the Gutowsky–Holm result for both directions.
    """
    tc = checked("tc_k", tc_k, invalid=invalid, what="must be above 0 K")
    dnu = checked("dnu_hz", dnu_hz, invalid=invalid, what="must be > 0 Hz")
    r = checked(
        "ratio",
        ratio,
        lower=1.0,
        inclusive=True,
        invalid=invalid,
        what="population ratio major/minor must be ≥ 1 (and finite)",
    )
    kap = float(checked("kappa", kappa, what="must be > 0"))
    tc_err = optional_error("tc_err_k", tc_err_k, invalid)
    dnu_err = optional_error("dnu_err_hz", dnu_err_hz, invalid)
    r_err = optional_error("ratio_err", ratio_err, invalid)

    k_ab, k_ba, dp, x = _unequal_rates(dnu, r)
    dg_ab = _dg_at(tc, k_ab, kap)
    dg_ba = _dg_at(tc, k_ba, kap)
    rt = R_KJ_MOL_K * tc
    # The ratio enters through the root X, whose slope is infinite at ratio 1 (X² − 2 grows as
    # Δp^(2/3)), so propagate by a secant across ratio ± its uncertainty (clipped at 1).
    if ratio_err is None:
        dln_ab = dln_ba = np.asarray(0.0)
    else:
        hi = r + r_err
        lo = np.maximum(r - r_err, 1.0)
        step = np.where(hi > lo, hi - lo, 1.0)
        ab_hi, ba_hi, _, _ = _unequal_rates(dnu, hi)
        ab_lo, ba_lo, _, _ = _unequal_rates(dnu, lo)
        dln_ab = (np.log(ab_hi) - np.log(ab_lo)) / step
        dln_ba = (np.log(ba_hi) - np.log(ba_lo)) / step

    def total(dg: NDArray, dln_dr: NDArray) -> NDArray:
        from_tc = (dg / tc + R_KJ_MOL_K) * tc_err
        from_dnu = rt / dnu * dnu_err
        from_r = rt * np.abs(dln_dr) * r_err
        return np.sqrt(from_tc**2 + from_dnu**2 + from_r**2)

    out = scalar_or_array
    return UnequalPopulationBarriers(
        tc_k=out(tc),
        dnu_hz=out(dnu),
        ratio=out(r),
        delta_p=out(dp),
        x=out(x),
        k_ab_per_s=out(k_ab),
        k_ba_per_s=out(k_ba),
        dg_ab_kj_mol=out(dg_ab),
        dg_ba_kj_mol=out(dg_ba),
        dg_ab_err_kj_mol=out(total(dg_ab, dln_ab)),
        dg_ba_err_kj_mol=out(total(dg_ba, dln_ba)),
    )
