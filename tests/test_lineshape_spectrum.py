"""Reading the CSV form of a spectrum, and turning fits into rate points for the registry."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from registry.errors import FileFormatError, UsageError
from registry.lineshape.fit_core import LineShapeFit
from registry.lineshape.spectrum import csv_text, parse_csv_spectrum, read_spectrum
from registry.lineshape.store_link import rate_points, value_with_error_text
from registry.record.units import parse_value


def test_header_metadata_and_units() -> None:
    text = (
        "# temperature: -10 °C\n# observe frequency: 500.13 MHz\n"
        "shift_ppm,intensity\n3.0,1.5\n2.9,2.5\n2.8,0.5\n"
    )
    spec = parse_csv_spectrum(text, "a.csv")
    assert spec.x_unit == "ppm"
    assert spec.t_k == pytest.approx(263.15)
    assert spec.t_text == "-10 °C"
    assert spec.observe_mhz == pytest.approx(500.13)
    np.testing.assert_allclose(spec.frequency_hz(), [1500.39, 1450.377, 1400.364])
    np.testing.assert_allclose(spec.intensity, [1.5, 2.5, 0.5])


@pytest.mark.parametrize(
    ("text", "unit"),
    [
        ("frequency (Hz);intensity\n1,5;2\n2,5;3\n3,5;1\n", "Hz"),  # decimal commas
        ("nu_hz\tI\n1.5\t2\n2.5\t3\n3.5\t1\n", "Hz"),
        ("1.5 2\n2.5 3\n3.5 1\n", None),  # blanks, no header
        ("x,y,extra\n1.5,2,9\n2.5,3,9\n3.5,1,9\n", None),
    ],
)
def test_separators_and_headers(text: str, unit: str | None) -> None:
    spec = parse_csv_spectrum(text, "s.csv")
    np.testing.assert_allclose(spec.x, [1.5, 2.5, 3.5])
    np.testing.assert_allclose(spec.intensity, [2.0, 3.0, 1.0])
    assert spec.x_unit == unit


@pytest.mark.parametrize(
    ("text", "message"),
    [
        ("ppm,i\n1,2\n2,x\n", "s.csv: line 3: cannot read 'x' as a number"),
        ("ppm,i\n1,2\n2\n", "s.csv: line 3: expected two columns (shift, intensity), found '2'"),
        ("ppm,i\n1,2\n3,4\n2,5\n", "s.csv: line 4: the shift column repeats or changes direction"),
        ("ppm,i\n1,2\n1,3\n", "s.csv: line 3: the shift column repeats or changes direction"),
        ("# only a comment\n", "s.csv: no data rows"),
        ("ppm,i\n1,2\n", "s.csv: a spectrum needs at least two points"),
        ("ppm,i\n1,2\n2,nan\n", "s.csv: line 3: cannot read 'nan' as a number"),
        ("# temperature: hot\nppm,i\n1,2\n2,3\n", "s.csv: line 1: temperature: cannot read"),
    ],
)
def test_bad_csv_names_file_and_line(text: str, message: str) -> None:
    with pytest.raises(FileFormatError) as info:
        parse_csv_spectrum(text, "s.csv")
    assert str(info.value).startswith(message)


def test_unknown_unit_and_missing_field_are_usage_errors() -> None:
    spec = parse_csv_spectrum("1,2\n2,3\n", "n.csv")
    with pytest.raises(UsageError, match="abscissa unit is unknown"):
        spec.frequency_hz()
    with pytest.raises(UsageError, match="no spectrometer frequency"):
        spec.with_x_unit("ppm").frequency_hz()
    np.testing.assert_allclose(spec.with_x_unit("ppm").frequency_hz(400.0), [400.0, 800.0])


def test_files_on_disk(tmp_path: Path) -> None:
    with pytest.raises(FileFormatError, match="no such file"):
        read_spectrum(tmp_path / "missing.csv")
    empty = tmp_path / "empty.csv"
    empty.write_text("  \n")
    with pytest.raises(FileFormatError, match="the file is empty"):
        read_spectrum(empty)
    binary = tmp_path / "b.csv"
    binary.write_bytes(b"\x00\x01\x02")
    with pytest.raises(FileFormatError, match="binary file"):
        read_spectrum(binary)


@settings(max_examples=50, deadline=None)
@given(
    ys=st.lists(st.floats(-1e6, 1e6, allow_nan=False), min_size=2, max_size=60),
    unit=st.sampled_from(["ppm", "Hz"]),
)
def test_csv_round_trip(ys: list[float], unit: str) -> None:
    x = np.linspace(5.0, -1.0, len(ys))
    text = csv_text(x, np.array(ys), unit, {"temperature": "250 K"})
    spec = parse_csv_spectrum(text, "r.csv")
    np.testing.assert_allclose(spec.x, x, rtol=1e-8, atol=1e-12)
    np.testing.assert_allclose(spec.intensity, ys, rtol=1e-8, atol=1e-300)
    assert spec.x_unit == unit and spec.t_k == 250.0


def _fit(t_k: float | None, k: float, err: float | None) -> LineShapeFit:
    return LineShapeFit(
        source="a.csv", t_k=t_k, t_text=None if t_k is None else f"{t_k} K", k_per_s=k,
        k_err_per_s=err, ln_k=np.log(k), ln_k_err=None if err is None else err / k,
        width_hz=1.0, width_err_hz=None, offset_hz=0.0, offset_err_hz=None, area=1.0,
        baseline_at_centre=0.0, baseline_slope_per_hz=0.0, rms=0.01, n_points=100,
        n_params=6, converged=True, message="ok",
    )  # fmt: skip


def test_rate_points_read_back_as_the_same_numbers() -> None:
    """What is stored is what the text says (``verify`` re-reads texts to 1e-9); the fit's
    unrounded k and σ stay in the fit record."""
    points = rate_points([_fit(250.0, 123.456, 4.567), _fit(260.0, 12345.6, 456.0)])
    keys = {"t_k", "t_text", "k_per_s", "k_err_per_s", "k_text", "fit_json"}
    assert [set(p) for p in points] == [keys] * 2
    assert points[0]["k_text"] == "123.5 ± 4.6 s-1"
    assert points[1]["k_text"] == "12350 ± 460 s-1"
    for p, k in zip(points, (123.456, 12345.6), strict=True):
        parsed = parse_value(p["k_text"], "rate")
        assert parsed.value == pytest.approx(p["k_per_s"], rel=1e-12)
        assert parsed.error == pytest.approx(p["k_err_per_s"], rel=1e-12)
        assert parse_value(p["t_text"], "temperature").value == p["t_k"]
        assert json.loads(p["fit_json"])["k_per_s"] == k


def test_rate_texts() -> None:
    assert value_with_error_text(0.012341, 0.00067, "s-1") == "0.01234 ± 0.00067 s-1"
    assert value_with_error_text(8.7414, None, "s-1") == "8.741 s-1"
    assert value_with_error_text(58.5, 0.25, "kJ/mol") == "58.50 ± 0.25 kJ/mol"


def test_rates_without_temperature_cannot_be_stored() -> None:
    with pytest.raises(UsageError, match="no temperature known"):
        rate_points([_fit(None, 10.0, 1.0)])
