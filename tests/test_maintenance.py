"""backup, restore, verify, db upgrade/current on real files; verify finds each kind of damage.

Check values: 1 kcal = 4.184 kJ exactly (thermochemical calorie, NIST SP 811 (2008) B.8);
T/K = t/°C + 273.15 (NIST SP 811 (2008) 4.2.1.1).
"""

from __future__ import annotations

import json
import os
import sqlite3
import subprocess
import sys
from datetime import UTC, datetime
from pathlib import Path

import pytest
from sqlalchemy import MetaData, Table, insert

from registry import api
from registry.admin.verify import verify_file
from registry.storage import audit, migrate
from registry.storage.database import open_database

FLUXLEDGER = Path(sys.executable).with_name("fluxledger")

ADD = [
    "add", "--method", "coalescence", "--smiles", "CN(C)C(=O)c1ccc(Cl)cc1", "--compound", "AM-1",
    "--process", "amide rotation", "--nucleus", "1H", "--solvent", "CDCl3", "--mhz", "400",
    "--tc", "-12 °C", "--dnu", "0.045 ppm", "--dg", "13.3 ± 0.3 kcal/mol",
    "--rate", "250 K, 12.5 s-1",
]  # fmt: skip


def _sql(path: Path, statement: str, *, fk: bool = True) -> None:
    conn = sqlite3.connect(path)
    conn.execute(f"PRAGMA foreign_keys = {'ON' if fk else 'OFF'}")
    conn.execute(statement)
    conn.commit()
    conn.close()


def _verify(path: Path) -> dict:
    return verify_file(path)


def _failed(report: dict) -> dict[str, list[str]]:
    return {c["check"]: c["problems"] for c in report["checks"] if not c["ok"]}


@pytest.fixture
def filled(cli, db_path: Path) -> Path:  # type: ignore[no-untyped-def]
    assert cli(*ADD).exit_code == 0
    # both values agree with their Tc and Δν (18 Hz): ΔG‡(Tc) = 55.67 kJ/mol at −12 °C and
    # 56.10 kJ/mol at −10 °C (Gutowsky–Holm + Eyring, scipy.constants; computed beside the
    # test), so no check flags them and the history holds only these three revisions
    assert cli(*ADD[:-4], "--dg", "56 kJ/mol").exit_code == 0
    assert cli("edit", "2", "--set", "tc=-10 °C").exit_code == 0
    return db_path


def test_verify_a_clean_registry(cli, filled: Path) -> None:  # type: ignore[no-untyped-def]
    result = cli("verify")
    assert result.exit_code == 0, result.stdout
    head = api.history_anchor(str(filled))
    assert head is not None and head.startswith("3:") and len(head) == 2 + 16
    assert result.stdout.splitlines() == [
        f"verify sqlite:///{filled}",
        "  ok      integrity",
        "  ok      foreign keys",
        "  ok      schema  (at head " + migrate.head_revision() + "; tables match the models)",
        f"  ok      history  (3 revisions, hash chain, head {head})",
        "  ok      accounted  (measurements and acceptances)",
        "  ok      state  (2 measurements replayed from the history)",
        "  ok      findings  (statuses follow the findings; stored findings not derived again: "
        "no check of the whole registry has recorded its rules yet)",
        "  ok      numbers  (every stored number finite)",
        "  ok      values  (12 reported values read again)",
        "all checks passed",
    ]
    report = json.loads(cli("verify", "--json").stdout)
    assert report["ok"] is True
    assert [c["check"] for c in report["checks"]] == [
        "integrity",
        "foreign keys",
        "schema",
        "history",
        "accounted",
        "state",
        "findings",
        "numbers",
        "values",
    ]


def test_verify_finds_a_value_that_does_not_match_its_text(cli, filled: Path) -> None:  # type: ignore[no-untyped-def]
    _sql(filled, "UPDATE measurement SET dg_kj_mol = 61.0 WHERE id = 1")
    _sql(filled, "UPDATE coalescence SET tc_k = 262.15 WHERE measurement_id = 2")
    _sql(filled, "UPDATE rate_point SET k_per_s = 125 WHERE id = 1")
    result = cli("verify")
    assert result.exit_code == 1
    assert _failed(_verify(filled)) == {
        # the floats changed without their texts, and without a revision (the rate point's
        # float is not in the history, which keeps the texts of rate points)
        "state": [
            "measurement 1: dg_kj_mol is 61 but its history ends at 55.6472 (revision 1): "
            "changed without a revision",
            "measurement 2: coalescence tc_k is 262.15 but its history ends at 263.15 "
            "(revision 3): changed without a revision",
        ],
        "values": [
            "measurement 1: dg_text '13.3 ± 0.3 kcal/mol' reads as 55.6472, stored 61.0",
            "measurement 2 coalescence 2: tc_text '-10 °C' reads as 263.15, stored 262.15",
            "measurement 1 rate point 1: k_text '12.5 s-1' reads as 12.5, stored 125.0",
        ],
    }
    assert "  PROBLEM values  3 problem(s)  (12 reported values read again)" in result.stdout
    assert result.stdout.endswith("the registry has problems (exit 1)\n")


def test_verify_finds_an_edited_revision_and_a_broken_link(cli, filled: Path) -> None:  # type: ignore[no-untyped-def]
    _sql(filled, "UPDATE revision SET actor = 'mallory' WHERE id = 2")
    assert _failed(_verify(filled)) == {
        "history": ["revision 2: content does not match its hash (edited after the fact)"]
    }
    _sql(filled, "DELETE FROM revision WHERE id = 2")
    assert _failed(_verify(filled)) == {
        "history": [
            "revision 3: previous-hash link broken (a revision before it was changed or removed)"
        ],
        "accounted": ["measurement 2 has no revision that created it (inserted by hand?)"],
    }
    assert cli("verify").exit_code == 1


def test_verify_finds_a_row_pointing_nowhere(cli, filled: Path) -> None:  # type: ignore[no-untyped-def]
    _sql(
        filled,
        "INSERT INTO rate_point (id, measurement_id, t_k, t_text, k_per_s, k_text) "
        "VALUES (99, 42, 300.0, '300 K', 1.0, '1 s-1')",
        fk=False,
    )
    assert _failed(_verify(filled)) == {
        "foreign keys": ["table rate_point row 99: refers to a missing row of measurement"]
    }


def test_verify_reports_a_schema_behind_the_head(cli, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    revisions = migrate.known_revisions()
    if len(revisions) < 2:
        pytest.skip("only one migration revision")
    path = tmp_path / "old.sqlite"
    database = open_database(str(path), must_exist=False)
    migrate.upgrade(database, revisions[0])
    database.close()
    report = _verify(path)
    assert _failed(report) == {
        "schema": [
            f"schema at {revisions[0]}, head is {revisions[-1]}: run 'fluxledger db upgrade'"
        ]
    }


def test_backup_then_restore_into_a_new_file(cli, filled: Path, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    dest = tmp_path / "copy.sqlite"
    result = cli("backup", str(dest))
    assert result.exit_code == 0, result.stderr
    assert result.stdout.startswith(f"backup written: {dest} (2 measurements, 3 revisions, schema ")
    assert not Path(f"{dest}-wal").exists()  # a single self-contained file
    assert _verify(dest)["ok"]
    again = cli("backup", str(dest))
    assert (again.exit_code, again.stderr) == (
        2,
        f"error: backup {dest}: exists; choose another name, or allow replacing it (overwrite)\n",
    )
    assert cli("backup", str(dest), "--force").exit_code == 0
    target = tmp_path / "restored.sqlite"
    from typer.testing import CliRunner

    from registry.cli.main import app

    restored = CliRunner().invoke(app, ["--db", str(target), "restore", str(dest)])
    assert restored.exit_code == 0, restored.stderr
    assert restored.stdout == (
        f"restored {target} from {dest} (2 measurements, 3 revisions, schema "
        f"{migrate.head_revision()})\n"
    )
    assert _verify(target)["ok"]
    database = api.open_registry(str(target))
    try:
        assert [r["id"] for r in api.list_measurements(database)] == [1, 2]
    finally:
        database.close()


def test_backup_into_a_folder_gets_a_dated_name(cli, filled: Path, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    folder = tmp_path / "backups"
    folder.mkdir()
    result = json.loads(cli("backup", str(folder), "--json").stdout)
    made = Path(result["backup"])
    assert made.parent == folder
    assert made.name.startswith("registry.backup-") and made.suffix == ".sqlite"
    assert result["measurements"] == 2


def test_restore_over_a_registry_needs_force_and_keeps_a_safety_copy(
    cli, filled: Path, tmp_path: Path
) -> None:  # type: ignore[no-untyped-def]
    dest = tmp_path / "one.sqlite"
    assert cli("backup", str(dest)).exit_code == 0
    assert cli("retract", "1", "--reason", "later found wrong").exit_code == 0
    refused = cli("restore", str(dest))
    assert refused.exit_code == 2
    assert refused.stderr == (
        f"error: {filled} exists; allow replacing its content (force) "
        "(a safety backup of the current content is taken first)\n"
    )
    done = cli("restore", str(dest), "--force")
    assert done.exit_code == 0, done.stderr
    first = done.stdout.splitlines()[0]
    assert first.startswith(f"previous content saved to {filled.parent}/registry.before-restore-")
    safety = Path(first.split(" to ", 1)[1])
    database = api.open_registry(str(filled))
    try:  # back to the state of the backup: the retraction is gone
        assert api.get_measurement(database, 1)["status"] == "draft"
    finally:
        database.close()
    conn = sqlite3.connect(safety)
    assert conn.execute("SELECT status FROM measurement WHERE id = 1").fetchone() == ("retracted",)
    conn.close()
    assert _verify(filled)["ok"]


def test_restore_refuses_a_damaged_backup_and_touches_nothing(
    cli, filled: Path, tmp_path: Path
) -> None:  # type: ignore[no-untyped-def]
    dest = tmp_path / "bad.sqlite"
    assert cli("backup", str(dest)).exit_code == 0
    _sql(dest, "UPDATE revision SET reason = 'rewritten' WHERE id = 1")
    before = filled.read_bytes()
    result = cli("restore", str(dest), "--force")
    assert result.exit_code == 1
    assert result.stderr == (
        f"error: {dest} failed verification; nothing was restored\n"
        "  history: revision 1: content does not match its hash (edited after the fact)\n"
    )
    assert not list(filled.parent.glob("registry.before-restore-*"))
    assert _verify(filled)["ok"]
    assert len(filled.read_bytes()) == len(before)
    not_db = tmp_path / "notes.txt"
    not_db.write_text("this is not a database\n" * 200)
    garbage = cli("restore", str(not_db), "--force")
    assert garbage.exit_code == 1
    assert garbage.stderr.startswith(f"error: {not_db} is not a readable SQLite file: ")
    missing = cli("restore", str(tmp_path / "nope.sqlite"))
    assert (missing.exit_code, missing.stderr) == (
        2,
        f"error: no backup file at {tmp_path / 'nope.sqlite'}\n",
    )


def test_db_current_and_a_no_op_upgrade(cli, db_path: Path) -> None:  # type: ignore[no-untyped-def]
    head = migrate.head_revision()
    assert cli("db", "current").stdout == f"schema {head}  (head {head})\nup to date\n"
    assert json.loads(cli("db", "current", "--json").stdout)["pending"] == []
    result = cli("db", "upgrade")
    assert (result.exit_code, result.stdout) == (0, f"schema already at {head}; nothing to do\n")
    assert not list(db_path.parent.glob("*.before-upgrade-*"))


# Data as a registry at the FIRST schema revision held it. These columns are those of 0001 and
# never change; later revisions must carry the rows over (the test walks every later revision).
_AT = datetime(2026, 1, 15, 9, 30, tzinfo=UTC)
_FIRST_SCHEMA_ROWS: dict[str, list[dict]] = {
    "compound": [
        {"id": 1, "label": "OLD-1", "name": "N,N-dimethylacetamide", "smiles_input": "CC(=O)N(C)C",
         "smiles_canonical": "CC(=O)N(C)C", "inchikey": "FXHOOIRPVKKKFG-UHFFFAOYSA-N",
         "structure_ok": True, "created_at": _AT},
    ],
    "process": [{"id": 1, "compound_id": 1, "kind": "bond-rotation", "sites": "N-CH3", "nucleus": "1H"}],
    "measurement": [
        {"id": 1, "compound_id": 1, "process_id": 1, "method": "coalescence", "solvent_text": "CDCl3",
         "dg_kj_mol": 18.1 * 4.184, "dg_text": "18.1 kcal/mol", "dg_t_k": 343.15,
         "entered_by": "old", "entered_at": _AT, "status": "reviewed"},
    ],
    "coalescence": [
        {"id": 1, "measurement_id": 1, "tc_k": 343.15, "tc_text": "70 °C", "dnu_hz": 48.0,
         "dnu_text": "0.12 ppm", "field_mhz": 400.0, "field_text": "400 MHz"},
    ],
    "rate_point": [
        {"id": 1, "measurement_id": 1, "t_k": 343.15, "t_text": "343.15 K", "k_per_s": 106.6,
         "k_text": "106.6 s-1"},
    ],
}  # fmt: skip


def _fill_first_schema(path: Path) -> None:
    """Insert the fixture rows (and a hash-chained revision) into a registry at the first revision."""
    database = open_database(str(path), must_exist=False)
    migrate.upgrade(database, migrate.known_revisions()[0])
    with database.sqlalchemy_engine().begin() as conn:  # an old schema: plain SQLAlchemy
        meta = MetaData()
        for table, rows in _FIRST_SCHEMA_ROWS.items():
            conn.execute(insert(Table(table, meta, autoload_with=conn)), rows)
        revision = {
            "entity": "measurement",
            "entity_id": 1,
            "action": "add",
            "actor": "old",
            "at": _AT,
            "before_json": None,
            "after_json": audit.to_json({"dg_text": "18.1 kcal/mol"}),
            "reason": None,
            "batch_id": None,
            "prev_hash": audit.GENESIS,
        }
        revision["hash"] = audit.revision_hash(audit.GENESIS, revision)
        conn.execute(insert(Table("revision", meta, autoload_with=conn)), [revision])
    database.close()


def _rows_kept(path: Path) -> None:
    database = open_database(str(path))
    try:
        with database.read() as conn:
            for table, rows in _FIRST_SCHEMA_ROWS.items():
                stored = conn.records(f"SELECT * FROM {table} ORDER BY id")
                assert len(stored) == len(rows), table
                for want, have in zip(rows, stored, strict=True):
                    for column, value in want.items():
                        got = have[column]
                        if isinstance(value, datetime):
                            assert got.replace(tzinfo=UTC) == value, (table, column)
                        else:
                            assert got == value, (table, column)
    finally:
        database.close()


def test_every_revision_after_the_first_keeps_the_data(tmp_path: Path) -> None:
    path = tmp_path / "old.sqlite"
    _fill_first_schema(path)
    for revision in migrate.known_revisions()[1:]:
        database = open_database(str(path))
        migrate.upgrade(database, revision)
        assert migrate.current_revision(database) == revision
        database.close()
        _rows_kept(path)


def test_db_upgrade_of_the_installed_command_from_the_first_schema(tmp_path: Path) -> None:
    """A real process: ``fluxledger db upgrade`` backs up, upgrades, keeps rows; verify is clean."""
    path = tmp_path / "old.sqlite"
    _fill_first_schema(path)
    revisions = migrate.known_revisions()
    env = {**os.environ, "FLUXLEDGER_DB": str(path), "FLUXLEDGER_USER": "tester"}

    def run(*args: str) -> subprocess.CompletedProcess[str]:
        return subprocess.run(
            [str(FLUXLEDGER), *args], capture_output=True, text=True, env=env, timeout=120
        )

    upgraded = run("db", "upgrade")
    assert upgraded.returncode == 0, upgraded.stderr
    if len(revisions) > 1:
        lines = upgraded.stdout.splitlines()
        assert lines[0].startswith(f"backup written: {tmp_path}/old.before-upgrade-{revisions[0]}-")
        assert lines[1] == (
            f"schema upgraded {revisions[0]} → {revisions[-1]} (applied {', '.join(revisions[1:])})"
        )
        backup = Path(lines[0].split(": ", 1)[1])
        conn = sqlite3.connect(backup)
        assert conn.execute("SELECT version_num FROM alembic_version").fetchone() == (revisions[0],)
        assert conn.execute("SELECT dg_text FROM measurement").fetchall() == [("18.1 kcal/mol",)]
        conn.close()
    else:
        assert upgraded.stdout == f"schema already at {revisions[0]}; nothing to do\n"
    _rows_kept(path)
    verified = run("verify")
    assert verified.returncode == 0, verified.stdout
    listed = json.loads(run("list", "--json").stdout)
    assert [(r["compound"], r["dg_kj_mol"]) for r in listed] == [
        ("OLD-1", pytest.approx(18.1 * 4.184))  # NIST SP 811 B.8
    ]


def test_a_carbon_separation_in_ppm_is_checked_at_the_carbon_frequency(cli, db_path: Path) -> None:  # type: ignore[no-untyped-def]
    """0.5 ppm of 13C on a 400 MHz magnet is 0.5 × 400 × 0.25145020 Hz (IUPAC Ξ(13C) = 25.145020 %,
    Harris et al., Pure Appl. Chem. 73, 1795 (2001), Table 1)."""
    added = cli(
        "add", "--method", "coalescence", "--compound", "C13-1", "--process", "ring inversion",
        "--nucleus", "13C", "--mhz", "400", "--tc", "-60 °C", "--dnu", "0.5 ppm",
        "--dg", "40 kJ/mol",
    )  # fmt: skip
    assert added.exit_code == 0, added.stderr
    assert cli("edit", "1", "--set", "reference=lab book 3").exit_code == 0
    assert _verify(db_path)["ok"]
    _sql(db_path, "UPDATE coalescence SET dnu_hz = 200.0 WHERE measurement_id = 1")  # at 1H
    assert _failed(_verify(db_path)) == {
        "state": [
            "measurement 1: coalescence dnu_hz is 200 but its history ends at 50.29004 "
            "(revision 1): changed without a revision"
        ],
        "values": ["measurement 1 coalescence 1: dnu_text '0.5 ppm' reads as 50.29, stored 200.0"],
    }
