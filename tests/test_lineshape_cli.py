"""``fluxledger lineshape``: exit codes, exact messages, --json, plots and stored rate points."""

from __future__ import annotations

import json
import math
import os
import subprocess
import sys
from pathlib import Path

import pytest
from typer.testing import CliRunner

from registry.lineshape.eyring import eyring_ln_rate
from registry.lineshape.spectrum import read_spectrum

SITES = "3.15,2.85"
TEMPS = (270.0, 285.0, 300.0)
DH, DS = 60.0, 5.0  # invented demo barrier


def _simulate(cli, path: Path, t_k: float, seed: int) -> None:  # type: ignore[no-untyped-def]
    k = math.exp(eyring_ln_rate(t_k, DH, DS))
    result = cli(
        "lineshape", "simulate", "--sites", SITES, "--field", "400.13", "--k", f"{k:.6g}",
        "--width", "1.2", "--points", "4096", "--noise", "0.01", "--seed", str(seed),
        "--temperature", f"{t_k} K", "--out", str(path),
    )  # fmt: skip
    assert result.exit_code == 0, result.stderr


@pytest.fixture
def vt_files(cli, tmp_path: Path) -> list[Path]:  # type: ignore[no-untyped-def]
    files = []
    for i, t in enumerate(TEMPS):
        path = tmp_path / f"vt_{t:.0f}.csv"
        _simulate(cli, path, t, seed=i + 1)
        files.append(path)
    return files


def test_simulate_writes_a_readable_spectrum(cli, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    out = tmp_path / "s.csv"
    result = cli(
        "lineshape", "simulate", "--sites", "-60,60 Hz", "--k", "266", "--points", "2001",
        "--width", "1 Hz", "--window", "-200,200 Hz", "--out", str(out), "--json",
    )  # fmt: skip
    assert result.exit_code == 0, result.stderr
    data = json.loads(result.stdout)
    assert data["k_per_s"] == 266.0
    assert data["sites_hz"] == [-60.0, 60.0]
    assert data["populations"] == [0.5, 0.5]
    spec = read_spectrum(out)
    assert spec.x_unit == "Hz" and len(spec.x) == 2001
    # unit area: the trapezoid over ±200 Hz misses only the Lorentzian tails (< 1 %)
    area = float(((spec.intensity[1:] + spec.intensity[:-1]) / 2 * (spec.x[1] - spec.x[0])).sum())
    assert area == pytest.approx(1.0, abs=0.01)
    plain = cli("lineshape", "simulate", "--sites", "-60,60 Hz", "--k", "266", "--out", str(out))
    assert plain.stdout == (f"wrote {out}: 16384 points, -180 … 180 Hz, k = 266 s⁻¹, width 1 Hz\n")


def test_fit_json_recovers_the_rates(cli, vt_files: list[Path]) -> None:  # type: ignore[no-untyped-def]
    result = cli(
        "lineshape", "fit", *map(str, vt_files), "--sites", SITES, "--width", "1.2",
        "--fix-width", "--json",
    )  # fmt: skip
    assert result.exit_code == 0, result.stderr
    data = json.loads(result.stdout)
    assert data["observe_mhz"] == pytest.approx(400.13)
    for fit, t in zip(data["fits"], TEMPS, strict=True):
        k_true = math.exp(eyring_ln_rate(t, DH, DS))
        assert fit["t_k"] == t
        assert abs(fit["k_per_s"] - k_true) < 3 * fit["k_err_per_s"]
    line = data["eyring_line"]
    assert abs(line["dh_kj_mol"] - DH) < 3 * line["dh_err_kj_mol"]
    assert [p["t_text"] for p in data["rate_points"]] == ["270.00 K", "285.00 K", "300.00 K"]
    assert data["global"] is None and data["stored_rate_points"] is None
    assert data["cautions"] == []


def test_fit_table_and_global(cli, vt_files: list[Path]) -> None:  # type: ignore[no-untyped-def]
    result = cli(
        "lineshape", "fit", *map(str, vt_files), "--sites", SITES, "--width", "1.2",
        "--fix-width", "--global",
    )  # fmt: skip
    assert result.exit_code == 0, result.stderr
    lines = result.stdout.splitlines()
    assert lines[0].split() == [
        "file", "T/K", "k/s-1", "±k", "w/Hz", "offset/Hz", "Δν/Hz", "p1", "rms", "note"
    ]  # fmt: skip
    assert [ln.split()[0] for ln in lines[2:5]] == ["vt_270.csv", "vt_285.csv", "vt_300.csv"]
    assert lines[5] == "after a value: ~ tied to the series, = held, ? fitted but not determined"
    rest = [ln for ln in lines[6:] if not ln.startswith(("Δν drift", "populations, van"))]
    assert rest[0].startswith("Eyring line (weighted, 3 rates): ΔH‡ = ")
    assert rest[1].startswith("global fit (3 spectra, χ²/dof = ")
    data = json.loads(
        cli("lineshape", "fit", *map(str, vt_files), "--sites", SITES, "--width", "1.2",
            "--fix-width", "--global", "--json").stdout
    )  # fmt: skip
    g = data["global"]
    assert abs(g["dh_kj_mol"] - DH) < 3 * g["dh_err_kj_mol"]
    assert len(g["fits"]) == 3 and g["fits"][0]["method"] == "global Eyring"


def test_plots_are_png_files(cli, vt_files: list[Path], tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    out = tmp_path / "plots"
    result = cli(
        "lineshape", "fit", *map(str, vt_files[:2]), "--sites", SITES, "--plots", str(out),
        "--json",
    )  # fmt: skip
    assert result.exit_code == 0, result.stderr
    written = [Path(p) for p in json.loads(result.stdout)["plots"]]
    assert sorted(p.name for p in written) == ["eyring.png", "vt_270_fit.png", "vt_285_fit.png"]
    for p in written:
        assert p.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


def test_rates_are_stored_in_a_measurement(cli, vt_files: list[Path]) -> None:  # type: ignore[no-untyped-def]
    added = cli(
        "add", "--method", "lineshape", "--smiles", "CN(C)C=O", "--compound", "DMF-demo",
        "--process", "amide rotation", "--nucleus", "1H", "--solvent", "CDCl3",
        "--mhz", "400.13", "--dg", "58.5 kJ/mol", "--dg-t", "298.15 K",
    )  # fmt: skip
    assert added.exit_code == 0, added.stderr
    result = cli(
        "lineshape", "fit", *map(str, vt_files), "--sites", SITES, "--width", "1.2",
        "--fix-width", "--measurement", "1",
    )  # fmt: skip
    assert result.exit_code == 0, result.stderr
    assert result.stdout.splitlines()[-1] == "stored 3 rate points in measurement 1"
    shown = json.loads(cli("show", "1", "--json").stdout)
    assert [r["t_k"] for r in shown["rate_points"]] == list(TEMPS)
    assert all(r["k_text"].endswith(" s-1") and "±" in r["k_text"] for r in shown["rate_points"])
    missing = cli("lineshape", "fit", str(vt_files[0]), "--sites", SITES, "--measurement", "9")
    assert missing.exit_code == 1
    assert missing.stderr == "error: no measurement with id 9\n"


@pytest.mark.parametrize(
    ("args", "code", "message"),
    [
        (["--temps", "250"], 2, "error: temps gives 1 temperature for 3 files\n"),
        (["--scheme", "star"], 2, "error: scheme must be one of mutual, cycle, not 'star'\n"),
        (["--populations", "1,2,3"], 2, "error: populations gives 3 values for 2 sites\n"),
        (["--width", "-1"], 1, "error: width: cannot read '-1': must be > 0\n"),
        (["--x-unit", "cm"], 2, "error: x_unit must be 'ppm' or 'Hz', not 'cm'\n"),
    ],
)
def test_user_errors(cli, vt_files: list[Path], args: list[str], code: int, message: str) -> None:  # type: ignore[no-untyped-def]
    result = cli("lineshape", "fit", *map(str, vt_files), "--sites", SITES, *args)
    assert result.exit_code == code
    assert result.stderr == message
    assert result.stdout == ""


def test_file_problems_are_data_errors(cli, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    bad = tmp_path / "bad.csv"
    bad.write_text("shift_ppm,intensity\n1.0,2\n1.1,x\n")
    result = cli("lineshape", "fit", str(bad), "--sites", "1.0,1.1", "--field", "400")
    assert result.exit_code == 1
    assert result.stderr == f"error: {bad}: line 3: cannot read 'x' as a number\n"
    nofield = tmp_path / "nofield.csv"
    nofield.write_text("shift_ppm,intensity\n1.0,2\n1.1,3\n")
    result = cli("lineshape", "fit", str(nofield), "--sites", "1.0,1.1")
    assert result.exit_code == 2
    assert (
        result.stderr == "error: sites is in ppm: give the spectrometer frequency as field (MHz)\n"
    )
    result = cli(
        "lineshape", "fit", str(nofield), "--sites", "1.0,1.1", "--field", "400", "--global"
    )
    assert result.exit_code == 2
    assert result.stderr == (
        f"error: {nofield}: no temperature in the file; "
        "give the temperatures of all files (temps)\n"
    )
    result = cli("lineshape", "fit", str(nofield), "--sites", "1.0,1.1", "--field", "400")
    assert result.exit_code == 1
    assert result.stderr == f"error: {nofield}: 2 points are too few to fit 6 parameters\n"


def test_global_fit_needs_two_temperatures(cli, vt_files: list[Path]) -> None:  # type: ignore[no-untyped-def]
    result = cli("lineshape", "fit", str(vt_files[0]), "--sites", SITES, "--global")
    assert result.exit_code == 1
    assert result.stderr == "error: global fit: needs spectra at two or more temperatures\n"


def test_sub_app_alone_prints_clean_errors(tmp_path: Path) -> None:
    from registry.cli.lineshape import app

    result = CliRunner().invoke(app, ["fit", str(tmp_path / "none.csv"), "--sites", "1,2"])
    assert result.exit_code == 1
    assert result.stderr == f"error: {tmp_path / 'none.csv'}: no such file\n"


def test_installed_command(tmp_path: Path) -> None:
    exe = Path(sys.executable).with_name("fluxledger")
    assert exe.exists(), "the package must be installed (make install)"
    env = {**os.environ, "FLUXLEDGER_DB": str(tmp_path / "r.sqlite")}
    out = tmp_path / "x.csv"
    run = subprocess.run(
        [str(exe), "lineshape", "simulate", "--sites", "1,2", "--k", "5", "--out", str(out)],
        capture_output=True, text=True, env=env, check=False,
    )  # fmt: skip
    assert run.returncode == 2
    assert run.stderr == (
        "error: sites is in ppm: give the spectrometer frequency as field (MHz)\n"
    )


def _jcamp_from_csv(csv_path: Path, out: Path, t_celsius: float) -> None:
    """Write a simulated CSV spectrum as JCAMP-DX (AFFN, integer ordinates with ##YFACTOR)."""
    spec = read_spectrum(csv_path)
    yfactor = float(abs(spec.intensity).max()) / 30000.0
    ys = [round(v / yfactor) for v in spec.intensity]
    lines = [
        f"{spec.x[i]:.6f} " + " ".join(str(v) for v in ys[i : i + 10])
        for i in range(0, len(ys), 10)
    ]
    out.write_text(
        "##TITLE= demo\n##JCAMP-DX= 4.24\n##DATA TYPE= NMR SPECTRUM\n"
        "##.OBSERVE FREQUENCY= 400.13\n##XUNITS= PPM\n##YUNITS= ARBITRARY UNITS\n"
        f"##FIRSTX= {spec.x[0]:.9f}\n##LASTX= {spec.x[-1]:.9f}\n##XFACTOR= 1\n"
        f"##YFACTOR= {yfactor:.9e}\n##NPOINTS= {len(ys)}\n##TEMPERATURE= {t_celsius}\n"
        "##XYDATA=(X++(Y..Y))\n" + "\n".join(lines) + "\n##END=\n",
        encoding="ascii",
    )


def test_fit_reads_jcamp_with_field_and_temperature(
    cli,  # type: ignore[no-untyped-def]
    vt_files: list[Path],
    tmp_path: Path,
) -> None:
    jdx = []
    for path, t in zip(vt_files, TEMPS, strict=True):
        target = tmp_path / f"{path.stem}.jdx"
        _jcamp_from_csv(path, target, round(t - 273.15, 2))
        jdx.append(target)
    result = cli(
        "lineshape", "fit", *map(str, jdx), "--sites", SITES, "--width", "1.2", "--fix-width",
        "--region", "3.35,2.65", "--json",
    )  # fmt: skip
    assert result.exit_code == 0, result.stderr
    data = json.loads(result.stdout)
    assert data["observe_mhz"] == pytest.approx(400.13)
    for fit, t in zip(data["fits"], TEMPS, strict=True):
        assert fit["t_k"] == pytest.approx(t)
        assert fit["t_text"].endswith("°C")
        assert fit["n_points"] < 4096  # the region cut the window
        k_true = math.exp(eyring_ln_rate(t, DH, DS))
        assert abs(fit["k_per_s"] - k_true) < 3 * fit["k_err_per_s"]


def test_headerless_csv_needs_its_unit(cli, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    path = tmp_path / "bare.csv"
    body = "\n".join(f"{x:.4f} {1.0 / (1.0 + (x - 1.0) ** 2 * 1e4):.6f}" for x in
                     [0.9 + i * 0.0005 for i in range(400)])  # fmt: skip
    path.write_text(body + "\n")
    result = cli("lineshape", "fit", str(path), "--sites", "0.98,1.02", "--field", "400")
    assert result.exit_code == 2
    assert result.stderr.startswith(f"error: {path}: the abscissa unit is unknown")
    result = cli(
        "lineshape", "fit", str(path), "--sites", "0.98,1.02", "--field", "400",
        "--x-unit", "ppm", "--json",
    )  # fmt: skip
    assert result.exit_code == 0, result.stderr
    assert json.loads(result.stdout)["fits"][0]["t_k"] is None


def test_cli_module_import_is_light() -> None:
    # `fluxledger --help` stays fast: the lineshape group pulls in no numerical stack
    code = (
        "import sys, registry.cli.lineshape; "
        "print(sorted(m for m in ('numpy', 'scipy', 'matplotlib', 'pandas', 'pint', "
        "'registry.lineshape') if m in sys.modules))"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "[]"


def test_reference_window_tied_width_and_modes(cli, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    """simulate --reference adds a singlet; fit --reference --tie-width holds one width for the
    series, measured on it (simulated at 1.2 Hz), and says so for every spectrum."""
    files = []
    for i, t in enumerate(TEMPS):
        path = tmp_path / f"r_{t:.0f}.csv"
        k = math.exp(eyring_ln_rate(t, DH, DS))
        result = cli(
            "lineshape", "simulate", "--sites", SITES, "--field", "400.13", "--k", f"{k:.6g}",
            "--width", "1.2", "--points", "8192", "--noise", "0.01", "--seed", str(i + 1),
            "--temperature", f"{t} K", "--reference", "2.40", "--window", "3.5,2.2",
            "--out", str(path),
        )  # fmt: skip
        assert result.exit_code == 0, result.stderr
        files.append(path)
    result = cli(
        "lineshape", "fit", *map(str, files), "--sites", SITES, "--region", "3.4,2.6",
        "--reference", "2.45,2.35", "--tie-width", "--json",
    )  # fmt: skip
    assert result.exit_code == 0, result.stderr
    data = json.loads(result.stdout)
    tied = data["tied_width"]
    assert abs(tied["width_hz"] - 1.2) < 4 * tied["width_err_hz"]
    assert len(data["reference_widths"]) == 3
    for fit in data["fits"]:
        width = next(p for p in fit["parameters"] if p["name"] == "width")
        assert width["how"] == "tied (series)"
        k_true = math.exp(eyring_ln_rate(fit["t_k"], DH, DS))
        assert abs(fit["k_per_s"] - k_true) < 4 * fit["k_err_per_s"]
    bad = cli("lineshape", "fit", *map(str, files), "--sites", SITES, "--shifts-mode", "drift")
    assert bad.exit_code == 2
    assert bad.stderr == "error: shifts_mode must be one of auto, fit, hold, tie, not 'drift'\n"
    lonely = cli("lineshape", "fit", *map(str, files), "--sites", SITES, "--tie-width")
    assert lonely.exit_code == 2
    assert lonely.stderr == "error: tie_width needs a reference window (reference)\n"
