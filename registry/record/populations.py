"""Populations of two exchanging sites as written → the ratio major/minor.

Kept apart from :mod:`registry.record.entry` because the texts are many (``60:40``, ``3:1``,
``25%``, ``p = 0.25``) and a bare number below 1 is ambiguous: one site's fraction or a
minor/major ratio. Such a number is refused unless the column says which, never guessed.
"""

from __future__ import annotations

import math
import re

from registry.errors import UnitError

_PERCENT = re.compile(r"^(?P<num>\d+(?:[.,]\d*)?|[.,]\d+)\s*%$")
_FRACTION = re.compile(
    r"^(?:p|pa|pb|p_?[ab12]|x|x_?[ab12]|fraction|molefraction|frac)\s*[=:]?\s*"
    r"(?P<num>\d*[.,]\d+|[01])$",
    re.I,
)
#: how a bare number in a population column is meant, when the column's header says
_POPULATION_UNITS = {"%": "percent", "percent": "percent", "fraction": "fraction",
                     "molefraction": "fraction", "ratio": "ratio", "majorminor": "ratio"}  # fmt: skip

POPULATION_HELP = (
    "write a ratio of the two sites ('60:40', '3:1'), the major/minor ratio ('1.5'), one "
    "site's percentage ('25%') or one site's fraction ('p = 0.25')"
)


def population_unit(text: str | None) -> str | None:
    """How a population column's header unit reads bare numbers (percent, fraction, ratio)."""
    if not text:
        return None
    return _POPULATION_UNITS.get(re.sub(r"[^a-z%]", "", text.lower()))


def parse_population_ratio(
    text: str, field_name: str = "population", unit: str | None = None
) -> float:
    """Populations as written → the ratio major/minor (≥ 1).

    ``60:40``, ``3:1``, ``1:3`` and ``60/40`` give the two sites; a bare number ≥ 1 is the
    major/minor ratio; ``25%`` is one site's percentage and ``p = 0.25`` one site's fraction.
    A bare number below 1 could be a fraction of one site (0.25 → 3:1) or a minor/major ratio
    (0.25 → 4:1), so it is refused unless the column says which (``unit``: ``fraction``,
    ``percent`` or ``ratio``, from a header such as ``p_A (fraction)`` or ``population (%)``).
    """
    t = str(text).strip().replace("∶", ":")
    how = population_unit(unit)
    try:
        if ":" in t or ("/" in t and not t.startswith("/")):
            a, b = (_number(x) for x in re.split(r"[:/]", t, maxsplit=1))
            if a <= 0 or b <= 0:
                raise UnitError(field_name, text, "both sites need a population above zero")
            return max(a, b) / min(a, b)
        percent = _PERCENT.match(t)
        if percent or how == "percent":
            share = _number(percent["num"] if percent else t) / 100.0
            return _from_share(share, field_name, text)
        fraction = _FRACTION.match(t)
        if fraction or how == "fraction":
            return _from_share(_number(fraction["num"] if fraction else t), field_name, text)
        x = _number(t)
    except ValueError as exc:
        raise UnitError(field_name, text, POPULATION_HELP) from exc
    if not (x > 0 and math.isfinite(x)):
        raise UnitError(field_name, text, "a population ratio must be positive")
    if x < 1 and how != "ratio":
        raise UnitError(
            field_name,
            text,
            f"ambiguous: {t} could be one site's fraction ({max(x, 1 - x) / min(x, 1 - x):.3g}:1) "
            f"or the minor/major ratio ({1 / x:.3g}:1); {POPULATION_HELP}",
        )
    return max(x, 1.0 / x)


def _number(text: str) -> float:
    value = float(text.strip().replace(",", "."))
    if not math.isfinite(value):
        raise ValueError(text)
    return value


def _from_share(share: float, field_name: str, text: str) -> float:
    """One site's fraction (0 < p < 1) → the ratio of the larger to the smaller population."""
    if not 0.0 < share < 1.0:
        raise UnitError(field_name, text, "one site's share must lie strictly between 0 and 100%")
    return max(share, 1 - share) / min(share, 1 - share)


def legacy_population_ratio(text: str) -> float | None:
    """How entries stored before this reader read a bare number below 1: a site's fraction.
    (Used to keep such stored texts readable; new entries must say what they mean.)"""
    try:
        x = _number(str(text))
    except ValueError:
        return None
    if 0.0 < x < 1.0:
        return max(x, 1 - x) / min(x, 1 - x)
    return None
