"""Input checks shared by the kinetics functions, vectorized so 10⁶ entries cost little.

A value that cannot be physical (a temperature at or below 0 K, a zero Δν, a population
ratio below 1) raises :class:`KineticsInputError` naming the argument, how many entries
are wrong and the first one. ``NaN`` means "missing" and passes through as ``NaN`` so a
batch with gaps still computes. ``invalid="nan"`` turns bad entries into ``NaN`` instead of
raising, for validation runs that want to flag rows rather than stop.
"""

from __future__ import annotations

from typing import Literal

import numpy as np
from numpy.typing import ArrayLike, NDArray

from registry.errors import FluxledgerError

Invalid = Literal["raise", "nan"]


class KineticsInputError(ValueError, FluxledgerError):
    """A number handed to a kinetics function is outside what the physics allows."""

    exit_code = 1

    def __init__(
        self, field: str, reason: str, *, index: int | None = None, value: object = None
    ) -> None:
        super().__init__(field, reason, index, value)
        self.field = field
        self.reason = reason
        self.index = index
        self.value = value

    def __str__(self) -> str:
        where = f" (entry {self.index}: {self.value!r})" if self.index is not None else ""
        if self.index is None and self.value is not None:
            where = f" (got {self.value!r})"
        return f"{self.field}: {self.reason}{where}"


def as_float_array(field: str, values: ArrayLike) -> NDArray[np.float64]:
    """``values`` as a float array; text or objects that are not numbers are a clear error."""
    try:
        return np.asarray(values, dtype=np.float64)
    except (TypeError, ValueError) as exc:
        raise KineticsInputError(field, "expected numbers", value=_short(values)) from exc


def checked(
    field: str,
    values: ArrayLike,
    *,
    lower: float = 0.0,
    inclusive: bool = False,
    invalid: Invalid = "raise",
    what: str | None = None,
) -> NDArray[np.float64]:
    """Return ``values`` as floats after checking ``values > lower`` (or ``>=``); NaN passes.

    ``what`` phrases the rule for the message, e.g. "must be above 0 K".
    """
    arr = as_float_array(field, values)
    with np.errstate(invalid="ignore"):
        ok = (arr >= lower) if inclusive else (arr > lower)
    bad = ~(ok & np.isfinite(arr)) & ~np.isnan(arr)
    if not bad.any():
        return arr
    if invalid == "nan":
        return np.where(bad, np.nan, arr)
    rule = what or f"must be {'≥' if inclusive else '>'} {lower:g}"
    flat = np.flatnonzero(bad.ravel())
    first = int(flat[0])
    value = float(arr.ravel()[first])
    if arr.ndim == 0:
        raise KineticsInputError(field, rule, value=value)
    count = f"; {flat.size} of {arr.size} values are not" if arr.size > 1 else ""
    raise KineticsInputError(field, rule + count, index=first, value=value)


def check_finite(field: str, values: ArrayLike, *, invalid: Invalid = "raise") -> NDArray:
    """Any finite number is allowed (a coupling constant may be negative); inf is not."""
    arr = as_float_array(field, values)
    bad = np.isinf(arr)
    if not bad.any():
        return arr
    if invalid == "nan":
        return np.where(bad, np.nan, arr)
    raise KineticsInputError(field, "must be finite", value=_short(values))


def optional_error(field: str, values: ArrayLike | None, invalid: Invalid = "raise") -> NDArray:
    """An uncertainty: absent means 0, otherwise it must be ≥ 0."""
    if values is None:
        return np.asarray(0.0)
    return checked(field, values, lower=0.0, inclusive=True, invalid=invalid, what="must be ≥ 0")


def scalar_or_array(values: NDArray) -> float | NDArray:
    """Return a Python float for 0-d results so scalar callers get scalars back."""
    return float(values) if np.ndim(values) == 0 else values


def _short(values: object) -> object:
    """The value itself when its repr is short, else the start of its repr (for messages)."""
    text = repr(values)
    return values if len(text) <= 60 else text[:57] + "..."
