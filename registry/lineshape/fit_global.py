"""The global fit: ΔH‡ and ΔS‡ fitted to all spectra at once, k(T) tied by the Eyring equation.

The fit shares ΔH‡ and ΔS‡ (through ΔG‡ at the mean temperature, see
:mod:`registry.lineshape.eyring`) across spectra, each keeping its own w, δ, A and baseline, with
residuals weighted by each spectrum's noise from its own per-temperature fit
(:func:`registry.lineshape.fit.fit_spectrum`), so χ²/dof ≈ 1 by construction. The model of one
spectrum and the error estimate are those of :mod:`registry.lineshape.fit_core`.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from scipy.optimize import OptimizeResult, least_squares

from registry.kinetics.constants import R_KJ_MOL_K
from registry.kinetics.constants import STANDARD_TEMPERATURE_K as T_STANDARD_K
from registry.kinetics.fits import extrapolation_warning, fit_eyring
from registry.lineshape.eyring import (
    EyringParameters,
    harmonic_mean_temperature,
    ln_rate_from_dg_dh,
    parameters_from_dg_dh,
)
from registry.lineshape.fit import fit_spectrum, k_errors
from registry.lineshape.fit_core import (
    MAX_EVALUATIONS,
    FloatArray,
    LineShapeFit,
    LineShapeFitError,
    Prepared,
    bounded_exp,
    covariance,
    make_fit,
    not_converged,
    prepare,
    std_err,
)
from registry.lineshape.simulate import ExchangeModel


@dataclass(frozen=True, eq=False)
class SpectrumInput:
    """What a global fit needs of each spectrum."""

    freq_hz: FloatArray
    intensity: FloatArray
    t_k: float
    source: str
    t_text: str | None = None
    #: this spectrum's own sites (Δν, populations fitted or tied per spectrum), else the common
    model: ExchangeModel | None = None
    #: this spectrum's own intrinsic width to hold (a reference line's), else the common one
    width_hz: float | None = None


@dataclass(frozen=True)
class GlobalFit:
    """ΔH‡, ΔS‡ fitted to all spectra at once, with the per-spectrum results it implies."""

    eyring: EyringParameters
    fits: list[LineShapeFit]
    n_points: int
    chi2_reduced: float
    converged: bool
    message: str
    #: ΔG‡(298.15 K) extrapolated beyond the fitted temperatures, as the Eyring line says it
    warnings: tuple[str, ...] = ()


class _GlobalProblem:
    """Weighted residuals and Jacobian for θ = ΔG‡(T_m), ΔH‡, then per spectrum [θ_w,] δ, A, b₀, b₁."""

    def __init__(
        self,
        preps: list[Prepared],
        temps: FloatArray,
        sigmas: FloatArray,
        widths: Sequence[float],
        fix_width: bool,
    ) -> None:
        self.preps = preps
        self.temps_array = temps
        self.temps = [float(t) for t in temps]
        self.sigmas = sigmas
        self.widths = list(widths)
        self.fix_width = fix_width
        self.per = 4 if fix_width else 5
        self.t_m = harmonic_mean_temperature(temps)
        self.bounds = np.cumsum([0, *(len(p.y) for p in preps)])
        self.n_total = int(self.bounds[-1])
        self.n_par = 2 + self.per * len(preps)
        self.dlnk_dg = -1.0 / (R_KJ_MOL_K * self.t_m)

    def lnk_of(self, theta: FloatArray, t: float) -> float:
        return ln_rate_from_dg_dh(t, theta[0], theta[1], self.t_m).item()

    def dlnk_dh(self, t: float) -> float:
        return -(1.0 / t - 1.0 / self.t_m) / R_KJ_MOL_K

    def local(self, theta: FloatArray, i: int) -> tuple[float, float, float, float, float]:
        """θ → w, δ, A, b₀, b₁ of spectrum i."""
        block = theta[2 + self.per * i : 2 + self.per * (i + 1)]
        if self.fix_width:
            return self.widths[i], *block
        return self.preps[i].width(block[0]), *block[1:]

    def residuals(self, theta: FloatArray) -> FloatArray:
        out = np.empty(self.n_total)
        for i, (p, t) in enumerate(zip(self.preps, self.temps, strict=True)):
            w, off, a, b0, b1 = self.local(theta, i)
            m = a * p.shape.value(bounded_exp(self.lnk_of(theta, t)), w, off) + b0 + b1 * p.u
            out[self.bounds[i] : self.bounds[i + 1]] = (m - p.y) / self.sigmas[i]
        return out

    def jacobian(self, theta: FloatArray) -> FloatArray:
        jac = np.zeros((self.n_total, self.n_par))
        for i, (p, t) in enumerate(zip(self.preps, self.temps, strict=True)):
            w, off, a, _b0, _b1 = self.local(theta, i)
            k = bounded_exp(self.lnk_of(theta, t))
            s, d_lnk, d_w, d_off = p.shape.derivatives(k, w, off)
            rows = slice(self.bounds[i], self.bounds[i + 1])
            jac[rows, 0] = a * d_lnk * self.dlnk_dg
            jac[rows, 1] = a * d_lnk * self.dlnk_dh(t)
            cols = [] if self.fix_width else [a * (w - p.width_floor) * d_w]
            cols += [a * d_off, s, np.ones_like(s), p.u]
            c0 = 2 + self.per * i
            jac[rows, c0 : c0 + self.per] = np.column_stack(cols)
            jac[rows, :] /= self.sigmas[i]
        return jac


def _start(problem: _GlobalProblem, starts: Sequence[LineShapeFit]) -> FloatArray:
    """θ₀ from the per-temperature fits: their Eyring line, offsets, areas and baselines."""
    t_m = problem.t_m
    line = fit_eyring(problem.temps_array, [f.k_per_s for f in starts], k_errors(starts))
    theta0 = [line.dh_kj_mol - t_m * line.ds_j_mol_k / 1000.0, line.dh_kj_mol]
    for i, (f, p) in enumerate(zip(starts, problem.preps, strict=True)):
        local0 = [
            f.offset_hz,
            f.area / p.ynorm,
            f.baseline_at_centre / p.ynorm,
            f.baseline_slope_per_hz * p.half_span / p.ynorm,
        ]
        # a start whose width collapsed (see fit_core.make_fit) restarts from the given width
        w0 = f.width_hz if f.width_hz > 1.01 * p.width_floor else problem.widths[i]
        theta0 += local0 if problem.fix_width else [p.theta_w(w0), *local0]
    return np.asarray(theta0, dtype=float)


def _fits_at(
    problem: _GlobalProblem, result: OptimizeResult, cov: FloatArray | None
) -> list[LineShapeFit]:
    """The per-spectrum results the global θ implies, k's error from the (ΔG‡, ΔH‡) block."""
    theta = result.x
    cov_gh = None if cov is None else cov[:2, :2]
    fits = []
    for i, (p, t) in enumerate(zip(problem.preps, problem.temps, strict=True)):
        w, off, a, b0, b1 = problem.local(theta, i)
        grad = np.array([problem.dlnk_dg, problem.dlnk_dh(t)])
        c0 = 2 + problem.per * i
        width_err = std_err(cov, c0)
        fits.append(
            make_fit(
                p,
                k=bounded_exp(problem.lnk_of(theta, t)),
                ln_k_err=None if cov_gh is None else math.sqrt(float(grad @ cov_gh @ grad)),
                width=w,
                width_err=(
                    None
                    if problem.fix_width or width_err is None
                    else width_err * (w - p.width_floor)
                ),
                offset=off,
                offset_err=std_err(cov, c0 if problem.fix_width else c0 + 1),
                linear=(a, b0, b1),
                n_par=problem.n_par,
                result=result,
                method="global Eyring",
            )
        )
    return fits


def fit_global(
    spectra: Sequence[SpectrumInput],
    model: ExchangeModel,
    *,
    width_hz: float = 1.0,
    fix_width: bool = False,
    starts: Sequence[LineShapeFit] | None = None,
) -> GlobalFit:
    """Fit ΔH‡ and ΔS‡ to all spectra at once (k(T) from the Eyring equation).

    ``starts`` are per-temperature fits of the same spectra (computed here when not given);
    they give the starting values and each spectrum's noise level for the weights.
    Parameters θ: ΔG‡(T_m), ΔH‡ (kJ/mol), then per spectrum [θ_w,] δ, A, b₀, b₁.
    """
    if len(spectra) < 2 or len({round(s.t_k, 6) for s in spectra}) < 2:
        raise LineShapeFitError("global fit", "needs spectra at two or more temperatures")
    if starts is None:
        starts = [
            fit_spectrum(
                s.freq_hz,
                s.intensity,
                s.model or model,
                width_hz=width_hz if s.width_hz is None else s.width_hz,
                fix_width=fix_width,
                source=s.source,
                t_k=s.t_k,
                t_text=s.t_text,
            )
            for s in spectra
        ]
    per = 4 if fix_width else 5
    preps = [
        prepare(s.freq_hz, s.intensity, s.model or model, s.source, s.t_k, s.t_text, per + 2)
        for s in spectra
    ]
    sigmas = np.array([max(f.rms / p.ynorm, 1e-12) for f, p in zip(starts, preps, strict=True)])
    temps = np.array([s.t_k for s in spectra])
    widths = [width_hz if s.width_hz is None else s.width_hz for s in spectra]
    problem = _GlobalProblem(preps, temps, sigmas, widths, fix_width)
    result = least_squares(
        problem.residuals,
        _start(problem, starts),
        jac=problem.jacobian,
        method="lm",
        x_scale="jac",
        max_nfev=MAX_EVALUATIONS,
    )
    ssr = float(result.fun @ result.fun)
    cov = covariance(problem.jacobian(result.x), ssr, problem.n_total)
    chi2 = ssr / (problem.n_total - problem.n_par)
    eyring = parameters_from_dg_dh(
        float(result.x[0]),
        float(result.x[1]),
        None if cov is None else cov[:2, :2],
        problem.t_m,
        len(preps),
        chi2,
        "global line-shape fit",
    )
    fits = _fits_at(problem, result, cov)
    note = extrapolation_warning(temps, T_STANDARD_K)
    failed = [f.source for f in fits if f.failed]
    notes = [] if result.success else [not_converged(result)]
    if failed:  # a rate at the bound is no result: nor is the fit that implies it
        notes.append(f"k ran to the bound of the search at {', '.join(failed)}: the fit failed")
    message = "; ".join(notes)
    return GlobalFit(
        eyring, fits, problem.n_total, chi2, bool(result.success) and not failed, message,
        (note,) if note else (),
    )  # fmt: skip
