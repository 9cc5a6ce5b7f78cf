"""Computed barriers stored with their level of theory, and compared with measured ones.

Check values come from outside the code under test: the error statistics from numpy on the
same pairs, the bootstrap intervals from scipy.stats.bootstrap (its own resampling), ΔG‡ at
298.15 K from ΔH‡ − TΔS‡ (Eyring 1935) written here. All barriers are invented.
"""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from scipy import stats as sps
from sqlalchemy import inspect

from registry import api
from registry.comparison.stats import RESAMPLES, error_stats
from registry.errors import UsageError
from registry.io.headers import guess_header
from registry.record.theory import STANDARD_STATES, read_standard_state
from registry.storage import migrate
from registry.storage.database import Database, open_database

B3 = "B3LYP-D3/6-31G(d)"
CC = "DLPNO-CCSD(T)/def2-TZVP"


def _measured(db: Database, label: str, smiles: str, **values: str) -> int:
    return api.add_measurement(db, {"method": "lineshape", "compound": label, "smiles": smiles,
                                    "process": "bond-rotation", **values})  # fmt: skip


def _computed(db: Database, label: str, dg: str, level: str, t: str = "298.15 K") -> int:
    return api.add_measurement(db, {"method": "computed", "compound": label, "dg": dg,
                                    "dg_t": t, "process": "bond-rotation", "theory": level,
                                    "standard_state": "1 M"})  # fmt: skip


def _filled(db: Database) -> None:
    _measured(db, "A1", "CN(C)C(=O)c1ccccc1", dg="65.0 kJ/mol", dg_t="298.15 K")
    _measured(db, "A2", "CN(C)C(=O)c1ccc(C)cc1", dg="64.0 kJ/mol", dg_t="298 K")
    # ΔH‡ and ΔS‡ only: ΔG‡(298.15 K) = 70.2 − 298.15 × (−0.0040) = 71.3926 kJ/mol
    _measured(db, "A3", "CN(C)C(=O)c1ccc(Cl)cc1", dh="70.2 kJ/mol", ds="-4.0 J/(mol K)",
              t_min="260 K", t_max="330 K")  # fmt: skip
    _measured(db, "A4", "CN(C)C(=O)c1ccc(F)cc1", dg="61.7 kJ/mol", dg_t="258 K")
    for label, b3, cc in (("A1", "63.0", "65.4"), ("A2", "62.5", "64.1"), ("A3", "69.0", None),
                          ("A4", "60.0", None)):  # fmt: skip
        _computed(db, label, f"{b3} kJ/mol", B3)
        if cc:
            _computed(db, label, f"{cc} kJ/mol", CC)


def test_pairs_at_a_common_temperature(database: Database) -> None:
    _filled(database)
    res = api.compare_computed(database)
    by = {(p.compound, p.level): p for p in res.pairs}
    assert by[("A3", B3)].measured_kj_mol == pytest.approx(70.2 + 298.15 * 0.0040)
    assert by[("A3", B3)].t_k == pytest.approx(298.15)
    # 298 K is 298.15 K within a rounding (1 K), so A2 compares at the common temperature
    assert by[("A2", CC)].error_kj_mol == pytest.approx(0.1)
    assert by[("A4", B3)].t_k is None  # 258 K without ΔH‡/ΔS‡: not aligned, and says why
    assert "measured at 258 K" in by[("A4", B3)].why_not
    stats = {s.level: s for s in res.stats}
    b3 = np.array([63.0 - 65.0, 62.5 - 64.0, 69.0 - (70.2 + 298.15 * 0.0040)])
    assert stats[B3].n == 3
    assert stats[B3].mse == pytest.approx(b3.mean())
    assert stats[B3].mae == pytest.approx(np.abs(b3).mean())
    assert stats[B3].rmse == pytest.approx(np.sqrt((b3**2).mean()))
    assert stats[B3].max_abs == pytest.approx(np.abs(b3).max())
    assert stats[CC].n == 2 and stats[CC].mse_ci is None  # too few pairs for an interval


def test_the_bootstrap_agrees_with_scipy() -> None:
    rng = np.random.default_rng(3)
    errors = rng.normal(-2.0, 3.0, size=40)
    mine = error_stats("x", errors.tolist())
    for ours, statistic in ((mine.mse_ci, np.mean), (mine.mae_ci, lambda e: np.abs(e).mean()),
                            (mine.rmse_ci, lambda e: np.sqrt((e**2).mean()))):  # fmt: skip
        theirs = sps.bootstrap((errors,), statistic, n_resamples=20000, method="percentile",
                               vectorized=False, random_state=1).confidence_interval  # fmt: skip
        width = theirs.high - theirs.low
        assert ours[0] == pytest.approx(theirs.low, abs=0.1 * width)
        assert ours[1] == pytest.approx(theirs.high, abs=0.1 * width)
    assert RESAMPLES >= 1000


def test_flagged_measured_values_are_left_out_unless_asked(database: Database) -> None:
    _filled(database)
    # a coalescence value whose ΔG‡ does not follow from its Tc and Δν: flagged by the check
    api.add_measurement(database, {"method": "coalescence", "compound": "A5", "smiles": "CC(=O)N(C)C",
        "process": "bond-rotation", "tc": "330 K", "dnu": "10 Hz", "field": "400 MHz",
        "dg": "60 kJ/mol"})  # fmt: skip
    _computed(database, "A5", "71.0 kJ/mol", B3, t="330 K")
    assert "A5" not in {p.compound for p in api.compare_computed(database).pairs}
    counted = api.compare_computed(database, include_flagged=True)
    assert "A5" in {p.compound for p in counted.pairs}
    assert {s.level: s.n for s in counted.stats}[B3] == 4


def test_two_levels_for_one_compound_are_two_measurements(
    database: Database, tmp_path: Path
) -> None:
    path = tmp_path / "computed.csv"
    path.write_text(
        "compound,smiles,method,process,T (K),dG (kJ/mol),level of theory\n"
        f"C1,CN(C)C=O,computed,bond-rotation,298.15,80.1,{B3}\n"
        f'C1,CN(C)C=O,computed,bond-rotation,298.15,84.0,"{CC}"\n',
        encoding="utf-8",
    )
    first = api.import_table(database, str(path))
    assert first["added"] == 2
    assert api.import_table(database, str(path))["unchanged"] == 2
    findings = [f for r in api.list_measurements(database)
                for f in api.get_measurement(database, r["id"])["findings"]]  # fmt: skip
    assert not [f for f in findings if f["rule_id"] == "repeat-disagrees"]


def test_the_cli(cli, database: Database, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    _filled(database)
    plot = tmp_path / "parity.png"
    result = cli("compare", "--json", "--plot", str(plot))
    assert result.exit_code == 0, result.stderr
    data = json.loads(result.stdout)
    assert {lv["level"] for lv in data["levels"]} == {B3, CC}
    assert data["T_K"] == pytest.approx(298.15)
    assert plot.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    text = cli("compare", "--level", "DLPNO", "--pairs")
    assert text.exit_code == 0
    assert B3 not in text.stdout and CC in text.stdout
    assert cli("compare", "--plot", str(tmp_path)).exit_code == 2  # a folder, refused first


def test_nothing_to_compare(cli) -> None:  # type: ignore[no-untyped-def]
    result = cli("compare")
    assert result.exit_code == 1
    assert "no computed barrier could be compared with a measured one" in result.stdout


def test_show_and_edit_the_level_of_theory(cli, database: Database) -> None:  # type: ignore[no-untyped-def]
    mid = api.add_measurement(database, {"method": "computed", "compound": "Z", "dg": "70 kJ/mol",
        "dg_t": "298.15 K", "theory": "ωB97X-D/def2-TZVP, SMD(CHCl3)", "functional": "ωB97X-D",
        "basis": "def2-TZVP", "solvation": "SMD(CHCl3)", "conformers": "lowest conformer",
        "standard_state": "1 mol/L"})  # fmt: skip
    assert cli("edit", str(mid), "--set", "basis=def2-QZVP").exit_code == 0
    shown = cli("show", str(mid)).stdout
    for line in ("theory       ωB97X-D/def2-TZVP, SMD(CHCl3)", "basis      def2-QZVP",
                 "std. state   1 M", "conformers lowest conformer"):  # fmt: skip
        assert line in shown
    bad = cli("add", "--method", "computed", "--compound", "Y", "--dg", "70 kJ/mol",
              "--standard-state", "2 M")  # fmt: skip
    assert bad.exit_code == 1
    assert "standard_state: cannot read '2 M': a standard state is one of 1 M, 1 atm" in bad.stderr


@pytest.mark.parametrize(
    ("text", "state"),
    [("1 M", "1 M"), ("1 mol/L", "1 M"), ("1 mol dm-3", "1 M"), ("1 mol dm⁻³", "1 M"),
     ("1 atm", "1 atm"), ("gas phase", "1 atm"), ("1 bar", "1 bar"), ("100 kPa", "1 bar")],
)  # fmt: skip
def test_standard_state_spellings(text: str, state: str) -> None:
    assert read_standard_state(text) == state


@given(st.text(max_size=20))
def test_a_standard_state_is_read_or_refused(text: str) -> None:
    try:
        assert read_standard_state(text) in STANDARD_STATES
    except Exception as exc:
        assert "a standard state is one of" in str(exc)


@pytest.mark.parametrize("header", ["dS (J/(mol K))", "ΔS‡ [J/(mol·K)]", "dS (J/(mol*K))"])
def test_units_with_parentheses_in_headers(header: str) -> None:
    guess = guess_header(header)
    assert guess.field == "ds" and guess.unit is not None and "mol" in guess.unit


def test_migration_0007_up_and_down(tmp_path: Path) -> None:
    database = open_database(str(tmp_path / "m.sqlite"), must_exist=False)
    try:
        migrate.upgrade(database, "0007")
        columns = {
            c["name"] for c in inspect(database.sqlalchemy_engine()).get_columns("measurement")
        }
        assert {"theory_level", "theory_basis", "standard_state"} <= columns
        migrate.downgrade(database, "0005")
        columns = {
            c["name"] for c in inspect(database.sqlalchemy_engine()).get_columns("measurement")
        }
        assert "theory_level" not in columns and "k_convention" in columns
    finally:
        database.close()


def test_the_library_refuses_a_bad_temperature(database: Database) -> None:
    with pytest.raises(UsageError):
        api.compare_computed(database, plot="x.gif")


@pytest.mark.parametrize("suffix", [".png", ".svg", ".pdf"])
def test_the_parity_plot_in_the_print_style(
    database: Database, tmp_path: Path, suffix: str
) -> None:
    _filled(database)
    out = tmp_path / f"parity{suffix}"
    res = api.compare_computed(database, plot=str(out), style="print", size="single", dpi=200)
    data = out.read_bytes()
    assert res.plot == str(out) and len(data) > 1000
    if suffix == ".png":  # a single journal column (3.3 in wide) at 200 dpi: 660 pixels
        width = int.from_bytes(data[16:20], "big")
        assert width == round(3.3 * 200)
    elif suffix == ".pdf":
        assert data.startswith(b"%PDF")
    else:
        assert b"<svg" in data[:2000]
    with pytest.raises(UsageError):
        api.compare_computed(database, plot=str(out), style="poster")
