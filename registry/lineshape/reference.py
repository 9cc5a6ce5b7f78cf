"""The intrinsic line width measured on a non-exchanging signal of the same spectrum.

Field inhomogeneity and T₂ broaden every line of one spectrum alike, so a singlet that takes no
part in the exchange (a solvent or internal-standard line, a methyl group far away) measures the
width the exchanging lines would have without exchange, at that temperature and shim. The
window holding it is fitted with one Lorentzian of unit-area form (w/2π)/((ν − ν₀)² + (w/2)²),
its area and a straight baseline; w is the full width at half height (Hz) with its standard
error. Across a series the widths can be tied to one value: their weighted mean, its error
widened by the scatter when the scatter is larger than the errors say (Birge ratio).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray
from scipy.optimize import least_squares

from registry.lineshape.fit_core import LineShapeFitError, covariance, std_err

FloatArray = NDArray[np.float64]


@dataclass(frozen=True)
class ReferenceWidth:
    """The width of the reference line of one spectrum (or the series' tied value)."""

    width_hz: float
    width_err_hz: float | None
    centre_hz: float
    source: str
    how: str = "reference line"

    def to_dict(self) -> dict[str, object]:
        return {
            "width_hz": self.width_hz,
            "width_err_hz": self.width_err_hz,
            "centre_hz": self.centre_hz,
            "source": self.source,
            "how": self.how,
        }


def lorentzian(freq: FloatArray, centre: float, width: float) -> FloatArray:
    """Unit-area Lorentzian of full width ``width`` at half height (Hz)."""
    half = 0.5 * width
    return (half / math.pi) / ((freq - centre) ** 2 + half * half)


def fit_reference(
    freq_hz: FloatArray, intensity: FloatArray, window_hz: tuple[float, float], source: str
) -> ReferenceWidth:
    """Fit one Lorentzian and a straight baseline to the window; its width with σ."""
    freq = np.asarray(freq_hz, float)
    keep = (freq >= min(window_hz)) & (freq <= max(window_hz))
    x, y = freq[keep], np.asarray(intensity, float)[keep]
    if len(x) < 12:
        raise LineShapeFitError(
            source,
            f"the reference window holds {len(x)} points: too few to measure a line width; "
            "widen it or check its unit",
        )
    order = np.argsort(x)
    x, y = x[order], y[order]
    scale = float(np.abs(y).max()) or 1.0
    y = y / scale
    mid, half_span = 0.5 * (x[0] + x[-1]), 0.5 * (x[-1] - x[0])
    u = (x - mid) / half_span
    base = float(np.median(np.concatenate([y[:5], y[-5:]])))
    top = int(np.argmax(y))
    above = np.nonzero(y - base >= 0.5 * (y[top] - base))[0]
    w0 = max(float(x[above[-1]] - x[above[0]]), 2.0 * (x[1] - x[0]))
    a0 = (y[top] - base) * math.pi * w0 / 2.0

    def residuals(theta: FloatArray) -> FloatArray:
        c, ln_w, a, b0, b1 = theta
        return a * lorentzian(x, c, math.exp(ln_w)) + b0 + b1 * u - y

    result = least_squares(
        residuals, np.array([x[top], math.log(w0), a0, base, 0.0]), method="lm", x_scale="jac"
    )
    c, ln_w, a, *_ = result.x
    width = math.exp(ln_w)
    if a <= 0 or not min(x) <= c <= max(x) or width > 2 * (x[-1] - x[0]):
        raise LineShapeFitError(
            source, "no single line found in the reference window; check its limits"
        )
    ssr = float(result.fun @ result.fun)
    cov = covariance(result.jac, ssr, len(x))
    err = std_err(cov, 1)
    return ReferenceWidth(width, None if err is None else width * err, float(c), source)


def tie_widths(widths: Sequence[ReferenceWidth]) -> ReferenceWidth:
    """One width for the whole series: the weighted mean, its σ widened by the Birge ratio."""
    values = np.array([w.width_hz for w in widths])
    errs = [w.width_err_hz for w in widths]
    if any(e is None or e <= 0 for e in errs) or len(values) < 2:
        mean = float(values.mean())
        spread = float(values.std(ddof=1) / math.sqrt(len(values))) if len(values) > 1 else None
        return ReferenceWidth(mean, spread, math.nan, "series", "tied (mean of the series)")
    mean, var = weighted_mean(values, errs)  # type: ignore[arg-type]  (no None: checked)
    return ReferenceWidth(mean, math.sqrt(var), math.nan, "series", "tied (weighted mean)")


def weighted_mean(values: Sequence[float], sigma: Sequence[float]) -> tuple[float, float]:
    """Mean and its variance, widened by the Birge ratio when the scatter exceeds the errors."""
    y, w = np.asarray(values, float), 1.0 / np.asarray(sigma, float) ** 2
    mean = float(np.sum(w * y) / np.sum(w))
    var = 1.0 / float(np.sum(w))
    if len(y) > 1:
        var *= max(float(np.sum(w * (y - mean) ** 2)) / (len(y) - 1), 1.0)
    return mean, var
