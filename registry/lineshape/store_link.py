"""From fitted rates to the registry: the rate points a measurement holds.

The points are plain dicts; :func:`registry.api.fit_lineshapes` stores them through
:func:`registry.api.add_rate_points` (this module knows nothing of the registry).

Per-temperature fits are what should be stored: each rate is an independent measurement, so the
registry's own Eyring analysis (and anyone re-using the points) sees the real scatter. Rates
from the global fit are tied by the Eyring equation; storing them would make a later Eyring fit
of the stored points circular.
"""

from __future__ import annotations

import json
import math
from collections.abc import Mapping, Sequence
from pathlib import Path
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


def rate_points(
    fits: Sequence[LineShapeFit], series: Mapping[str, Any] | None = None
) -> list[dict[str, Any]]:
    """Rate points {t_k, t_text, k_per_s, k_err_per_s, k_text, fit_json} for
    ``api.add_rate_points``; ``fit_json`` says how each rate was obtained (:func:`fit_record`)
    and keeps the fit's unrounded k and σ(k).

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
        k_text = value_with_error_text(fit.k_per_s, fit.k_err_per_s, "s-1")
        k, k_err = _numbers_of(k_text)
        points.append(
            {
                "t_k": float(fit.t_k),
                "t_text": fit.t_text or f"{float(fit.t_k):.15g} K",
                "k_per_s": k,
                "k_err_per_s": k_err,
                "k_text": k_text,
                "fit_json": fit_json(fit_record(fit, series or {})),
            }
        )
    return points


def _numbers_of(text: str) -> tuple[float, float | None]:
    """The value and error a rate's text says: what is stored is what the text reads as (the
    rounding to the error's second figure moves k by at most 1/40 of its σ), so ``verify``'s
    re-reading of the text finds the stored numbers."""
    words = text.split()
    return float(words[0]), float(words[2]) if words[1] == "±" else None


def fit_record(fit: LineShapeFit, series: Mapping[str, Any]) -> dict[str, Any]:
    """What a stored rate rests on: each site parameter with its value, error and how it was
    set (fitted, held, tied to the series' trend, from the reference line), the spectrum's
    name, the fit's noise and problems, and ``series`` (the settings and trends of the run).

    Kept beside the rate so that a reader years later can tell a rate fitted with the sites
    free from one that leaned on an extrapolated Δν, and check it against the spectrum."""
    return {
        "method": f"line shape, {fit.method}",
        "spectrum": Path(fit.source).name,
        "k_per_s": fit.k_per_s,
        "k_err_per_s": fit.k_err_per_s,
        "parameters": [
            {"name": name, "value": value, "error": error, "how": how}
            for name, value, error, how in fit.parameters
        ],
        "width_hz": fit.width_hz,
        "width_err_hz": fit.width_err_hz,
        "rms": fit.rms,
        "n_points": fit.n_points,
        "problems": list(fit.problems),
        "doubtful": fit.doubtful,
        "series": dict(series),
    }


def fit_json(record: Mapping[str, Any]) -> str:
    """Canonical JSON (sorted keys, no spaces, non-finite numbers as null): the same text in
    the row and in the history, on SQLite and PostgreSQL."""
    return json.dumps(
        _finite(record), sort_keys=True, ensure_ascii=False, separators=(",", ":"), allow_nan=False
    )


def _finite(value: Any) -> Any:
    if isinstance(value, float):
        return value if math.isfinite(value) else None
    if isinstance(value, Mapping):
        return {str(k): _finite(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_finite(v) for v in value]
    return value
