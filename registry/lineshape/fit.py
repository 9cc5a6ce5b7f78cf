"""Fitting exchange rates to spectra: one temperature at a time, or all tied by the Eyring law.

Model of one spectrum: y(ν) = A·S(ν; k, w, δ) + b₀ + b₁·u, with S the unit-area exchange
spectrum of :mod:`registry.lineshape.simulate` (k = rate constant for leaving site 1, see there),
w a common intrinsic width (FWHM, Hz), δ a common offset of all sites (Hz, for referencing
drift), A the integrated intensity and a straight baseline in u = (ν − ν_mid)/half-width.
k and w are fitted as ln k and ln w, which keeps them positive and makes the rate's error
relative (a rate is known to so many per cent, not so many s⁻¹).

The start comes from a grid over k (and w unless it is fixed) with A, b₀, b₁ solved linearly at
each node, on a thinned copy of the spectrum; then Levenberg–Marquardt
(:func:`scipy.optimize.least_squares`) on all points with an analytic Jacobian: derivatives of
the resolvent 2·Re[1ᵀ(iω − L)⁻¹p] with respect to w and δ are −π and 2πi times 2·Re Σ aₘDₘ²
(Dₘ = 1/(iω − λₘ)), and with respect to ln k it is 2·Re[(1ᵀV·D)(V⁻¹XV)(D·V⁻¹p)] with X the
exchange generator at rate k. Standard errors are √diag(s²(JᵀJ)⁻¹), s² = SSR/(N − p):
right for white noise; real spectra (zero-filled, apodised) have correlated points, so treat
the errors as lower bounds.

The global fit shares ΔH‡ and ΔS‡ (through ΔG‡ at the mean temperature, see
:mod:`registry.lineshape.eyring`) across spectra, each keeping its own w, δ, A and baseline, with
residuals weighted by each spectrum's noise from its own fit.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field

import numpy as np
from numpy.typing import NDArray
from scipy.optimize import OptimizeResult, least_squares

from registry.errors import FluxledgerError
from registry.kinetics.constants import R_KJ_MOL_K
from registry.kinetics.fits import EyringFit, fit_eyring
from registry.lineshape.eyring import (
    EyringParameters,
    harmonic_mean_temperature,
    ln_rate_from_dg_dh,
    parameters_from_dg_dh,
)
from registry.lineshape.simulate import ExchangeModel, Resolvent, evaluate

FloatArray = NDArray[np.float64]

#: grid for the start: rates per decade, and factors on the starting width
_K_PER_DECADE = 6
_WIDTH_FACTORS = (1 / 3, 1.0, 3.0)
#: the grid only ranks starting points, so it runs on a thinned copy: at least this many
#: points, and at least two per narrowest trial width
_GRID_POINTS = 1024
#: Levenberg–Marquardt evaluations per start; a good start converges in 10–30
_MAX_EVALUATIONS = 200


def _exp(x: float) -> float:
    """exp with its argument held to ±40, so a wild Levenberg–Marquardt trial step cannot overflow."""
    return math.exp(min(max(float(x), -40.0), 40.0))


class LineShapeFitError(FluxledgerError):
    """A spectrum that cannot be fitted as given (too few points, no signal, no convergence)."""

    exit_code = 1

    def __init__(self, source: str, reason: str) -> None:
        super().__init__(source, reason)
        self.source = source
        self.reason = reason

    def __str__(self) -> str:
        return f"{self.source}: {self.reason}"


@dataclass(frozen=True, eq=False)
class LineShapeFit:
    """Result at one temperature. Errors are standard errors (None when not determined)."""

    source: str
    t_k: float | None
    t_text: str | None
    k_per_s: float
    k_err_per_s: float | None
    ln_k: float
    ln_k_err: float | None
    width_hz: float
    width_err_hz: float | None
    offset_hz: float
    offset_err_hz: float | None
    area: float
    baseline_at_centre: float
    baseline_slope_per_hz: float
    rms: float
    n_points: int
    n_params: int
    converged: bool
    message: str
    method: str = "per temperature"
    freq_hz: FloatArray = field(default_factory=lambda: np.empty(0), repr=False)
    data: FloatArray = field(default_factory=lambda: np.empty(0), repr=False)
    best_fit: FloatArray = field(default_factory=lambda: np.empty(0), repr=False)

    def to_dict(self) -> dict[str, object]:
        """Plain values for JSON and tables (the arrays are left out)."""
        skip = {"freq_hz", "data", "best_fit"}
        return {k: getattr(self, k) for k in self.__dataclass_fields__ if k not in skip}


@dataclass(frozen=True)
class GlobalFit:
    """ΔH‡, ΔS‡ fitted to all spectra at once, with the per-spectrum results it implies."""

    eyring: EyringParameters
    fits: list[LineShapeFit]
    n_points: int
    chi2_reduced: float
    converged: bool
    message: str


# ----------------------------------------------------------------------------- the model


@dataclass
class _Shape:
    """S(ν) and, when asked, its derivatives for one (k, w, δ); caches the diagonalisation."""

    model: ExchangeModel
    omega: FloatArray
    _k: float = math.nan
    _res: Resolvent | None = None

    def resolvent(self, k: float) -> Resolvent:
        if k != self._k or self._res is None:
            self._res = self.model.resolvent(k)
            self._k = k
        return self._res

    def value(self, k: float, width: float, offset: float) -> FloatArray:
        return evaluate(self.resolvent(k), self.omega / (2 * np.pi), width, offset)

    def derivatives(
        self, k: float, width: float, offset: float
    ) -> tuple[FloatArray, FloatArray, FloatArray, FloatArray]:
        """S, ∂S/∂ln k, ∂S/∂w, ∂S/∂δ (analytic; central differences near a defective L)."""
        res = self.resolvent(k)
        if res.direct:
            return self._numeric(k, width, offset)
        lam = res.eigenvalues - np.pi * width + 2j * np.pi * offset
        # Element-wise over the n eigenvalues (n is small): BLAS calls on (N, n) arrays cost
        # more in thread start-up than the arithmetic itself.
        iw = 1j * self.omega
        d = [1.0 / (iw - lam_m) for lam_m in lam]
        s_c = sum(a * dm for a, dm in zip(res.amplitudes, d, strict=True))
        d2a = sum(a * dm * dm for a, dm in zip(res.amplitudes, d, strict=True))
        c = res.inverse @ self.model.generator(k) @ res.vectors
        n = len(lam)
        dk_c = sum(
            (res.left[m] * c[m, q] * res.right[q]) * (d[m] * d[q])
            for m in range(n)
            for q in range(n)
        )
        s = 2.0 * s_c.real
        ds_dw = -2.0 * np.pi * d2a.real
        ds_doff = -4.0 * np.pi * d2a.imag  # 2·Re(2πi·z) = −4π·Im z
        ds_dlnk = 2.0 * dk_c.real
        return s, ds_dlnk, ds_dw, ds_doff

    def _numeric(
        self, k: float, width: float, offset: float
    ) -> tuple[FloatArray, FloatArray, FloatArray, FloatArray]:
        """Central differences, for the rare L too close to defective for eigenvectors."""
        h = 1e-6
        hz = 1e-6 * max(width, 1e-3)
        up = self.value(k * math.exp(h), width, offset)
        down = self.value(k * math.exp(-h), width, offset)
        d_lnk = (up - down) / (2 * h)
        s = self.value(k, width, offset)
        d_w = (self.value(k, width + hz, offset) - self.value(k, width - hz, offset)) / (2 * hz)
        d_off = (self.value(k, width, offset + hz) - self.value(k, width, offset - hz)) / (2 * hz)
        return s, d_lnk, d_w, d_off


@dataclass
class _Prepared:
    """One spectrum scaled for fitting: intensities divided by their largest magnitude."""

    source: str
    freq: FloatArray
    y: FloatArray
    ynorm: float
    u: FloatArray
    half_span: float
    shape: _Shape
    t_k: float | None
    t_text: str | None
    #: half the point spacing: a narrower line is not described by the sampled data
    width_floor: float

    def thinned(self, stride: int) -> _Prepared:
        """Every ``stride``-th point, same scaling and width floor (for the coarse stage)."""
        if stride <= 1:
            return self
        freq = self.freq[::stride]
        return _Prepared(
            self.source,
            freq,
            self.y[::stride],
            self.ynorm,
            self.u[::stride],
            self.half_span,
            _Shape(self.shape.model, 2 * np.pi * freq),
            self.t_k,
            self.t_text,
            self.width_floor,
        )

    def width(self, theta_w: float) -> float:
        """w = floor + exp(θ): positive, and LM cannot chase it to zero where it has no grip."""
        return self.width_floor + _exp(theta_w)

    def theta_w(self, width_hz: float) -> float:
        return math.log(max(width_hz - self.width_floor, 1e-3 * self.width_floor))


def _prepare(
    freq_hz: FloatArray,
    intensity: FloatArray,
    model: ExchangeModel,
    source: str,
    t_k: float | None,
    t_text: str | None,
    n_params: int,
) -> _Prepared:
    freq = np.asarray(freq_hz, dtype=float)
    y = np.asarray(intensity, dtype=float)
    if freq.shape != y.shape or freq.ndim != 1:
        raise LineShapeFitError(source, "frequency and intensity arrays differ in shape")
    if not (np.isfinite(freq).all() and np.isfinite(y).all()):
        raise LineShapeFitError(source, "the spectrum holds non-finite values")
    if len(freq) < n_params + 5:
        raise LineShapeFitError(
            source, f"{len(freq)} points are too few to fit {n_params} parameters"
        )
    order = np.argsort(freq)
    freq, y = freq[order], y[order]
    ynorm = float(np.abs(y).max())
    if ynorm == 0.0:
        raise LineShapeFitError(source, "the spectrum is all zeros")
    centre = 0.5 * (freq[0] + freq[-1])
    half = 0.5 * (freq[-1] - freq[0])
    if half <= 0:
        raise LineShapeFitError(source, "the frequency axis has zero width")
    lo, hi = min(model.shifts_hz), max(model.shifts_hz)
    if hi < freq[0] or lo > freq[-1]:
        raise LineShapeFitError(
            source,
            f"the sites ({lo:g} … {hi:g} Hz) lie outside the spectrum "
            f"({freq[0]:g} … {freq[-1]:g} Hz); check the shifts, units and spectrometer frequency",
        )
    return _Prepared(
        source,
        freq,
        y / ynorm,
        ynorm,
        (freq - centre) / half,
        half,
        _Shape(model, 2 * np.pi * freq),
        t_k,
        t_text,
        0.5 * (freq[-1] - freq[0]) / (len(freq) - 1),
    )


def _rate_grid(model: ExchangeModel, width_hz: float) -> FloatArray:
    """Rates from 'no visible broadening' (k ≈ 0.02·πw) to 'fully averaged' (k ≈ 50·πΔν²/w)."""
    span = max(model.span_hz, model.min_separation_hz, 1e-9)
    k_lo = 0.02 * math.pi * width_hz
    k_hi = max(50.0 * math.pi * span**2 / width_hz, 100.0 * k_lo)
    n = max(8, math.ceil(_K_PER_DECADE * math.log10(k_hi / k_lo)) + 1)
    return np.geomspace(k_lo, k_hi, n)


def _dot(a: FloatArray, b: FloatArray) -> float:
    """Σ a·b without BLAS: a threaded ddot stalls when the machine's cores are busy."""
    return float(np.einsum("i,i->", a, b))


class _LinearPart:
    """Least squares for A·s + b₀ + b₁·u ≈ y at fixed s, by 3×3 normal equations.

    The sums over 1, u and y are computed once; each grid node then needs four dot products.
    """

    def __init__(self, y: FloatArray, u: FloatArray) -> None:
        self.y = y
        self.u = u
        self.n = float(len(y))
        self.su = float(u.sum())
        self.suu = _dot(u, u)
        self.sy = float(y.sum())
        self.suy = _dot(u, y)
        self.syy = _dot(y, y)

    def solve(self, s: FloatArray) -> tuple[FloatArray, float]:
        ss, s1, su, sy = _dot(s, s), float(s.sum()), _dot(s, self.u), _dot(s, self.y)
        gram = np.array([[ss, s1, su], [s1, self.n, self.su], [su, self.su, self.suu]])
        rhs = np.array([sy, self.sy, self.suy])
        try:
            coef = np.linalg.solve(gram, rhs)
        except np.linalg.LinAlgError:
            return np.zeros(3), math.inf
        return coef, max(self.syy - float(coef @ rhs), 0.0)


def _coarse_stride(prep: _Prepared, narrowest_width_hz: float) -> int:
    """Thinning that keeps ≥ _GRID_POINTS points and ≥ 2 points per narrowest trial width."""
    spacing = (prep.freq[-1] - prep.freq[0]) / (len(prep.freq) - 1)
    return max(1, min(len(prep.freq) // _GRID_POINTS, int(narrowest_width_hz / (2 * spacing))))


def _grid_start(
    prep: _Prepared, width_hz: float, fix_width: bool, k_guess: float | None
) -> list[tuple[float, float, FloatArray]]:
    """The best (k, w, [A, b₀, b₁]) of the grid, plus the best of another basin in k if any."""
    widths = [width_hz] if fix_width else [width_hz * f for f in _WIDTH_FACTORS]
    stride = _coarse_stride(prep, min(widths))
    freq = prep.freq[::stride]
    linear = _LinearPart(prep.y[::stride], prep.u[::stride])
    ks = _rate_grid(prep.shape.model, width_hz)
    if k_guess is not None:
        ks = np.unique(np.append(ks, k_guess))
    ssr = np.full((len(ks), len(widths)), np.inf)
    coefs: dict[tuple[int, int], FloatArray] = {}
    for i, k in enumerate(ks):
        res = prep.shape.model.resolvent(float(k))
        for j, w in enumerate(widths):
            coef, value = linear.solve(evaluate(res, freq, w, 0.0))
            if coef[0] > 0:
                ssr[i, j] = value
                coefs[(i, j)] = coef
    if not np.isfinite(ssr).any():
        raise LineShapeFitError(
            prep.source, "no positive signal found at the given sites (inverted or empty spectrum?)"
        )
    best_per_k = ssr.min(axis=1)
    # local minima along k of the best-over-width SSR: slow and fast exchange can both fit
    minima = [
        i
        for i in range(len(ks))
        if np.isfinite(best_per_k[i])
        and (i == 0 or best_per_k[i] <= best_per_k[i - 1])
        and (i == len(ks) - 1 or best_per_k[i] <= best_per_k[i + 1])
    ]
    minima.sort(key=lambda i: best_per_k[i])
    starts = []
    for i in minima[:2]:
        j = int(np.argmin(ssr[i]))
        starts.append((float(ks[i]), float(widths[j]), coefs[(i, j)]))
    return starts


def _covariance(jac: FloatArray, ssr: float, n: int) -> FloatArray | None:
    """s²·(JᵀJ)⁻¹, s² = SSR/(N − p); None when J does not determine every parameter.

    JᵀJ is formed with its columns scaled to unit length (a correlation-like matrix, well
    conditioned unless parameters are truly degenerate) and inverted by eigen-decomposition;
    an SVD of the tall N×p Jacobian gives the same numbers but costs ten times more.
    """
    p = jac.shape[1]
    if n <= p:
        return None
    norms = np.sqrt(np.einsum("ij,ij->j", jac, jac))
    if not (norms > 0).all():
        return None
    scaled = jac / norms
    gram = scaled.T @ scaled
    evals, evecs = np.linalg.eigh(gram)
    if evals[0] <= 1e-12 * evals[-1]:
        return None
    inv = (evecs / evals) @ evecs.T
    return inv / np.outer(norms, norms) * (ssr / (n - p))


def _err(cov: FloatArray | None, i: int) -> float | None:
    if cov is None or not np.isfinite(cov[i, i]) or cov[i, i] < 0:
        return None
    return math.sqrt(float(cov[i, i]))


# ----------------------------------------------------------------------------- one temperature


def fit_spectrum(
    freq_hz: FloatArray,
    intensity: FloatArray,
    model: ExchangeModel,
    *,
    width_hz: float = 1.0,
    fix_width: bool = False,
    k_guess: float | None = None,
    source: str = "spectrum",
    t_k: float | None = None,
    t_text: str | None = None,
) -> LineShapeFit:
    """Fit k (with w, δ, area and a straight baseline) to one spectrum; see module docstring.

    ``width_hz`` is the starting intrinsic width, or the fixed one with ``fix_width``.
    Parameters θ: ln k, [θ_w,] δ, A, b₀, b₁ (intensities scaled by their largest magnitude).
    """
    if not width_hz > 0:
        raise LineShapeFitError(source, f"the intrinsic width must be > 0 Hz, got {width_hz}")
    n_par = 5 if fix_width else 6
    prep = _prepare(freq_hz, intensity, model, source, t_k, t_text, n_par)
    widths = [width_hz] if fix_width else [width_hz * f for f in _WIDTH_FACTORS]
    coarse = prep.thinned(_coarse_stride(prep, min(widths)))

    def unpack(theta: FloatArray) -> tuple[float, float, float, float, float, float]:
        """θ → k, w, δ, A, b₀, b₁."""
        if fix_width:
            ln_k, off, a, b0, b1 = theta
            return _exp(ln_k), width_hz, off, a, b0, b1
        ln_k, th_w, off, a, b0, b1 = theta
        return _exp(ln_k), prep.width(th_w), off, a, b0, b1

    def problem(
        p: _Prepared,
    ) -> tuple[Callable[[FloatArray], FloatArray], Callable[[FloatArray], FloatArray]]:
        ones = np.ones_like(p.u)

        def residuals(theta: FloatArray) -> FloatArray:
            k, w, off, a, b0, b1 = unpack(theta)
            return a * p.shape.value(k, w, off) + b0 + b1 * p.u - p.y

        def jacobian(theta: FloatArray) -> FloatArray:
            k, w, off, a, _b0, _b1 = unpack(theta)
            s, d_lnk, d_w, d_off = p.shape.derivatives(k, w, off)
            cols = [a * d_lnk]
            if not fix_width:
                cols.append(a * (w - p.width_floor) * d_w)
            cols += [a * d_off, s, ones, p.u]
            return np.column_stack(cols)

        return residuals, jacobian

    def minimise(p: _Prepared, theta0: FloatArray) -> OptimizeResult:
        residuals, jacobian = problem(p)
        return least_squares(
            residuals, theta0, jac=jacobian, method="lm", x_scale="jac", max_nfev=_MAX_EVALUATIONS
        )

    # Each start is refined on the thinned copy (which already resolves every trial width);
    # the best is then polished on all points, which takes a few steps from there.
    best = None
    for k0, w0, coef in _grid_start(prep, width_hz, fix_width, k_guess):
        theta0 = [math.log(k0)] + ([] if fix_width else [prep.theta_w(w0)]) + [0.0, *coef]
        result = minimise(coarse, np.asarray(theta0))
        if best is None or result.cost < best.cost:
            best = result
    assert best is not None
    if coarse is not prep:
        best = minimise(prep, best.x)
    _, jacobian = problem(prep)
    theta = best.x
    k, w, off, a, b0, b1 = unpack(theta)
    ssr = float(best.fun @ best.fun)
    cov = _covariance(jacobian(theta), ssr, len(prep.y))
    ln_k_err = _err(cov, 0)
    th_w_err = None if fix_width else _err(cov, 1)
    return _result(
        prep,
        k=k,
        ln_k_err=ln_k_err,
        width=w,
        width_err=None if th_w_err is None else (w - prep.width_floor) * th_w_err,
        offset=off,
        offset_err=_err(cov, 1 if fix_width else 2),
        linear=(a, b0, b1),
        n_par=n_par,
        result=best,
        method="per temperature",
    )


def _result(
    prep: _Prepared,
    *,
    k: float,
    ln_k_err: float | None,
    width: float,
    width_err: float | None,
    offset: float,
    offset_err: float | None,
    linear: tuple[float, float, float],
    n_par: int,
    result: OptimizeResult,
    method: str,
) -> LineShapeFit:
    """A :class:`LineShapeFit` in the data's own units, with a warning when k is not pinned."""
    a, b0, b1 = linear
    model_y = a * prep.shape.value(k, width, offset) + b0 + b1 * prep.u
    resid = model_y - prep.y
    message = str(result.message)
    if ln_k_err is None or ln_k_err > 1.0:
        message += (
            "; k is poorly determined: near the slow- or fast-exchange limit k trades off "
            "against the intrinsic width, so fix the width (measured without exchange)"
        )
    if width <= 1.01 * prep.width_floor:
        message += "; the intrinsic width ran down to the point spacing: fix the width"
    return LineShapeFit(
        source=prep.source,
        t_k=prep.t_k,
        t_text=prep.t_text,
        k_per_s=k,
        k_err_per_s=None if ln_k_err is None else k * ln_k_err,
        ln_k=math.log(k),
        ln_k_err=ln_k_err,
        width_hz=width,
        width_err_hz=width_err,
        offset_hz=float(offset),
        offset_err_hz=offset_err,
        area=float(a * prep.ynorm),
        baseline_at_centre=float(b0 * prep.ynorm),
        baseline_slope_per_hz=float(b1 * prep.ynorm / prep.half_span),
        rms=math.sqrt(float(resid @ resid) / len(resid)) * prep.ynorm,
        n_points=len(prep.y),
        n_params=n_par,
        converged=bool(result.success),
        message=message,
        method=method,
        freq_hz=prep.freq,
        data=prep.y * prep.ynorm,
        best_fit=model_y * prep.ynorm,
    )


# ----------------------------------------------------------------------------- all temperatures


@dataclass(frozen=True, eq=False)
class SpectrumInput:
    """What a global fit needs of each spectrum."""

    freq_hz: FloatArray
    intensity: FloatArray
    t_k: float
    source: str
    t_text: str | None = None


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
                model,
                width_hz=width_hz,
                fix_width=fix_width,
                source=s.source,
                t_k=s.t_k,
                t_text=s.t_text,
            )
            for s in spectra
        ]
    per = 4 if fix_width else 5
    preps = [
        _prepare(s.freq_hz, s.intensity, model, s.source, s.t_k, s.t_text, per + 2) for s in spectra
    ]
    temps = np.array([s.t_k for s in spectra])
    t_m = harmonic_mean_temperature(temps)
    line = fit_eyring(temps, [f.k_per_s for f in starts], _k_errors(starts))
    sigmas = np.array([max(f.rms / p.ynorm, 1e-12) for f, p in zip(starts, preps, strict=True)])
    theta0 = [line.dh_kj_mol - t_m * line.ds_j_mol_k / 1000.0, line.dh_kj_mol]
    for f, p in zip(starts, preps, strict=True):
        local0 = [
            f.offset_hz,
            f.area / p.ynorm,
            f.baseline_at_centre / p.ynorm,
            f.baseline_slope_per_hz * p.half_span / p.ynorm,
        ]
        # a start whose width collapsed (see _result) restarts from the given width
        w0 = f.width_hz if f.width_hz > 1.01 * p.width_floor else width_hz
        theta0 += local0 if fix_width else [p.theta_w(w0), *local0]
    bounds = np.cumsum([0, *(len(p.y) for p in preps)])
    n_total = int(bounds[-1])
    n_par = 2 + per * len(preps)
    dlnk_dg = -1.0 / (R_KJ_MOL_K * t_m)

    def lnk_of(theta: FloatArray, t: float) -> float:
        return ln_rate_from_dg_dh(t, theta[0], theta[1], t_m).item()

    def local(theta: FloatArray, i: int) -> tuple[float, float, float, float, float]:
        """θ → w, δ, A, b₀, b₁ of spectrum i."""
        block = theta[2 + per * i : 2 + per * (i + 1)]
        if fix_width:
            return width_hz, *block
        return preps[i].width(block[0]), *block[1:]

    def residuals(theta: FloatArray) -> FloatArray:
        out = np.empty(n_total)
        for i, p in enumerate(preps):
            w, off, a, b0, b1 = local(theta, i)
            m = a * p.shape.value(_exp(lnk_of(theta, p.t_k)), w, off) + b0 + b1 * p.u
            out[bounds[i] : bounds[i + 1]] = (m - p.y) / sigmas[i]
        return out

    def jacobian(theta: FloatArray) -> FloatArray:
        jac = np.zeros((n_total, n_par))
        for i, p in enumerate(preps):
            w, off, a, _b0, _b1 = local(theta, i)
            s, d_lnk, d_w, d_off = p.shape.derivatives(_exp(lnk_of(theta, p.t_k)), w, off)
            rows = slice(bounds[i], bounds[i + 1])
            jac[rows, 0] = a * d_lnk * dlnk_dg
            jac[rows, 1] = a * d_lnk * (-(1.0 / p.t_k - 1.0 / t_m) / R_KJ_MOL_K)
            cols = [] if fix_width else [a * (w - p.width_floor) * d_w]
            cols += [a * d_off, s, np.ones_like(s), p.u]
            c0 = 2 + per * i
            jac[rows, c0 : c0 + per] = np.column_stack(cols)
            jac[rows, :] /= sigmas[i]
        return jac

    result = least_squares(
        residuals,
        np.asarray(theta0, dtype=float),
        jac=jacobian,
        method="lm",
        x_scale="jac",
        max_nfev=_MAX_EVALUATIONS,
    )
    theta = result.x
    ssr = float(result.fun @ result.fun)
    cov = _covariance(jacobian(theta), ssr, n_total)
    chi2 = ssr / (n_total - n_par)
    cov_gh = None if cov is None else cov[:2, :2]
    eyring = parameters_from_dg_dh(
        float(theta[0]), float(theta[1]), cov_gh, t_m, len(preps), chi2, "global line-shape fit"
    )
    fits = []
    for i, p in enumerate(preps):
        w, off, a, b0, b1 = local(theta, i)
        grad = np.array([dlnk_dg, -(1.0 / p.t_k - 1.0 / t_m) / R_KJ_MOL_K])
        c0 = 2 + per * i
        fits.append(
            _result(
                p,
                k=_exp(lnk_of(theta, p.t_k)),
                ln_k_err=None if cov_gh is None else math.sqrt(float(grad @ cov_gh @ grad)),
                width=w,
                width_err=None if fix_width else _scaled_err(cov, c0, w - p.width_floor),
                offset=off,
                offset_err=_err(cov, c0 if fix_width else c0 + 1),
                linear=(a, b0, b1),
                n_par=n_par,
                result=result,
                method="global Eyring",
            )
        )
    return GlobalFit(eyring, fits, n_total, chi2, bool(result.success), str(result.message))


def _scaled_err(cov: FloatArray | None, i: int, factor: float) -> float | None:
    err = _err(cov, i)
    return None if err is None else err * factor


def eyring_from_fits(fits: Sequence[LineShapeFit]) -> EyringFit | None:
    """The weighted Eyring line through per-temperature rates (None below two temperatures)."""
    usable = [f for f in fits if f.t_k is not None]
    if len({round(f.t_k, 6) for f in usable if f.t_k is not None}) < 2:
        return None
    return fit_eyring(
        [f.t_k for f in usable],  # type: ignore[misc]
        [f.k_per_s for f in usable],
        _k_errors(usable),
    )


def _k_errors(fits: Sequence[LineShapeFit]) -> list[float] | None:
    """Weights for an Eyring line: the fits' errors of k, or none (unweighted) if any lacks one."""
    errs = [f.k_err_per_s for f in fits]
    if any(e is None or not e > 0 for e in errs):
        return None
    return [float(e) for e in errs]  # type: ignore[arg-type]
