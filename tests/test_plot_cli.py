"""``fluxledger plot`` and ``fluxledger report`` on the command line: files, exit codes, messages."""

from __future__ import annotations

import json
import math
import subprocess
import sys
from pathlib import Path

import pytest
from scipy import constants as codata

RATE_POINTS = ["283 K, 1.95 s-1", "293 K, 5.1 s-1", "303 K, 12.9 s-1", "313 K, 30.2 s-1"]


def _add(cli, *args: str) -> int:  # type: ignore[no-untyped-def]
    result = cli("add", *args, "--json")
    assert result.exit_code == 0, result.stderr
    return json.loads(result.stdout)["id"]


@pytest.fixture
def filled(cli):  # type: ignore[no-untyped-def]
    """Two measurements; the coalescence one is flagged: Tc 318.15 K and Δν 0.2 ppm × 400 MHz =
    80 Hz give ΔG‡(Tc) = 64.39 kJ/mol (Gutowsky–Holm k_c = πΔν/√2 with the Eyring equation,
    CODATA constants via scipy.constants, computed beside this test), so the reported
    66.0 ± 0.4 kJ/mol leaves the coalescence-barrier check's error finding open."""
    rates = [x for p in RATE_POINTS for x in ("--rate", p)]
    with_rates = _add(
        cli,
        "--method", "lineshape", "--compound", "DEMO-P1", "--smiles", "CC(=O)N(C)C",
        "--process", "bond-rotation", "--solvent", "CDCl3", "--mhz", "400",
        "--dg", "64 kJ/mol", "--dg-t", "298.15 K", *rates,
    )  # fmt: skip
    coalescence = _add(
        cli,
        "--method", "coalescence", "--compound", "DEMO-P2", "--smiles", "CN(C)C=O",
        "--process", "bond-rotation", "--solvent", "CDCl3", "--mhz", "400",
        "--tc", "45 °C", "--dnu", "0.2 ppm", "--dg", "66.0 ± 0.4 kJ/mol",
    )  # fmt: skip
    return {"rates": with_rates, "coalescence": coalescence}


def test_eyring_from_a_measurement(cli, filled, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    out = tmp_path / "e.svg"
    result = cli("plot", "eyring", str(filled["rates"]), "-o", str(out), "--json")
    assert result.exit_code == 0, result.stderr
    data = json.loads(result.stdout)
    assert data["file"] == str(out) and out.exists()
    assert data["n_points"] == 4
    # ΔG‡ = ΔH‡ − T·ΔS‡ (Gibbs) at the reference temperature
    assert data["dg_ref_kj_mol"] == pytest.approx(
        data["dh_kj_mol"] - 298.15 * data["ds_j_mol_k"] / 1000.0
    )
    text = cli("plot", "eyring", str(filled["rates"]), "-o", str(tmp_path / "e.png"))
    assert text.exit_code == 0
    assert text.stdout.startswith(f"wrote {tmp_path / 'e.png'}: Eyring plot of 4 rate points\n")
    assert "  ΔG‡(298.15 K) = " in text.stdout


def test_eyring_from_a_csv_file(cli, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    # k from the Eyring equation (J. Chem. Phys. 3, 107 (1935)) with ΔH‡ 60 kJ/mol and ΔS‡ 0,
    # so ΔG‡ = 60 kJ/mol at every T; the file gives T in °C in the header
    rows = ["T (°C),k (s-1)"]
    for t_c in (0.0, 15.0, 30.0, 45.0):
        t = t_c + 273.15
        k = codata.k * t / codata.h * math.exp(-60000.0 / (codata.R * t))
        rows.append(f"{t_c},{k:.8g}")
    table = tmp_path / "rates.csv"
    table.write_text("\n".join(rows) + "\n", encoding="utf-8")
    result = cli(
        "plot", "eyring", str(table), "-o", str(tmp_path / "f.svg"), "--json", "--t-ref", "25 °C"
    )
    assert result.exit_code == 0, result.stderr
    data = json.loads(result.stdout)
    assert data["dh_kj_mol"] == pytest.approx(60.0, abs=1e-4)
    assert data["ds_j_mol_k"] == pytest.approx(0.0, abs=1e-3)
    assert data["dg_ref_kj_mol"] == pytest.approx(60.0, abs=1e-4)
    svg = (tmp_path / "f.svg").read_text(encoding="utf-8")
    assert "rates.csv" in svg  # default title: the file name


def test_eyring_from_points_on_the_command_line(cli, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    # the same Eyring rates as above (ΔH‡ 60 kJ/mol, ΔS‡ 0; J. Chem. Phys. 3, 107 (1935))
    args = []
    for t_c in (0.0, 15.0, 30.0, 45.0):
        t = t_c + 273.15
        k = codata.k * t / codata.h * math.exp(-60000.0 / (codata.R * t))
        args += ["--point", f"{t_c} °C, {k:.8g} s-1"]
    result = cli("plot", "eyring", *args, "-o", str(tmp_path / "p.svg"), "--json")
    assert result.exit_code == 0, result.stderr
    data = json.loads(result.stdout)
    assert data["source"] == "points" and data["n_points"] == 4
    assert data["dh_kj_mol"] == pytest.approx(60.0, abs=1e-4)
    both = cli("plot", "eyring", "7", "--point", "300 K, 1 s-1", "-o", str(tmp_path / "x.svg"))
    assert both.exit_code == 2
    assert both.stderr == "error: give a measurement id or a file, or --point, not both\n"
    none = cli("plot", "eyring", "-o", str(tmp_path / "x.svg"))
    assert none.exit_code == 2
    assert none.stderr == "error: give a measurement id, a rate table file, or --point 'T, k'\n"
    bad = cli("plot", "eyring", "--point", "300 K", "--point", "310 K, 2 s-1", "-o", "x.svg")
    assert bad.exit_code == 2 and bad.stderr.startswith("error: points[1]: cannot read '300 K'")


def test_eyring_errors(cli, filled, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    few = cli("plot", "eyring", str(filled["coalescence"]), "-o", str(tmp_path / "x.svg"))
    assert few.exit_code == 2
    assert few.stderr.startswith(
        f"error: measurement {filled['coalescence']} has 0 rate point(s); an Eyring plot needs"
    )
    missing = cli("plot", "eyring", "nope.csv", "-o", str(tmp_path / "x.svg"))
    assert missing.exit_code == 1
    assert missing.stderr == "error: nope.csv: no such file (nor a measurement id)\n"
    unknown = cli("plot", "eyring", "999", "-o", str(tmp_path / "x.svg"))
    assert unknown.exit_code == 1 and "no measurement with id 999" in unknown.stderr
    suffix = cli("plot", "eyring", str(filled["rates"]), "-o", str(tmp_path / "x.jpg"))
    assert suffix.exit_code == 2
    assert suffix.stderr == (
        f"error: {tmp_path / 'x.jpg'}: write a .png, .svg or .pdf file (the suffix chooses the format)\n"
    )
    unit = cli("plot", "eyring", str(filled["rates"]), "-o", "x.svg", "--energy-unit", "eV")
    assert unit.exit_code == 2 and "use kJ/mol or kcal/mol" in unit.stderr


def test_coalescence_from_a_measurement(cli, filled, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    out = tmp_path / "c.svg"
    result = cli(
        "plot", "coalescence", "--measurement", str(filled["coalescence"]), "-o", str(out), "--json"
    )
    assert result.exit_code == 0, result.stderr
    data = json.loads(result.stdout)
    assert data["dg_kj_mol"] == pytest.approx(66.0)
    assert data["dnu_ppm"] == pytest.approx(0.2)
    assert [o["measurement_id"] for o in data["observed"]] == [filled["coalescence"]]
    assert data["solvent"]["name"] == "chloroform-d"
    # chloroform boils at 61 °C (CRC Handbook): a predicted Tc above it brings the caution
    above = max(data["tc_range_k"]) > 273.15 + 61.0
    assert above == any("pressure-rated sealed" in c for c in data["cautions"])
    svg = out.read_text(encoding="utf-8")
    assert ">DEMO-P2<" in svg  # the observed point is labelled with its compound


def test_coalescence_cautions_above_the_boiling_point(cli, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    result = cli(
        "plot", "coalescence", "--barrier", "80 kJ/mol", "--dnu", "0.5 ppm",
        "--solvent", "CD2Cl2", "-o", str(tmp_path / "hot.png"),
    )  # fmt: skip
    assert result.exit_code == 0, result.stderr
    # dichloromethane boils at 40 °C (CRC Handbook); ΔG‡ 80 kJ/mol coalesces far above that
    assert "caution: " in result.stdout and "pressure-rated sealed NMR tube" in result.stdout
    assert "Follow your facility's safety rules" in result.stdout


def test_coalescence_needs_a_field_for_hz(cli, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    bad = cli("plot", "coalescence", "--barrier", "15 kcal/mol", "--dnu", "30 Hz", "-o", "x.png")
    assert bad.exit_code == 2
    assert bad.stderr == (
        "error: dnu '30 Hz': a Δν in Hz holds at one field only; give the field it was measured"
        " at (dnu_field, e.g. '400 MHz') or Δν in ppm\n"
    )
    ok = cli(
        "plot", "coalescence", "--barrier", "15 kcal/mol", "--dnu", "30 Hz",
        "--dnu-field", "300 MHz", "-o", str(tmp_path / "c.png"), "--json",
    )  # fmt: skip
    assert ok.exit_code == 0, ok.stderr
    assert json.loads(ok.stdout)["dnu_ppm"] == pytest.approx(0.1)
    none = cli("plot", "coalescence", "--dnu", "0.1 ppm", "-o", "x.png")
    assert none.exit_code == 2
    assert none.stderr == "error: barrier: give ΔG‡, or a measurement with a stored ΔG‡\n"


def test_overview(cli, filled, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    result = cli("plot", "overview", "--by", "kind", "-o", str(tmp_path / "o.svg"), "--json")
    assert result.exit_code == 0, result.stderr
    data = json.loads(result.stdout)
    assert data["grouped_by"] == "process kind"
    # the flagged 66.0 kJ/mol is left out unless asked for; then it is drawn and counted
    assert data["groups"] == [
        {"group": "bond-rotation", "n": 1, "min_kj_mol": 64.0, "max_kj_mol": 64.0, "flagged": 0}
    ]
    assert (data["include_flagged"], data["left_out_flagged"]) == (False, 1)
    text = cli("plot", "overview", "--by", "kind", "-o", str(tmp_path / "o.svg"))
    assert text.stdout.splitlines()[-1] == (
        "note: 1 flagged value(s) left out (an error finding is open); --include-flagged draws"
        " them as crosses"
    )
    every = cli(
        "plot", "overview", "--by", "kind", "-o", str(tmp_path / "o.svg"), "--include-flagged",
        "--json",
    )  # fmt: skip
    assert json.loads(every.stdout)["groups"] == [
        {"group": "bond-rotation", "n": 2, "min_kj_mol": 64.0, "max_kj_mol": 66.0, "flagged": 1}
    ]
    bad = cli("plot", "overview", "--by", "colour", "-o", "o.svg")
    assert bad.exit_code == 2
    assert bad.stderr == "error: by 'colour': use kind, motif or auto\n"


def test_report_command(cli, filled, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    out = tmp_path / "site"
    result = cli("report", "-o", str(out))
    assert result.exit_code == 0, result.stderr
    assert result.stdout.splitlines()[:2] == [
        f"wrote {out / 'index.html'}: 2 measurement(s), 2 compound page(s), 1 Eyring plot(s);"
        " 1 flagged (marked)",
        "note: 1 flagged value(s) left out of the overview and of the compounds' ΔG‡ ranges",
    ]
    as_json = json.loads(cli("report", "-o", str(out), "--json", "--no-plots").stdout)
    assert as_json["eyring_plots"] == 0 and as_json["compound_pages"] == 2
    assert not (out / "plots" / "overview.svg").exists()  # rebuilt without plots


def test_overview_by_motif(cli, filled, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    pytest.importorskip("registry.search")
    _add(
        cli,
        "--method", "coalescence", "--compound", "DEMO-P3", "--smiles", "C1CCCCC1",
        "--process", "ring-inversion", "--solvent", "CD2Cl2", "--mhz", "400",
        "--tc", "-60 °C", "--dnu", "0.5 ppm", "--dg", "43 kJ/mol",
    )  # fmt: skip
    result = cli("plot", "overview", "--by", "motif", "-o", str(tmp_path / "m.svg"), "--json")
    assert result.exit_code == 0, result.stderr
    data = json.loads(result.stdout)
    assert data["grouped_by"] == "structural motif"
    groups = {g["group"]: g["n"] for g in data["groups"]}
    # N,N-dimethylacetamide and N,N-dimethylformamide are both amides, but the latter's value
    # is flagged (see ``filled``) and left out; so is DEMO-P3's 43 kJ/mol: Tc 213.15 K and
    # Δν 0.5 ppm × 400 MHz = 200 Hz give 40.81 kJ/mol (same equations and constants as in
    # ``filled``; computed beside the test)
    assert groups.get("amide") == 1
    assert data["left_out_flagged"] == 2
    every = cli(
        "plot", "overview", "--by", "motif", "-o", str(tmp_path / "m.svg"), "--json",
        "--include-flagged",
    )  # fmt: skip
    groups = {g["group"]: g["n"] for g in json.loads(every.stdout)["groups"]}
    # asked for, every barrier is somewhere, a compound in no motif under "(no motif)"
    assert groups.get("amide") == 2
    assert sum(n for g, n in groups.items() if g in ("amide", "(no motif)")) >= 2
    assert max(groups.values()) <= 3
    svg = (tmp_path / "m.svg").read_text(encoding="utf-8")
    assert "structural motif" in svg


def test_plot_eyring_as_a_real_process(cli, filled, db_path: Path, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    """The installed command, in its own process: the file is written, a user error is one
    line on stderr with exit code 2 and no traceback."""
    command = Path(sys.executable).with_name("fluxledger")
    out = tmp_path / "real.png"
    done = subprocess.run(
        [str(command), "--db", str(db_path), "plot", "eyring", str(filled["rates"]), "-o", str(out)],
        capture_output=True, text=True, timeout=120,
    )  # fmt: skip
    assert done.returncode == 0, done.stderr
    assert done.stdout.startswith(f"wrote {out}: Eyring plot of 4 rate points\n")
    assert out.read_bytes().startswith(b"\x89PNG\r\n\x1a\n")
    bad = subprocess.run(
        [str(command), "--db", str(db_path), "plot", "eyring", str(filled["rates"]), "-o", "x.gif"],
        capture_output=True, text=True, timeout=120,
    )  # fmt: skip
    assert bad.returncode == 2
    assert (
        bad.stderr
        == "error: x.gif: write a .png, .svg or .pdf file (the suffix chooses the format)\n"
    )
