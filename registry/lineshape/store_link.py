"""From fitted rates to the registry: the rate points a measurement holds.

The points are plain dicts; :func:`registry.api.fit_lineshapes` stores them through
:func:`registry.api.add_rate_points` (this module knows nothing of the registry).

Per-temperature fits are what should be stored: each rate is an independent measurement, so the
registry's own Eyring analysis (and anyone re-using the points) sees the real scatter. Rates
from the global fit are tied by the Eyring equation; storing them would make a later Eyring fit
of the stored points circular.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from typing import TYPE_CHECKING, Any

from registry.errors import UsageError

if TYPE_CHECKING:  # the fit modules pull in scipy; keep this one light
    from registry.lineshape.fit_core import LineShapeFit


def value_with_error_text(value: float, error: float | None, unit: str) -> str:
    """``'123.5 ± 4.6 s-1'``: the error to two significant figures and the value to match.

    The text reads back through :func:`registry.record.units.parse_value` to the same numbers.
    """
    if error is None or not math.isfinite(error) or error <= 0:
        return f"{value:.4g} {unit}"
    digits = 1 - math.floor(math.log10(error))  # decimals that keep two significant figures
    if digits > 0:
        return f"{value:.{digits}f} ± {error:.{digits}f} {unit}"
    step = 10.0 ** (-digits)
    return f"{round(value / step) * step:.0f} ± {round(error / step) * step:.0f} {unit}"


def rate_points(fits: Sequence[LineShapeFit]) -> list[dict[str, Any]]:
    """Rate points {t_k, t_text, k_per_s, k_err_per_s, k_text} for ``api.add_rate_points``.

    A failed fit (k at the bound of the search or above κ·k_B·T/h) gives no rate point: its
    message says so in the analysis' notes."""
    points = []
    for fit in fits:
        if fit.failed:
            continue
        if fit.t_k is None:
            raise UsageError(
                f"{fit.source}: no temperature known, so its rate cannot be stored; "
                "give the temperatures of all files (temps)"
            )
        points.append(
            {
                "t_k": float(fit.t_k),
                "t_text": fit.t_text or f"{fit.t_k:.2f} K",
                "k_per_s": float(fit.k_per_s),
                "k_err_per_s": None if fit.k_err_per_s is None else float(fit.k_err_per_s),
                "k_text": value_with_error_text(fit.k_per_s, fit.k_err_per_s, "s-1"),
            }
        )
    return points
