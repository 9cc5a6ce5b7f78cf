"""The unit each value was reported in, so findings speak the user's units.

A stored value is a float in the canonical unit plus the text as entered; the text tells how to
show the value back (kcal/mol stays kcal/mol, °C stays °C). Each distinct unit text is looked
up once (pint, through :mod:`registry.record.units`), so 10⁵ texts cost a regular expression
each and a handful of unit look-ups. The unit registry is loaded only when a finding needs a
label (a check that flags nothing does without it).
"""

from __future__ import annotations

import re
from collections.abc import Sequence
from functools import lru_cache

import numpy as np
from numpy.typing import NDArray

#: the leading number (with an optional "(3)" or "± 0.3" uncertainty) of a value as written
_NUMBER_PREFIX = re.compile(
    r"^\s*[-+−–]?(?:\d+(?:[.,]\d*)?|[.,]\d+)(?:[eE][-+]?\d+)?\s*(?:\(\d+\))?\s*"
    r"(?:(?:±|\+/-|\+-|\+/−)\s*(?:\d+(?:[.,]\d*)?|[.,]\d+)(?:[eE][-+]?\d+)?)?\s*"
)
#: the leading number alone
_NUMBER = re.compile(r"^\s*([-+]?(?:\d+(?:[.,]\d*)?|[.,]\d+)(?:[eE][-+]?\d+)?)")


def _missing(text: object) -> bool:
    return text is None or (isinstance(text, float) and text != text)


def unit_part(text: object) -> str | None:
    """What follows the number (and its uncertainty) in a text; None where there is no text."""
    if _missing(text):
        return None
    return _NUMBER_PREFIX.sub("", str(text), count=1).strip()


def leading_number(text: object) -> float:
    """The number a text starts with (a decimal comma read as a point); NaN if none."""
    if _missing(text):
        return float("nan")
    found = _NUMBER.match(str(text))
    return float(found.group(1).replace(",", ".")) if found else float("nan")


_KNOWN_LABELS = {
    "energy": (("kJ/mol", "kJ/mol"), ("kcal/mol", "kcal/mol")),
    "entropy": (("J/(mol*K)", "J/(mol·K)"), ("cal/(mol*K)", "cal/(mol·K)")),
}


@lru_cache(maxsize=256)
def _unit_label(unit_text: str, quantity: str) -> tuple[str, float] | None:
    """A display label and the factor from the canonical unit for a written unit, or None."""
    from registry.record import units

    try:
        units.unit_of(unit_text, quantity)
        factor = units.convert(1.0, units.CANONICAL[quantity], unit_text)
    except Exception:
        return None
    for pint_unit, label in _KNOWN_LABELS.get(quantity, ()):
        if abs(factor - units.convert(1.0, units.CANONICAL[quantity], pint_unit)) < 1e-9:
            return label, factor
    return unit_text, factor


@lru_cache(maxsize=1)
def kcal_per_kj() -> float:
    """kcal/mol per kJ/mol (thermochemical calorie, via the unit registry)."""
    from registry.record import units

    return units.convert(1.0, "kJ/mol", "kcal/mol")


@lru_cache(maxsize=4)
def _alternative_factor(quantity: str) -> float:
    from registry.record import units

    return units.convert(1.0, units.CANONICAL[quantity], _KNOWN_LABELS[quantity][1][0])


def energy_units(texts: Sequence[object], values_kj: Sequence[float]) -> tuple[NDArray, NDArray]:
    """Display label and factor (display = kJ/mol × factor) of each reported energy."""
    return value_units(texts, values_kj, "energy")


def value_units(
    texts: Sequence[object], values: Sequence[float], quantity: str
) -> tuple[NDArray, NDArray]:
    """Display label and factor (display = canonical × factor) of each reported value.

    A text without a unit (the unit came from a spreadsheet header) is matched by the ratio of
    its number to the stored canonical value (kJ/mol or kcal/mol; J or cal per mol·K).
    """
    texts = list(texts)
    stored = np.asarray(values, dtype=float)
    n = len(texts)
    known = _KNOWN_LABELS[quantity]
    labels = np.full(n, known[0][1], dtype=object)
    factors = np.ones(n)
    for i, text in enumerate(texts):
        part = unit_part(text)
        if part:
            found = _unit_label(part, quantity)
            if found is not None:
                labels[i], factors[i] = found
        elif part == "":
            alt = _alternative_factor(quantity)
            with np.errstate(invalid="ignore", divide="ignore"):
                ratio = np.float64(leading_number(text)) / stored[i]
            if abs(ratio - alt) < 1e-3:
                labels[i], factors[i] = known[1][1], alt
    return labels, factors


@lru_cache(maxsize=64)
def _temperature_map(unit_text: str) -> tuple[str, float, float] | None:
    """(label, offset, scale) so that display = offset + scale·K for a written temperature unit."""
    from registry.record import units

    try:
        normal = units.unit_of(unit_text, "temperature")
        zero = units.convert(0.0, "K", normal)
        one = units.convert(1.0, "K", normal)
    except Exception:
        return None
    label = {"degC": "°C", "degF": "°F"}.get(normal, "K")
    return label, zero, one - zero


def temperature_units(texts: Sequence[object]) -> tuple[NDArray, NDArray, NDArray]:
    """Display label, offset and scale (display = offset + scale·K) of each reported temperature."""
    texts = list(texts)
    n = len(texts)
    labels = np.full(n, "K", dtype=object)
    offset = np.zeros(n)
    scale = np.ones(n)
    for i, text in enumerate(texts):
        part = unit_part(text)
        if not part:
            continue
        found = _temperature_map(part)
        if found is None or found[0] == "K":
            continue
        labels[i], offset[i], scale[i] = found
    return labels, offset, scale


def as_temperature(value_k: float, label: str) -> str:
    """A temperature for a message: '333.2 K' or '60.0 °C (333.2 K)'."""
    if label == "K" or value_k != value_k:
        return f"{value_k:.1f} K"
    from registry.record import units

    shown = units.convert(value_k, "K", {"°C": "degC", "°F": "degF"}[label])
    return f"{shown:.1f} {label} ({value_k:.1f} K)"
