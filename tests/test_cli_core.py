"""init, info, add, show, list: exit codes, exact messages, nothing written on bad input."""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import pytest

from registry import api

ADD_AMIDE = [
    "add", "--method", "coalescence", "--smiles", "CN(C)C(=O)c1ccc(Cl)cc1", "--compound", "AM-1",
    "--process", "amide rotation", "--nucleus", "1H", "--solvent", "CDCl3", "--mhz", "400",
    "--tc", "-12 °C", "--dnu", "0.045 ppm", "--dg", "14.2 ± 0.3 kcal/mol",
]  # fmt: skip


def _count(db_path: Path) -> int:
    database = api.open_registry(str(db_path))
    try:
        return api.registry_info(database)["counts"]["measurements"]
    finally:
        database.dispose()


def test_add_then_show_and_list(cli, db_path: Path) -> None:  # type: ignore[no-untyped-def]
    result = cli(*ADD_AMIDE)
    assert result.exit_code == 0, result.stderr
    assert result.stdout.startswith("added measurement 1 (AM-1)")
    shown = cli("show", "1", "--json")
    record = json.loads(shown.stdout)
    assert record["dg_kj_mol"] == pytest.approx(14.2 * 4.184)  # NIST SP 811 B.8 calorie
    assert record["dg_text"] == "14.2 ± 0.3 kcal/mol"
    assert record["coalescence"][0]["tc_k"] == pytest.approx(261.15)
    assert record["coalescence"][0]["dnu_hz"] == pytest.approx(18.0)  # 0.045 ppm × 400 MHz
    assert record["compound"]["inchikey"] == "FARSXMMESQDZMY-UHFFFAOYSA-N"
    assert record["process"]["kind"] == "bond-rotation"
    assert record["solvent"]["name"] == "chloroform-d"
    listed = json.loads(cli("list", "--json").stdout)
    assert [(r["id"], r["compound"]) for r in listed] == [(1, "AM-1")]
    text = cli("show", "1").stdout
    assert "ΔG‡          59.41 ± 1.26 kJ/mol   (reported: 14.2 ± 0.3 kcal/mol)" in text


def test_same_structure_reuses_the_compound(cli, db_path: Path) -> None:  # type: ignore[no-untyped-def]
    assert cli(*ADD_AMIDE).exit_code == 0
    assert cli(*ADD_AMIDE[:-2], "--dg", "59.0 kJ/mol").exit_code == 0
    info = json.loads(cli("info", "--json").stdout)
    assert info["counts"]["compounds"] == 1
    assert info["counts"]["measurements"] == 2


def test_duplicate_compound_label_for_another_structure(cli, db_path: Path) -> None:  # type: ignore[no-untyped-def]
    assert cli(*ADD_AMIDE).exit_code == 0
    other = [
        "add",
        "--method",
        "coalescence",
        "--smiles",
        "CC(=O)N(C)C",
        "--compound",
        "AM-1",
        "--dg",
        "70 kJ/mol",
    ]
    result = cli(*other)
    assert result.exit_code == 1
    assert result.stderr.startswith("error: compound 'AM-1' already names a different structure")
    assert _count(db_path) == 1


def test_same_structure_under_another_label_is_refused(cli, db_path: Path) -> None:  # type: ignore[no-untyped-def]
    assert cli(*ADD_AMIDE).exit_code == 0
    result = cli(*[("AM-2" if a == "AM-1" else a) for a in ADD_AMIDE])
    assert result.exit_code == 1
    assert "already registered as 'AM-1'" in result.stderr
    assert _count(db_path) == 1


@pytest.mark.parametrize(
    ("args", "message"),
    [
        (["--dg", "14.2 furlongs"], "error: dg: cannot read '14.2 furlongs':"),
        (["--dg", "300 K"], "error: dg: cannot read '300 K': K is not a molar energy"),
        (
            ["--smiles", "C1CC(", "--dg", "60 kJ/mol"],
            "error: SMILES 'C1CC(': not a readable SMILES",
        ),
        (
            ["--tc", "250 K", "--dg", "60 kJ/mol"],
            "error: dnu: missing: coalescence data needs both Tc and Δν\n",
        ),
    ],
)
def test_bad_input_clear_error_nothing_written(
    cli, db_path: Path, args: list[str], message: str
) -> None:  # type: ignore[no-untyped-def]
    base = ["add", "--method", "coalescence", "--compound", "X-1"]
    result = cli(*base, *args)
    assert result.exit_code == 1
    assert result.stderr.startswith(message), result.stderr
    assert result.stdout == ""
    assert "Traceback" not in result.stderr + result.stdout
    assert _count(db_path) == 0


def test_missing_required_method_is_a_usage_error(cli) -> None:  # type: ignore[no-untyped-def]
    result = cli("add", "--compound", "X")
    assert result.exit_code == 2
    assert "--method" in result.stderr


def test_several_problems_are_all_listed(cli, db_path: Path) -> None:  # type: ignore[no-untyped-def]
    result = cli("add", "--method", "guesswork", "--dg", "12", "--tc", "300")
    assert result.exit_code == 1
    assert result.stderr.splitlines()[0] == "error: 4 problems; nothing was written"
    assert "method: 'guesswork': unknown method" in result.stderr
    assert "dg: '12': no unit given" in result.stderr


def test_show_unknown_and_malformed_ids(cli) -> None:  # type: ignore[no-untyped-def]
    missing = cli("show", "42")
    assert (missing.exit_code, missing.stderr) == (1, "error: no measurement with id 42\n")
    bad = cli("show", "abc")
    assert (bad.exit_code, bad.stderr) == (
        2,
        "error: 'abc' is not a measurement id (a whole number from 1)\n",
    )


def test_missing_registry_file(runner, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    from registry.cli.main import app

    result = runner.invoke(app, ["--db", str(tmp_path / "nope.sqlite"), "list"])
    assert result.exit_code == 1
    assert result.stderr.startswith("error: no registry at ")
    assert not (tmp_path / "nope.sqlite").exists()


def test_list_filters(cli) -> None:  # type: ignore[no-untyped-def]
    cli(*ADD_AMIDE)
    cli(
        "add",
        "--method",
        "exsy",
        "--smiles",
        "CC(=O)N(C)C",
        "--compound",
        "DMA",
        "--dg",
        "18.0 kcal/mol",
        "--solvent",
        "toluene-d8",
    )
    assert [
        r["compound"]
        for r in json.loads(cli("list", "--json", "--barrier-min", "16 kcal/mol").stdout)
    ] == ["DMA"]
    assert [
        r["compound"] for r in json.loads(cli("list", "--json", "--method", "coalescence").stdout)
    ] == ["AM-1"]
    assert [
        r["compound"] for r in json.loads(cli("list", "--json", "--solvent", "toluene").stdout)
    ] == ["DMA"]
    csv_out = cli("list", "--csv").stdout.splitlines()
    assert csv_out[0].startswith("id,label,compound")
    assert len(csv_out) == 3


def test_env_var_selects_database(runner, db_path: Path) -> None:  # type: ignore[no-untyped-def]
    from registry.cli.main import app

    result = runner.invoke(app, ["info", "--json"], env={"FLUXLEDGER_DB": str(db_path)})
    assert result.exit_code == 0
    assert json.loads(result.stdout)["database"].endswith("registry.sqlite")


def test_installed_console_script_runs(tmp_path: Path) -> None:
    exe = Path(sys.executable).with_name("fluxledger")
    assert exe.exists(), "the package must be installed (make install)"
    env = {**os.environ, "FLUXLEDGER_DB": str(tmp_path / "r.sqlite")}
    init = subprocess.run([str(exe), "init"], capture_output=True, text=True, env=env, check=False)
    assert init.returncode == 0, init.stderr
    bad = subprocess.run(
        [str(exe), "add", "--method", "coalescence", "--compound", "Z", "--dg", "x"],
        capture_output=True,
        text=True,
        env=env,
        check=False,
    )
    assert bad.returncode == 1
    assert bad.stderr == "error: dg: cannot read 'x': no number found\n"
    helped = subprocess.run(
        [str(exe), "--help"], capture_output=True, text=True, env=env, check=False
    )
    assert helped.returncode == 0
    for command in ("init", "info", "add", "show", "list"):
        assert command in helped.stdout


def test_compound_known_only_by_name_is_reused(cli) -> None:  # type: ignore[no-untyped-def]
    for dg in ("60 kJ/mol", "61 kJ/mol"):
        assert (
            cli(
                "add", "--method", "computed", "--name", "tri-tert-butylamine", "--dg", dg
            ).exit_code
            == 0
        )
    info = json.loads(cli("info", "--json").stdout)
    assert (info["counts"]["compounds"], info["counts"]["measurements"]) == (1, 2)


def test_same_compound_with_and_without_a_known_solvent(cli) -> None:  # type: ignore[no-untyped-def]
    base = [
        "add",
        "--method",
        "coalescence",
        "--smiles",
        "CC(=O)N(C)C",
        "--compound",
        "DMA",
        "--mhz",
        "400",
    ]
    coal = ["--tc", "70 °C", "--dnu", "24 Hz", "--dg", "73 kJ/mol"]
    assert cli(*base, *coal, "--solvent", "CDCl3").exit_code == 0
    result = cli(*base, *coal)
    assert result.exit_code == 0, result.stderr
