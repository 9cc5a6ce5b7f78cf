"""Planning and interpreting: rates and half-lives at any T, the T for a target, the exchange
regime on the NMR time scale, and the atropisomer stability class.

A barrier is given either as ΔG‡ (taken as temperature-independent, i.e. ΔS‡ = 0 for the
T-dependence) or as ΔH‡ and ΔS‡. Solving k(T) = k_target for T uses the Lambert W function:
with a = ΔH‡/R and c = κ·(k_B/h)·e^(ΔS‡/R)/k_target, a/T − ln T = ln c gives T = a/W(a·c),
exact and vectorized.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache

import numpy as np
from numpy.typing import ArrayLike, NDArray

from registry.errors import UsageError
from registry.kinetics.checks import check_finite, checked, scalar_or_array
from registry.kinetics.coalescence import coalescence_rate
from registry.kinetics.constants import (
    BODY_TEMPERATURE_K,
    KB_OVER_H_PER_S_K,
    LN2,
    R_J_MOL_K,
    R_KJ_MOL_K,
)
from registry.kinetics.eyring import eyring_rate

Number = float | NDArray[np.float64]

#: k/k_c below this is slow exchange, above its inverse fast (common practice, no source)
SLOW_BELOW = 0.1
FAST_ABOVE = 10.0


def _activation(
    dg_kj_mol: ArrayLike | None, dh_kj_mol: ArrayLike | None, ds_j_mol_k: ArrayLike | None
) -> tuple[NDArray, NDArray]:
    """(ΔH‡ kJ/mol, ΔS‡ J/(mol·K)) from either ΔG‡ alone or ΔH‡ and ΔS‡ together."""
    if dg_kj_mol is not None and (dh_kj_mol is not None or ds_j_mol_k is not None):
        raise UsageError("give either ΔG‡ or ΔH‡ with ΔS‡, not both")
    if dg_kj_mol is not None:
        return check_finite("dg_kj_mol", dg_kj_mol), np.asarray(0.0)
    if dh_kj_mol is None or ds_j_mol_k is None:
        raise UsageError("give ΔG‡, or both ΔH‡ and ΔS‡")
    return check_finite("dh_kj_mol", dh_kj_mol), check_finite("ds_j_mol_k", ds_j_mol_k)


def rate_at(
    t_k: ArrayLike,
    dg_kj_mol: ArrayLike | None = None,
    *,
    dh_kj_mol: ArrayLike | None = None,
    ds_j_mol_k: ArrayLike | None = None,
    kappa: float = 1.0,
) -> Number:
    """Rate constant (s⁻¹) at T from ΔG‡, or from ΔH‡ and ΔS‡ (ΔG‡ = ΔH‡ − T·ΔS‡)."""
    dh, ds = _activation(dg_kj_mol, dh_kj_mol, ds_j_mol_k)
    t = checked("t_k", t_k, what="must be above 0 K")
    return eyring_rate(dh - t * ds / 1000.0, t, kappa)


def half_life(k_per_s: ArrayLike, *, pair: bool = False) -> Number:
    """First-order half-life ln 2/k (s).

    ``pair=True``: the excess of one of two equally stable forms that interconvert with rate
    constant k each way (an enantiomer racemizing, a degenerate isomer equilibrating) decays
    with 2k, so its half-life is ln 2/(2k).
    """
    k = checked("k_per_s", k_per_s, what="must be > 0 s⁻¹")
    return scalar_or_array(LN2 / (2.0 * k if pair else k))


def temperature_for_rate(
    k_per_s: ArrayLike,
    dg_kj_mol: ArrayLike | None = None,
    *,
    dh_kj_mol: ArrayLike | None = None,
    ds_j_mol_k: ArrayLike | None = None,
    kappa: float = 1.0,
) -> Number:
    """Temperature (K) at which the Eyring rate constant equals ``k_per_s``.

    NaN where no positive temperature gives that rate (ΔH‡ ≤ 0).
    """
    k = checked("k_per_s", k_per_s, what="must be > 0 s⁻¹")
    dh, ds = _activation(dg_kj_mol, dh_kj_mol, ds_j_mol_k)
    kap = float(checked("kappa", kappa, what="must be > 0"))
    a = dh / R_KJ_MOL_K  # kelvin
    a_pos = np.where(a > 0, a, np.nan)
    with np.errstate(invalid="ignore"):
        ln_ac = np.log(a_pos) + np.log(kap * KB_OVER_H_PER_S_K) - np.log(k) + ds / R_J_MOL_K
    with np.errstate(over="ignore", invalid="ignore", divide="ignore"):
        t = a / lambert_w_of_log(ln_ac)
    return scalar_or_array(np.where(np.isfinite(t) & (t > 0), t, np.nan))


def lambert_w_of_log(ln_z: ArrayLike) -> NDArray[np.float64]:
    """The principal branch W(z) for z > 0, given ln z (so z may exceed the float range).

    W solves w + ln w = ln z (R. M. Corless et al., Adv. Comput. Math. 5, 329 (1996)).
    g(w) = w + ln w − ln z is increasing and concave, so Newton's method started below the
    root climbs to it monotonically; both starts are lower bounds of W: ln z − ln ln z for
    z > e, and z/(1 + z) for z ≤ e (as e^w·(1 − w) ≤ 1). NaN stays NaN; ln z = +inf gives inf.
    """
    ln = np.asarray(ln_z, dtype=np.float64)
    with np.errstate(over="ignore", invalid="ignore", divide="ignore"):
        big = ln > 1.0
        z = np.exp(np.minimum(ln, 1.0))
        w = np.where(big, ln - np.log(np.where(big, ln, 1.0)), z / (1.0 + z))
        for _ in range(100):  # quadratic convergence: ~5 steps from these starts
            step = (w + np.log(w) - ln) / (1.0 + 1.0 / w)
            w = w - step
            if not np.any(np.abs(step) > 4e-16 * np.abs(w)):
                break
        return np.where(np.isposinf(ln), np.inf, w)


def temperature_for_half_life(
    t_half_s: ArrayLike,
    dg_kj_mol: ArrayLike | None = None,
    *,
    dh_kj_mol: ArrayLike | None = None,
    ds_j_mol_k: ArrayLike | None = None,
    kappa: float = 1.0,
    pair: bool = False,
) -> Number:
    """Temperature (K) at which the half-life reaches ``t_half_s`` (see :func:`half_life`)."""
    t_half = checked("t_half_s", t_half_s, what="must be > 0 s")
    k = LN2 / t_half / (2.0 if pair else 1.0)
    return temperature_for_rate(
        k, dg_kj_mol, dh_kj_mol=dh_kj_mol, ds_j_mol_k=ds_j_mol_k, kappa=kappa
    )


def coalescence_temperature(
    dnu_hz: ArrayLike,
    dg_kj_mol: ArrayLike | None = None,
    *,
    j_hz: ArrayLike = 0.0,
    dh_kj_mol: ArrayLike | None = None,
    ds_j_mol_k: ArrayLike | None = None,
    kappa: float = 1.0,
) -> Number:
    """Predicted Tc (K) of two equally populated sites Δν apart for a given barrier."""
    k_c = coalescence_rate(dnu_hz, j_hz)
    return temperature_for_rate(
        k_c, dg_kj_mol, dh_kj_mol=dh_kj_mol, ds_j_mol_k=ds_j_mol_k, kappa=kappa
    )


@dataclass(frozen=True)
class ExchangeRegime:
    """Where exchange at rate k sits on the NMR time scale for two sites Δν apart.

    ``ratio`` is k/k_c. ``extra_width_hz`` is the exchange broadening of each line for two
    equally populated uncoupled sites: k/π in slow exchange, π·Δν²/(2k) in fast exchange
    (the standard limits of the Bloch–McConnell equations); NaN in between, where only a
    line-shape calculation says.
    """

    k_per_s: Number
    dnu_hz: Number
    k_c_per_s: Number
    ratio: Number
    regime: str | NDArray[np.str_]
    extra_width_hz: Number


def exchange_regime(k_per_s: ArrayLike, dnu_hz: ArrayLike, j_hz: ArrayLike = 0.0) -> ExchangeRegime:
    """Classify exchange as slow, intermediate or fast: k below k_c/10, within, or above 10·k_c."""
    k = checked("k_per_s", k_per_s, what="must be > 0 s⁻¹")
    dnu = checked("dnu_hz", dnu_hz, what="must be > 0 Hz")
    k_c = np.asarray(coalescence_rate(dnu, j_hz))
    ratio = k / k_c
    regime = np.where(
        ratio < SLOW_BELOW, "slow", np.where(ratio > FAST_ABOVE, "fast", "intermediate")
    )
    width = np.where(
        ratio < SLOW_BELOW,
        k / np.pi,
        np.where(ratio > FAST_ABOVE, np.pi * dnu**2 / (2 * k), np.nan),
    )
    reg: str | NDArray[np.str_] = str(regime) if regime.ndim == 0 else regime
    return ExchangeRegime(
        scalar_or_array(k),
        scalar_or_array(dnu),
        scalar_or_array(k_c),
        scalar_or_array(ratio),
        reg,
        scalar_or_array(width),
    )


@lru_cache(maxsize=1)
def _laplante_limits_kj_mol() -> tuple[float, float]:
    from registry.record.units import convert

    return convert(20.0, "kcal/mol", "kJ/mol"), convert(30.0, "kcal/mol", "kJ/mol")


_CLASS_TEXT = {
    1: "class 1 (ΔG‡ < 20 kcal/mol): interconverts rapidly at 37 °C (a minute or faster)",
    2: "class 2 (20–30 kcal/mol): interconverts slowly at 37 °C (minutes to years, typically"
    " hours to months)",
    3: "class 3 (> 30 kcal/mol): stable for years at 37 °C",
}


@dataclass(frozen=True)
class AtropisomerClass:
    """Stability class of an atropisomeric axis (S. R. LaPlante et al., ChemMedChem 6, 505 (2011)).

    Class 1: ΔG‡ < 20 kcal/mol; class 2: 20–30 kcal/mol; class 3: > 30 kcal/mol, with the
    first-order half-life ln 2/k of interconversion at 37 °C. The class limits are round
    numbers: at 37 °C the Eyring half-life is ~13 s at 20 kcal/mol and ~5 years at 30, so the
    computed half-life, not the class wording, is the number to quote.
    """

    stability_class: int
    dg_kj_mol: float
    half_life_37c_s: float
    description: str


def atropisomer_class(dg_kj_mol: float, *, kappa: float = 1.0) -> AtropisomerClass:
    """LaPlante class of an axis with rotation barrier ΔG‡ (kJ/mol, taken at 37 °C)."""
    dg = float(check_finite("dg_kj_mol", dg_kj_mol))
    low, high = _laplante_limits_kj_mol()
    cls = 1 if dg < low else (2 if dg <= high else 3)
    k = float(eyring_rate(dg, BODY_TEMPERATURE_K, kappa))
    t_half = LN2 / k if k > 0 else float("inf")
    return AtropisomerClass(cls, dg, t_half, _CLASS_TEXT[cls])
