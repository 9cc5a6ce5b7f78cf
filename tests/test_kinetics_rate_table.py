"""Reading rate points from tables and command-line text: units in headers or cells, all errors at once."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from registry.errors import FileFormatError, ImportRowError, NotFoundError, UnitError, UsageError
from registry.kinetics.rate_table import parse_point, read_rate_table


def write(tmp_path: Path, name: str, text: str) -> Path:
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


def test_units_in_headers(tmp_path: Path) -> None:
    path = write(tmp_path, "r.csv", "T (°C),k / s-1,σk (s-1)\n10,0.0105,0.001\n25,0.05,0.004\n")
    pts = read_rate_table(path)
    assert np.allclose(pts.t_k, [283.15, 298.15])
    assert np.allclose(pts.k_per_s, [0.0105, 0.05])
    assert np.allclose(pts.k_err_per_s, [0.001, 0.004])


def test_units_in_cells_override_and_convert(tmp_path: Path) -> None:
    # 2.4 min⁻¹ = 0.04 s⁻¹ (NIST SP 811: 1 min = 60 s)
    path = write(tmp_path, "r.tsv", "temperature\tkex\n283.15 K\t0.0105 s-1\n20 °C\t2.4 min-1\n")
    pts = read_rate_table(path)
    assert np.allclose(pts.t_k, [283.15, 293.15])
    assert np.allclose(pts.k_per_s, [0.0105, 0.04])
    assert pts.k_err_per_s is None


def test_semicolon_file_with_decimal_commas(tmp_path: Path) -> None:
    path = write(tmp_path, "r.csv", "T [K];k (s^-1);dk\n300,5;0,131;0,01\n310;0,4;0,02\n")
    pts = read_rate_table(path)
    assert np.allclose(pts.t_k, [300.5, 310.0])
    assert np.allclose(pts.k_per_s, [0.131, 0.4])
    assert np.allclose(pts.k_err_per_s, [0.01, 0.02])  # σk takes the unit of k


def test_suffix_headers_and_inline_errors(tmp_path: Path) -> None:
    path = write(tmp_path, "r.csv", "T_K,k_per_s,comment\n300,0.1 ± 0.01,a\n310,0.2 ± 0.02,b\n")
    pts = read_rate_table(path)
    assert np.allclose(pts.k_err_per_s, [0.01, 0.02])


def test_spreadsheet(tmp_path: Path) -> None:
    pd = pytest.importorskip("pandas")
    path = tmp_path / "rates.xlsx"
    pd.DataFrame({"T (°C)": [10, 20, 30], "k (s-1)": [0.0105, 0.0383, 0.131]}).to_excel(
        path, index=False, sheet_name="run 1"
    )
    pts = read_rate_table(path, sheet="run 1")
    assert np.allclose(pts.t_k, [283.15, 293.15, 303.15])
    with pytest.raises(FileFormatError) as info:
        read_rate_table(path, sheet="nope")
    assert "nope" in str(info.value)


def test_every_bad_row_reported_with_its_number(tmp_path: Path) -> None:
    path = write(tmp_path, "bad.csv", "T (K),k (s-1)\n300,0.1\n310,abc\n-5,0.2\n320,-1\n")
    with pytest.raises(ImportRowError) as info:
        read_rate_table(path)
    lines = str(info.value).splitlines()[1:]
    assert [line.strip() for line in lines] == [
        f"{path}, row 3, column 'k (s-1)': 'abc': no number found",
        f"{path}, row 4, column 'T (K)': '-5': below absolute zero",
        f"{path}, row 5, column 'k (s-1)': '-1': must be > 0",
    ]


@pytest.mark.parametrize(
    ("text", "message"),
    [
        ("", "the file is empty"),
        ("T (K),k (s-1)\n", "no data rows"),
        ("a,b\n1,2\n", "no column for the temperature and the rate constant (headers: 'a', 'b')"),
        ("T,k (s-1)\n300,0.1\n", "column 'T' has no unit: write it in the header, e.g. 'T (K)' or"),
        ("T (K),k (s-1),σk\n300,0.1,0.01\n310,0.2,\n", "σ_k is given for some points but not all"),
        ("T (K),temp (K),k (s-1)\n1,2,3\n", "two columns look like the temperature"),
    ],
)
def test_file_problems(tmp_path: Path, text: str, message: str) -> None:
    path = write(tmp_path, "f.csv", text)
    with pytest.raises(FileFormatError) as info:
        read_rate_table(path)
    assert message in str(info.value)
    assert str(info.value).startswith(str(path))


def test_missing_file(tmp_path: Path) -> None:
    with pytest.raises(NotFoundError):
        read_rate_table(tmp_path / "nothing.csv")


def test_parse_point() -> None:
    assert parse_point("298.15, 0.012") == (298.15, 0.012, None)
    t, k, err = parse_point("25 °C; 0,72 min-1; 0,06 min-1")
    assert (t, k, err) == pytest.approx((298.15, 0.012, 0.001))
    assert parse_point("300 K, 0.1 ± 0.01 s-1")[2] == pytest.approx(0.01)


@pytest.mark.parametrize(
    ("text", "error", "message"),
    [
        ("300", UsageError, "point: cannot read '300': write 'T, k' or 'T; k; σk'"),
        ("25, 0.01", UnitError, "point: cannot read '25, 0.01': 25 K? write the unit"),
        ("300 K, -1", UnitError, "a rate constant must be > 0"),
        ("300 K, 1 Hz, 0 Hz", UnitError, "σk must be > 0"),
    ],
)
def test_parse_point_errors(text: str, error: type, message: str) -> None:
    with pytest.raises(error) as info:
        parse_point(text)
    assert message in str(info.value)
