"""Rule: reported ΔH‡, ΔS‡ (and ΔG‡) against a refit of the stored rate points.

The refit is the Eyring line ln(k/T) = ln(k_B/h) + ΔS‡/R − (ΔH‡/R)/T (Eyring 1935), the same
model as :func:`registry.kinetics.fit_eyring`, but done for every measurement at once with
grouped sums (``np.bincount``): calling ``fit_eyring`` once per measurement costs ~0.1 ms each
in scipy quantile look-ups, too slow for 10⁵ measurements. A test checks that both agree.
Weights are 1/σ_y² with σ_y = σ_k/k when every point of a measurement has σ_k (covariance
taken as absolute), otherwise equal weights with the covariance scaled by the residual variance.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np
from numpy.typing import NDArray

from registry.kinetics.constants import LN_KB_OVER_H, R_J_MOL_K, R_KJ_MOL_K
from registry.validation.base import CheckConfig, Finding, Rule, fnum, opt
from registry.validation.conventions import rate_basis
from registry.validation.data import CheckData
from registry.validation.reported import energy_units, value_units

Array = NDArray[np.float64]


@dataclass(frozen=True)
class GroupedEyringFit:
    """Eyring fits of many measurements: one entry per group (NaN where a fit is impossible)."""

    n_points: NDArray[np.int64]
    dh_kj_mol: Array
    dh_err_kj_mol: Array
    ds_j_mol_k: Array
    ds_err_j_mol_k: Array
    intercept: Array
    slope: Array
    var_intercept: Array
    var_slope: Array
    cov: Array

    def dg_at(self, t_k: Array) -> tuple[Array, Array]:
        """ΔG‡(T) and its standard error from the full covariance (g = (1, 1/T))."""
        y = self.intercept + self.slope / t_k
        dg = -R_KJ_MOL_K * t_k * (y - LN_KB_OVER_H)
        var = self.var_intercept + 2.0 * self.cov / t_k + self.var_slope / t_k**2
        return dg, R_KJ_MOL_K * t_k * np.sqrt(np.maximum(var, 0.0))


def grouped_eyring_fit(
    group: NDArray[np.int64], n_groups: int, t_k: Array, k_per_s: Array, k_err: Array
) -> GroupedEyringFit:
    """Weighted straight-line fits of ln(k/T) against 1/T for every group at once."""
    x = 1.0 / t_k
    y = np.log(k_per_s / t_k)
    has_err = np.isfinite(k_err) & (k_err > 0)
    all_err = np.bincount(group, weights=(~has_err).astype(float), minlength=n_groups) == 0
    sigma_y = np.where(has_err, k_err / k_per_s, 1.0)
    w = np.where(all_err[group], 1.0 / sigma_y**2, 1.0)

    def s(values: Array) -> Array:
        return np.bincount(group, weights=values, minlength=n_groups)

    n = np.bincount(group, minlength=n_groups)
    sw = s(w)
    with np.errstate(invalid="ignore", divide="ignore"):
        xm = s(w * x) / sw
        ym = s(w * y) / sw
        dx = x - xm[group]
        dy = y - ym[group]
        sxx = s(w * dx * dx)
        slope = s(w * dx * dy) / sxx
        intercept = ym - slope * xm
        resid = y - (intercept[group] + slope[group] * x)
        chi2 = s(w * resid * resid)
        dof = n - 2
        scale = np.where(all_err, 1.0, np.where(dof > 0, chi2 / np.maximum(dof, 1), np.nan))
        var_slope = scale / sxx
        var_int = scale * (1.0 / sw + xm**2 / sxx)
        cov = scale * (-xm / sxx)
    ok = (n >= 2) & (sxx > 0)
    nan = np.nan
    return GroupedEyringFit(
        n_points=n,
        dh_kj_mol=np.where(ok, -R_KJ_MOL_K * slope, nan),
        dh_err_kj_mol=np.where(ok, R_KJ_MOL_K * np.sqrt(var_slope), nan),
        ds_j_mol_k=np.where(ok, R_J_MOL_K * (intercept - LN_KB_OVER_H), nan),
        ds_err_j_mol_k=np.where(ok, R_J_MOL_K * np.sqrt(var_int), nan),
        intercept=np.where(ok, intercept, nan),
        slope=np.where(ok, slope, nan),
        var_intercept=np.where(ok, var_int, nan),
        var_slope=np.where(ok, var_slope, nan),
        cov=np.where(ok, cov, nan),
    )


def fit_rate_points(data: CheckData) -> GroupedEyringFit | None:
    """One Eyring fit per measurement of ``data`` (its row order)."""
    r = data.rates
    if len(r) == 0:
        return None
    with np.errstate(invalid="ignore"):
        ok = (r.t_k > 0) & (r.k_per_s > 0)
    return grouped_eyring_fit(r.pos[ok], len(data), r.t_k[ok], r.k_per_s[ok], r.k_err_per_s[ok])


class ActivationRefit(Rule):
    """Reported ΔH‡, ΔS‡ and ΔG‡ must agree with an Eyring refit of the stored rate points."""

    id = "activation-refit"
    version = 2  # 2: the recorded path degeneracy, κ and concentration (σ·c·κ) are used
    severity = "warning"
    title = "ΔH‡/ΔS‡/ΔG‡ against a refit of the rate points"
    uses = (
        "dh_tolerance_kj_mol",
        "ds_tolerance_j_mol_k",
        "dg_tolerance_kj_mol",
        "coverage",
        "min_rate_points",
    )

    def run(self, data: CheckData, config: CheckConfig) -> list[Finding]:
        fit = fit_rate_points(data)
        if fit is None:
            return []
        # the barrier refers to k/(σ·c·κ) as recorded (see .conventions): a constant factor
        # leaves ΔH‡ alone and moves ΔS‡ by −R·ln(divisor), ΔG‡(T) by +RT·ln(divisor)
        ln_div = np.log(rate_basis(data, np.arange(len(data))).divisor)
        fit = replace(fit, ds_j_mol_k=fit.ds_j_mol_k - R_J_MOL_K * ln_div,
                      intercept=fit.intercept - ln_div)  # fmt: skip
        enough = (fit.n_points >= config.min_rate_points) & np.isfinite(fit.dh_kj_mol)
        out: list[Finding] = []
        c = config.coverage
        dh, dh_err = data.col("dh_kj_mol"), np.nan_to_num(data.col("dh_err_kj_mol"), nan=0.0)
        tol = config.dh_tolerance_kj_mol + c * np.sqrt(fit.dh_err_kj_mol**2 + dh_err**2)
        bad = enough & np.isfinite(dh) & ~(np.abs(dh - fit.dh_kj_mol) <= tol)
        out += self._findings(data, bad, "ΔH‡", "dh", dh, fit.dh_kj_mol, tol, "energy", fit)
        ds, ds_err = data.col("ds_j_mol_k"), np.nan_to_num(data.col("ds_err_j_mol_k"), nan=0.0)
        tol = config.ds_tolerance_j_mol_k + c * np.sqrt(fit.ds_err_j_mol_k**2 + ds_err**2)
        bad = enough & np.isfinite(ds) & ~(np.abs(ds - fit.ds_j_mol_k) <= tol)
        out += self._findings(data, bad, "ΔS‡", "ds", ds, fit.ds_j_mol_k, tol, "entropy", fit)
        dg, t = data.col("dg_kj_mol"), data.col("dg_t_k")
        with np.errstate(invalid="ignore"):
            dg_fit, dg_fit_err = fit.dg_at(np.where(t > 0, t, np.nan))
        dg_err = np.nan_to_num(data.col("dg_err_kj_mol"), nan=0.0)
        tol = config.dg_tolerance_kj_mol + c * np.sqrt(dg_fit_err**2 + dg_err**2)
        with np.errstate(invalid="ignore"):
            bad = enough & np.isfinite(dg) & np.isfinite(dg_fit) & ~(np.abs(dg - dg_fit) <= tol)
        out += self._findings(data, bad, "ΔG‡", "dg", dg, dg_fit, tol, "energy", fit)
        return out

    def _findings(
        self,
        data: CheckData,
        bad: NDArray[np.bool_],
        name: str,
        key: str,
        reported: Array,
        refit: Array,
        tol: Array,
        quantity: str,
        fit: GroupedEyringFit,
    ) -> list[Finding]:
        pos = np.flatnonzero(bad)
        if pos.size == 0:
            return []
        texts = data.text(f"{key}_text")[pos]
        column = f"{key}_kj_mol" if quantity == "energy" else f"{key}_j_mol_k"
        values = data.col(column)[pos]
        if quantity == "energy":
            labels, factors = energy_units(texts, values)
        else:
            labels, factors = value_units(texts, values, "entropy")
        t = data.col("dg_t_k")
        out = []
        for i, p in enumerate(pos):
            u, f = labels[i], float(factors[i])
            rep, rec, tl = float(reported[p]) * f, float(refit[p]) * f, float(tol[p]) * f
            at = f" at {t[p]:.1f} K" if key == "dg" else ""
            out.append(
                self.finding(
                    int(data.ids[p]),
                    f"{name} {fnum(rep, 2)} {u}{at} does not match {fnum(rec, 2)} {u} from an "
                    f"Eyring refit of the {int(fit.n_points[p])} stored rate points: off by "
                    f"{rep - rec:+.2f} {u}, tolerance ±{tl:.2f} {u}",
                    reported=opt(rep),
                    recomputed=opt(rec),
                    difference=opt(rep - rec),
                    unit=u,
                    context=key,
                )
            )
        return out
