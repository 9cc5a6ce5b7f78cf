"""Stored texts read again: what unit a bare imported number must have had, and equal floats.

An imported cell may hold a bare number whose unit came from the column header, which is not
kept; reading it again (for ``edit``, which re-normalizes the whole entry, and for ``verify``,
which checks every stored float against its text) tries the usual units of its quantity and
takes the one that reproduces the stored value.
"""

from __future__ import annotations

import math
from functools import lru_cache

from registry.errors import UnitError
from registry.record.units import ParsedValue, parse_value

#: units a column header may have given to a bare number, per quantity, tried in this order
UNIT_CANDIDATES: dict[str, tuple[str, ...]] = {
    "energy": ("kJ/mol", "kcal/mol", "J/mol", "cal/mol", "cm-1", "eV"),
    "temperature": ("K", "°C", "°F"),
    "entropy": ("J/(mol*K)", "cal/(mol*K)"),
    "frequency": ("Hz", "kHz"),
    "shift": ("Hz", "ppm"),
    "field": ("MHz",),
    "rate": ("1/s", "1/min", "1/h"),
    "dimensionless": ("",),
}


def same_value(a: float | None, b: float | None) -> bool:
    """Equal floats (to 1e-9 relative, as re-parsing the same text gives) or both missing."""
    if a is None or b is None:
        return a is None and b is None
    return math.isclose(a, b, rel_tol=1e-9, abs_tol=1e-12)


def reread(
    text: str, quantity: str, stored: float | None, *, field: str, mhz: float | None = None
) -> tuple[ParsedValue | None, str | None]:
    """Read a stored text again: (the value, the header unit it must have had, if it had none).

    ``(None, None)`` when no reading reproduces the stored value.
    """
    try:
        parsed = parse_value(text, quantity, field=field, spectrometer_mhz=mhz)
        return parsed, None
    except UnitError as exc:
        if "no unit given" not in exc.reason:
            return None, None
    for unit in UNIT_CANDIDATES[quantity]:
        try:
            parsed = parse_value(
                text, quantity, field=field, default_unit=unit, spectrometer_mhz=mhz
            )
        except UnitError:
            continue
        if stored is None or same_value(parsed.value, stored):
            return parsed, unit
    return None, None


_NO_UNIT = "no unit"


@lru_cache(maxsize=200_000)
def _parse_cached(
    text_value: str, quantity: str, mhz: float | None, default_unit: str | None
) -> tuple[float, float | None] | str | None:
    """(value, error) of a text; ``_NO_UNIT`` for a bare number without a default; None if
    unreadable. Keyed on the text, so the many rows that share a text are read once."""
    try:
        parsed = parse_value(text_value, quantity, default_unit=default_unit, spectrometer_mhz=mhz)
    except UnitError as exc:
        return _NO_UNIT if "no unit given" in exc.reason else None
    return parsed.value, parsed.error


def reread_value(
    text_value: str, quantity: str, stored: float | None, mhz: float | None = None
) -> tuple[float, float | None] | None:
    """(value, uncertainty) of a stored text as :func:`reread` finds it, parses cached (for
    reading every text of a registry); None when no reading reproduces the stored value."""
    read = _parse_cached(text_value, quantity, mhz, None)
    if read != _NO_UNIT:
        return read if isinstance(read, tuple) else None
    for unit in UNIT_CANDIDATES[quantity]:
        candidate = _parse_cached(text_value, quantity, mhz, unit)
        if isinstance(candidate, tuple) and (stored is None or same_value(candidate[0], stored)):
            return candidate
    return None


def shift_mhz(proton_mhz: float | None, nucleus: str | None) -> float | None:
    """The frequency at which a Δν in ppm becomes Hz: the observed nucleus' own (as on entry)."""
    if proton_mhz is None or not nucleus or nucleus == "1H":
        return proton_mhz
    from registry.record.nuclei import observe_frequency_mhz

    return observe_frequency_mhz(proton_mhz, nucleus)
