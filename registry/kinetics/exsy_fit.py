"""Rate constants from EXSY volumes at several mixing times, fitted together.

Model: I(τm) = s·exp(L·τm)·diag(p) (see :mod:`.exchange_matrix`), with the rate constants
k(i→j) for i < j, the relaxation rate R1 of every site, the total magnetization s and — unless
given — the populations p as parameters; k(j→i) = k(i→j)·p_i/p_j (detailed balance). A τm = 0
spectrum is simply one more mixing time (I(0) = s·diag(p)). Every volume of every mixing time
is a residual, weighted by 1/σ_I when σ_I is given.

Why a least-squares fit on the volumes rather than a weighted mean of the single-τm results
of :func:`registry.kinetics.exsy.exsy_rates`: the matrix logarithm turns volume noise into rate
noise non-linearly (steeply as τm approaches 1/k), fails outright when an eigenvalue is ≤ 0,
and needs M0 or equal T1s; the fit uses every mixing time, including those whose logarithm
has no real solution, separates relaxation from exchange through the τm dependence, and its
covariance gives σ for every rate constant directly (absolute when σ_I is given, scaled by the
scatter otherwise; :mod:`.lsq`). Started from the matrix method at the shortest mixing time.
scipy.optimize is imported when a fit runs, never at module import.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np
from numpy.typing import ArrayLike, NDArray

from registry.kinetics.checks import KineticsInputError
from registry.kinetics.exchange_matrix import balanced_rates, propagators
from registry.kinetics.exsy import (
    GIVEN,
    ExsyRates,
    exsy_rates,
    normalised_populations,
    site_names,
    volume_matrix,
)
from registry.kinetics.lsq import covariance, propagate, sigmas

FloatArray = NDArray[np.float64]

FIT = "least squares on the volumes of all mixing times (matrix exponential model)"
FITTED = "fitted"


def _unpack(
    x: FloatArray, n: int, fixed_p: FloatArray | None
) -> tuple[FloatArray, FloatArray, float, FloatArray]:
    """(k matrix, R1, s, p) from the parameter vector."""
    m = n * (n - 1) // 2
    if fixed_p is None:
        q = np.concatenate([x[m + n + 1 :], [0.0]])
        e = np.exp(q - q.max())
        p = e / e.sum()
    else:
        p = fixed_p
    return balanced_rates(x[:m], p), x[m : m + n], float(x[m + n]), p


def _model(x: FloatArray, n: int, fixed_p: FloatArray | None, taus: FloatArray) -> FloatArray:
    k, r1, s, p = _unpack(x, n, fixed_p)
    return s * propagators(k, r1, p, taus) * p[None, None, :]


def _outputs(x: FloatArray, n: int, fixed_p: FloatArray | None) -> FloatArray:
    k, r1, _, p = _unpack(x, n, fixed_p)
    extra = [k[0, 1] + k[1, 0]] if n == 2 else []
    return np.concatenate([k.ravel(), r1, p, extra])


def fit_exsy(
    volumes: Sequence[ArrayLike],
    mixing_s: Sequence[float],
    *,
    populations: ArrayLike | None = None,
    volume_err: float | None = None,
    sites: Sequence[str] | None = None,
) -> ExsyRates:
    """Fit k(i→j), R1 and (unless given) the populations to volume matrices at ≥ 2 mixing
    times (one of them may be 0: the reference spectrum)."""
    from scipy.optimize import least_squares

    data, taus = _inputs(volumes, mixing_s)
    n = data.shape[1]
    names = site_names(sites, n)
    fixed_p = None if populations is None else normalised_populations(populations, n)
    x0 = _start(data, taus, fixed_p)
    m = n * (n - 1) // 2
    lower = np.full(x0.size, -np.inf)
    lower[: m + n + 1] = 0.0
    if x0.size >= data.size:
        raise KineticsInputError(
            "volumes",
            f"{x0.size} parameters but only {data.size} volumes: add mixing times (or a τm = 0 "
            "spectrum), or give the populations",
        )
    sigma = 1.0 if volume_err is None else float(volume_err)
    if not (np.isfinite(sigma) and sigma > 0):
        raise KineticsInputError("volume_err", "the volumes' σ must be > 0", value=volume_err)

    def residuals(x: FloatArray) -> FloatArray:
        return ((_model(x, n, fixed_p, taus) - data) / sigma).ravel()

    res = least_squares(residuals, x0, bounds=(lower, np.inf), x_scale="jac", method="trf")
    if not res.success:
        raise KineticsInputError("volumes", f"the fit did not converge: {res.message}")
    cov = covariance(res.jac, res.fun, absolute=volume_err is not None)
    out = _outputs(res.x, n, fixed_p)
    errs = (
        None
        if cov.matrix is None
        else sigmas(propagate(lambda v: _outputs(v, n, fixed_p), res.x, cov.matrix))
    )
    chi2 = cov.chi2_reduced if volume_err is not None else None
    return _result(names, res.x, out, errs, n, fixed_p, taus, chi2, volume_err)


def _inputs(
    volumes: Sequence[ArrayLike], mixing_s: Sequence[float]
) -> tuple[FloatArray, FloatArray]:
    mats = [volume_matrix(v, f"volumes at mixing time {i + 1}") for i, v in enumerate(volumes)]
    taus = np.asarray([float(t) for t in mixing_s])
    if len(mats) != taus.size:
        raise KineticsInputError(
            "mixing", f"{taus.size} mixing time(s) but {len(mats)} volume matrices: give one each"
        )
    if len({m.shape for m in mats}) != 1:
        raise KineticsInputError("volumes", "every mixing time needs the same number of sites")
    if not (np.isfinite(taus).all() and (taus >= 0).all()):
        raise KineticsInputError("mixing", "mixing times must be ≥ 0 s", value=taus.tolist())
    if np.unique(taus).size < 2:
        raise KineticsInputError("mixing", "a fit needs at least two different mixing times")
    order = np.argsort(taus)
    data = np.stack(mats)[order]
    return data, taus[order]


def _start(data: FloatArray, taus: FloatArray, fixed_p: FloatArray | None) -> FloatArray:
    """Start values: the matrix method at the shortest non-zero mixing time, relaxation from
    the decay of the total volume, populations from the column sums."""
    n = data.shape[1]
    m = n * (n - 1) // 2
    first = int(np.flatnonzero(taus > 0)[0])
    p = fixed_p if fixed_p is not None else data[first].sum(axis=0) / data[first].sum()
    rows, cols = np.triu_indices(n, 1)
    guess = np.full(m, 0.3 / float(np.median(taus[taus > 0])))
    try:
        single = exsy_rates(data[first], taus[first], populations=p)
        found = single.k_per_s[rows, cols]
        guess = np.where(found > 0, found, guess)
    except KineticsInputError:
        pass
    totals = data.sum(axis=(1, 2))
    slope = -np.polyfit(taus, np.log(np.maximum(totals, 1e-300)), 1)[0]
    r1 = max(float(slope), 0.05 / float(taus.max()))
    s = float(totals[0] * np.exp(r1 * taus[0]))
    parts = [guess, np.full(n, r1), [s]]
    if fixed_p is None:
        parts.append(np.log(p[:-1] / p[-1]))
    return np.concatenate(parts)


def _result(
    names: tuple[str, ...],
    x: FloatArray,
    out: FloatArray,
    errs: FloatArray | None,
    n: int,
    fixed_p: FloatArray | None,
    taus: FloatArray,
    chi2_reduced: float | None,
    volume_err: float | None,
) -> ExsyRates:
    nn = n * n
    k = out[:nn].reshape(n, n)
    notes = []
    rows, cols = np.triu_indices(n, 1)
    for i, j in zip(rows, cols, strict=True):
        if k[i, j] <= 1e-12 * max(float(k.max()), 1e-300):
            notes.append(
                f"k({names[i]}→{names[j]}) ran to its bound 0: no direct exchange between "
                f"{names[i]} and {names[j]} is seen"
            )
    if volume_err is not None and chi2_reduced is not None and chi2_reduced > 4.0:
        notes.append(
            f"the volumes scatter {chi2_reduced**0.5:.1f}× more than the σ given: the σ's "
            "of the rate constants are too small (or the model does not fit)"
        )
    return ExsyRates(
        sites=names,
        k_per_s=k,
        k_err_per_s=None if errs is None else errs[:nn].reshape(n, n),
        populations=out[nn + n : nn + 2 * n],
        populations_from=GIVEN if fixed_p is not None else FITTED,
        r1_per_s=out[nn : nn + n],
        r1_err_per_s=None if errs is None else errs[nn : nn + n],
        method=FIT,
        mixing_s=tuple(float(t) for t in taus),
        k_exchange_err_per_s=None if errs is None or n != 2 else float(errs[-1]),
        chi2_reduced=chi2_reduced,
        notes=tuple(notes),
    )
