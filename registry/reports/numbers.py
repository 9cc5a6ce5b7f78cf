"""Values with uncertainties written the way papers write them: 62.3(4) or 62.3 ± 0.4.

The uncertainty decides how many digits the value keeps. It is quoted to at most two
significant digits (JCGM 100:2008, "Guide to the expression of uncertainty in measurement",
§7.2.6); the choice between one and two digits follows the rule of the Particle Data Group's
Review of Particle Physics (introduction, "rounding"; from memory): look at the three leading
digits of the uncertainty — 100–354 keep two digits, 355–949 keep one, 950–999 round up to
1000 and keep two. The concise notation "62.3(4)", where the digits in parentheses are the
uncertainty in the last digits of the value, is GUM §7.2.2's second form.

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


def error_decimals(error: float) -> int:
    """How many decimals an uncertainty keeps (negative: round to tens, hundreds …)."""
    exponent = math.floor(math.log10(error))
    lead3 = int(_quantize(error / 10.0 ** (exponent - 2), 0))
    if lead3 >= 1000:  # 999.6 → 1000: one decade up
        exponent += 1
        lead3 = 100
    if lead3 <= 354:
        significant = 2
    elif lead3 <= 949:
        significant = 1
    else:  # 950–999 round up to 1000 and keep two digits: 0.096 → 0.10
        exponent += 1
        significant = 2
    return significant - 1 - exponent


def round_with_error(value: float, error: float | None, *, default_decimals: int = 1) -> Rounded:
    """Round ``value`` to the precision its ``error`` allows (or to ``default_decimals``)."""
    if error is None or not math.isfinite(error) or error <= 0:
        d = _quantize(value, default_decimals)
        return Rounded(_text(d, default_decimals), None, None, default_decimals)
    decimals = error_decimals(error)
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
) -> str:
    """``62.3(4)`` (style ``paren``) or ``62.3 ± 0.4`` (style ``pm``); empty text for no value."""
    if value is None or not math.isfinite(value):
        return ""
    if style not in ("paren", "pm"):
        raise ValueError(f"unknown uncertainty style {style!r}; use 'paren' or 'pm'")
    r = round_with_error(value, error, default_decimals=default_decimals)
    number = r.value.replace("-", minus, 1) if r.value.startswith("-") else r.value
    if r.error is None:
        return number
    if style == "paren":
        return f"{number}({r.error_digits})"
    return f"{number}{plus_minus}{r.error}"
