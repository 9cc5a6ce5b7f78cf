"""Values with uncertainties written the way papers write them: 62.3(4) or 62.3 ± 0.4.

The uncertainty decides how many digits the value keeps. It is quoted to at most two
significant digits (JCGM 100:2008, "Guide to the expression of uncertainty in measurement",
§7.2.6): two when its leading digit is 1 (0.14 → "14" in the last places), one otherwise
(0.3, 2, 40), which keeps "± 0.3" as chemists report it (common practice, no source). An
uncertainty that rounds up to a power of ten keeps two digits (0.96 → 1.0). The concise
notation "62.3(4)", where the digits in parentheses are the uncertainty in the last digits of
the value, is GUM §7.2.2's second form.

Rounding is half-up on the shortest decimal text of the float (so 62.25 shows as 62.3), which is
what a reader doing it by hand would get.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from decimal import ROUND_HALF_UP, Decimal


@dataclass(frozen=True)
class Rounded:
    """A value and its uncertainty rounded together; ``decimals`` may be negative (tens, …)."""

    value: str
    error: str | None
    error_digits: str | None
    decimals: int


def _quantize(x: float, decimals: int) -> Decimal:
    return Decimal(repr(float(x))).quantize(Decimal(1).scaleb(-decimals), rounding=ROUND_HALF_UP)


def _text(d: Decimal, decimals: int) -> str:
    if decimals >= 0:
        return f"{d:.{decimals}f}"
    return f"{d:.0f}"


def error_decimals(error: float, digits: int | None = None) -> int:
    """How many decimals an uncertainty keeps (negative: round to tens, hundreds …).

    ``digits`` (1 or 2) forces that many significant digits instead of the rule above.
    """
    exponent = math.floor(math.log10(error))
    if digits is not None:
        if digits not in (1, 2):
            raise ValueError("an uncertainty keeps 1 or 2 significant digits")
        top = int(_quantize(error / 10.0 ** (exponent - digits + 1), 0))
        if top >= 10**digits:  # 0.96 with one digit → 1: one decade up
            exponent += 1
        return digits - 1 - exponent
    lead2 = int(_quantize(error / 10.0 ** (exponent - 1), 0))  # 10 … 100
    if lead2 >= 100:  # 0.0996 → 0.10: one decade up
        exponent += 1
        lead2 = 10
    if lead2 < 20:
        return 1 - exponent
    lead1 = int(_quantize(error / 10.0**exponent, 0))  # 2 … 10
    if lead1 >= 10:  # 0.96 → 1.0: a leading 1 again, so two digits
        return 1 - (exponent + 1)
    return -exponent


def round_with_error(
    value: float,
    error: float | None,
    *,
    default_decimals: int = 1,
    error_digits: int | None = None,
) -> Rounded:
    """Round ``value`` to the precision its ``error`` allows (or to ``default_decimals``)."""
    if error is None or not math.isfinite(error) or error <= 0:
        d = _quantize(value, default_decimals)
        return Rounded(_text(d, default_decimals), None, None, default_decimals)
    decimals = error_decimals(error, error_digits)
    v = _quantize(value, decimals)
    e = _quantize(error, decimals)
    digits = str(int(e.scaleb(decimals))) if decimals > 0 else _text(e, decimals)
    text = _text(v, decimals)
    if text.startswith("-") and v == 0:
        text = text[1:]
    return Rounded(text, _text(e, decimals), digits, decimals)


def format_uncertain(
    value: float | None,
    error: float | None,
    *,
    style: str = "paren",
    default_decimals: int = 1,
    minus: str = "-",
    plus_minus: str = " ± ",
    error_digits: int | None = None,
) -> str:
    """``62.3(4)`` (style ``paren``) or ``62.3 ± 0.4`` (style ``pm``); empty text for no value.

    ``error_digits`` (1 or 2) overrides how many significant digits the uncertainty keeps.
    """
    if value is None or not math.isfinite(value):
        return ""
    if style not in ("paren", "pm"):
        raise ValueError(f"unknown uncertainty style {style!r}; use 'paren' or 'pm'")
    r = round_with_error(value, error, default_decimals=default_decimals, error_digits=error_digits)
    number = r.value.replace("-", minus, 1) if r.value.startswith("-") else r.value
    if r.error is None:
        return number
    if style == "paren":
        return f"{number}({r.error_digits})"
    return f"{number}{plus_minus}{r.error}"
