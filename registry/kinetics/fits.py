"""Eyring and Arrhenius fits of rate constants measured at several temperatures.

Both are straight lines in x = 1/T: ln(k/T) = ln(κ·k_B/h) + ΔS‡/R − (ΔH‡/R)·x (Eyring) and
ln k = ln A − (Ea/R)·x (Arrhenius), fitted by weighted least squares with weights 1/σ_y²,
σ_y = σ_k/k. Standard errors come from the full 2×2 covariance of slope and intercept, so
ΔG‡(T) = ΔH‡ − T·ΔS‡ carries the ΔH‡/ΔS‡ covariance and is best determined at T* = 1/x̄
(weighted mean of 1/T), far better than ΔH‡ or ΔS‡ alone. That covariance is strongly
*positive*: slope and intercept of the line are negatively correlated (all x = 1/T > 0), and
ΔH‡ ∝ −slope while ΔS‡ ∝ +intercept, so a steeper line raises both (r ≈ +0.99 over a
typical 40–60 K range; the enthalpy–entropy compensation of fits).

With σ_k given the covariance is taken as absolute (trusting σ_k; a χ² check warns when the
scatter says otherwise) and 95 % intervals use the normal quantile. Without σ_k the points
are weighted equally, the covariance is scaled by the residual variance and the intervals
use Student's t with n − 2 degrees of freedom.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from registry.kinetics.checks import KineticsInputError, checked
from registry.kinetics.constants import LN_KB_OVER_H, R_J_MOL_K, R_KJ_MOL_K, STANDARD_TEMPERATURE_K
from registry.kinetics.distributions import chi2_upper_tail, normal_quantile, student_t_quantile

#: below this temperature span ΔH‡ and ΔS‡ separate poorly (common practice, no source)
MIN_SPAN_K = 30.0
#: ΔG‡ asked for further than this outside the measured range draws a warning
EXTRAPOLATION_WARN_K = 10.0


@dataclass(frozen=True)
class LineFit:
    """A weighted straight line y = intercept + slope·x with the covariance of both."""

    slope: float
    intercept: float
    cov: NDArray[np.float64]  # [[var(intercept), cov], [cov, var(slope)]]
    x_mean: float
    residuals: NDArray[np.float64]
    r_squared: float
    chi2: float
    dof: int
    absolute: bool
    p_value: float
    ci95_factor: float


@dataclass(frozen=True)
class BarrierAt:
    """ΔG‡ at one temperature from a fit, with its standard error and any warning."""

    t_k: float
    dg_kj_mol: float
    dg_err_kj_mol: float
    warning: str | None


@dataclass(frozen=True)
class EyringFit:
    """Activation parameters from an Eyring plot and how well the data determine them."""

    dh_kj_mol: float
    dh_err_kj_mol: float
    ds_j_mol_k: float
    ds_err_j_mol_k: float
    corr_dh_ds: float
    t_ref_k: float
    dg_ref_kj_mol: float
    dg_ref_err_kj_mol: float
    t_best_k: float
    dg_best_kj_mol: float
    dg_best_err_kj_mol: float
    ci95_factor: float
    r_squared: float
    chi2_reduced: float
    n_points: int
    weighted: bool
    t_k: NDArray[np.float64]
    k_per_s: NDArray[np.float64]
    residuals_ln: NDArray[np.float64]
    kappa: float
    line: LineFit
    warnings: tuple[str, ...]

    def dg_at(self, t_k: float) -> BarrierAt:
        """ΔG‡ and its standard error at ``t_k``, with a warning when that is extrapolated."""
        dg, err = _eyring_dg(self.line, float(t_k), self.kappa)
        return BarrierAt(float(t_k), dg, err, extrapolation_warning(self.t_k, float(t_k)))


@dataclass(frozen=True)
class ArrheniusFit:
    """Arrhenius parameters Ea and log10 A from ln k against 1/T."""

    ea_kj_mol: float
    ea_err_kj_mol: float
    log10_a: float
    log10_a_err: float
    corr_ea_log10_a: float
    ci95_factor: float
    r_squared: float
    chi2_reduced: float
    n_points: int
    weighted: bool
    t_k: NDArray[np.float64]
    k_per_s: NDArray[np.float64]
    residuals_ln: NDArray[np.float64]
    line: LineFit
    warnings: tuple[str, ...]


def weighted_line(x: NDArray, y: NDArray, sigma_y: NDArray | None) -> LineFit:
    """Weighted least squares on centred x (well conditioned for x = 1/T ≈ 3·10⁻³).

    numpy only: the t and χ² numbers come from :mod:`.distributions`, not scipy.stats.
    """
    n = x.size
    absolute = sigma_y is not None
    w = np.ones_like(x) if sigma_y is None else 1.0 / sigma_y**2
    sw = w.sum()
    x_mean = float((w * x).sum() / sw)
    y_mean = float((w * y).sum() / sw)
    dx = x - x_mean
    sxx = float((w * dx * dx).sum())
    if not sxx > 0:
        raise KineticsInputError("t_k", "all points are at the same temperature; nothing to fit")
    slope = float((w * dx * (y - y_mean)).sum() / sxx)
    intercept = y_mean - slope * x_mean
    residuals = y - (intercept + slope * x)
    chi2 = float((w * residuals**2).sum())
    syy = float((w * (y - y_mean) ** 2).sum())
    r_squared = 1.0 - chi2 / syy if syy > 0 else 1.0
    dof = n - 2
    cov = np.array([[1.0 / sw + x_mean**2 / sxx, -x_mean / sxx], [-x_mean / sxx, 1.0 / sxx]])
    if absolute:
        p_value = chi2_upper_tail(chi2, dof) if dof > 0 else float("nan")
        factor = normal_quantile(0.975)
    else:
        scale = chi2 / dof if dof > 0 else float("nan")
        cov = cov * scale
        p_value = float("nan")
        factor = student_t_quantile(0.975, dof) if dof > 0 else float("nan")
    return LineFit(
        slope, intercept, cov, x_mean, residuals, r_squared, chi2, dof, absolute, p_value, factor
    )


def _points(
    t_k: ArrayLike, k_per_s: ArrayLike, k_err: ArrayLike | None
) -> tuple[NDArray, NDArray, NDArray | None]:
    t = np.atleast_1d(checked("t_k", t_k, what="must be above 0 K")).ravel()
    k = np.atleast_1d(checked("k_per_s", k_per_s, what="must be > 0 s⁻¹")).ravel()
    if t.size != k.size:
        raise KineticsInputError("k_per_s", f"{k.size} rate constants for {t.size} temperatures")
    if np.isnan(t).any() or np.isnan(k).any():
        raise KineticsInputError("t_k/k_per_s", "missing (NaN) values cannot be fitted")
    if t.size < 2:
        raise KineticsInputError("t_k", f"a line needs at least 2 points; got {t.size}")
    if k_err is None:
        return t, k, None
    err = np.atleast_1d(checked("k_err", k_err, what="must be > 0 s⁻¹")).ravel()
    if err.size == 1:
        err = np.full_like(k, err[0])
    if err.size != k.size or np.isnan(err).any():
        raise KineticsInputError("k_err", "give one σ_k per point (or none at all)")
    return t, k, err


def _common_warnings(t: NDArray, line: LineFit) -> list[str]:
    notes: list[str] = []
    if t.size < 3:
        tail = (
            "standard errors rest on σ_k alone"
            if line.absolute
            else "standard errors cannot be estimated"
        )
        notes.append(f"only {t.size} points: no degrees of freedom to judge the scatter; {tail}")
    span = float(t.max() - t.min())
    if span < MIN_SPAN_K:
        notes.append(
            f"temperatures span only {span:.1f} K (under ~{MIN_SPAN_K:.0f} K): the enthalpy and"
            " entropy of activation are poorly separated; trust ΔG‡ near the middle of the range"
        )
    if line.absolute and line.dof > 0 and line.p_value < 0.01:
        notes.append(
            f"the scatter is larger than the stated σ_k imply (χ²/dof = {line.chi2 / line.dof:.2f},"
            f" p = {line.p_value:.2g}); standard errors from σ_k are likely too small"
        )
    return notes


def extrapolation_warning(t: NDArray, t_at: float) -> str | None:
    """The warning for ΔG‡ at ``t_at`` more than EXTRAPOLATION_WARN_K outside ``t``'s range."""
    lo, hi = float(t.min()), float(t.max())
    beyond = max(lo - t_at, t_at - hi)
    if beyond <= EXTRAPOLATION_WARN_K:
        return None
    return (
        f"ΔG‡ at {t_at:.1f} K is extrapolated {beyond:.0f} K beyond the measured range"
        f" {lo:.1f}–{hi:.1f} K; it assumes ΔH‡ and ΔS‡ do not change with temperature"
    )


def _eyring_dg(line: LineFit, t_k: float, kappa: float) -> tuple[float, float]:
    """ΔG‡(T) = −RT·(b0 + b1/T − ln(κ·k_B/h)); var = (RT)²·gᵀ·C·g with g = (1, 1/T)."""
    g = np.array([1.0, 1.0 / t_k])
    y_at = line.intercept + line.slope / t_k
    dg = -R_KJ_MOL_K * t_k * (y_at - LN_KB_OVER_H - np.log(kappa))
    err = R_KJ_MOL_K * t_k * float(np.sqrt(g @ line.cov @ g))
    return float(dg), err


def _corr(cov: NDArray) -> float:
    denom = np.sqrt(cov[0, 0] * cov[1, 1])
    return float(cov[0, 1] / denom) if denom > 0 else float("nan")


def fit_eyring(
    t_k: ArrayLike,
    k_per_s: ArrayLike,
    k_err: ArrayLike | None = None,
    *,
    t_ref_k: float = STANDARD_TEMPERATURE_K,
    kappa: float = 1.0,
) -> EyringFit:
    """Fit ln(k/T) against 1/T: ΔH‡, ΔS‡, their correlation and ΔG‡ at ``t_ref_k`` and T*."""
    t, k, err = _points(t_k, k_per_s, k_err)
    kap = float(checked("kappa", kappa, what="must be > 0"))
    line = weighted_line(1.0 / t, np.log(k / t), None if err is None else err / k)
    dh = -R_KJ_MOL_K * line.slope
    ds = R_J_MOL_K * (line.intercept - LN_KB_OVER_H - np.log(kap))
    dh_err = R_KJ_MOL_K * float(np.sqrt(line.cov[1, 1]))
    ds_err = R_J_MOL_K * float(np.sqrt(line.cov[0, 0]))
    # ΔH‡ ∝ −slope and ΔS‡ ∝ +intercept, so their correlation is minus that of the line
    corr = -_corr(line.cov)
    dg_ref, dg_ref_err = _eyring_dg(line, float(t_ref_k), kap)
    t_best = 1.0 / line.x_mean
    dg_best, dg_best_err = _eyring_dg(line, t_best, kap)
    notes = _common_warnings(t, line)
    extrapolated = extrapolation_warning(t, float(t_ref_k))
    if extrapolated:
        notes.append(extrapolated)
    return EyringFit(
        dh_kj_mol=float(dh),
        dh_err_kj_mol=dh_err,
        ds_j_mol_k=float(ds),
        ds_err_j_mol_k=ds_err,
        corr_dh_ds=corr,
        t_ref_k=float(t_ref_k),
        dg_ref_kj_mol=dg_ref,
        dg_ref_err_kj_mol=dg_ref_err,
        t_best_k=float(t_best),
        dg_best_kj_mol=dg_best,
        dg_best_err_kj_mol=dg_best_err,
        ci95_factor=line.ci95_factor,
        r_squared=line.r_squared,
        chi2_reduced=line.chi2 / line.dof if line.dof > 0 else float("nan"),
        n_points=int(t.size),
        weighted=err is not None,
        t_k=t,
        k_per_s=k,
        residuals_ln=line.residuals,
        kappa=kap,
        line=line,
        warnings=tuple(notes),
    )


def fit_arrhenius(
    t_k: ArrayLike, k_per_s: ArrayLike, k_err: ArrayLike | None = None
) -> ArrheniusFit:
    """Fit ln k against 1/T: Ea = −R·slope and log10 A = intercept/ln 10."""
    t, k, err = _points(t_k, k_per_s, k_err)
    line = weighted_line(1.0 / t, np.log(k), None if err is None else err / k)
    ln10 = float(np.log(10.0))
    return ArrheniusFit(
        ea_kj_mol=float(-R_KJ_MOL_K * line.slope),
        ea_err_kj_mol=R_KJ_MOL_K * float(np.sqrt(line.cov[1, 1])),
        log10_a=float(line.intercept / ln10),
        log10_a_err=float(np.sqrt(line.cov[0, 0])) / ln10,
        corr_ea_log10_a=-_corr(line.cov),
        ci95_factor=line.ci95_factor,
        r_squared=line.r_squared,
        chi2_reduced=line.chi2 / line.dof if line.dof > 0 else float("nan"),
        n_points=int(t.size),
        weighted=err is not None,
        t_k=t,
        k_per_s=k,
        residuals_ln=line.residuals,
        line=line,
        warnings=tuple(_common_warnings(t, line)),
    )
