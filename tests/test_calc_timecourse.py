"""``calc timecourse``: racemization and equilibration time courses simulated here with numpy,
and ΔG‡ by the Eyring equation written here with CODATA constants (scipy.constants).

Racemization: each inversion of one molecule (rate constant k_enant) removes one enantiomer
and adds the other, so d ee/dt = −2·k_enant·ee and ee(t) = ee0·exp(−k_rac·t) with
k_rac = 2·k_enant (e.g. K. A. Connors, Chemical Kinetics (VCH 1990), ch. 3, reversible first
order with equal rate constants; from memory). Two isomers P ⇌ Q: the fraction of P relaxes
with k_f + k_r towards x_eq = k_r/(k_f + k_r) (same source).
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from scipy import constants as codata
from typer.testing import CliRunner

from registry import api
from registry.cli.calc import app as calc_app
from registry.errors import FileFormatError, ImportRowError, UsageError

runner = CliRunner()


def eyring_dg_kj(k: float, t: float, kappa: float = 1.0) -> float:
    """ΔG‡ = RT·ln(κ·k_B·T/(h·k)) (H. Eyring, J. Chem. Phys. 3, 107 (1935)), CODATA constants."""
    return codata.R * t * math.log(kappa * codata.Boltzmann * t / (codata.Planck * k)) / 1000


def write(path: Path, header: str, rows: list[tuple[float, float]]) -> Path:
    path.write_text(
        header + "\n" + "".join(f"{a:.10g},{b:.10g}\n" for a, b in rows), encoding="utf-8"
    )
    return path


K_RAC = 2.0e-4  # s⁻¹: an invented atropisomer at 60 °C (t½ ≈ 58 min)


def racemization_rows(noise: float, seed: int = 3) -> list[tuple[float, float]]:
    t_min = np.array([0, 5, 10, 20, 30, 45, 60, 90, 120, 150, 180, 240], dtype=float)
    ee = 97.0 * np.exp(-K_RAC * t_min * 60.0)
    ee += np.random.default_rng(seed).normal(0.0, noise, ee.size)
    return list(zip(t_min.tolist(), ee.tolist(), strict=True))


def test_racemization_from_ee_percent(tmp_path: Path) -> None:
    path = write(tmp_path / "rac.csv", "t (min),ee (%)", racemization_rows(0.0))
    result = runner.invoke(calc_app, ["timecourse", str(path), "--temperature", "60 °C", "--json"])
    assert result.exit_code == 0, result.stderr
    data = json.loads(result.stdout)
    assert data["k_rac_per_s"] == pytest.approx(K_RAC, rel=1e-7)
    assert data["k_per_s"] == pytest.approx(K_RAC / 2, rel=1e-7)  # k_enant = k_rac/2
    assert data["k_convention"] == "enantiomerization"
    assert data["half_life_s"] == pytest.approx(math.log(2) / K_RAC, rel=1e-7)
    assert data["ee0"] == pytest.approx(0.97, rel=1e-7)
    assert data["T_K"] == pytest.approx(333.15)
    # the barrier belongs to one molecule's k (k_enant); k_rac would lower it by RT·ln 2
    assert data["dg_kj_mol"] == pytest.approx(eyring_dg_kj(K_RAC / 2, 333.15), rel=1e-7)
    assert eyring_dg_kj(K_RAC / 2, 333.15) - eyring_dg_kj(K_RAC, 333.15) == pytest.approx(
        codata.R * 333.15 * math.log(2) / 1000
    )
    assert data["time_column"] == "t (min)" and data["value_column"] == "ee (%)"
    assert data["n_points"] == 12


def test_racemization_with_noise_within_its_sigma(tmp_path: Path) -> None:
    path = write(tmp_path / "rac.csv", "t (min),ee (%)", racemization_rows(0.4))
    res = api.calc_timecourse(str(path), temperature="333.15 K")
    assert abs(res.k_obs_per_s - K_RAC) < 3 * res.k_obs_err_per_s
    assert res.k_obs_err_per_s < 0.05 * K_RAC
    assert res.k_err_per_s == pytest.approx(res.k_obs_err_per_s / 2)
    assert res.dg.kj_mol == pytest.approx(eyring_dg_kj(res.k_per_s, 333.15), rel=1e-10)
    # σ(ΔG‡) from σk: ∂ΔG‡/∂k = −RT/k (differentiate the Eyring equation)
    expected = codata.R * 333.15 / 1000 * res.k_err_per_s / res.k_per_s
    assert res.dg.err_kj_mol == pytest.approx(expected, rel=1e-6)


def test_residual_scatter_sigma_by_monte_carlo(tmp_path: Path) -> None:
    rng = np.random.default_rng(99)
    t_min = np.linspace(0, 240, 15)
    clean = 0.9 * np.exp(-K_RAC * t_min * 60)
    ks, sigmas = [], []
    for i in range(200):
        y = clean + rng.normal(0.0, 0.01, clean.size)
        path = write(tmp_path / f"r{i}.csv", "t (min),ee", list(zip(t_min, y, strict=True)))
        res = api.calc_timecourse(str(path))
        ks.append(res.k_obs_per_s)
        sigmas.append(res.k_obs_err_per_s)
    # 200 fits: the spread of k and the median reported σ agree to ≈ 10 % (σ of a σ ≈ 5 %;
    # the reported σ comes from each set's own scatter): 20 % allowed
    assert float(np.median(sigmas)) == pytest.approx(float(np.std(ks, ddof=1)), rel=0.2)
    assert float(np.mean(ks)) == pytest.approx(K_RAC, rel=0.02)


def test_unequal_isomers_fraction(tmp_path: Path) -> None:
    k_f, k_r = 3.0e-4, 1.0e-4  # P → Q and Q → P, s⁻¹
    x_eq = k_r / (k_f + k_r)
    t_h = np.array([0, 0.25, 0.5, 1, 1.5, 2, 3, 4, 6, 8])
    x = x_eq + (1.0 - x_eq) * np.exp(-(k_f + k_r) * t_h * 3600)
    path = write(tmp_path / "eq.csv", "time / h,fraction (%)", list(zip(t_h, 100 * x, strict=True)))
    res = api.calc_timecourse(str(path), temperature="25 °C")
    assert res.quantity == "fraction"
    assert res.k_obs_per_s == pytest.approx(k_f + k_r, rel=1e-7)
    assert res.k_per_s == pytest.approx(k_f, rel=1e-6)
    assert res.k_reverse_per_s == pytest.approx(k_r, rel=1e-6)
    assert res.equilibrium == pytest.approx(x_eq, rel=1e-7) and res.equilibrium_fitted
    assert res.half_life.seconds == pytest.approx(math.log(2) / (k_f + k_r), rel=1e-7)
    assert res.dg.kj_mol == pytest.approx(eyring_dg_kj(k_f, 298.15), rel=1e-7)
    assert res.dg_reverse.kj_mol == pytest.approx(eyring_dg_kj(k_r, 298.15), rel=1e-7)
    # detailed balance: ΔG‡(P→Q) − ΔG‡(Q→P) = RT·ln(k_r/k_f) = ΔG°(P→Q)
    diff = res.dg.kj_mol - res.dg_reverse.kj_mol
    assert diff == pytest.approx(codata.R * 298.15 * math.log(k_r / k_f) / 1000, rel=1e-6)
    fixed = api.calc_timecourse(str(path), x_eq="25 %")
    assert fixed.k_per_s == pytest.approx(k_f, rel=1e-7) and not fixed.equilibrium_fitted


def test_fraction_column_may_name_its_isomer(tmp_path: Path) -> None:
    t_h = np.array([0, 1, 2, 4, 8, 16])
    x = 0.3 + 0.7 * np.exp(-1e-4 * t_h * 3600)  # x_eq 0.3, k_obs 1e-4 s⁻¹
    path = write(
        tmp_path / "eq.csv", "time (h),fraction E (%)", list(zip(t_h, 100 * x, strict=True))
    )
    res = api.calc_timecourse(str(path))
    assert res.columns == ("time (h)", "fraction E (%)")
    assert res.k_per_s == pytest.approx(0.7e-4, rel=1e-6)  # k(E→Z) = (1 − x_eq)·k_obs


def test_kappa_enters_the_barrier(tmp_path: Path) -> None:
    path = write(tmp_path / "rac.csv", "t (min),ee (%)", racemization_rows(0.0))
    res = api.calc_timecourse(str(path), temperature="60 °C", kappa=0.5)
    assert res.dg.kj_mol == pytest.approx(eyring_dg_kj(K_RAC / 2, 333.15, kappa=0.5), rel=1e-7)


def test_text_output_names_the_convention(tmp_path: Path) -> None:
    path = write(tmp_path / "rac.csv", "t (min),ee (%)", racemization_rows(0.0))
    result = runner.invoke(calc_app, ["timecourse", str(path), "--temperature", "60 °C"])
    assert result.exit_code == 0
    out = result.stdout
    assert out.startswith("Racemization time course: 'ee (%)' against 't (min)'\n")
    assert "  k_rac                   2.00e-04 ± " in out
    assert "ΔG‡ is from k_enant = k_rac/2, the rate constant of one molecule" in out


# --- bad files: file, row, column and text named; exit 1 (data), 2 (usage) --------------


@pytest.mark.parametrize(
    ("content", "expected"),
    [
        (
            "t (min),purity\n0,98\n10,90\n20,81\n",
            "error: {path}: no ee or fraction column (headers: 't (min)', 'purity'); name one "
            "e.g. 'ee (%)' or 'fraction'\n",
        ),
        (
            "ee (%)\n98\n90\n81\n",
            "error: {path}: no time column (headers: 'ee (%)'); name it e.g. 't (min)'\n",
        ),
        (
            "t (min),ee (%)\n0,98\n10,ninety\n20,81\n",
            "error: 1 problem(s) in the input; nothing was written\n"
            "  {path}, row 3, column 'ee (%)': 'ninety': no number found\n",
        ),
        (
            "t (min),ee (%)\n0,98\n",
            "error: {path}: 1 different time(s) in 1 data row(s): a first-order fit (amplitude "
            "and k) needs at least 3\n",
        ),
        (
            "t (min),ee (%)\n-5,98\n10,90\n20,81\n",
            "error: 1 problem(s) in the input; nothing was written\n"
            "  {path}, row 2, column 't (min)': '-5': a time cannot be negative\n",
        ),
        (
            "t (min),ee\n0,98\n10,90\n20,81\n",
            "error: 3 problem(s) in the input; nothing was written\n"
            "  {path}, row 2, column 'ee': '98': outside -1…1 (as a fraction); if these are "
            "percentages, write '%' in the header\n"
            "  {path}, row 3, column 'ee': '90': outside -1…1 (as a fraction); if these are "
            "percentages, write '%' in the header\n"
            "  {path}, row 4, column 'ee': '81': outside -1…1 (as a fraction); if these are "
            "percentages, write '%' in the header\n",
        ),
        (
            "t,ee (%)\n0,98\n",
            "error: 1 problem(s) in the input; nothing was written\n"
            "  {path}, row 2, column 't': '0': no unit given; write one, e.g. '0 s'\n",
        ),
    ],
)
def test_bad_files(tmp_path: Path, content: str, expected: str) -> None:
    path = tmp_path / "course.csv"
    path.write_text(content, encoding="utf-8")
    result = runner.invoke(calc_app, ["timecourse", str(path)])
    assert result.exit_code == 1
    assert result.stdout == ""
    assert result.stderr == expected.format(path=path)


def test_usage_errors(tmp_path: Path) -> None:
    path = write(tmp_path / "rac.csv", "t (min),ee (%)", racemization_rows(0.0))
    result = runner.invoke(calc_app, ["timecourse", str(path), "--quantity", "yield"])
    assert result.exit_code == 2
    assert result.stderr == "error: quantity: 'yield' is neither 'ee' nor 'fraction'\n"
    result = runner.invoke(calc_app, ["timecourse", str(path), "--x-eq", "0.3"])
    assert result.exit_code == 2
    assert "x_eq belongs to a fraction time course" in result.stderr
    with pytest.raises(FileFormatError):
        api.calc_timecourse(str(tmp_path / "missing.csv"))
    with pytest.raises(UsageError):
        api.calc_timecourse(str(path), quantity="yield")
    bad = write(tmp_path / "bad.csv", "t (min),ee (%)", [(0, 98), (-1, 90), (2, 80)])
    with pytest.raises(ImportRowError):
        api.calc_timecourse(str(bad))


def test_flat_course_is_refused(tmp_path: Path) -> None:
    path = write(tmp_path / "flat.csv", "t (min),ee (%)", [(0, 98), (10, 98), (20, 98), (30, 98)])
    result = runner.invoke(calc_app, ["timecourse", str(path)])
    assert result.exit_code == 1
    assert "no decay toward equilibrium is seen" in result.stderr


# --- properties ----------------------------------------------------------------------------

UNITS = {"s": 1.0, "min": 60.0, "h": 3600.0}


@settings(
    max_examples=40, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture]
)
@given(
    st.floats(1e-5, 1e-2),
    st.floats(0.3, 0.98),
    st.integers(0, 2**32 - 1),
)
def test_property_time_unit_does_not_change_k(
    tmp_path: Path, k: float, ee0: float, seed: int
) -> None:
    times_s = np.linspace(0.0, 3.0 / k, 12)
    ee = ee0 * np.exp(-k * times_s) + np.random.default_rng(seed).normal(0, 0.003, 12)
    results = []
    for unit, scale in UNITS.items():
        rows = list(zip((times_s / scale).tolist(), ee.tolist(), strict=True))
        path = write(tmp_path / f"course_{unit}.csv", f"t ({unit}),ee", rows)
        results.append(api.calc_timecourse(str(path)).k_obs_per_s)
    assert results[1] == pytest.approx(results[0], rel=1e-6)
    assert results[2] == pytest.approx(results[0], rel=1e-6)
    assert results[0] == pytest.approx(k, rel=0.1)  # 12 points over 3 decay times, 0.3 % noise
