"""Plain words for a line-shape fit whose rate should not be trusted without a look.

Every check names the parameter and what to do (hold the width, add a reference window, narrow
the region, tie the sites to the series); none repeats an optimiser's own text. A fit with any of
these problems is *doubtful*: its rate is shown but not stored unless the caller says so.

* k–width correlation above :data:`MAX_CORRELATION` (or k and the width not separable at all):
  near the fast- and slow-exchange limits a faster exchange and a broader line look alike.
* k not determined (σ of ln k above 1, or none): the spectrum fixes no rate.
* residuals not noise-like: the Durbin–Watson statistic of consecutive residuals over the points
  that carry signal, d ≈ 2 ± 2/√n for white noise (Durbin & Watson, Biometrika 37, 409 (1950);
  the large-n σ from memory); a smooth misfit makes neighbours alike and d small. Zero-filled or
  apodised spectra have correlated noise and can be flagged falsely: fit spectra as recorded.
"""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import NDArray

#: |correlation| of ln k with the width above which k is not pinned by the data
MAX_CORRELATION = 0.95
#: Durbin–Watson z below which the residuals are called not noise-like (white noise: < 0.2 %)
MIN_DW_Z = -3.0
#: points carrying signal: the model's line above this fraction of its tallest point
SIGNAL_FRACTION = 0.02


def durbin_watson_z(residuals: NDArray[np.float64]) -> tuple[float, float]:
    """d = Σ(eₜ − eₜ₋₁)²/Σeₜ² and its z against white noise, (d − 2)/(2/√n)."""
    n = len(residuals)
    d = float(np.sum(np.diff(residuals) ** 2) / np.sum(residuals**2))
    return d, (d - 2.0) / (2.0 / math.sqrt(n))


def residual_problem(resid: NDArray[np.float64], signal: NDArray[np.float64]) -> str | None:
    """The Durbin–Watson check over the points where the fitted lines (no baseline) carry signal."""
    big = np.abs(signal) > SIGNAL_FRACTION * float(np.abs(signal).max())
    n = int(big.sum())
    if n < 20:
        return None
    d, z = durbin_watson_z(resid[big])
    if z >= MIN_DW_Z:
        return None
    return (
        f"residuals not noise-like: Durbin–Watson d = {d:.2f} over the lines where noise gives "
        f"2.00 ± {2 / math.sqrt(n):.2f}; the model misses part of the spectrum: narrow the "
        "region to the exchanging lines, or let the shifts and populations vary"
    )


def width_problem(corr: float | None) -> str | None:
    """k and a fitted (not measured) width: too strongly correlated, or not separable (None)."""
    if corr is not None and abs(corr) <= MAX_CORRELATION:
        return None
    size = "≈ ±1" if corr is None else f"{corr:+.2f}"
    return (
        f"k–width correlation {size}: this spectrum cannot tell a faster exchange from a "
        "broader line; hold the width or add a reference window"
    )


K_UNDETERMINED = (
    "k not determined: the spectrum fixes no rate (slow- or fast-exchange limit); hold the "
    "width, add a reference window or tie Δν and the populations to the series"
)
