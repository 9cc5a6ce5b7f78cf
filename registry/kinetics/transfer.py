"""Rate constants from magnetization transfer: saturation transfer and inversion transfer.

Two sites, the observed (or inverted) site A and its partner B; k is k(A→B), the rate
constant of one molecule leaving A for B. The z magnetizations obey the Bloch–McConnell
equations (:mod:`.exchange_matrix`).

**Saturation transfer** (S. Forsén and R. A. Hoffman, J. Chem. Phys. 39, 2892 (1963)): with B
saturated (M_B = 0), dM_A/dt = −(M_A − M0_A)/T1_A − k·M_A, so M_A relaxes with
1/T1_app = 1/T1_A + k to the steady state r = M_ss/M0 = (1/T1_A)·T1_app. Hence

    k = (1 − r)/T1_app         (T1_app: T1 of A measured while B is saturated — the usual way)
    k = (1 − r)/(r·T1_A)       (T1_A: the intrinsic T1 of A, without exchange)

with σ by first-order propagation of σ_r and σ_T1 (the partial derivatives are written out).

**Inversion transfer**: after a selective inversion of A, both magnetizations are followed at
several delays t; M(t) = M0 + exp(L·t)·(M(0) − M0). The fit (scipy ``least_squares``, imported
only when it runs) has k, R1_A, R1_B, M0_A, M0_B, M_A(0) and M_B(0) as parameters, with
k(B→A) = k·M0_A/M0_B (detailed balance; M0 ∝ population for equivalent nuclei). σ from the
fit covariance, scaled by the scatter unless the intensities' σ is given (:mod:`.lsq`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Literal

import numpy as np
from numpy.typing import ArrayLike, NDArray

from registry.kinetics.checks import KineticsInputError
from registry.kinetics.exchange_matrix import propagators
from registry.kinetics.lsq import Covariance, covariance

FloatArray = NDArray[np.float64]

T1Kind = Literal["apparent", "intrinsic"]


@dataclass(frozen=True)
class SaturationTransfer:
    """k(A→B) from the steady-state ratio r = M_ss/M0 of A with B saturated, and a T1 of A."""

    k_per_s: float
    k_err_per_s: float | None
    ratio: float
    ratio_err: float | None
    t1_s: float
    t1_err_s: float | None
    t1_kind: T1Kind
    t1_apparent_s: float  # T1 of A with B saturated
    t1_intrinsic_s: float  # T1 of A without exchange (∞ when r = 1… never: r ≤ 1 gives finite)


def saturation_transfer(
    ratio: float,
    t1_s: float,
    *,
    t1_kind: T1Kind = "apparent",
    ratio_err: float | None = None,
    t1_err_s: float | None = None,
) -> SaturationTransfer:
    """Forsén–Hoffman k(A→B); ``t1_kind`` says which T1 of A ``t1_s`` is."""
    r, t1 = float(ratio), float(t1_s)
    if not (math.isfinite(r) and 0 < r <= 1):
        raise KineticsInputError(
            "ratio",
            "M_ss/M0 must be > 0 and ≤ 1: saturating the partner can only lower the observed "
            "signal (a ratio above 1 is an NOE or an integration problem)",
            value=ratio,
        )
    if not (math.isfinite(t1) and t1 > 0):
        raise KineticsInputError("t1", "T1 must be > 0 s", value=t1_s)
    if t1_kind == "apparent":
        k = (1.0 - r) / t1
        dk_dr, dk_dt1 = -1.0 / t1, -(1.0 - r) / t1**2
        t1_app, t1_int = t1, t1 / r
    elif t1_kind == "intrinsic":
        k = (1.0 - r) / (r * t1)
        dk_dr, dk_dt1 = -1.0 / (r * r * t1), -(1.0 - r) / (r * t1**2)
        t1_app, t1_int = r * t1, t1
    else:
        raise KineticsInputError("t1_kind", "must be 'apparent' or 'intrinsic'", value=t1_kind)
    err = None
    if ratio_err is not None or t1_err_s is not None:
        err = math.hypot(dk_dr * (ratio_err or 0.0), dk_dt1 * (t1_err_s or 0.0))
    return SaturationTransfer(k, err, r, ratio_err, t1, t1_err_s, t1_kind, t1_app, t1_int)


@dataclass(frozen=True)
class InversionTransfer:
    """The fitted two-site inversion-transfer time course; k is k(A→B), A the inverted site."""

    k_per_s: float
    k_err_per_s: float | None
    k_reverse_per_s: float
    k_reverse_err_per_s: float | None
    t1_s: tuple[float, float]
    t1_err_s: tuple[float | None, float | None]
    m0: tuple[float, float]
    m_start: tuple[float, float]
    delays_s: FloatArray
    fitted: FloatArray  # 2×N: model magnetizations of A and B at the delays
    residuals: FloatArray  # 2×N
    rms_residual: float
    chi2_reduced: float | None  # only when the intensities' σ was given
    notes: tuple[str, ...]


def _course(x: FloatArray, delays: FloatArray) -> FloatArray:
    """M_A and M_B (2×N) for parameters (k, R1_A, R1_B, M0_A, M0_B, M_A(0), M_B(0))."""
    k, r1a, r1b, m0a, m0b, ma0, mb0 = x
    p = np.array([m0a, m0b]) / (m0a + m0b)
    rates = np.array([[0.0, k], [k * m0a / m0b, 0.0]])
    prop = propagators(rates, [r1a, r1b], p, delays)
    m0 = np.array([m0a, m0b])
    return (m0[None, :] + prop @ (np.array([ma0, mb0]) - m0)).T


def fit_inversion_transfer(
    delays_s: ArrayLike,
    inverted: ArrayLike,
    partner: ArrayLike,
    *,
    intensity_err: float | None = None,
) -> InversionTransfer:
    """Fit k(A→B), both T1s and M0s to the magnetizations of the inverted site A and its
    partner B after a selective inversion of A."""
    from scipy.optimize import least_squares

    t, ma, mb = _course_inputs(delays_s, inverted, partner)
    sigma = 1.0 if intensity_err is None else float(intensity_err)
    if not (math.isfinite(sigma) and sigma > 0):
        raise KineticsInputError("intensity_err", "σ must be > 0", value=intensity_err)
    data = np.stack([ma, mb])

    def residuals(x: FloatArray) -> FloatArray:
        return ((_course(x, t) - data) / sigma).ravel()

    scale = float(np.max(np.abs(data)))
    lower = [0.0, 0.0, 0.0, 1e-9 * scale, 1e-9 * scale, -np.inf, -np.inf]
    best = None
    for x0 in _starts(t, ma, mb):
        res = least_squares(residuals, x0, bounds=(lower, np.inf), x_scale="jac", method="trf")
        if res.success and (best is None or res.cost < best.cost):
            best = res
    if best is None:
        raise KineticsInputError("magnetization", "the inversion-transfer fit did not converge")
    return _transfer_result(best.x, best.jac, best.fun, t, data, intensity_err is not None)


def _course_inputs(
    delays_s: ArrayLike, inverted: ArrayLike, partner: ArrayLike
) -> tuple[FloatArray, FloatArray, FloatArray]:
    t = np.asarray(delays_s, dtype=float).ravel()
    ma = np.asarray(inverted, dtype=float).ravel()
    mb = np.asarray(partner, dtype=float).ravel()
    if not (t.size == ma.size == mb.size):
        raise KineticsInputError(
            "magnetization", f"{t.size} delays but {ma.size} and {mb.size} intensities"
        )
    if not (np.isfinite(t).all() and np.isfinite(ma).all() and np.isfinite(mb).all()):
        raise KineticsInputError("magnetization", "every delay and intensity must be finite")
    if (t < 0).any():
        raise KineticsInputError("delays", "delays must be ≥ 0 s", value=float(t.min()))
    if np.unique(t).size < 4:
        raise KineticsInputError(
            "delays", f"need at least 4 different delays for 7 parameters; got {np.unique(t).size}"
        )
    if not (np.max(mb) > 0 and np.max(ma) > np.min(ma)):
        raise KineticsInputError(
            "magnetization", "the inverted site must recover and the partner must be positive"
        )
    order = np.argsort(t)
    return t[order], ma[order], mb[order]


def _starts(t: FloatArray, ma: FloatArray, mb: FloatArray) -> list[FloatArray]:
    """A few starts: M0 from the last delay, M(0) from the first, R1 from the span, and k at
    three scales around the recovery rate (the fit is cheap; local minima are not)."""
    span = float(t[-1] - t[0]) or float(t[-1])
    m0a, m0b = max(float(ma[-1]), 1e-6 * float(np.max(np.abs(ma)))), max(float(mb[-1]), 1e-12)
    r1 = 3.0 / span
    return [
        np.array([k, r1, r1, m0a, m0b, float(ma[0]), float(mb[0])])
        for k in (0.3 / span, 3.0 / span, 30.0 / span)
    ]


def _transfer_result(
    x: FloatArray, jac: FloatArray, fun: FloatArray, t: FloatArray, data: FloatArray, absolute: bool
) -> InversionTransfer:
    cov: Covariance = covariance(jac, fun, absolute=absolute)
    k, r1a, r1b, m0a, m0b, ma0, mb0 = (float(v) for v in x)
    if k <= 0:
        raise KineticsInputError(
            "magnetization",
            "the fit ran to k = 0: no transfer to the partner is seen (its signal shows no "
            "dip); the exchange is too slow for these delays and T1s",
        )
    k_err = cov.sigma(0)
    rev, rev_err = k * m0a / m0b, None
    if cov.matrix is not None:
        g = np.array([m0a / m0b, 0, 0, k / m0b, -k * m0a / m0b**2, 0, 0])
        rev_err = math.sqrt(max(float(g @ cov.matrix @ g), 0.0))
    notes = []
    if k_err is not None and k_err > 0.5 * k:
        notes.append("k is poorly determined (σ above half its value): add delays near 1/k")
    fitted = _course(x, t)
    return InversionTransfer(
        k_per_s=k,
        k_err_per_s=k_err,
        k_reverse_per_s=rev,
        k_reverse_err_per_s=rev_err,
        t1_s=(1.0 / r1a if r1a > 0 else math.inf, 1.0 / r1b if r1b > 0 else math.inf),
        t1_err_s=tuple(  # type: ignore[arg-type]
            None if s is None or r <= 0 else s / r**2
            for s, r in ((cov.sigma(1), r1a), (cov.sigma(2), r1b))
        ),
        m0=(m0a, m0b),
        m_start=(ma0, mb0),
        delays_s=t,
        fitted=fitted,
        residuals=data - fitted,
        rms_residual=float(np.sqrt(np.mean((data - fitted) ** 2))),
        chi2_reduced=cov.chi2_reduced if absolute else None,
        notes=tuple(notes),
    )
