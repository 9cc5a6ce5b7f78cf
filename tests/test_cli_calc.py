"""``fluxledger calc``: exit codes, exact text, JSON keys with units, and the mounted app."""

from __future__ import annotations

import json
import math
import shutil
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest
from scipy import constants as codata
from typer.testing import CliRunner

from registry.cli.calc import app as calc_app

runner = CliRunner()
KCAL = 4.184  # thermochemical calorie, NIST SP 811 (2008) B.8
R_KJ = codata.R / 1000  # CODATA 2018 via scipy.constants


def eyring_rate(dg_kj_mol: float, t_k: float) -> float:
    """k = (k_B·T/h)·exp(−ΔG‡/RT) (H. Eyring, J. Chem. Phys. 3, 107 (1935)), CODATA constants;
    written here so no expected rate comes from the code under test."""
    return codata.Boltzmann * t_k / codata.Planck * math.exp(-dg_kj_mol / (R_KJ * t_k))


def dg_from_dh_ds(dh_kj_mol: float, ds_j_mol_k: float, t_k: float) -> float:
    """ΔG‡ = ΔH‡ − T·ΔS‡ (Gibbs), kJ/mol."""
    return dh_kj_mol - t_k * ds_j_mol_k / 1000


def calc(*args: str):  # type: ignore[no-untyped-def]
    return runner.invoke(calc_app, list(args))


def calc_json(*args: str) -> dict:
    result = calc(*args, "--json")
    assert result.exit_code == 0, result.stderr
    return json.loads(result.stdout)


def test_coalescence_text() -> None:
    result = calc("coalescence", "--tc", "-12 °C", "--dnu", "0.045 ppm", "--mhz", "600")
    assert result.exit_code == 0
    assert result.stderr == ""
    assert result.stdout == (
        "Coalescence, equal populations (Gutowsky–Holm)\n"
        "  Tc          261.15 ± 2.00 K  (-12.0 °C)\n"
        "  Δν          27.0 Hz at 600 MHz\n"
        "  k_c         60.0 s⁻¹\n"
        "  ΔG‡(Tc)     54.78 ± 0.44 kJ/mol  (13.09 ± 0.10 kcal/mol)\n"
        "  error from  Tc ±0.44, Δν ±0.00 kJ/mol\n"
        "note: no Tc uncertainty given: ±2 K assumed (typical for coalescence)\n"
        "note: no Δν uncertainty given: taken as 0\n"
    )


def test_coalescence_json_against_guenther_form() -> None:
    data = calc_json("coalescence", "--tc", "27 °C", "--dnu", "100 Hz", "--tc-err", "1 K")
    # ΔG‡ = 19.14·Tc·(10.32 + log10(Tc/k_c)) J/mol (H. Günther, NMR Spectroscopy, 3rd ed.,
    # Wiley-VCH 2013, dynamic NMR chapter; from memory), k_c = π·Δν/√2
    k_c = math.pi * 100.0 / math.sqrt(2.0)
    expected = 19.14 * 300.15 * (10.32 + math.log10(300.15 / k_c)) / 1000
    assert data["dg_kj_mol"] == pytest.approx(expected, rel=1e-3)
    assert data["k_c_per_s"] == pytest.approx(k_c)
    assert data["tc_k"] == pytest.approx(300.15)
    assert data["tc_err_k"] == 1.0
    assert data["dg_kcal_mol"] == pytest.approx(data["dg_kj_mol"] / KCAL)
    assert {"dnu_hz", "dg_err_kj_mol", "dg_err_from_tc_kj_mol", "notes"} <= set(data)


def test_coalescence_error_written_with_the_value() -> None:
    data = calc_json("coalescence", "--tc", "265 ± 1 K", "--dnu", "40 ± 2 Hz")
    assert data["tc_err_k"] == 1.0 and data["dnu_err_hz"] == 2.0
    assert data["notes"] == []


def test_coalescence_unequal_populations_json() -> None:
    data = calc_json("coalescence", "--tc", "300 K", "--dnu", "100 Hz", "--ratio", "75:25")
    assert data["ratio"] == pytest.approx(3.0)
    assert data["k_minor_to_major_per_s"] / data["k_major_to_minor_per_s"] == pytest.approx(3.0)
    diff = data["dg_major_to_minor_kj_mol"] - data["dg_minor_to_major_kj_mol"]
    assert diff == pytest.approx(8.314462618e-3 * 300.0 * math.log(3.0))


# Ξ(¹³C) = 25.145020 % (R. K. Harris et al., Pure Appl. Chem. 73, 1795 (2001), Table 1: the
# ¹³C frequency of TMS where the ¹H of TMS is at exactly 100 MHz). Close to the bare
# magnetogyric ratio γ(¹³C)/γ(¹H) = 6.728284e7/26.7522128e7 = 0.251503 (CODATA/IUPAC values,
# from memory); the shielding of TMS makes the small difference.
XI_13C = 0.25145020


def test_coalescence_carbon_shift_in_ppm_at_the_carbon_frequency() -> None:
    data = calc_json(
        "coalescence", "--tc", "300 K", "--tc-err", "1 K", "--dnu", "0.10 ppm",
        "--field", "400 MHz", "--nucleus", "13C",
    )  # fmt: skip
    dnu = 0.10e-6 * 400e6 * XI_13C  # Hz: ppm × the ¹³C observe frequency
    assert abs(XI_13C - 6.728284 / 26.7522128) < 1e-3  # the γ ratio check on Ξ
    assert data["nucleus"] == "13C"
    assert data["observe_mhz"] == pytest.approx(400 * XI_13C, rel=1e-8)
    assert data["dnu_hz"] == pytest.approx(dnu, rel=1e-8)
    k_c = math.pi * dnu / math.sqrt(2)  # Gutowsky & Holm, J. Chem. Phys. 25, 1228 (1956)
    assert data["k_c_per_s"] == pytest.approx(k_c, rel=1e-8)
    expected = R_KJ * 300.0 * math.log(codata.Boltzmann * 300.0 / (codata.Planck * k_c))
    assert data["dg_kj_mol"] == pytest.approx(expected, rel=1e-9)
    proton = calc_json("coalescence", "--tc", "300 K", "--dnu", "0.10 ppm", "--mhz", "400")
    assert proton["k_c_per_s"] / data["k_c_per_s"] == pytest.approx(1 / XI_13C, rel=1e-8)
    result = calc(
        "coalescence", "--tc", "300 K", "--dnu", "0.10 ppm", "--mhz", "400", "--nucleus", "13C"
    )
    assert "  Δν          10.1 Hz (13C at 101 MHz, 400 MHz magnet)\n" in result.stdout


def test_coalescence_nucleus_with_unequal_populations_and_hz() -> None:
    data = calc_json(
        "coalescence", "--tc", "300 K", "--dnu", "0.10 ppm", "--mhz", "400", "--nucleus", "13C",
        "--ratio", "3",
    )  # fmt: skip
    assert data["dnu_hz"] == pytest.approx(0.10 * 400 * XI_13C, rel=1e-8)
    in_hz = calc_json("coalescence", "--tc", "300 K", "--dnu", "10 Hz", "--nucleus", "13C")
    assert in_hz["dnu_hz"] == 10.0  # a Δν in Hz needs no frequency


def test_plan_carbon_shift_in_ppm() -> None:
    data = calc_json(
        "plan", "--dg", "60 kJ/mol", "--dnu", "1 ppm", "--mhz", "400", "--nucleus", "13C"
    )
    assert data["fields"][0]["dnu_hz"] == pytest.approx(400 * XI_13C, rel=1e-8)


def test_nucleus_errors() -> None:
    result = calc(
        "coalescence", "--tc", "300 K", "--dnu", "0.1 ppm", "--mhz", "400", "--nucleus", "195Pt"
    )
    assert result.exit_code == 1
    assert result.stderr == (
        "error: dnu: cannot read '0.1 ppm': give Δν in Hz: the observe frequency of 195Pt is "
        "not known to fluxledger\n"
    )
    result = calc(
        "coalescence", "--tc", "300 K", "--dnu", "0.1 ppm", "--mhz", "400", "--nucleus", "Qx"
    )
    assert result.exit_code == 1
    assert result.stderr.startswith("error: nucleus: cannot read 'Qx': unknown nucleus")


def test_coalescence_coupled() -> None:
    data = calc_json("coalescence", "--tc", "300 K", "--dnu", "20 Hz", "--j", "12 Hz")
    # π·√(20² + 6·12²)/√2 (Kurland, Rubin, Wise, J. Chem. Phys. 40, 2426 (1964))
    assert data["k_c_per_s"] == pytest.approx(78.978, rel=1e-4)


@pytest.mark.parametrize(
    ("args", "code", "stderr"),
    [
        (
            ["--tc", "-12 °C", "--dnu", "0.045 ppm"],
            1,
            "error: dnu: cannot read '0.045 ppm': a value in ppm needs the spectrometer"
            " frequency (MHz)\n",
        ),
        (
            ["--tc", "-300 °C", "--dnu", "20 Hz"],
            1,
            "error: tc: cannot read '-300 °C': below absolute zero\n",
        ),
        (["--tc", "0 K", "--dnu", "20 Hz"], 1, "error: tc: cannot read '0 K': must be > 0\n"),
        (["--tc", "300 K", "--dnu", "0 Hz"], 1, "error: dnu: cannot read '0 Hz': must be > 0\n"),
        (
            ["--tc", "300", "--dnu", "20 Hz"],
            1,
            "error: tc: cannot read '300': no unit given; write one, e.g. '300 K'\n",
        ),
        (
            ["--tc", "300 K", "--dnu", "20 Hz", "--ratio", "0.5"],
            1,
            "error: ratio: cannot read '0.5': the ratio is major/minor and must be ≥ 1"
            " (e.g. '3' or '75:25')\n",
        ),
        (
            ["--tc", "300 K", "--dnu", "20 Hz", "--ratio", "lots"],
            1,
            "error: ratio: cannot read 'lots': no number found\n",
        ),
        (
            ["--tc", "300 K", "--dnu", "20 Hz", "--ratio", "3", "--j", "5 Hz"],
            2,
            "error: ratio (unequal populations) and j (coupled AB) cannot be combined\n",
        ),
        (
            ["--tc", "300 K", "--dnu", "20 Hz", "--mhz", "-5"],
            1,
            "error: field: cannot read '-5': the spectrometer frequency must be > 0 MHz\n",
        ),
    ],
)
def test_coalescence_user_errors(args: list[str], code: int, stderr: str) -> None:
    result = calc("coalescence", *args)
    assert result.exit_code == code
    assert result.stdout == ""
    assert result.stderr == stderr


def _rate_csv(tmp_path: Path, dh: float = 75.0, ds: float = -8.0) -> Path:
    temps_c = [0.0, 10.0, 20.0, 30.0, 40.0]
    lines = ["T (°C),k / s-1"]
    for c in temps_c:
        t = c + 273.15
        lines.append(f"{c},{eyring_rate(dg_from_dh_ds(dh, ds, t), t):.10g}")
    path = tmp_path / "rates.csv"
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    return path


def test_eyring_from_csv_json(tmp_path: Path) -> None:
    data = calc_json("eyring", str(_rate_csv(tmp_path)), "--t", "25 °C", "--t", "100 °C")
    assert data["dh_kj_mol"] == pytest.approx(75.0, abs=1e-4)
    assert data["ds_j_mol_k"] == pytest.approx(-8.0, abs=1e-3)
    assert data["n_points"] == 5 and data["T_min_K"] == pytest.approx(273.15)
    assert [row["T_K"] for row in data["dg_at"]] == pytest.approx([298.15, 373.15])
    assert data["dg_at"][0]["dg_kj_mol"] == pytest.approx(75.0 + 298.15 * 8.0 / 1000, abs=1e-4)
    assert any("extrapolated 60 K beyond" in w for w in data["warnings"])
    assert len(data["points"]) == 5 and "residual_ln" in data["points"][0]
    assert {"ea_kj_mol", "log10_a_per_s", "corr_dh_ds", "T_best_K", "r_squared"} <= set(data)


def test_eyring_text_shows_correlation_and_warnings() -> None:
    result = calc("eyring", "--point", "300 K, 0.01", "--point", "310 K, 0.03")
    assert result.exit_code == 0
    out = result.stdout
    assert "corr(ΔH‡, ΔS‡)" in out and "Ea" in out and "log10 A" in out
    assert "warning: only 2 points" in out
    assert "warning: temperatures span only 10.0 K (under ~30 K)" in out


def test_eyring_points_with_sigma() -> None:
    data = calc_json(
        "eyring",
        "--point", "280 K; 0.002; 0.0002",
        "--point", "300 K; 0.02; 0.002",
        "--point", "320 K; 0.15; 0.015",
    )  # fmt: skip
    assert data["weighted"] is True
    assert data["points"][0]["k_err_per_s"] == pytest.approx(0.0002)


@pytest.mark.parametrize(
    ("content", "stderr_start", "code"),
    [
        ("", "error: {path}: the file is empty", 1),
        ("T (K),k (s-1)\n300,abc\n", "error: 1 problem(s) in the input", 1),
        ("x,y\n1,2\n", "error: {path}: no column for the temperature and the rate constant", 1),
    ],
)
def test_eyring_bad_files(tmp_path: Path, content: str, stderr_start: str, code: int) -> None:
    path = tmp_path / "in.csv"
    path.write_text(content, encoding="utf-8")
    result = calc("eyring", str(path))
    assert result.exit_code == code
    assert result.stderr.startswith(stderr_start.format(path=path))
    assert "Traceback" not in result.stderr + result.stdout


def test_eyring_needs_input() -> None:
    result = calc("eyring")
    assert result.exit_code == 2
    assert result.stderr == "error: give a table file, or rate points 'T, k'\n"


def test_eyring_mixed_sigma_is_refused() -> None:
    result = calc("eyring", "--point", "300 K; 0.01; 0.001", "--point", "310 K, 0.02")
    assert result.exit_code == 2
    assert "σk is given for some points but not all" in result.stderr


def test_rate_json_and_text() -> None:
    data = calc_json("rate", "--dg", "21 kcal/mol", "--t", "25 °C", "--t", "100 °C")
    k25 = eyring_rate(21.0 * KCAL, 298.15)
    assert data["rows"][0]["k_per_s"] == pytest.approx(k25)
    assert data["rows"][0]["half_life_s"] == pytest.approx(math.log(2) / k25)
    result = calc("rate", "--dh", "80 kJ/mol", "--ds", "-10 J/(mol K)", "--pair")
    assert result.exit_code == 0
    assert "t½ = ln2/(2k)" in result.stdout


def test_rate_barrier_errors() -> None:
    result = calc("rate", "--dh", "80 kJ/mol")
    assert result.exit_code == 2
    assert result.stderr == "error: give the barrier: dg, or both dh and ds\n"
    result = calc("rate", "--dg", "80 kJ")
    assert result.exit_code == 1
    assert result.stderr.startswith("error: dg: cannot read '80 kJ'")


def test_halflife_oki_criterion() -> None:
    # M. Ōki, Top. Stereochem. 14, 1 (1983) (from memory): racemization t½ = 1000 s at 300 K
    # for ΔG‡ = 93.3 kJ/mol
    data = calc_json("halflife", "--dg", "93.3 kJ/mol", "--target", "1000 s", "--pair")
    assert data["T_K"] == pytest.approx(300.0, abs=0.3)
    assert data["cautions"] == []


def test_halflife_caution_with_boiling_point() -> None:
    result = calc("halflife", "--dg", "110 kJ/mol", "--target", "10 min", "--solvent-bp", "61 °C")
    assert result.exit_code == 0
    assert "caution: " in result.stdout
    assert "pressure-rated sealed NMR tube" in result.stdout
    assert "Follow your facility's safety rules and local regulations" in result.stdout


def test_plan_dmf_at_60_mhz() -> None:
    # common practice, no source: the N-methyl signals of DMF merge near 100 °C at 60 MHz;
    # ΔG‡ ≈ 21 kcal/mol and Δδ ≈ 0.15 ppm from memory
    data = calc_json("plan", "--dg", "21 kcal/mol", "--dnu", "0.15 ppm", "--mhz", "60")
    tc_c = data["fields"][0]["tc_K"] - 273.15
    assert 75.0 <= tc_c <= 130.0
    assert data["fields"][0]["field_MHz"] == 60.0
    assert data["fields"][0]["dnu_hz"] == pytest.approx(9.0)
    assert data["fields"][0]["regime_at_T"] == "slow"
    assert data["atropisomer_class"] == 2


def test_plan_text_in_chloroform_cautions() -> None:
    result = calc(
        "plan", "--dg", "21 kcal/mol", "--dnu", "0.15 ppm", "--mhz", "60", "--solvent-bp", "61 °C"
    )
    assert result.exit_code == 0
    out = result.stdout
    assert "above solvent bp: sealed tube" in out
    assert "caution: " in out and "pressure-rated sealed NMR tube" in out
    assert "if an atropisomer  LaPlante class 2 (20–30 kcal/mol)" in out


def test_plan_default_fields_for_ppm() -> None:
    data = calc_json("plan", "--dg", "15 kcal/mol", "--dnu", "0.3 ppm")
    assert [f["field_MHz"] for f in data["fields"]] == [60.0, 300.0, 400.0, 500.0, 600.0, 800.0]
    tcs = [f["tc_K"] for f in data["fields"]]
    assert tcs == sorted(tcs)


def test_plan_hz_with_two_fields_is_a_usage_error() -> None:
    result = calc("plan", "--dg", "15 kcal/mol", "--dnu", "25 Hz", "--mhz", "400", "--mhz", "600")
    assert result.exit_code == 2
    assert result.stderr.startswith("error: a Δν in Hz belongs to one field")


def test_every_command_has_help() -> None:
    for name in (
        "coalescence",
        "eyring",
        "rate",
        "halflife",
        "plan",
        "exsy",
        "transfer",
        "timecourse",
    ):
        result = calc(name, "--help")
        assert result.exit_code == 0
        assert "--json" in result.stdout


def test_mounted_under_main_app() -> None:
    from registry.cli.main import app as main_app

    args = ["calc", "coalescence", "--tc", "-12 °C", "--dnu", "0.045 ppm", "--mhz", "600"]
    mounted = runner.invoke(main_app, args)
    assert mounted.exit_code == 0
    assert mounted.stdout == calc(*args[1:]).stdout
    bad = runner.invoke(main_app, ["calc", "coalescence", "--tc", "1 K", "--dnu", "1 ppm"])
    assert bad.exit_code == 1
    assert bad.stderr.startswith("error: dnu: cannot read '1 ppm'")
    debug = runner.invoke(
        main_app, ["--debug", "calc", "coalescence", "--tc", "1 K", "--dnu", "1 ppm"]
    )
    from registry.errors import UnitError

    assert isinstance(debug.exception, UnitError)


def test_installed_command_runs_in_a_real_process() -> None:
    exe = shutil.which("fluxledger", path=str(Path(sys.executable).parent))
    if exe is None:
        pytest.skip("the fluxledger console script is not installed in this environment")
    out = subprocess.run(
        [exe, "calc", "rate", "--dg", "80 kJ/mol", "--t", "25 °C", "--json"],
        capture_output=True,
        text=True,
        timeout=60,
        check=False,
    )
    assert out.returncode == 0, out.stderr
    assert json.loads(out.stdout)["rows"][0]["k_per_s"] == pytest.approx(eyring_rate(80.0, 298.15))
    bad = subprocess.run(
        [exe, "calc", "coalescence", "--tc", "-5 K", "--dnu", "10 Hz"],
        capture_output=True,
        text=True,
        timeout=60,
        check=False,
    )
    assert bad.returncode == 1
    assert bad.stderr == "error: tc: cannot read '-5 K': below absolute zero\n"


def test_calc_import_is_light() -> None:
    # `fluxledger --help` stays fast: importing the CLI module pulls in no numerical stack
    code = (
        "import sys, registry.cli.calc; "
        "print(sorted(m for m in ('numpy', 'scipy', 'pandas', 'pint', 'registry.kinetics') "
        "if m in sys.modules))"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "[]"


def test_json_nan_becomes_null() -> None:
    data = calc_json("eyring", "--point", "300 K, 0.01", "--point", "320 K, 0.1")
    assert data["dh_err_kj_mol"] is None  # two points, no σk: no standard error exists
    assert np.isfinite(data["dh_kj_mol"])


def test_cli_module_imports_only_the_api_errors_and_cli() -> None:
    # the CLI parses, calls registry.api and renders: no engine or unit module imported directly
    import ast

    import registry.cli.calc as module

    tree = ast.parse(Path(module.__file__).read_text(encoding="utf-8"))
    imported: set[str] = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.ImportFrom) and node.module:
            names = [f"{node.module}.{a.name}" for a in node.names]
            imported |= {node.module} if node.module != "registry" else set(names)
        elif isinstance(node, ast.Import):
            imported |= {a.name for a in node.names}
    ours = {m for m in imported if m.split(".")[0] == "registry"}
    assert ours, "the check must see the module's imports"
    allowed = ("registry.api", "registry.errors", "registry.cli.")
    assert all(m == "registry.api" or m.startswith(allowed) for m in ours), ours
