"""Quantiles and tail probabilities the fits need, in plain Python (no scipy on the fit path).

A six-point Eyring fit needs one Student-t quantile and perhaps one χ² tail probability;
importing ``scipy.stats`` for them costs more than half a second, so they are computed here
from published methods:

* Normal quantile: the rational approximation of C. Hastings (Abramowitz & Stegun 26.2.23,
  |error| < 4.5·10⁻⁴) as a start, then Newton steps on ln Q(x) with Q(x) = ½·erfc(x/√2)
  from :func:`math.erfc`, so small tail probabilities keep their relative precision.
* Student-t quantile: the starting value of G. W. Hill, Comm. ACM 13, 619 (1970),
  Algorithm 396 ("Student's t-quantiles"), polished by Newton steps on the exact tail
  probability P(T > t) = ½·I_{ν/(ν+t²)}(ν/2, ½) (Abramowitz & Stegun 26.7.1 with 26.5.27).
  ν = 1 and ν = 2 have closed forms (Cauchy; A&S 26.7.5 rearranged) and use them.
* Regularized incomplete beta I_x(a, b): the continued fraction of A&S 26.5.8, evaluated
  by the modified Lentz method (I. J. Thompson and A. R. Barnett, J. Comput. Phys. 64, 490
  (1986)); for x above (a+1)/(a+b+2) through I_x(a, b) = 1 − I_{1−x}(b, a).
* χ² tail probability Q(ν/2, χ²/2): the regularized incomplete gamma function, by its series
  (A&S 6.5.29) below a+1 and Legendre's continued fraction (A&S 6.5.31) above.

Accuracy (checked against scipy.stats and asymptotic expansions in
tests/test_kinetics_distributions.py): the t quantile within 1e-12 relative for ν ≤ 100 and
within 1e-11 up to ν = 10⁶, over p ∈ [1e-6, 1 − 1e-6]; the normal quantile within 1e-14.
"""

from __future__ import annotations

import math

_EPS = 1e-15
_SQRT2 = math.sqrt(2.0)
_SQRT_2PI = math.sqrt(2.0 * math.pi)
_TINY = 1e-300
_MAX_TERMS = 100_000  # the fractions need ~√max(a, b) terms; ν = 10⁶ takes under 1,000


def normal_quantile(p: float) -> float:
    """z with Φ(z) = p for the standard normal distribution."""
    _check_probability(p)
    if p == 0.5:
        return 0.0
    tail = p if p < 0.5 else 1.0 - p  # Q(x) = tail for the x ≥ 0 we solve for
    x = _hastings(tail)
    for _ in range(50):  # Newton on ln Q(x) − ln tail; two or three steps from Hastings
        q = 0.5 * math.erfc(x / _SQRT2)
        density = math.exp(-0.5 * x * x) / _SQRT_2PI
        step = (math.log(q) - math.log(tail)) * q / density
        x += step
        if abs(step) <= 4 * _EPS * max(x, 1.0):
            break
    return -x if p < 0.5 else x


def _hastings(tail: float) -> float:
    """x with Q(x) ≈ ``tail`` ≤ ½ (A&S 26.2.23, |error| < 4.5·10⁻⁴)."""
    t = math.sqrt(-2.0 * math.log(tail))
    numerator = 2.515517 + t * (0.802853 + t * 0.010328)
    denominator = 1.0 + t * (1.432788 + t * (0.189269 + t * 0.001308))
    return t - numerator / denominator


def student_t_quantile(p: float, dof: float) -> float:
    """t with P(T ≤ t) = p for Student's t with ``dof`` degrees of freedom (dof > 0).

    ``student_t_quantile(0.975, n - 2)`` is the factor of a two-sided 95 % interval.
    """
    _check_probability(p)
    if not dof > 0 or math.isnan(dof):
        raise ValueError(f"degrees of freedom must be > 0; got {dof!r}")
    if p == 0.5:
        return 0.0
    upper = 1.0 - p if p > 0.5 else p  # one-sided tail probability beyond |t|, ≤ ½
    sign = 1.0 if p > 0.5 else -1.0
    if dof == 1.0:  # Cauchy: P(T > t) = ½ − atan(t)/π, so t = cot(π·P)
        return sign / math.tan(math.pi * upper)
    if dof == 2.0:  # P(T > t) = ½·(1 − t/√(t² + 2))
        two = 2.0 * upper
        return sign * math.sqrt(2.0 / (two * (2.0 - two)) - 2.0)
    if math.isinf(dof):
        return sign * -normal_quantile(upper)
    t = _hill_start(2.0 * upper, dof) if dof >= 1.0 else 1.0  # Hill's series needs ν ≥ 1
    return sign * _newton_t(t, upper, dof)


def _hill_start(two_tailed: float, n: float) -> float:
    """|t| with P(|T| > t) = ``two_tailed``: Hill (1970), Algorithm 396 (asymptotic series)."""
    a = 1.0 / (n - 0.5)
    b = 48.0 / (a * a)
    c = ((20700.0 * a / b - 98.0) * a - 16.0) * a + 96.36
    d = ((94.5 / (b + c) - 3.0) / b + 1.0) * math.sqrt(a * math.pi / 2.0) * n
    x = d * two_tailed
    y = x ** (2.0 / n)
    if y > 0.05 + a:  # moderate tails: a correction to the normal deviate
        x = -normal_quantile(0.5 * two_tailed)
        y = x * x
        if n < 5.0:
            c += 0.3 * (n - 4.5) * (x + 0.6)
        c = (((0.05 * d * x - 5.0) * x - 7.0) * x - 2.0) * x + b + c
        y = (((((0.4 * y + 6.3) * y + 36.0) * y + 94.5) / c - y - 3.0) / b + 1.0) * x
        y = a * y * y
        y = math.expm1(y)
    else:  # far tails: the small-probability expansion
        y = ((1.0 / (((n + 6.0) / (n * y) - 0.089 * d - 0.822) * (n + 2.0) * 3.0)
              + 0.5 / (n + 4.0)) * y - 1.0) * (n + 1.0) / (n + 2.0) + 1.0 / y  # fmt: skip
    return math.sqrt(n * y)


def _newton_t(t: float, upper: float, dof: float) -> float:
    """Polish |t| so that P(T > t) = ``upper`` exactly (Newton on the tail, safeguarded)."""
    log_norm = -_log_beta(dof / 2.0, 0.5) - 0.5 * math.log(dof)  # 1/(√ν·B(ν/2, ½))
    lo, hi = 0.0, math.inf  # the root stays bracketed: the tail falls as t grows
    for _ in range(400):  # Newton takes 2–4; doubling from 1 toward a huge t takes more
        diff = student_t_upper_tail(t, dof) - upper
        if diff > 0:
            lo = t
        else:
            hi = t
        density = math.exp(log_norm - (dof + 1.0) / 2.0 * math.log1p(t * t / dof))
        step = diff / density if density > 0 else math.inf
        new = t + step
        if not lo < new < hi:  # Newton left the bracket: bisect (or double) instead
            new = 0.5 * (lo + hi) if math.isfinite(hi) else 2.0 * max(t, 1.0)
        if abs(new - t) <= 4 * _EPS * max(abs(new), 1.0):
            return new
        t = new
    return t


def student_t_upper_tail(t: float, dof: float) -> float:
    """P(T > t) for Student's t with ``dof`` degrees of freedom."""
    t2 = t * t
    x = dof / (dof + t2)
    y = t2 / (dof + t2)  # 1 − x without cancellation
    half = 0.5 * regularized_beta(dof / 2.0, 0.5, x, y)
    return half if t >= 0 else 1.0 - half


def regularized_beta(a: float, b: float, x: float, one_minus_x: float | None = None) -> float:
    """I_x(a, b) for a, b > 0 and 0 ≤ x ≤ 1; pass ``one_minus_x`` when x is close to 1."""
    y = 1.0 - x if one_minus_x is None else one_minus_x
    if x <= 0.0:
        return 0.0
    if y <= 0.0:
        return 1.0
    # ln x from y when x is near 1 (and the other way round): a·ln x with a = 5·10⁵ would
    # otherwise carry the rounding of x times a
    log_x = math.log1p(-y) if y < 0.5 else math.log(x)
    log_y = math.log1p(-x) if x < 0.5 else math.log(y)
    log_front = a * log_x + b * log_y - _log_beta(a, b)
    if x < (a + 1.0) / (a + b + 2.0):
        return math.exp(log_front) * _beta_fraction(a, b, x) / a
    return 1.0 - math.exp(log_front) * _beta_fraction(b, a, y) / b


def _log_beta(a: float, b: float) -> float:
    """ln B(a, b), accurate also when one argument is large (ν = 10⁶ in a t quantile).

    lgamma(a + b) − lgamma(a) cancels about ln a·a of magnitude, losing ~10 digits at
    a = 5·10⁵; with Stirling's series for the remainders (A&S 6.1.40) nothing large is
    subtracted: ln Γ(a) − ln Γ(a+b) = −(a − ½)·ln(1 + b/a) − b·ln(a+b) + b + δ(a) − δ(a+b).
    """
    small, big = min(a, b), max(a, b)
    if big < 10.0:
        return math.lgamma(a) + math.lgamma(b) - math.lgamma(a + b)
    total = big + small
    if small < 10.0:
        head = math.lgamma(small)
    else:
        head = 0.5 * math.log(2.0 * math.pi) + (small - 0.5) * math.log(small) - small
        head += _stirling_remainder(small)
    return (
        head
        - (big - 0.5) * math.log1p(small / big)
        - small * math.log(total)
        + small
        + _stirling_remainder(big)
        - _stirling_remainder(total)
    )


def _stirling_remainder(x: float) -> float:
    """δ(x) = ln Γ(x) − [(x − ½)·ln x − x + ½·ln 2π] for x ≥ 10 (A&S 6.1.41, five terms)."""
    inv = 1.0 / x
    inv2 = inv * inv
    return inv * (1 / 12 - inv2 * (1 / 360 - inv2 * (1 / 1260 - inv2 * (1 / 1680 - inv2 / 1188))))


def _beta_fraction(a: float, b: float, x: float) -> float:
    """The continued fraction of A&S 26.5.8 by the modified Lentz method."""
    qab, qap, qam = a + b, a + 1.0, a - 1.0
    c = 1.0
    d = 1.0 - qab * x / qap
    d = 1.0 / (d if abs(d) > _TINY else _TINY)
    h = d
    for m in range(1, _MAX_TERMS):
        m2 = 2 * m
        for coefficient in (
            m * (b - m) * x / ((qam + m2) * (a + m2)),
            -(a + m) * (qab + m) * x / ((a + m2) * (qap + m2)),
        ):
            d = 1.0 + coefficient * d
            d = 1.0 / (d if abs(d) > _TINY else _TINY)
            c = 1.0 + coefficient / c
            c = c if abs(c) > _TINY else _TINY
            delta = c * d
            h *= delta
        if abs(delta - 1.0) < _EPS:
            return h
    raise ArithmeticError(f"incomplete beta fraction did not converge (a={a}, b={b}, x={x})")


def chi2_upper_tail(chi2: float, dof: float) -> float:
    """P(χ²_dof > chi2): the regularized upper incomplete gamma function Q(dof/2, chi2/2)."""
    if not dof > 0:
        raise ValueError(f"degrees of freedom must be > 0; got {dof!r}")
    if math.isnan(chi2):
        return math.nan
    if chi2 <= 0.0:
        return 1.0
    a, x = dof / 2.0, chi2 / 2.0
    log_front = _log_gamma_front(a, x)
    if x < a + 1.0:  # series for P(a, x) (A&S 6.5.29); Q = 1 − P
        term = total = 1.0 / a
        ap = a
        for _ in range(_MAX_TERMS):
            ap += 1.0
            term *= x / ap
            total += term
            if abs(term) < abs(total) * _EPS:
                return 1.0 - total * math.exp(log_front)
        raise ArithmeticError(f"incomplete gamma series did not converge (a={a}, x={x})")
    # Legendre's continued fraction for Q(a, x) (A&S 6.5.31), modified Lentz
    b = x + 1.0 - a
    c = 1.0 / _TINY
    d = 1.0 / b
    h = d
    for i in range(1, _MAX_TERMS):
        an = -i * (i - a)
        b += 2.0
        d = an * d + b
        d = 1.0 / (d if abs(d) > _TINY else _TINY)
        c = b + an / c
        c = c if abs(c) > _TINY else _TINY
        delta = d * c
        h *= delta
        if abs(delta - 1.0) < _EPS:
            return math.exp(log_front) * h
    raise ArithmeticError(f"incomplete gamma fraction did not converge (a={a}, x={x})")


def _log_gamma_front(a: float, x: float) -> float:
    """ln(xᵃ·e⁻ˣ/Γ(a)); for a ≥ 10 through Stirling's series so that x ≈ a cancels nothing."""
    if a < 10.0:
        return a * math.log(x) - x - math.lgamma(a)
    u = (x - a) / a
    return a * (math.log1p(u) - u) + 0.5 * math.log(a / (2.0 * math.pi)) - _stirling_remainder(a)


def _check_probability(p: float) -> None:
    if not 0.0 < p < 1.0:
        raise ValueError(f"a probability strictly between 0 and 1 is needed; got {p!r}")
