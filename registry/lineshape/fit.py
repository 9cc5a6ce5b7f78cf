"""Fitting the exchange rate to one spectrum (one temperature), and the Eyring line through the rates.

The model and its derivatives are in :mod:`registry.lineshape.fit_core`. The start comes from a
grid over k (and w unless it is fixed) with A, b₀, b₁ solved linearly at each node, on a thinned
copy of the spectrum; the best two basins are refined there by Levenberg–Marquardt
(:func:`scipy.optimize.least_squares`, analytic Jacobian) and the best is polished on all points.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence

import numpy as np
from scipy.optimize import OptimizeResult, least_squares

from registry.kinetics.fits import EyringFit, fit_eyring
from registry.lineshape.fit_core import (
    MAX_EVALUATIONS,
    FloatArray,
    LineShapeFit,
    LineShapeFitError,
    Prepared,
    bounded_exp,
    covariance,
    make_fit,
    prepare,
    std_err,
)
from registry.lineshape.simulate import ExchangeModel, evaluate

#: grid for the start: rates per decade, and factors on the starting width
_K_PER_DECADE = 6
_WIDTH_FACTORS = (1 / 3, 1.0, 3.0)
#: the grid only ranks starting points, so it runs on a thinned copy: at least this many
#: points, and at least two per narrowest trial width
_GRID_POINTS = 1024

#: θ → k, w, δ, A, b₀, b₁
Unpack = Callable[[FloatArray], tuple[float, float, float, float, float, float]]


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


def _coarse_stride(prep: Prepared, narrowest_width_hz: float) -> int:
    """Thinning that keeps ≥ _GRID_POINTS points and ≥ 2 points per narrowest trial width."""
    spacing = (prep.freq[-1] - prep.freq[0]) / (len(prep.freq) - 1)
    return max(1, min(len(prep.freq) // _GRID_POINTS, int(narrowest_width_hz / (2 * spacing))))


def _grid_start(
    prep: Prepared, width_hz: float, fix_width: bool, k_guess: float | None
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


def _unpacker(prep: Prepared, width_hz: float, fix_width: bool) -> Unpack:
    """θ = ln k, [θ_w,] δ, A, b₀, b₁ → k, w, δ, A, b₀, b₁ (w fixed at ``width_hz`` or free)."""

    def unpack(theta: FloatArray) -> tuple[float, float, float, float, float, float]:
        if fix_width:
            ln_k, off, a, b0, b1 = theta
            return bounded_exp(ln_k), width_hz, off, a, b0, b1
        ln_k, th_w, off, a, b0, b1 = theta
        return bounded_exp(ln_k), prep.width(th_w), off, a, b0, b1

    return unpack


class _Problem:
    """Residuals and analytic Jacobian of one (possibly thinned) spectrum for θ (see _unpacker)."""

    def __init__(self, p: Prepared, unpack: Unpack, fix_width: bool) -> None:
        self.p = p
        self.unpack = unpack
        self.fix_width = fix_width
        self.ones = np.ones_like(p.u)

    def residuals(self, theta: FloatArray) -> FloatArray:
        p = self.p
        k, w, off, a, b0, b1 = self.unpack(theta)
        return a * p.shape.value(k, w, off) + b0 + b1 * p.u - p.y

    def jacobian(self, theta: FloatArray) -> FloatArray:
        p = self.p
        k, w, off, a, _b0, _b1 = self.unpack(theta)
        s, d_lnk, d_w, d_off = p.shape.derivatives(k, w, off)
        cols = [a * d_lnk]
        if not self.fix_width:
            cols.append(a * (w - p.width_floor) * d_w)
        cols += [a * d_off, s, self.ones, p.u]
        return np.column_stack(cols)

    def minimise(self, theta0: FloatArray) -> OptimizeResult:
        return least_squares(
            self.residuals,
            theta0,
            jac=self.jacobian,
            method="lm",
            x_scale="jac",
            max_nfev=MAX_EVALUATIONS,
        )


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
    prep = prepare(freq_hz, intensity, model, source, t_k, t_text, n_par)
    widths = [width_hz] if fix_width else [width_hz * f for f in _WIDTH_FACTORS]
    coarse = prep.thinned(_coarse_stride(prep, min(widths)))
    unpack = _unpacker(prep, width_hz, fix_width)
    # Each start is refined on the thinned copy (which already resolves every trial width);
    # the best is then polished on all points, which takes a few steps from there.
    best = None
    for k0, w0, coef in _grid_start(prep, width_hz, fix_width, k_guess):
        theta0 = [math.log(k0)] + ([] if fix_width else [prep.theta_w(w0)]) + [0.0, *coef]
        result = _Problem(coarse, unpack, fix_width).minimise(np.asarray(theta0))
        if best is None or result.cost < best.cost:
            best = result
    assert best is not None
    if coarse is not prep:
        best = _Problem(prep, unpack, fix_width).minimise(best.x)
    theta = best.x
    k, w, off, a, b0, b1 = unpack(theta)
    ssr = float(best.fun @ best.fun)
    cov = covariance(_Problem(prep, unpack, fix_width).jacobian(theta), ssr, len(prep.y))
    ln_k_err = std_err(cov, 0)
    th_w_err = None if fix_width else std_err(cov, 1)
    return make_fit(
        prep,
        k=k,
        ln_k_err=ln_k_err,
        width=w,
        width_err=None if th_w_err is None else (w - prep.width_floor) * th_w_err,
        offset=off,
        offset_err=std_err(cov, 1 if fix_width else 2),
        linear=(a, b0, b1),
        n_par=n_par,
        result=best,
        method="per temperature",
        width_free=not fix_width,
        k_width_corr=None if fix_width or cov is None else _corr(cov, 0, 1),
    )


def _corr(cov: FloatArray, i: int, j: int) -> float | None:
    denom = math.sqrt(abs(float(cov[i, i] * cov[j, j])))
    return float(cov[i, j]) / denom if denom > 0 else None


def eyring_from_fits(fits: Sequence[LineShapeFit]) -> EyringFit | None:
    """The weighted Eyring line through per-temperature rates (None below two temperatures).

    Failed fits (k at its bound, :attr:`LineShapeFit.failed`) are left out and said so; a point
    without σ_k gets the least weight of the others (:func:`k_errors`), said in the warnings;
    doubtful fits (:attr:`LineShapeFit.problems`) stay in, and the warnings name them.
    """
    from dataclasses import replace

    usable = [f for f in fits if f.t_k is not None and not f.failed]
    if len({round(f.t_k, 6) for f in usable if f.t_k is not None}) < 2:
        return None
    errors, note = fill_k_errors(usable)
    line = fit_eyring(
        [f.t_k for f in usable],  # type: ignore[misc]
        [f.k_per_s for f in usable],
        errors,
    )
    left_out = [f.source for f in fits if f.failed]
    doubtful = [f.source for f in usable if f.doubtful]
    notes = [note] if note else []
    if doubtful:
        notes.append(
            f"the line runs through doubtful rates ({', '.join(doubtful)}): read their notes "
            "before trusting ΔH‡ and ΔS‡"
        )
    if left_out:
        notes.append(f"left out of the Eyring line (the fit failed): {', '.join(left_out)}")
    return replace(line, warnings=(*line.warnings, *notes)) if notes else line


def k_errors(fits: Sequence[LineShapeFit]) -> list[float] | None:
    """Weights for an Eyring line (see :func:`fill_k_errors`)."""
    return fill_k_errors(fits)[0]


def fill_k_errors(fits: Sequence[LineShapeFit]) -> tuple[list[float] | None, str | None]:
    """σ_k of each fit for a weighted Eyring line, and a note when some were filled in.

    A fit without σ_k (k not pinned) does not make the whole line unweighted: it gets the
    largest *relative* σ of the points that have one (the least weight any measured point has),
    and the note says which. Only when no point has σ_k is the line unweighted (None).
    """
    rel = [f.k_err_per_s / f.k_per_s if f.k_err_per_s and f.k_err_per_s > 0 else None
           for f in fits]  # fmt: skip
    known = [r for r in rel if r is not None]
    if not known:
        return None, None
    worst = max(known)
    missing = [f.source for f, r in zip(fits, rel, strict=True) if r is None]
    errors = [(worst if r is None else r) * f.k_per_s for f, r in zip(fits, rel, strict=True)]
    if not missing:
        return errors, None
    return errors, (
        f"no σ_k for {', '.join(missing)}: weighted as the least certain of the other points "
        f"(σ_k/k = {worst:.2g})"
    )
