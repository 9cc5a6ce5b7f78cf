"""``calc transfer``: saturation transfer (Forsén–Hoffman) and the inversion-transfer fit,
against the published relations derived here and a two-site Bloch–McConnell simulation done
here with scipy.linalg.expm.

Saturation transfer (S. Forsén and R. A. Hoffman, J. Chem. Phys. 39, 2892 (1963)). With the
partner B saturated (M_B = 0), the observed site A obeys

    dM_A/dt = −(M_A − M0_A)/T1 − k·M_A          (T1: A's intrinsic T1, k = k(A→B))

so M_A relaxes with the rate 1/T1_sat = 1/T1 + k towards the steady state
M_ss = M0_A·(1/T1)/(1/T1 + k), i.e. ratio r = M_ss/M0_A = T1_sat/T1. Then:

* from T1_sat (the T1 of A measured while B is saturated, the usual experiment):
  1/T1 = r/T1_sat, so k = 1/T1_sat − 1/T1 = (1 − r)/T1_sat;
* from the intrinsic T1: 1/T1_sat = 1/(r·T1), so k = 1/(r·T1) − 1/T1 = (1/T1)·(1/r − 1)
  = (1 − r)/(r·T1).

The two differ by the factor r: reading one T1 as the other is a slip the CLI keeps apart with
two option names.
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.linalg import expm
from typer.testing import CliRunner

from registry import api
from registry.cli.calc import app as calc_app
from registry.errors import UsageError
from registry.kinetics.checks import KineticsInputError

runner = CliRunner()


def calc(*args: str):  # type: ignore[no-untyped-def]
    return runner.invoke(calc_app, ["transfer", *args])


def saturated_course(k: float, t1: float, times: np.ndarray) -> np.ndarray:
    """M_A/M0_A after B is saturated at t = 0, from the equation above written as a linear
    system with a constant term: d/dt [M_A, 1] = [[−(1/T1 + k), 1/T1], [0, 0]]·[M_A, 1]."""
    gen = np.array([[-(1.0 / t1 + k), 1.0 / t1], [0.0, 0.0]])
    return np.array([(expm(gen * t) @ np.array([1.0, 1.0]))[0] for t in times])


# --- saturation transfer -----------------------------------------------------------------


def test_forsen_hoffman_with_t1_measured_under_saturation() -> None:
    data = json.loads(calc("--t1", "1.2 s", "--ratio", "0.42", "--json").stdout)
    # k = (1 − r)/T1_sat, derived in the module docstring
    assert data["k_per_s"] == pytest.approx((1 - 0.42) / 1.2, rel=1e-12)
    assert data["t1_given"] == "apparent"
    assert data["t1_intrinsic_s"] == pytest.approx(1.2 / 0.42, rel=1e-12)
    assert data["k_convention"] == "per-site"


def test_forsen_hoffman_with_intrinsic_t1() -> None:
    data = json.loads(calc("--t1-intrinsic", "2.0 s", "--ratio", "42 %", "--json").stdout)
    # k = (1/T1)·(1/r − 1), Forsén & Hoffman's form with the intrinsic T1
    assert data["k_per_s"] == pytest.approx((1 / 2.0) * (1 / 0.42 - 1), rel=1e-12)
    assert data["t1_given"] == "intrinsic"
    assert data["t1_apparent_s"] == pytest.approx(0.42 * 2.0, rel=1e-12)


def test_simulated_saturation_experiment_recovers_k() -> None:
    k, t1 = 0.8, 2.0
    times = np.linspace(0.0, 20.0, 401)
    course = saturated_course(k, t1, times)
    ratio = float(course[-1])  # steady state after 20 s ≫ T1_sat
    # T1_sat from the simulated approach: ln((M − M_ss)/(M0 − M_ss)) = −t/T1_sat
    early = times < 3.0
    slope = np.polyfit(times[early], np.log(course[early] - ratio), 1)[0]
    t1_sat = -1.0 / slope
    res = api.calc_transfer(ratio=ratio, t1=f"{t1_sat} s")
    assert res.k_per_s == pytest.approx(k, rel=1e-6)
    res = api.calc_transfer(ratio=ratio, t1_intrinsic=t1)
    assert res.k_per_s == pytest.approx(k, rel=1e-6)


def test_sigma_by_monte_carlo() -> None:
    r, sr, t1, st1 = 0.42, 0.02, 1.2, 0.05
    res = api.calc_transfer(ratio=r, t1=t1, ratio_err=sr, t1_err=st1)
    rng = np.random.default_rng(7)
    draws = (1 - rng.normal(r, sr, 20000)) / rng.normal(t1, st1, 20000)
    # 20000 draws: the σ of a σ is ≈ 0.5 %; the division's curvature adds < 1 % here: 3 %
    assert res.k_err_per_s == pytest.approx(float(np.std(draws)), rel=0.03)


def test_temperature_gives_the_eyring_barrier() -> None:
    from scipy import constants as codata

    res = api.calc_transfer(ratio="0.42", t1="1.2 s", temperature="25 °C")
    k, t = (1 - 0.42) / 1.2, 298.15
    # ΔG‡ = RT·ln(k_B·T/(h·k)) (H. Eyring, J. Chem. Phys. 3, 107 (1935)), CODATA constants
    expected = codata.R * t * math.log(codata.Boltzmann * t / (codata.Planck * k)) / 1000
    assert res.dg.kj_mol == pytest.approx(expected, rel=1e-10)


@settings(max_examples=80, deadline=None)
@given(st.floats(0.01, 50.0), st.floats(0.05, 20.0))
def test_property_both_t1_options_give_the_same_k(k: float, t1: float) -> None:
    ratio = (1 / t1) / (1 / t1 + k)  # the steady state derived above
    t1_sat = 1 / (1 / t1 + k)
    a = api.calc_transfer(ratio=ratio, t1=t1_sat).k_per_s
    b = api.calc_transfer(ratio=ratio, t1_intrinsic=t1).k_per_s
    assert a == pytest.approx(k, rel=1e-9)
    assert b == pytest.approx(k, rel=1e-9)


@pytest.mark.parametrize(
    ("args", "code", "message"),
    [
        (["--t1", "1.2 s", "--ratio", "1.3"], 1, "M_ss/M0 must be > 0 and ≤ 1"),
        (["--t1", "1.2 s", "--ratio", "0"], 1, "M_ss/M0 must be > 0 and ≤ 1"),
        (["--t1", "1.2", "--ratio", "0.4"], 1, "t1: cannot read '1.2': no unit given"),
        (["--t1", "-1 s", "--ratio", "0.4"], 1, "T1 must be > 0 s"),
        (["--ratio", "0.4"], 2, "give one T1 of the observed site"),
        (["--t1", "1 s", "--t1-intrinsic", "2 s", "--ratio", "0.4"], 2, "give one T1"),
        (["--t1", "1 s"], 2, "give the ratio M_ss/M0 with a T1"),
    ],
)
def test_bad_saturation_input(args: list[str], code: int, message: str) -> None:
    result = calc(*args)
    assert result.exit_code == code
    assert result.stdout == ""
    assert message in result.stderr and "Traceback" not in result.stderr


# --- inversion transfer: a Bloch–McConnell time course simulated here --------------------


def bloch_mcconnell(
    k_ab: float, pa: float, pb: float, r1: tuple[float, float], m_start: np.ndarray,
    m0: np.ndarray, times: np.ndarray,
) -> np.ndarray:  # fmt: skip
    """M(t) = M0 + expm(L·t)·(M(0) − M0) with L = [[−R1A − k_AB, k_BA], [k_AB, −R1B − k_BA]],
    k_BA = k_AB·p_A/p_B (H. M. McConnell, J. Chem. Phys. 28, 430 (1958))."""
    k_ba = k_ab * pa / pb
    lmat = np.array([[-r1[0] - k_ab, k_ba], [k_ab, -r1[1] - k_ba]])
    return np.array([m0 + expm(lmat * t) @ (m_start - m0) for t in times])


def _course_file(tmp_path: Path, noise: float, seed: int = 11) -> Path:
    times = np.geomspace(0.005, 6.0, 20)
    m0 = np.array([60.0, 40.0])
    course = bloch_mcconnell(1.5, 0.6, 0.4, (0.7, 0.9), np.array([-55.0, 40.0]), m0, times)
    course += np.random.default_rng(seed).normal(0.0, noise, course.shape)
    lines = ["delay (ms),NCH3 cis,NCH3 trans"]
    lines += [f"{t * 1000:.6g},{a:.6f},{b:.6f}" for t, (a, b) in zip(times, course, strict=True)]
    path = tmp_path / "inversion.csv"
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    return path


def test_inversion_transfer_fit_recovers_k(tmp_path: Path) -> None:
    path = _course_file(tmp_path, noise=0.3)
    result = calc(str(path), "--json", "--intensity-err", "0.3")
    assert result.exit_code == 0, result.stderr
    data = json.loads(result.stdout)
    assert data["method"] == "inversion transfer (two-site Bloch–McConnell fit)"
    assert data["inverted_column"] == "NCH3 cis"
    k, err = data["k_per_s"], data["k_err_per_s"]
    assert abs(k - 1.5) < 3 * err and err < 0.1 * k  # seeded noise: within 3σ, σ meaningful
    assert data["k_reverse_per_s"] == pytest.approx(k * data["m0_inverted"] / data["m0_partner"])
    assert data["t1_inverted_s"] == pytest.approx(1 / 0.7, rel=0.1)
    assert data["m0_inverted"] == pytest.approx(60.0, rel=0.02)
    assert len(data["points"]) == 20 and data["points"][0]["t_s"] == pytest.approx(0.005)


def test_inversion_transfer_without_noise_is_exact(tmp_path: Path) -> None:
    res = api.calc_transfer(file=str(_course_file(tmp_path, noise=0.0)))
    assert res.k_per_s == pytest.approx(1.5, rel=1e-5)
    assert res.k_reverse_per_s == pytest.approx(1.5 * 0.6 / 0.4, rel=1e-5)
    assert res.t1_s == pytest.approx((1 / 0.7, 1 / 0.9), rel=1e-5)


def test_inverted_column_can_be_named(tmp_path: Path) -> None:
    path = _course_file(tmp_path, noise=0.0)
    swapped = path.read_text(encoding="utf-8").splitlines()
    rows = [",".join([r.split(",")[0], r.split(",")[2], r.split(",")[1]]) for r in swapped]
    path.write_text("\n".join(rows) + "\n", encoding="utf-8")
    res = api.calc_transfer(file=str(path), inverted="NCH3 cis")
    assert res.columns == ("NCH3 cis", "NCH3 trans")
    assert res.k_per_s == pytest.approx(1.5, rel=1e-5)


@pytest.mark.parametrize(
    ("content", "message"),
    [
        ("delay (ms),A,B\n0,-50,40\n10,-40,39\n20,-30,38\n", "3 different time(s)"),
        ("delay (ms),A\n0,-50\n10,-40\n20,-30\n40,-10\n", "found 1 intensity column(s)"),
        ("A,B\n-50,40\n-40,39\n", "no time column"),
        ("delay (ms),A,B\n0,-50,40\n-10,-40,39\n20,x,38\n40,-10,37\n", "row 3, column"),
    ],
)
def test_bad_inversion_files(tmp_path: Path, content: str, message: str) -> None:
    path = tmp_path / "bad.csv"
    path.write_text(content, encoding="utf-8")
    result = calc(str(path))
    assert result.exit_code == 1
    assert message in result.stderr and "bad.csv" in result.stderr
    assert "Traceback" not in result.stderr


def test_negative_delay_and_text_cell_named_together(tmp_path: Path) -> None:
    path = tmp_path / "bad.csv"
    path.write_text("delay (ms),A,B\n0,-50,40\n-10,-40,39\n20,x,38\n40,-10,37\n", "utf-8")
    result = calc(str(path))
    assert result.stderr == (
        "error: 2 problem(s) in the input; nothing was written\n"
        f"  {path}, row 3, column 'delay (ms)': '-10': a time cannot be negative\n"
        f"  {path}, row 4, column 'A': 'x': no number found\n"
    )


def test_file_and_ratio_together_is_a_usage_error(tmp_path: Path) -> None:
    with pytest.raises(UsageError):
        api.calc_transfer(file=str(_course_file(tmp_path, 0.0)), ratio=0.4, t1=1.0)
    with pytest.raises(KineticsInputError):
        api.calc_transfer(ratio=0.4, t1=0.0)
