"""The unit layer against outside references (NIST SP 811, CODATA via scipy.constants)."""

from __future__ import annotations

import math

import pytest
import scipy.constants as sc
from hypothesis import given
from hypothesis import strategies as st

from registry.errors import FluxledgerError, UnitError
from registry.record.units import convert, parse_value

# NIST SP 811 (2008), Appendix B.8: calorie (thermochemical) = 4.184 J exactly
CAL_TH_J = 4.184


@pytest.mark.parametrize(
    ("text", "expected_kj_mol"),
    [
        ("14.2 kcal/mol", 14.2 * CAL_TH_J),
        ("14.2 kcal mol-1", 14.2 * CAL_TH_J),
        ("14.2 kcal·mol⁻¹", 14.2 * CAL_TH_J),
        ("14.2 Kcal/mol", 14.2 * CAL_TH_J),
        ("59.4 kJ/mol", 59.4),
        ("59.4 kJ mol^-1", 59.4),
        ("59400 J/mol", 59.4),
        # CODATA: molar energy of a wavenumber = h·c·N_A (scipy.constants)
        ("1200 cm-1", 1200 * 100 * sc.h * sc.c * sc.N_A / 1000),
        # CODATA: 1 eV per molecule = e·N_A J/mol (the Faraday constant, 96485.33 C/mol)
        ("0.6 eV", 0.6 * sc.e * sc.N_A / 1000),
    ],
)
def test_energies(text: str, expected_kj_mol: float) -> None:
    assert parse_value(text, "energy").value == pytest.approx(expected_kj_mol, rel=1e-9)


def test_faraday_constant_cross_check() -> None:
    # CODATA 2018 Faraday constant 96 485.332 12 C/mol (scipy.constants "Faraday constant")
    assert parse_value("1 eV", "energy").value * 1000 == pytest.approx(
        sc.physical_constants["Faraday constant"][0], rel=1e-9
    )


@pytest.mark.parametrize(
    ("text", "expected_k"),
    [
        ("253 K", 253.0),
        ("−20 °C", 253.15),  # Unicode minus; NIST SP 811 (2008) 4.2.1.1: T = t + 273.15
        ("-20 °C", 253.15),
        ("-20 C", 253.15),
        ("-20 ºC", 253.15),
        ("-4 °F", 253.15),  # NIST SP 811 (2008) B.9: T/K = (t/°F + 459.67)/1.8
        ("100 °C", 373.15),
    ],
)
def test_temperatures(text: str, expected_k: float) -> None:
    assert parse_value(text, "temperature").value == pytest.approx(expected_k, abs=1e-9)


def test_temperature_uncertainty_is_a_difference_not_a_temperature() -> None:
    value = parse_value("25 ± 2 °C", "temperature")
    assert value.value == pytest.approx(298.15)
    assert value.error == pytest.approx(2.0)  # ±2 °C is ±2 K, not 275.15 K
    value_f = parse_value("77 ± 9 °F", "temperature")
    assert value_f.value == pytest.approx(298.15)
    assert value_f.error == pytest.approx(5.0)  # 9 °F difference = 5 K (NIST SP 811 B.9)


def test_entropy_units() -> None:
    # e.u. = cal mol⁻¹ K⁻¹ (thermochemical calorie, NIST SP 811 B.8)
    assert parse_value("35 e.u.", "entropy").value == pytest.approx(35 * CAL_TH_J)
    assert parse_value("-35 J K-1 mol-1", "entropy").value == pytest.approx(-35.0)
    assert parse_value("-5 cal/mol/K", "entropy").value == pytest.approx(-5 * CAL_TH_J)


def test_uncertainty_notations() -> None:
    a = parse_value("14.2 ± 0.3 kcal/mol", "energy")
    b = parse_value("14.2(3) kcal/mol", "energy")
    c = parse_value("14.2 +/- 0.3 kcal/mol", "energy")
    for v in (a, b, c):
        assert v.value == pytest.approx(14.2 * CAL_TH_J)
        assert v.error == pytest.approx(0.3 * CAL_TH_J)
    assert parse_value("62.31(12) kJ/mol", "energy").error == pytest.approx(0.12)


def test_shift_in_ppm_needs_the_field() -> None:
    assert parse_value("0.031 ppm", "shift", spectrometer_mhz=400).value == pytest.approx(12.4)
    assert parse_value("12.5 Hz", "shift").value == 12.5
    with pytest.raises(UnitError, match="spectrometer frequency"):
        parse_value("0.031 ppm", "shift")


def test_default_unit_from_header_and_cell_override() -> None:
    assert parse_value("14.2", "energy", default_unit="kcal/mol").value == pytest.approx(59.4128)
    assert parse_value("59.4 kJ/mol", "energy", default_unit="kcal/mol").value == pytest.approx(
        59.4
    )


@pytest.mark.parametrize(
    ("text", "quantity", "reason"),
    [
        ("14", "energy", "no unit given"),
        ("abc", "energy", "no number found"),
        ("300 K", "energy", "is not a molar energy"),
        ("14 kcal/mol", "temperature", "is not a temperature"),
        ("12 kcal", "energy", "lacks 'per mol'"),
        ("12 blorps/mol", "energy", "unknown unit"),
        ("-300 °C", "temperature", "below absolute zero"),
        ("1,200 s-1", "rate", "ambiguous"),
        ("5 Hz", "entropy", "is not an entropy"),
        ("3 ppm", "frequency", "ppm is a shift"),
    ],
)
def test_bad_values_name_field_and_text(text: str, quantity: str, reason: str) -> None:
    with pytest.raises(UnitError) as info:
        parse_value(text, quantity, field="dg")
    message = str(info.value)
    assert message.startswith("dg: cannot read ")
    assert repr(text) in message
    assert reason in message


def test_empty_value() -> None:
    with pytest.raises(UnitError) as info:
        parse_value("  ", "energy", field="dg")
    assert str(info.value) == "dg: cannot read '  ': empty value"


def test_decimal_comma() -> None:
    assert parse_value("14,2 kcal/mol", "energy").value == pytest.approx(14.2 * CAL_TH_J)


def test_convert() -> None:
    assert convert(1.0, "kcal/mol", "kJ/mol") == pytest.approx(CAL_TH_J)
    assert convert(0.0, "°C", "K") == pytest.approx(273.15)


@given(
    st.floats(min_value=-1e4, max_value=1e4, allow_nan=False),
    st.sampled_from(["kcal/mol", "kJ/mol", "cm-1"]),
)
def test_energy_round_trip(value: float, unit: str) -> None:
    parsed = parse_value(f"{value!r} {unit}", "energy")
    back = convert(parsed.value, "kJ/mol", unit)
    assert math.isclose(back, value, rel_tol=1e-9, abs_tol=1e-9)


@given(st.floats(min_value=-273.0, max_value=2000, allow_nan=False))
def test_celsius_round_trip(value: float) -> None:
    kelvin = parse_value(f"{value!r} °C", "temperature").value
    assert math.isclose(kelvin - 273.15, value, abs_tol=1e-9)


@given(
    st.text(max_size=40),
    st.sampled_from(["energy", "temperature", "entropy", "shift", "rate", "field"]),
)
def test_any_text_gives_a_value_or_a_unit_error(text: str, quantity: str) -> None:
    try:
        parsed = parse_value(text, quantity, default_unit=None, spectrometer_mhz=400.0)
    except FluxledgerError as exc:
        assert isinstance(exc, UnitError)
    else:
        assert math.isfinite(parsed.value)


def test_repeated_values_read_once_and_errors_name_their_own_field() -> None:
    first = parse_value("14.2 kcal/mol", "energy", field="dg")
    assert parse_value("14.2 kcal/mol", "energy", field="dh") is first  # read once
    # 1 kcal = 4.184 kJ exactly (thermochemical calorie, NIST SP 811 (2008), B.8)
    assert first.value == pytest.approx(14.2 * 4.184)
    for field in ("dnu", "j"):
        with pytest.raises(UnitError) as caught:
            parse_value("20", "frequency", field=field)
        assert caught.value.field == field


@pytest.mark.parametrize(
    ("text", "quantity"),
    [
        ("1e308 kcal/mol", "energy"),  # finite as written, infinite in kJ/mol (× 4.184)
        ("1e300 ± 1e308 kcal/mol", "energy"),
        ("2e15 K", "temperature"),
        ("1e16 s-1", "rate"),
    ],
)
def test_values_that_would_not_be_finite_or_plausible_are_refused(text: str, quantity: str) -> None:
    with pytest.raises(UnitError) as info:
        parse_value(text, quantity, field="dg")
    assert info.value.field == "dg" and info.value.text == text


def test_the_largest_rates_the_trade_meets_are_kept() -> None:
    # k_B·T/h at 1000 K is ~2.1e13 s⁻¹ (CODATA constants), well inside what is stored
    assert parse_value("2e13 s-1", "rate").value == 2e13
