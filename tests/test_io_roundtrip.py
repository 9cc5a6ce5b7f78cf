"""Round trips between a group's sheet and the registry: corrections survive re-imports, typo
fixes update, conflicts listed and decided, reviewed measurements, empty cells and missing
columns, snapshots, rate points (identity and the uid column: ``test_io_identity.py``).

The sheet is invented demo data (real structures, made-up measurements): three coalescence
measurements of amides, the first with a mistyped solvent (``CDC13``), the barriers being the
wrong values of a group's first draft that the registry later corrects.
"""

from __future__ import annotations

import csv
import json
from pathlib import Path
from typing import Any

import pytest
from test_io_import import write_csv, write_xlsx

from registry import api
from registry.api import import_table
from registry.errors import UsageError
from registry.storage.database import Database

HEADERS = [
    "label", "compound", "name", "SMILES", "method", "solvent", "field (MHz)", "Tc (°C)",
    "Δν (Hz)", "ΔG‡ (kcal/mol)", "ref", "notebook",
]  # fmt: skip
ROWS = [
    ["m1", "HG-A1", "N,N-dimethylbenzamide", "CN(C)C(=O)c1ccccc1", "coalescence", "CDC13", 400,
     12, 38.5, 6.3, "r1", "p1"],
    ["m2", "HG-A2", "1-acetylpiperidine", "CC(=O)N1CCCCC1", "coalescence", "CDCl3", 400, -20,
     48, 4.2, "r2", "p2"],
    ["m3", "HG-A3", "N,N-diisopropylacetamide", "CC(C)N(C(C)C)C(=O)C", "coalescence", "tol-d8",
     400, 95, 62, 18.1, "r3", "p3"],
]  # fmt: skip
# m1 and m2 are wrong on purpose; m3 agrees with its data: Tc 368.15 K, Δν 62 Hz →
# k_c = πΔν/√2, ΔG‡ = RT ln(k_B T / h k_c) = 18.10 kcal/mol (Gutowsky–Holm with the Eyring
# equation, computed by hand with scipy.constants), so it can be marked reviewed
KCAL = 4.184  # kJ per thermochemical kcal, exactly (NIST SP 811 (2008) B.8)


def sheet(tmp_path: Path, name: str, rows: list[list[Any]], headers: list[str] = HEADERS) -> Path:
    """The rows as a real file: .xlsx (one sheet 'entries') or .csv, by the name's suffix."""
    path = tmp_path / name
    if path.suffix == ".xlsx":
        return write_xlsx(path, {"entries": [headers, *rows]})
    return write_csv(path, headers, rows)


def changed(rows: list[list[Any]], **cells: Any) -> list[list[Any]]:
    """A copy of the rows with cells changed: ``m1_ref="x"`` sets column 'ref' of label m1."""
    out = [list(r) for r in rows]
    for key, value in cells.items():
        label, column = key.split("_", 1)
        out[[r[0] for r in out].index(label)][_COLUMN[column]] = value
    return out


_COLUMN = {"dg": 9, "ref": 10, "solvent": 5, "name": 2, "method": 4, "notebook": 11, "tc": 7}


def texts(database: Database, mid: int) -> dict[str, Any]:
    record = api.get_measurement(database, mid)
    return {
        "dg": record["dg_text"],
        "solvent": record["solvent_text"],
        "reference": record["reference"],
        "status": record["status"],
        "method": record["method"],
        "name": record["compound"]["name"],
        "extra": record["extra"],
    }


def revisions(database: Database, mid: int, action: str) -> list[dict[str, Any]]:
    return [r for r in api.history(database, mid, limit=None) if r["action"] == action]


def count(database: Database, table: str) -> int:
    with database.read() as conn:
        return int(conn.scalar(f"SELECT count(*) FROM {table}"))


@pytest.fixture
def imported(database: Database, tmp_path: Path) -> Database:
    summary = import_table(database, sheet(tmp_path, "group.xlsx", ROWS), actor="kofi")
    assert summary["measurement_ids"]["added"] == [1, 2, 3]
    return database


# ---------------------------------------------------------------- corrections survive


def test_corrections_in_the_registry_survive_reimporting_the_old_sheet(
    imported: Database, tmp_path: Path
) -> None:
    api.edit_measurement(imported, 1, {"dg": "20.5 kcal/mol"}, actor="ingrid")
    api.edit_measurement(imported, 2, {"dg": "9.7 kcal/mol"}, actor="ingrid")
    api.edit_measurement(
        imported, 3, {"dg": "18.05 kcal/mol", "status": "reviewed"}, actor="ingrid"
    )
    again = import_table(imported, tmp_path / "group.xlsx", actor="kofi")
    assert (again["added"], again["updated"], again["unchanged"], again["held"]) == (0, 0, 3, [])
    assert [texts(imported, i)["dg"] for i in (1, 2, 3)] == [
        "20.5 kcal/mol", "9.7 kcal/mol", "18.05 kcal/mol"
    ]  # fmt: skip
    assert api.get_measurement(imported, 1)["dg_kj_mol"] == pytest.approx(20.5 * KCAL)
    assert texts(imported, 3)["status"] == "reviewed"
    kept = {k["measurement_id"]: k for k in again["kept"] if k["field"] == "dg"}
    assert sorted(kept) == [1, 2, 3]
    assert kept[1]["registry"] == "20.5 kcal/mol" and kept[1]["file"] == "6.3 kcal/mol"
    assert (kept[1]["changed_by"], kept[1]["change"]) == ("ingrid", "edit")
    assert kept[1]["changed_at"] is not None
    assert all(not revisions(imported, i, "import-update") for i in (1, 2, 3))


def test_cli_says_what_was_kept(cli, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    path = sheet(tmp_path, "group.csv", ROWS)
    assert cli("--as", "kofi", "import", str(path)).exit_code == 0
    assert cli("--as", "ingrid", "edit", "1", "--set", "dg=20.5 kcal/mol").exit_code == 0
    result = cli("--as", "kofi", "import", str(path))
    assert result.exit_code == 0, result.stdout
    assert result.stdout.startswith(
        f"imported {path} (batch 2): 0 added, 0 updated, 3 unchanged, 0 rejected\n"
    )
    (line,) = [x for x in result.stdout.splitlines() if x.startswith("kept 1:")]
    assert line.startswith("kept 1: dg 20.5 kcal/mol (edit by ingrid, ")
    assert line.endswith(
        "; the file says 6.3 kcal/mol: the file has not changed since its last import; "
        "the registry's value stands"
    )


# ---------------------------------------------------------------- one identity, typo fixes


def test_typo_fixes_update_the_measurement_instead_of_adding_one(
    imported: Database, tmp_path: Path
) -> None:
    rows = changed(
        ROWS, m1_solvent="CDCl3", m1_name="N,N-Dimethylbenzamide", m2_method="lineshape",
        m3_ref="10.1000/invented.3",
    )  # fmt: skip
    summary = import_table(imported, sheet(tmp_path, "group.xlsx", rows), actor="kofi")
    assert (summary["added"], summary["updated"]) == (0, 3)
    assert summary["matched_by"] == {"label": 3}
    assert count(imported, "measurement") == 3
    one, two, three = (texts(imported, i) for i in (1, 2, 3))
    assert (one["solvent"], one["name"]) == ("CDCl3", "N,N-Dimethylbenzamide")
    assert two["method"] == "lineshape" and three["reference"] == "10.1000/invented.3"
    with imported.read() as conn:  # the corrected spelling now names the solvent table's row
        cdcl3 = conn.scalar("SELECT id FROM solvent WHERE name = 'chloroform-d'")
    assert api.get_measurement(imported, 1)["solvent_id"] == cdcl3
    (rev,) = revisions(imported, 1, "import-update")
    assert (rev["before"]["solvent_text"], rev["after"]["solvent_text"]) == ("CDC13", "CDCl3")
    assert rev["after"]["compound"] == {"name": "N,N-Dimethylbenzamide"}
    assert rev["reason"] == "re-import of group.xlsx, sheet 'entries', row 2"
    (rev,) = revisions(imported, 2, "import-update")
    assert (rev["before"]["method"], rev["after"]["method"]) == ("coalescence", "lineshape")


def test_dry_run_shows_each_update_field_by_field(cli, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    assert cli("import", str(sheet(tmp_path, "group.csv", ROWS))).exit_code == 0
    fixed = sheet(tmp_path, "group.csv", changed(ROWS, m1_solvent="CDCl3"))
    result = cli("import", str(fixed), "--dry-run")
    assert result.exit_code == 0
    assert "\nwould add 0, update 1, leave 2 unchanged; 0 row(s) with problems\n" in result.stdout
    assert "\nupdate 1: solvent CDC13 → CDCl3\n" in result.stdout
    data = json.loads(cli("import", str(fixed), "--dry-run", "--json").stdout)
    assert [
        (u["measurement_id"], u["field"], u["registry"], u["file"]) for u in data["updates"]
    ] == [(1, "solvent", "CDC13", "CDCl3")]
    assert (
        api.get_measurement(api.open_registry(str(tmp_path / "registry.sqlite")), 1)["solvent_text"]
        == "CDC13"
    )  # a dry run writes nothing


# ---------------------------------------------------------------- reviewed, conflicts


@pytest.mark.parametrize("prefer", [None, "file", "registry"])
def test_a_reviewed_measurement_changes_only_by_choice(
    imported: Database, tmp_path: Path, prefer: str | None
) -> None:
    api.edit_measurement(imported, 3, {"status": "reviewed"}, actor="ingrid")
    rows = changed(ROWS, m3_ref="r3 (2019)", m2_ref="r2 (2020)")
    summary = import_table(imported, sheet(tmp_path, "group.xlsx", rows), prefer=prefer)
    (c,) = summary["conflicts"]
    assert (c["measurement_id"], c["field"], c["file"], c["registry"]) == (
        3,
        "reference",
        "r3 (2019)",
        "r3",
    )
    assert (c["changed_by"], c["change"], c["resolved"]) == ("ingrid", "review", prefer)
    assert texts(imported, 2)["reference"] == "r2 (2020)"  # the rest of the file is written
    assert texts(imported, 3)["status"] == "reviewed"
    updates = revisions(imported, 3, "import-update")
    if prefer == "file":
        assert texts(imported, 3)["reference"] == "r3 (2019)"
        (rev,) = updates
        assert "a reviewed measurement, changed (reference) because the importing user chose " \
            "the file's values (prefer file)" in rev["reason"]  # fmt: skip
        assert summary["held"] == []
    else:
        assert texts(imported, 3)["reference"] == "r3" and updates == []
        assert summary["held"] == ([3] if prefer is None else [])


def test_conflicts_are_listed_and_nothing_is_written_for_them(
    imported: Database, tmp_path: Path
) -> None:
    api.edit_measurement(imported, 1, {"dg": "20.5 kcal/mol"}, actor="ingrid")
    rows = changed(ROWS, m1_dg=19.5, m1_ref="r1 (corrected)", m2_dg=9.7)
    path = sheet(tmp_path, "group.xlsx", rows)
    summary = import_table(imported, path, actor="kofi")
    (c,) = summary["conflicts"]
    assert (c["measurement_id"], c["field"], c["file"], c["registry"], c["last_import"]) == (
        1, "dg", "19.5 kcal/mol", "20.5 kcal/mol", "6.3 kcal/mol"
    )  # fmt: skip
    assert (c["changed_by"], c["change"], c["resolved"]) == ("ingrid", "edit", None)
    assert summary["held"] == [1] and summary["measurement_ids"]["updated"] == [2]
    assert texts(imported, 1)["dg"] == "20.5 kcal/mol"
    assert texts(imported, 1)["reference"] == "r1"  # nothing written for measurement 1
    assert texts(imported, 2)["dg"] == "9.7 kcal/mol"
    with imported.read() as conn:  # no snapshot for the held row: its news is not forgotten
        batch = conn.scalar("SELECT max(id) FROM import_batch")
        held = conn.scalar(
            "SELECT count(*) FROM import_snapshot WHERE measurement_id = 1 AND batch_id = :b",
            {"b": batch},
        )
        status = conn.scalar("SELECT status FROM import_batch WHERE id = :b", {"b": batch})
    assert (held, status) == (0, "partial")
    again = import_table(imported, path)  # still a conflict
    assert again["held"] == [1]


@pytest.mark.parametrize("prefer", ["file", "registry"])
def test_conflicts_are_decided_either_way(imported: Database, tmp_path: Path, prefer: str) -> None:
    api.edit_measurement(imported, 1, {"dg": "20.5 kcal/mol"}, actor="ingrid")
    path = sheet(tmp_path, "group.xlsx", changed(ROWS, m1_dg=19.5, m1_ref="r1 (corrected)"))
    summary = import_table(imported, path, prefer=prefer)
    assert summary["held"] == [] and summary["conflicts"][0]["resolved"] == prefer
    one = texts(imported, 1)
    assert one["reference"] == "r1 (corrected)"  # not in conflict: the file's correction
    assert one["dg"] == ("19.5 kcal/mol" if prefer == "file" else "20.5 kcal/mol")
    (rev,) = revisions(imported, 1, "import-update")
    if prefer == "file":
        assert rev["reason"].endswith("; conflicts (dg) decided for the file (prefer file)")
        assert rev["after"]["dg_kj_mol"] == pytest.approx(19.5 * KCAL)
    else:
        assert "dg_text" not in rev["after"]
    # the choice is remembered: the same file again brings no conflict
    again = import_table(imported, path)
    assert again["conflicts"] == [] and again["updated"] == 0


def test_cli_conflict_exit_status_and_choice(cli, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    assert cli("import", str(sheet(tmp_path, "group.csv", ROWS))).exit_code == 0
    assert cli("--as", "ingrid", "edit", "1", "--set", "dg=20.5 kcal/mol").exit_code == 0
    path = sheet(tmp_path, "group.csv", changed(ROWS, m1_dg=19.5))
    dry = cli("import", str(path), "--dry-run")
    assert dry.exit_code == 1
    assert "would add 0, update 0, leave 2 unchanged, hold back 1 (conflicts);" in dry.stdout
    result = cli("import", str(path))
    assert result.exit_code == 1
    (line,) = [x for x in result.stdout.splitlines() if x.startswith("conflict 1:")]
    assert line.startswith(
        "conflict 1: dg: file 19.5 kcal/mol, registry 20.5 kcal/mol (edit by ingrid, "
    )
    assert line.endswith(
        ", at the last import 6.3 kcal/mol — changed in the file and in the registry since the "
        "last import; nothing written for this measurement"
    )
    assert (
        "1 measurement(s) held back by conflicts (1): nothing written for them; choose with "
        "--prefer file or --prefer registry"
    ) in result.stdout
    data = json.loads(cli("import", str(path), "--json").stdout)
    assert data["held"] == [1] and data["conflicts"][0]["field"] == "dg"
    decided = cli("import", str(path), "--prefer", "file")
    assert decided.exit_code == 0
    assert (
        "update 1: dg 20.5 kcal/mol → 19.5 kcal/mol (your choice: --prefer file)" in decided.stdout
    )
    bad = cli("import", str(path), "--prefer", "mine")
    assert bad.exit_code == 2 and "prefer must be one of file, registry (got 'mine')" in bad.stderr


def test_prefer_is_checked(database: Database, tmp_path: Path) -> None:
    with pytest.raises(UsageError, match="prefer must be one of file, registry"):
        import_table(database, sheet(tmp_path, "group.csv", ROWS), prefer="newest")


# ---------------------------------------------------------------- missing columns, empty cells


@pytest.mark.parametrize("how", ["dropped", "misspelled"])
def test_a_missing_or_unrecognised_column_changes_nothing(
    imported: Database, tmp_path: Path, how: str
) -> None:
    out = tmp_path / "export.csv"
    api.export_measurements(imported, out)
    with out.open(encoding="utf-8") as fh:
        rows = list(csv.reader(fh))
    j = rows[0].index("dg")
    if how == "dropped":
        rows = [r[:j] + r[j + 1 :] for r in rows]
    else:
        rows[0][j] = "Barier"
    with out.open("w", newline="", encoding="utf-8") as fh:
        csv.writer(fh).writerows(rows)
    summary = import_table(imported, out)
    assert [u for u in summary["updates"] if u["field"] == "dg"] == []
    assert [texts(imported, i)["dg"] for i in (1, 2, 3)] == [
        "6.3 kcal/mol", "4.2 kcal/mol", "18.1 kcal/mol"
    ]  # fmt: skip
    if how == "dropped":
        assert summary["updated"] == 0


@pytest.mark.parametrize("suffix", ["csv", "xlsx"])
def test_an_empty_cell_clears_only_when_asked(
    imported: Database, tmp_path: Path, suffix: str
) -> None:
    path = sheet(tmp_path, f"blank.{suffix}", changed(ROWS, m1_ref=None, m1_notebook=None))
    summary = import_table(imported, path)
    assert summary["updated"] == 0
    assert texts(imported, 1)["reference"] == "r1"
    assert texts(imported, 1)["extra"] == {"notebook": "p1"}
    summary = import_table(imported, path, empty_clears=True)
    assert summary["measurement_ids"]["updated"] == [1]
    assert {(u["field"], u["registry"], u["file"]) for u in summary["updates"]} == {
        ("reference", "r1", None), ("extra: notebook", "p1", None)
    }  # fmt: skip
    assert texts(imported, 1)["reference"] is None and texts(imported, 1)["extra"] is None
    (rev,) = revisions(imported, 1, "import-update")
    assert (rev["before"]["reference"], rev["after"]["reference"]) == ("r1", None)


# ---------------------------------------------------------------- no snapshot, snapshots


def test_a_measurement_entered_by_hand_then_imported(database: Database, tmp_path: Path) -> None:
    for label, dg in (("m1", "6.3 kcal/mol"), ("m2", "4.2 kcal/mol")):
        row = ROWS[0] if label == "m1" else ROWS[1]
        api.add_measurement(
            database,
            {"label": label, "compound": row[1], "smiles": row[3], "method": "coalescence",
             "solvent": row[5], "field": "400 MHz", "tc": f"{row[7]} °C",
             "dnu": f"{row[8]} Hz", "dg": dg, "reference": row[10]},
            check=False,
        )  # fmt: skip
    api.edit_measurement(database, 2, {"dg": "9.7 kcal/mol"}, actor="ingrid")
    rows = changed(ROWS[:2], m1_dg=14.2, m2_dg=12.0)
    summary = import_table(database, sheet(tmp_path, "late.csv", rows))
    # never imported, never changed by hand: the file's value; changed by hand: a conflict
    assert texts(database, 1)["dg"] == "14.2 kcal/mol"
    (c,) = summary["conflicts"]
    assert (c["measurement_id"], c["last_import"]) == (2, None)
    assert c["why"] == (
        "no earlier import to compare with, and the registry's value was changed by hand"
    )
    # the value the registry had before the edit brings no news: kept
    summary = import_table(database, sheet(tmp_path, "old.csv", changed(ROWS[1:2])))
    (k,) = [k for k in summary["kept"] if k["field"] == "dg"]
    assert k["why"] == "the file holds an earlier value the registry has since replaced"
    assert summary["held"] == []


def test_snapshots_hold_what_the_file_said(imported: Database, tmp_path: Path) -> None:
    with imported.read() as conn:
        snaps = conn.records("SELECT * FROM import_snapshot ORDER BY id")
    assert [(s["measurement_id"], s["batch_id"], s["source_row"]) for s in snaps] == [
        (1, 1, 2), (2, 1, 3), (3, 1, 4)
    ]  # fmt: skip
    first = json.loads(snaps[0]["fields_json"])
    assert first == {
        "compound": "HG-A1",
        "dg": "6.3 kcal/mol",
        "dnu": "38.5 Hz",
        "extra: notebook": "p1",
        "field": "400 MHz",
        "label": "m1",
        "method": "coalescence",
        "name": "N,N-dimethylbenzamide",
        "reference": "r1",
        "smiles": "CN(C)C(=O)c1ccccc1",
        "solvent": "CDC13",
        "tc": "12 °C",
    }  # fmt: skip  (only the columns the sheet has)
    import_table(imported, tmp_path / "group.xlsx")  # the same sheet again: nothing new to keep
    assert count(imported, "import_snapshot") == 3
    blank = sheet(tmp_path, "group.xlsx", changed(ROWS, m1_ref=None))
    import_table(imported, blank)  # an empty cell says nothing: not recorded
    import_table(imported, blank, empty_clears=True)  # …unless it is to clear the value
    with imported.read() as conn:
        said = [json.loads(t) for t in conn.column("SELECT fields_json FROM import_snapshot")]
    assert "reference" not in said[3] and said[4]["reference"] is None


# ---------------------------------------------------------------- rate points from a rates sheet


def test_rate_points_added_by_hand_survive_an_old_rates_sheet(
    database: Database, tmp_path: Path
) -> None:
    entries = [["label", "compound", "SMILES", "method", "ΔH‡ (kJ/mol)"],
               ["L1", "B1", "Cc1ccccc1-c1ccccc1C", "DNMR", 70.0]]  # fmt: skip
    rates = [["label", "T (°C)", "k (s-1)"], ["L1", 80, 25.0], ["L1", 90, 60.0]]
    import_table(database, write_xlsx(tmp_path / "book.xlsx", {"entries": entries, "rates": rates}))
    only_rates = write_xlsx(tmp_path / "rates.xlsx", {"rates": rates})
    assert import_table(database, only_rates)["updated"] == 0
    # 100 °C = 373.15 K (NIST SP 811 (2008) 4.2.1.1)
    api.add_rate_points(
        database, 1, [{"t_k": 373.15, "t_text": "100 °C", "k_per_s": 140.0, "k_text": "140 s-1"}],
        actor="ingrid",
    )  # fmt: skip
    summary = import_table(database, only_rates)
    assert summary["updated"] == 0 and summary["held"] == []
    (k,) = summary["kept"]
    assert (k["field"], k["changed_by"], k["change"]) == ("rates", "ingrid", "rate-points")
    assert len(api.get_measurement(database, 1)["rate_points"]) == 3
    changed_rates = write_xlsx(
        tmp_path / "rates.xlsx", {"rates": [rates[0], rates[1], ["L1", 90, 61.0]]}
    )
    assert import_table(database, changed_rates)["held"] == [1]
    assert len(api.get_measurement(database, 1)["rate_points"]) == 3
    summary = import_table(database, changed_rates, prefer="file")
    assert summary["held"] == [] and summary["updated"] == 1
    points = api.get_measurement(database, 1)["rate_points"]
    assert [p["k_text"] for p in points] == ["25 s-1", "61 s-1"]
