"""First-order approach to equilibrium: racemization (ee against time) and the equilibration of
two isomers (the fraction of one against time).

Two forms interconverting by first-order steps P ⇌ Q with rate constants k_PQ (one molecule
of P becoming Q) and k_QP relax together with k_obs = k_PQ + k_QP (any first-order kinetics
text, e.g. K. A. Connors, Chemical Kinetics (VCH 1990), ch. 3):

* **racemization**: enantiomers have k_PQ = k_QP = k_enant (the enantiomerization rate
  constant, one molecule inverting), and ee = (P − Q)/(P + Q) obeys d ee/dt = −2·k_enant·ee, so
  ee(t) = ee0·exp(−k_rac·t) with k_rac = 2·k_enant. Each inversion of one molecule both
  removes one P and adds one Q, hence the 2.
* **equilibration**: the fraction x of P obeys x(t) = x_eq + (x0 − x_eq)·exp(−k_obs·t) with
  x_eq = k_QP/k_obs, so k_PQ = (1 − x_eq)·k_obs and k_QP = x_eq·k_obs; x_eq is given or fitted.

The rate constant of one molecule (k_enant; k_PQ and k_QP) is the one transition-state theory
speaks of and the one an Eyring barrier belongs to; k_rac and k_obs are what the curve shows.
The half-life is that of the observed decay, ln 2/k_obs (ee halves; the distance from
equilibrium halves).

The fit is least squares by variable projection: for a trial k_obs the amplitudes (ee0, or x0
and x_eq) are linear and solved exactly, so only ln k_obs is searched — on a grid over every
time scale the data can show, then refined by golden-section search. No start value is needed
and the global minimum on the grid is found. σ come from the covariance of all parameters,
scaled by the scatter (:mod:`.lsq`; the points carry no σ of their own). numpy only.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Literal

import numpy as np
from numpy.typing import ArrayLike, NDArray

from registry.kinetics.checks import KineticsInputError
from registry.kinetics.constants import LN2
from registry.kinetics.lsq import covariance

FloatArray = NDArray[np.float64]

Quantity = Literal["ee", "fraction"]

#: how many time scales below the longest and above the shortest time the search covers
_DECADES_OUT = 2.0
_GRID = 240
_GOLDEN = (math.sqrt(5.0) - 1.0) / 2.0


@dataclass(frozen=True)
class TimeCourse:
    """A first-order fit toward equilibrium and the rate constants of one molecule.

    ``k_per_s``: ee → k_enant; fraction → k_PQ (the followed isomer P becoming the other, Q).
    ``k_reverse_per_s``: ee → k_enant again; fraction → k_QP.
    """

    quantity: Quantity
    k_obs_per_s: float  # k_rac for ee, k_PQ + k_QP for a fraction
    k_obs_err_per_s: float | None
    k_per_s: float
    k_err_per_s: float | None
    k_reverse_per_s: float
    k_reverse_err_per_s: float | None
    start: float  # ee0 or x0
    start_err: float | None
    equilibrium: float  # 0 for ee, x_eq for a fraction
    equilibrium_err: float | None  # None when given (or ee)
    equilibrium_fitted: bool
    t_s: FloatArray
    y: FloatArray
    fitted: FloatArray
    rms_residual: float
    notes: tuple[str, ...]

    @property
    def half_life_s(self) -> float:
        return LN2 / self.k_obs_per_s

    @property
    def half_life_err_s(self) -> float | None:
        if self.k_obs_err_per_s is None:
            return None
        return LN2 * self.k_obs_err_per_s / self.k_obs_per_s**2


def fit_racemization(t_s: ArrayLike, ee: ArrayLike) -> TimeCourse:
    """ee(t) = ee0·exp(−k_rac·t); ``ee`` as fractions (−1 … 1)."""
    t, y = _series(t_s, ee, "ee", (-1.0, 1.0))
    k, amps, cov, fitted, notes = _fit(t, y, offset=0.0, free_offset=False)
    k_err = _sig(cov, 1)
    half = None if k_err is None else k_err / 2.0
    return TimeCourse(
        "ee", k, k_err, k / 2.0, half, k / 2.0, half, float(amps[0]), _sig(cov, 0), 0.0, None, False,
        t, y, fitted, _rms(y, fitted), tuple(notes),
    )  # fmt: skip


def fit_equilibration(
    t_s: ArrayLike, fraction: ArrayLike, *, x_eq: float | None = None
) -> TimeCourse:
    """x(t) = x_eq + (x0 − x_eq)·exp(−k_obs·t); ``fraction`` (0 … 1) of the followed isomer P."""
    t, y = _series(t_s, fraction, "fraction", (0.0, 1.0))
    if x_eq is not None and not (math.isfinite(x_eq) and 0.0 < x_eq < 1.0):
        raise KineticsInputError(
            "x_eq", "the equilibrium fraction must lie between 0 and 1", value=x_eq
        )
    free = x_eq is None
    k, amps, cov, fitted, notes = _fit(t, y, offset=0.0 if free else float(x_eq), free_offset=free)
    if free:
        xe, x0 = float(amps[0]), float(amps[0] + amps[1])
        if not 0.0 < xe < 1.0:
            raise KineticsInputError(
                "fraction",
                f"the fitted equilibrium fraction {xe:.3g} lies outside 0–1: the course has not "
                "come near equilibrium; give the equilibrium fraction",
            )
    else:
        xe, x0 = float(x_eq), float(x_eq) + amps[0]  # type: ignore[arg-type]
    k_f, k_r, errs = _split(k, xe, cov, free)
    return TimeCourse(
        "fraction", k, _sig(cov, _k_index(free)), k_f, errs[0], k_r, errs[1], x0,
        _start_err(cov, free), xe, _sig(cov, 0) if free else None, free,
        t, y, fitted, _rms(y, fitted), tuple(notes),
    )  # fmt: skip


def _k_index(free: bool) -> int:
    """Index of k_obs among the fitted parameters (offset first when it is fitted)."""
    return 2 if free else 1


def _split(
    k: float, xe: float, cov: FloatArray | None, free: bool
) -> tuple[float, float, tuple[float | None, float | None]]:
    """k_PQ = (1 − x_eq)·k_obs and k_QP = x_eq·k_obs with their σ (x_eq and k_obs correlated)."""
    k_f, k_r = float((1.0 - xe) * k), float(xe * k)
    if cov is None:
        return k_f, k_r, (None, None)
    ik = _k_index(free)
    if not free:
        sk = math.sqrt(cov[ik, ik])
        return k_f, k_r, ((1.0 - xe) * sk, xe * sk)
    sub = cov[np.ix_([0, ik], [0, ik])]  # (x_eq, k_obs)
    g_f, g_r = np.array([-k, 1.0 - xe]), np.array([k, xe])
    return k_f, k_r, (math.sqrt(max(g_f @ sub @ g_f, 0.0)), math.sqrt(max(g_r @ sub @ g_r, 0.0)))


def _start_err(cov: FloatArray | None, free: bool) -> float | None:
    """σ of x0: x0 = a (given x_eq) or x_eq + a (fitted), a the amplitude."""
    if cov is None:
        return None
    if not free:
        return math.sqrt(cov[0, 0])
    return math.sqrt(max(cov[0, 0] + cov[1, 1] + 2 * cov[0, 1], 0.0))


def _series(
    t_s: ArrayLike, values: ArrayLike, name: str, limits: tuple[float, float]
) -> tuple[FloatArray, FloatArray]:
    t = np.asarray(t_s, dtype=float).ravel()
    y = np.asarray(values, dtype=float).ravel()
    if t.size != y.size:
        raise KineticsInputError(name, f"{t.size} times but {y.size} values")
    if not (np.isfinite(t).all() and np.isfinite(y).all()):
        raise KineticsInputError(name, "every time and value must be a finite number")
    if (t < 0).any():
        raise KineticsInputError("time", "times must be ≥ 0", value=float(t.min()))
    lo, hi = limits
    if (y < lo).any() or (y > hi).any():
        bad = float(y[(y < lo) | (y > hi)][0])
        raise KineticsInputError(
            name, f"values must lie between {lo:g} and {hi:g} (as fractions, not %)", value=bad
        )
    if np.unique(t).size < 3:
        raise KineticsInputError("time", "need at least 3 different times to fit a rate")
    order = np.argsort(t, kind="stable")
    return t[order], y[order]


def _amplitudes(
    u: float, t: FloatArray, y: FloatArray, free_offset: bool
) -> tuple[FloatArray, FloatArray]:
    """Best linear amplitudes at k = e^u, and the model."""
    e = np.exp(-math.exp(u) * t)
    basis = np.stack([np.ones_like(t), e], axis=1) if free_offset else e[:, None]
    amps, *_ = np.linalg.lstsq(basis, y, rcond=None)
    return amps, basis @ amps


def _fit(
    t: FloatArray, y: FloatArray, *, offset: float, free_offset: bool
) -> tuple[float, FloatArray, FloatArray | None, FloatArray, list[str]]:
    """k_obs, the amplitudes, the covariance of (offset?, amplitude, k_obs), the model, notes."""
    target = y - offset
    positive = t[t > 0]
    lo = math.log(10**-_DECADES_OUT / float(t.max() - t.min()))
    hi = math.log(10**_DECADES_OUT / float(positive.min() if positive.size else t.max()))
    grid = np.linspace(lo, hi, _GRID)
    ssr = np.array([_ssr(u, t, target, free_offset) for u in grid])
    best = int(np.argmin(ssr))
    if best == 0:
        raise KineticsInputError(
            "time course", "no decay toward equilibrium is seen over these times (k → 0)"
        )
    if best == grid.size - 1:
        raise KineticsInputError(
            "time course",
            "the values are at equilibrium already at the first times: the process is faster "
            "than the sampling",
        )
    u = _golden(lambda v: _ssr(v, t, target, free_offset), grid[best - 1], grid[best + 1])
    k = math.exp(u)
    amps, model = _amplitudes(u, t, target, free_offset)
    fitted = model + offset
    cov = _covariance(t, y - fitted, amps, k, free_offset)
    notes = []
    if k * float(t.max() - t.min()) < 0.5:
        notes.append(
            "the data cover less than half a decay time (k·Δt < 0.5): k leans on the "
            "curvature of a nearly straight line"
        )
    return k, amps, cov, fitted, notes


def _ssr(u: float, t: FloatArray, y: FloatArray, free_offset: bool) -> float:
    _, model = _amplitudes(u, t, y, free_offset)
    return float(((y - model) ** 2).sum())


def _golden(fn, a: float, b: float, tol: float = 1e-12) -> float:  # type: ignore[no-untyped-def]
    """Minimum of a unimodal ``fn`` on [a, b] by golden-section search."""
    c, d = b - _GOLDEN * (b - a), a + _GOLDEN * (b - a)
    fc, fd = fn(c), fn(d)
    while abs(b - a) > tol * max(1.0, abs(a)):
        if fc < fd:
            b, d, fd = d, c, fc
            c = b - _GOLDEN * (b - a)
            fc = fn(c)
        else:
            a, c, fc = c, d, fd
            d = a + _GOLDEN * (b - a)
            fd = fn(d)
    return 0.5 * (a + b)


def _covariance(
    t: FloatArray, resid: FloatArray, amps: FloatArray, k: float, free_offset: bool
) -> FloatArray | None:
    """Scaled covariance of (offset?, amplitude, k) from the analytic Jacobian."""
    e = np.exp(-k * t)
    a = float(amps[-1])
    cols = [np.ones_like(t)] if free_offset else []
    cols += [e, -a * t * e]
    return covariance(np.stack(cols, axis=1), resid, absolute=False).matrix


def _sig(cov: FloatArray | None, i: int) -> float | None:
    if cov is None or not cov[i, i] >= 0:
        return None
    return math.sqrt(float(cov[i, i]))


def _rms(y: FloatArray, fitted: FloatArray) -> float:
    return float(np.sqrt(np.mean((y - fitted) ** 2)))
