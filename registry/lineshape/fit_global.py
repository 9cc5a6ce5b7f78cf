"""The global fit: ΔH‡ and ΔS‡ fitted to all spectra at once, k(T) tied by the Eyring equation.

The fit shares ΔH‡ and ΔS‡ (through ΔG‡ at the mean temperature, see
:mod:`registry.lineshape.eyring`) across spectra, each keeping its own w, δ, A and baseline, with
residuals weighted by each spectrum's noise from its own per-temperature fit
(:func:`registry.lineshape.fit.fit_spectrum`), so χ²/dof ≈ 1 by construction. The model of one
spectrum and the error estimate are those of :mod:`registry.lineshape.fit_core`.

Δν, the populations and J are not held at what the series fit found: where the series tied
them to smooth functions of temperature, those functions (Δν's linear drift, the van 't Hoff
line of the site equilibrium, one J) are parameters of this fit too, shared by every spectrum
(:mod:`registry.lineshape.global_sites`, which says why); a width measured on a reference line
enters as a prior of its σ (one more residual (w − w_ref)/σ). So the covariance is that of the
whole problem, and σ(k), σ(ΔH‡), σ(ΔS‡) carry what Δν, p₁ and the widths are not known to.
Their derivatives are analytic (:meth:`~registry.lineshape.fit_core.ModelShape.along`).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, replace

import numpy as np
from scipy.optimize import OptimizeResult, least_squares

from registry.errors import UsageError
from registry.kinetics.constants import R_KJ_MOL_K
from registry.kinetics.constants import STANDARD_TEMPERATURE_K as T_STANDARD_K
from registry.kinetics.fits import extrapolation_warning, fit_eyring
from registry.lineshape.coupled import CoupledABModel
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
    ModelShape,
    Prepared,
    bounded_exp,
    covariance,
    make_fit,
    not_converged,
    prepare,
    std_err,
)
from registry.lineshape.global_sites import (
    SitePlan,
    population,
    site_values,
    start_values,
    trends,
    value_error,
)
from registry.lineshape.series import Trend
from registry.lineshape.simulate import ExchangeModel


@dataclass(frozen=True, eq=False)
class SpectrumInput:
    """What a global fit needs of each spectrum."""

    freq_hz: FloatArray
    intensity: FloatArray
    t_k: float
    source: str
    t_text: str | None = None
    #: this spectrum's own sites (as its series fit found them): the centre of its sites, and
    #: what its held site parameters stay at; else the common model
    model: ExchangeModel | CoupledABModel | None = None
    #: this spectrum's own intrinsic width (a reference line's), else the common one …
    width_hz: float | None = None
    #: … and its σ: the width is then fitted with that prior; 0 holds it (as ``fix_width``)
    width_err_hz: float | None = None


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
    #: the shared Δν drift, van 't Hoff line of the populations, J: fitted with ΔH‡, ΔS‡
    trends: tuple[Trend, ...] = ()


@dataclass
class _Spectrum:
    """One spectrum's part of the global problem: its data, sites, width and columns of θ."""

    prep: Prepared
    t_k: float
    sigma: float
    model: ExchangeModel | CoupledABModel
    #: Δν, ln K, J as the series fit found them (what a held site parameter stays at)
    held: dict[str, float]
    width_hz: float
    #: how the width enters: 'held', 'fitted', 'reference' (fitted with a prior of σ below) or
    #: 'tied (series)' (one width for every spectrum, with one prior)
    width_how: str
    width_sigma: float | None
    #: index in θ of every parameter this spectrum depends on (shared ones included)
    columns: dict[str, int]
    rows: slice


def _held_sites(model: ExchangeModel | CoupledABModel) -> dict[str, float]:
    """Δν, ln K = ln(p₂/p₁) and J of a spectrum's own model (two sites; zeros otherwise)."""
    if len(model.shifts_hz) != 2:
        return {"delta": 0.0, "lnk": 0.0, "coupling": 0.0}
    p1, p2 = model.populations
    return {
        "delta": float(model.shifts_hz[0] - model.shifts_hz[1]),
        "lnk": math.log(p2 / p1),
        "coupling": float(getattr(model, "j_hz", 0.0)),
    }


class _GlobalProblem:
    """Weighted residuals (data, then width priors) and Jacobian for θ = ΔG‡(T_m), ΔH‡, the
    shared site parameters (:mod:`registry.lineshape.global_sites`), then per spectrum
    [θ_w,] [own Δν, ln K,] δ, A, b₀, b₁."""

    def __init__(self, spectra: list[_Spectrum], plan: SitePlan, n_par: int) -> None:
        self.spectra = spectra
        self.plan = plan
        self.n_par = n_par
        temps = np.array([s.t_k for s in spectra])
        self.temps_array = temps
        self.t_m = harmonic_mean_temperature(temps)
        self.t_bar = float(np.mean(temps))
        self.n_data = spectra[-1].rows.stop
        # one prior row per width parameter (a tied width is one column shared by all)
        seen: set[int] = set()
        self.prior = []
        for s in spectra:
            if s.width_sigma is not None and s.columns["width"] not in seen:
                seen.add(s.columns["width"])
                self.prior.append(s)
        self.n_total = self.n_data + len(self.prior)
        self.dlnk_dg = -1.0 / (R_KJ_MOL_K * self.t_m)
        self._shapes: dict[int, tuple[tuple[float, ...], ModelShape]] = {}

    def lnk_of(self, theta: FloatArray, t: float) -> float:
        return ln_rate_from_dg_dh(t, theta[0], theta[1], self.t_m).item()

    def dlnk_dh(self, t: float) -> float:
        return -(1.0 / t - 1.0 / self.t_m) / R_KJ_MOL_K

    def sites(
        self, theta: FloatArray, i: int
    ) -> tuple[dict[str, float], dict[str, list[tuple[int, float]]]]:
        s = self.spectra[i]
        return site_values(self.plan, theta, s.columns, s.held, s.t_k - self.t_bar,
                           1.0 / s.t_k - 1.0 / self.t_m)  # fmt: skip

    def model_at(self, theta: FloatArray, i: int) -> ExchangeModel | CoupledABModel:
        """Spectrum i's exchange model for the site values θ gives it."""
        s = self.spectra[i]
        if self.plan.all_held:
            return s.model
        values, _ = self.sites(theta, i)
        centre = 0.5 * (s.model.shifts_hz[0] + s.model.shifts_hz[1])
        shifts = (centre + 0.5 * values["delta"], centre - 0.5 * values["delta"])
        if isinstance(s.model, CoupledABModel):
            return CoupledABModel(shifts, values["coupling"])
        p1 = population(values["lnk"])
        return ExchangeModel(shifts, (p1, 1.0 - p1), s.model.scheme)

    def shape(self, theta: FloatArray, i: int) -> ModelShape:
        """The model shape of spectrum i, kept while its site values stay (LM asks for the
        residuals and then the Jacobian at the same θ)."""
        s = self.spectra[i]
        if self.plan.all_held:
            return s.prep.shape
        values, _ = self.sites(theta, i)
        key = (values["delta"], values["lnk"], values["coupling"])
        cached = self._shapes.get(i)
        if cached is None or cached[0] != key:
            cached = (key, ModelShape(self.model_at(theta, i), s.prep.shape.omega))
            self._shapes[i] = cached
        return cached[1]

    def local(self, theta: FloatArray, i: int) -> tuple[float, float, float, float, float]:
        """θ → w, δ, A, b₀, b₁ of spectrum i."""
        s = self.spectra[i]
        c = s.columns
        w = s.width_hz if s.width_how == "held" else s.prep.width(theta[c["width"]])
        return w, *(float(theta[c[n]]) for n in ("offset", "area", "b0", "b1"))  # type: ignore[return-value]

    def residuals(self, theta: FloatArray) -> FloatArray:
        out = np.empty(self.n_total)
        for i, s in enumerate(self.spectra):
            w, off, a, b0, b1 = self.local(theta, i)
            k = bounded_exp(self.lnk_of(theta, s.t_k))
            m = a * self.shape(theta, i).value(k, w, off) + b0 + b1 * s.prep.u
            out[s.rows] = (m - s.prep.y) / s.sigma
        for r, s in enumerate(self.prior):
            w = s.prep.width(theta[s.columns["width"]])
            out[self.n_data + r] = (w - s.width_hz) / s.width_sigma  # type: ignore[operator]
        return out

    def jacobian(self, theta: FloatArray) -> FloatArray:
        jac = np.zeros((self.n_total, self.n_par))
        for i, s in enumerate(self.spectra):
            w, off, a, _b0, _b1 = self.local(theta, i)
            k = bounded_exp(self.lnk_of(theta, s.t_k))
            shape = self.shape(theta, i)
            value, d_lnk, d_w, d_off = shape.derivatives(k, w, off)
            block = jac[s.rows]
            c = s.columns
            block[:, 0] = a * d_lnk * self.dlnk_dg
            block[:, 1] = a * d_lnk * self.dlnk_dh(s.t_k)
            if s.width_how != "held":
                block[:, c["width"]] += a * (w - s.prep.width_floor) * d_w
            block[:, c["offset"]] = a * d_off
            block[:, c["area"]] = value
            block[:, c["b0"]] = 1.0
            block[:, c["b1"]] = s.prep.u
            values, grads = self.sites(theta, i)
            for name, pairs in grads.items():
                d_site = self._site_derivative(shape, name, values, k, w, off)
                for col, factor in pairs:
                    block[:, col] += a * factor * d_site
            block /= s.sigma
        for r, s in enumerate(self.prior):
            col = s.columns["width"]
            jac[self.n_data + r, col] = (s.prep.width(theta[col]) - s.prep.width_floor) / s.width_sigma  # type: ignore[operator]  # fmt: skip
        return jac

    @staticmethod
    def _site_derivative(
        shape: ModelShape, name: str, values: dict[str, float], k: float, w: float, off: float
    ) -> FloatArray:
        """∂S/∂Δν, ∂S/∂ln K (= −p₁p₂·∂S/∂p₁) or ∂S/∂J."""
        model_name = "population" if name == "lnk" else name
        d_liou, d_pops = shape.model.site_derivative(model_name, k)  # type: ignore[union-attr]
        d_site = shape.along(k, w, off, d_liou, d_pops)
        if name == "lnk":
            p1 = population(values["lnk"])
            d_site = -p1 * (1.0 - p1) * d_site
        return d_site


def _build(
    spectra: Sequence[SpectrumInput],
    model: ExchangeModel | CoupledABModel,
    plan: SitePlan,
    starts: Sequence[LineShapeFit],
    width_hz: float,
    fix_width: bool,
    tie_width: bool = False,
) -> tuple[_GlobalProblem, FloatArray]:
    """The problem (columns of θ for every spectrum) and its start θ₀ from the series fits."""
    shared = ["dg", "dh", *plan.shared()]
    tie_width = tie_width and not fix_width
    if tie_width:
        shared.append("width")
    columns0 = {n: i for i, n in enumerate(shared)}
    col, row = len(shared), 0
    parts: list[_Spectrum] = []
    for s, f in zip(spectra, starts, strict=True):
        own_model = s.model or model
        if len(own_model.shifts_hz) != 2 and not plan.all_held:
            raise UsageError("global fit: Δν and the populations vary only for two sites")
        width = width_hz if s.width_hz is None else s.width_hz
        sigma_w = s.width_err_hz
        if sigma_w is not None and not (math.isfinite(sigma_w) and sigma_w >= 0):
            raise UsageError(f"{s.source}: width_err_hz must be a finite σ ≥ 0, not {sigma_w!r}")
        if fix_width or (s.width_err_hz is not None and s.width_err_hz <= 0):
            how = "held"
        elif tie_width:
            how = "tied (series)"
        else:
            how = "reference" if s.width_err_hz else "fitted"
        own_width = ["width"] if how in ("reference", "fitted") else []
        names = own_width + plan.own() + ["offset", "area", "b0", "b1"]
        prep = prepare(s.freq_hz, s.intensity, own_model, s.source, s.t_k, s.t_text,
                       len(names) + len(shared))  # fmt: skip
        columns = {**columns0, **{n: col + j for j, n in enumerate(names)}}
        col += len(names)
        rows = slice(row, row + len(prep.y))
        row += len(prep.y)
        sigma = max(f.rms / prep.ynorm, 1e-12)
        parts.append(_Spectrum(prep, s.t_k, sigma, own_model, _held_sites(own_model), width, how,
                               s.width_err_hz if how != "held" else None, columns, rows))  # fmt: skip
    problem = _GlobalProblem(parts, plan, col)
    return problem, _start(problem, starts)


def _start(problem: _GlobalProblem, starts: Sequence[LineShapeFit]) -> FloatArray:
    """θ₀ from the series fits: their Eyring line, site values, offsets, areas and baselines."""
    t_m = problem.t_m
    theta0 = np.zeros(problem.n_par)
    line = fit_eyring(problem.temps_array, [f.k_per_s for f in starts], k_errors(starts))
    theta0[:2] = [line.dh_kj_mol - t_m * line.ds_j_mol_k / 1000.0, line.dh_kj_mol]
    held = [s.held for s in problem.spectra]
    shared = start_values(problem.plan, starts, held, problem.t_bar, t_m)
    for name, value in shared.items():
        theta0[problem.spectra[0].columns[name]] = value
    for f, s in zip(starts, problem.spectra, strict=True):
        c, p = s.columns, s.prep
        for name in problem.plan.own():
            theta0[c[name]] = s.held[name]
        theta0[c["offset"]] = f.offset_hz
        theta0[c["area"]] = f.area / p.ynorm
        theta0[c["b0"]] = f.baseline_at_centre / p.ynorm
        theta0[c["b1"]] = f.baseline_slope_per_hz * p.half_span / p.ynorm
        if s.width_how != "held":
            # a start whose width collapsed (see fit_core.make_fit) restarts from the given width
            w0 = f.width_hz if f.width_hz > 1.01 * p.width_floor else s.width_hz
            theta0[c["width"]] = p.theta_w(s.width_hz if s.width_how == "tied (series)" else w0)
    return theta0


#: how each plan is named in a fit's parameters
_HOW = {"drift": "global drift", "van 't Hoff": "global van 't Hoff", "level": "global, one value",
        "shared": "global, one value", "own": "fitted", "held": "held"}  # fmt: skip


def _site_rows(
    problem: _GlobalProblem, theta: FloatArray, cov: FloatArray | None, i: int, w: float
) -> tuple[tuple[str, float, float | None, str], ...]:
    """(name, value, error, how) of spectrum i's site parameters and width."""
    s = problem.spectra[i]
    if len(s.model.shifts_hz) != 2:
        return ()
    values, grads = problem.sites(theta, i)
    plan = problem.plan
    coupled = isinstance(s.model, CoupledABModel)
    err = value_error(grads["delta"], cov) if "delta" in grads else None
    rows = [("delta", values["delta"], err, _HOW[plan.delta])]
    if coupled:
        err = value_error(grads["coupling"], cov) if "coupling" in grads else None
        rows.append(("coupling", values["coupling"], err, _HOW[plan.coupling]))
    else:
        p1 = population(values["lnk"])
        err = value_error(grads["lnk"], cov) if "lnk" in grads else None
        rows.append(("population", p1, None if err is None else err * p1 * (1.0 - p1),
                     _HOW[plan.population]))  # fmt: skip
    w_err = None if s.width_how == "held" else std_err(cov, s.columns["width"])
    rows.append(("width", w, None if w_err is None else w_err * (w - s.prep.width_floor),
                 s.width_how))  # fmt: skip
    return tuple(rows)


def _fits_at(
    problem: _GlobalProblem, result: OptimizeResult, cov: FloatArray | None
) -> list[LineShapeFit]:
    """The per-spectrum results the global θ implies; k's error from the (ΔG‡, ΔH‡) block of
    the joint covariance, which carries what the site parameters and widths are not known to."""
    theta = result.x
    cov_gh = None if cov is None else cov[:2, :2]
    fits = []
    for i, s in enumerate(problem.spectra):
        w, off, a, b0, b1 = problem.local(theta, i)
        grad = np.array([problem.dlnk_dg, problem.dlnk_dh(s.t_k)])
        prep = replace(s.prep, shape=ModelShape(problem.model_at(theta, i), s.prep.shape.omega))
        width_err = None if s.width_how == "held" else std_err(cov, s.columns["width"])
        fit = make_fit(
            prep,
            k=bounded_exp(problem.lnk_of(theta, s.t_k)),
            ln_k_err=None if cov_gh is None else math.sqrt(float(grad @ cov_gh @ grad)),
            width=w,
            width_err=None if width_err is None else width_err * (w - s.prep.width_floor),
            offset=off,
            offset_err=std_err(cov, s.columns["offset"]),
            linear=(a, b0, b1),
            n_par=problem.n_par,
            result=result,
            method="global Eyring",
        )
        fits.append(replace(fit, parameters=_site_rows(problem, theta, cov, i, w)))
    return fits


def fit_global(
    spectra: Sequence[SpectrumInput],
    model: ExchangeModel | CoupledABModel,
    *,
    width_hz: float = 1.0,
    fix_width: bool = False,
    starts: Sequence[LineShapeFit] | None = None,
    plan: SitePlan | None = None,
    tie_width: bool = False,
) -> GlobalFit:
    """Fit ΔH‡ and ΔS‡ to all spectra at once (k(T) from the Eyring equation).

    ``starts`` are per-temperature fits of the same spectra (computed here when not given);
    they give the starting values and each spectrum's noise level for the weights. ``plan``
    says how Δν, the populations and J enter (:class:`~registry.lineshape.global_sites.SitePlan`;
    default: held at each spectrum's own model). The width is held (``fix_width``), fitted with
    a prior (a spectrum with ``width_err_hz``: its reference line's σ) or fitted freely;
    ``tie_width`` makes it one width for all spectra (one prior: the series' tied width and σ).
    Parameters θ: ΔG‡(T_m), ΔH‡ (kJ/mol), the shared site parameters, then per spectrum
    [θ_w,] [own Δν, ln K,] δ, A, b₀, b₁; every error is from the joint covariance.
    """
    plan = plan or SitePlan()
    if len(spectra) < 2 or len({round(s.t_k, 6) for s in spectra}) < 2:
        raise LineShapeFitError("global fit", "needs spectra at two or more temperatures")
    if starts is None:
        starts = [
            fit_spectrum(
                s.freq_hz,
                s.intensity,
                s.model or model,
                width_hz=width_hz if s.width_hz is None else s.width_hz,
                fix_width=fix_width or bool(s.width_err_hz),
                source=s.source,
                t_k=s.t_k,
                t_text=s.t_text,
            )
            for s in spectra
        ]
    problem, theta0 = _build(spectra, model, plan, starts, width_hz, fix_width, tie_width)
    result = least_squares(
        problem.residuals,
        theta0,
        jac=problem.jacobian,
        method="lm",
        x_scale="jac",
        max_nfev=MAX_EVALUATIONS,
    )
    data = result.fun[: problem.n_data]
    ssr = float(data @ data)
    # s² = SSR/(N − p) from the data rows; the width priors' rows are in units of their σ
    cov = covariance(problem.jacobian(result.x), ssr, problem.n_data)
    chi2 = ssr / (problem.n_data - problem.n_par)
    eyring = parameters_from_dg_dh(
        float(result.x[0]),
        float(result.x[1]),
        None if cov is None else cov[:2, :2],
        problem.t_m,
        len(problem.spectra),
        chi2,
        "global line-shape fit",
    )
    fits = _fits_at(problem, result, cov)
    sources = tuple(f.source for f in fits)
    columns = problem.spectra[0].columns
    site_trends = trends(plan, result.x, cov, columns, problem.t_bar, problem.t_m, sources)
    note = extrapolation_warning(problem.temps_array, T_STANDARD_K)
    failed = [f.source for f in fits if f.failed]
    notes = [] if result.success else [not_converged(result)]
    if failed:  # a rate at the bound is no result: nor is the fit that implies it
        notes.append(f"k ran to the bound of the search at {', '.join(failed)}: the fit failed")
    message = "; ".join(notes)
    return GlobalFit(
        eyring, fits, problem.n_data, chi2, bool(result.success) and not failed, message,
        (note,) if note else (), site_trends,
    )  # fmt: skip
