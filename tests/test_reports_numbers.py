"""Uncertainty notation: digits kept, concise (parenthesis) and ± forms, round trip through units."""

from __future__ import annotations

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from registry.record.units import parse_value
from registry.reports.numbers import error_decimals, format_uncertain, round_with_error


def test_gum_concise_notation_example() -> None:
    # JCGM 100:2008 (GUM) §7.2.2: m_S = 100,021 47 g with u_c = 0,35 mg is written
    # "m_S = 100,021 47(35) g" (second form) or with ± (fourth form, for U)
    # (the GUM allows one or two digits, §7.2.6; two are asked for here)
    assert format_uncertain(100.02147, 0.00035, error_digits=2) == "100.02147(35)"
    assert format_uncertain(100.02147, 0.00035, style="pm", error_digits=2) == (
        "100.02147 ± 0.00035"
    )
    assert format_uncertain(100.02147, 0.00035) == "100.0215(4)"  # our default: one digit
    assert format_uncertain(62.3, 0.96, error_digits=1) == "62(1)"


@pytest.mark.parametrize(
    ("value", "error", "expected"),
    [
        # the two rounding examples of the Particle Data Group's Review of Particle Physics
        # (introduction; from memory), which our rule reproduces too:
        (0.827, 0.119, "0.83 ± 0.12"),
        (0.827, 0.367, "0.8 ± 0.4"),
        # an uncertainty that rounds up to a power of ten keeps two digits
        (62.3, 0.0996, "62.30 ± 0.10"),
        (62.3, 0.96, "62.3 ± 1.0"),
        # leading digit 2…9: one digit, as chemists write "± 0.3" (common practice, no source)
        (74.0, 0.3, "74.0 ± 0.3"),
        (20.9, 0.2, "20.9 ± 0.2"),
        (62.34, 0.4, "62.3 ± 0.4"),
    ],
)
def test_rounding_rule(value: float, error: float, expected: str) -> None:
    assert format_uncertain(value, error, style="pm") == expected


def test_paren_digits_apply_to_last_places() -> None:
    assert format_uncertain(62.34, 0.4) == "62.3(4)"
    assert format_uncertain(-45.2, 3.0) == "-45(3)"
    assert format_uncertain(-45.2, 1.3) == "-45.2(13)"
    assert format_uncertain(1234.5, 37.0) == "1230(40)"  # tens: the value is rounded to tens


def test_half_up_on_decimal_text() -> None:
    # 62.25 is stored as 62.249999…; a reader rounding the written number gets 62.3
    assert format_uncertain(62.25, None) == "62.3"
    assert format_uncertain(-0.04, 0.4, style="pm") == "0.0 ± 0.4"  # no "-0.0"


def test_no_value_and_bad_style() -> None:
    assert format_uncertain(None, 0.1) == ""
    assert format_uncertain(float("nan"), 0.1) == ""
    with pytest.raises(ValueError, match="unknown uncertainty style"):
        format_uncertain(1.0, 0.1, style="brackets")


@settings(max_examples=300, deadline=None)
@given(
    value=st.floats(min_value=-1e4, max_value=1e4, allow_nan=False),
    error=st.floats(min_value=1e-4, max_value=1e3, allow_nan=False),
    style=st.sampled_from(["paren", "pm"]),
)
def test_written_text_reads_back_through_the_unit_parser(
    value: float, error: float, style: str
) -> None:
    """What we write, registry.record.units reads back: same rounded value and uncertainty."""
    text = format_uncertain(value, error, style=style)
    parsed = parse_value(f"{text} kJ/mol", "energy")
    decimals = error_decimals(error)
    step = 10.0 ** (-decimals)
    assert abs(parsed.value - value) <= 0.5 * step * (1 + 1e-9) + 1e-9 * abs(value)
    assert parsed.error is not None
    # one digit only from a leading 2 up: rounding moves the uncertainty by at most 0.5/1.95
    assert 0.74 * error <= parsed.error <= 1.26 * error
    rounded = round_with_error(value, error)
    assert rounded.error is not None and rounded.error_digits is not None
    assert math.isclose(parsed.error, float(rounded.error), rel_tol=1e-12)
    significant = rounded.error_digits.replace(".", "").lstrip("0")
    assert 1 <= len(significant.rstrip("0") or "1") <= 2
