"""Importing spreadsheets: values and units, extras, rates, upserts, batches, atomicity."""

from __future__ import annotations

import csv
import json
from pathlib import Path

import pytest
from openpyxl import Workbook

from registry import api
from registry.api import import_table
from registry.errors import ImportRowError
from registry.io import changes, parallel, results
from registry.record.chem import read_structure
from registry.storage.database import Database

HEADERS = [
    "compound",
    "SMILES",
    "method",
    "solvent",
    "field (MHz)",
    "Tc (°C)",
    "Δν (Hz)",
    "ΔG‡ (kcal/mol)",
    "label",
    "ref",
    "notebook",
]


def write_csv(path: Path, headers: list[str], rows: list[list[object]]) -> Path:
    with path.open("w", newline="", encoding="utf-8") as fh:
        writer = csv.writer(fh)
        writer.writerow(headers)
        writer.writerows(rows)
    return path


def write_xlsx(path: Path, sheets: dict[str, list[list[object]]]) -> Path:
    book = Workbook()
    book.remove(book.active)
    for name, rows in sheets.items():
        sheet = book.create_sheet(name)
        for row in rows:
            sheet.append(row)
    book.save(path)
    return path


def count(database: Database, table: str) -> int:
    """Rows in one table of the registry."""
    with database.read() as conn:
        return int(conn.scalar(f"SELECT count(*) FROM {table}"))


ROWS = [
    ["A1", "CN(C)C(=O)c1ccccc1", "coalescence", "chloroform", 400, 12, 38.5, 14.6, "m1", "r", "p1"],
    ["A2", "CC(=O)N1CCCCC1", "coalescence", "CDCl3", 400, "-20 °C", "0.12 ppm", "", "m2", "r", ""],
]


@pytest.fixture
def sample_csv(tmp_path: Path) -> Path:
    return write_csv(tmp_path / "sample.csv", HEADERS, ROWS)


def test_values_units_and_extras_are_stored(database: Database, sample_csv: Path) -> None:
    summary = import_table(database, sample_csv)
    assert (summary["added"], summary["updated"], summary["rejected"]) == (2, 0, 0)
    first, second = (api.get_measurement(database, i) for i in summary["measurement_ids"]["added"])
    # 1 kcal = 4.184 kJ exactly (thermochemical calorie, NIST SP 811 (2008) B.8)
    assert first["dg_kj_mol"] == pytest.approx(14.6 * 4.184, abs=1e-9)
    assert first["dg_text"] == "14.6 kcal/mol"  # the header's unit is kept with the number
    # 12 °C = 285.15 K (NIST SP 811 (2008) 4.2.1.1)
    assert first["coalescence"][0]["tc_k"] == pytest.approx(285.15)
    assert first["extra"] == {"notebook": "p1"}
    # a unit written in the cell wins over the header's: -20 °C = 253.15 K; 0.12 ppm at
    # 400 MHz = 48 Hz (ppm × MHz = Hz, definition of the ppm scale; common practice, no source)
    assert second["coalescence"][0]["tc_k"] == pytest.approx(253.15)
    assert second["coalescence"][0]["dnu_hz"] == pytest.approx(48.0)
    assert second["coalescence"][0]["tc_text"] == "-20 °C"
    # "chloroform" is a usual spelling of the solvent table's chloroform-d
    with database.read() as conn:
        sid = conn.scalar("SELECT id FROM solvent WHERE name = 'chloroform-d'")
    assert first["solvent_id"] == sid == second["solvent_id"]


def test_import_batch_is_recorded(database: Database, sample_csv: Path) -> None:
    import hashlib

    summary = import_table(database, sample_csv, actor="ingrid")
    with database.read() as conn:
        (batch,) = conn.records("SELECT * FROM import_batch")
    assert batch["file_name"] == "sample.csv"
    assert batch["sha256"] == hashlib.sha256(sample_csv.read_bytes()).hexdigest()
    assert (batch["actor"], batch["rows_total"], batch["rows_added"]) == ("ingrid", 2, 2)
    assert batch["status"] == "done" and batch["finished_at"] is not None
    assert summary["batch_id"] == batch["id"]


def test_same_file_twice_adds_nothing(database: Database, sample_csv: Path) -> None:
    import_table(database, sample_csv)
    revisions = count(database, "revision")
    again = import_table(database, sample_csv)
    assert (again["added"], again["updated"], again["unchanged"]) == (0, 0, 2)
    assert count(database, "measurement") == 2
    assert count(database, "revision") == revisions
    assert count(database, "import_batch") == 2


def test_corrected_file_updates_and_records_before_after(
    database: Database, tmp_path: Path
) -> None:
    path = write_csv(tmp_path / "v1.csv", HEADERS, ROWS)
    first = import_table(database, path)
    rows = [list(r) for r in ROWS]
    rows[0][7] = 14.9
    rows[0][10] = "p1 (corrected)"
    import_table(database, write_csv(tmp_path / "v2.csv", HEADERS, rows))
    mid = first["measurement_ids"]["added"][0]
    record = api.get_measurement(database, mid)
    assert record["dg_kj_mol"] == pytest.approx(14.9 * 4.184)
    assert record["extra"] == {"notebook": "p1 (corrected)"}
    with database.read() as conn:
        (rev,) = conn.rows(
            "SELECT before_json, after_json FROM revision "
            "WHERE entity_id = :id AND action = 'import-update'",
            {"id": mid},
        )
    before, after = json.loads(rev[0]), json.loads(rev[1])
    assert before["dg_text"] == "14.6 kcal/mol" and after["dg_text"] == "14.9 kcal/mol"
    assert after["extra"] == {"notebook": "p1 (corrected)"}
    assert count(database, "measurement") == 2


def test_workbook_with_rates_sheet(database: Database, tmp_path: Path) -> None:
    path = write_xlsx(
        tmp_path / "book.xlsx",
        {
            "entries": [
                ["label", "compound", "SMILES", "method", "ΔH‡ (kJ/mol)", "ΔS‡ (e.u.)"],
                ["L1", "B1", "Cc1ccccc1-c1ccccc1C", "DNMR", 70.0, -2.0],
            ],
            "rates": [
                ["label", "T (°C)", "k (s-1)", "σ_k"],
                ["L1", 80, 25.0, 1.0],
                ["L1", 90, 60.0, 2.0],
            ],
        },
    )
    summary = import_table(database, path)
    assert summary["sheet_kinds"] == {"entries": "entries", "rates": "rates"}
    record = api.get_measurement(database, summary["measurement_ids"]["added"][0])
    points = record["rate_points"]
    assert [p["t_k"] for p in points] == pytest.approx([353.15, 363.15])
    assert [p["k_err_per_s"] for p in points] == pytest.approx([1.0, 2.0])
    # ΔS‡ in e.u. = cal/(mol·K): -2 e.u. = -8.368 J/(mol·K) (NIST SP 811 (2008) B.8)
    assert record["ds_j_mol_k"] == pytest.approx(-8.368)
    again = import_table(database, path)
    assert again["added"] == 0 and again["updated"] == 0
    assert count(database, "rate_point") == 2


def test_rates_only_file_attaches_to_existing_measurements(
    database: Database, tmp_path: Path
) -> None:
    entries = write_csv(
        tmp_path / "e.csv",
        ["label", "compound", "method", "dh"],
        [["L9", "C9", "DNMR", "60 kJ/mol"]],
    )
    mid = import_table(database, entries)["measurement_ids"]["added"][0]
    rates = write_csv(
        tmp_path / "r.csv", ["label", "T/K", "k (s-1)"], [["L9", 300, 10], ["L9", 310, 30]]
    )
    summary = import_table(database, rates)
    assert summary["updated"] == 1
    assert len(api.get_measurement(database, mid)["rate_points"]) == 2
    assert import_table(database, rates)["updated"] == 0
    unknown = write_csv(tmp_path / "u.csv", ["label", "T/K", "k (s-1)"], [["NOPE", 300, 10]])
    with pytest.raises(ImportRowError, match="no measurement labelled 'NOPE'"):
        import_table(database, unknown)


def test_one_bad_row_means_nothing_is_written(database: Database, tmp_path: Path) -> None:
    rows = [list(r) for r in ROWS] + [["A3", "CCO", "coalescence", "CDCl3", 400, 20, 10, "abc"]]
    path = write_csv(tmp_path / "bad.csv", HEADERS, rows)
    with pytest.raises(ImportRowError) as info:
        import_table(database, path)
    (problem,) = info.value.problems
    assert (problem.row, problem.column, problem.text) == (4, "ΔG‡ (kcal/mol)", "abc")
    assert count(database, "measurement") == 0
    assert count(database, "import_batch") == 0


def test_skip_bad_imports_good_rows_and_writes_rejects(database: Database, tmp_path: Path) -> None:
    rows = [list(r) for r in ROWS] + [["A3", "C1CC1(", "coalescence", "CDCl3", 400, 20, 10, 15]]
    path = write_csv(tmp_path / "mixed.csv", HEADERS, rows)
    summary = import_table(database, path, skip_bad=True)
    assert (summary["added"], summary["rejected"]) == (2, 1)
    rejects = Path(summary["rejects_file"])
    assert rejects == tmp_path / "mixed.rejected.csv"
    with rejects.open(encoding="utf-8") as fh:
        lines = list(csv.DictReader(fh))
    assert len(lines) == 1
    assert lines[0]["row"] == "4" and lines[0]["column"] == "SMILES"
    assert "unreadable SMILES" in lines[0]["reason"]
    assert lines[0]["compound"] == "A3"
    with database.read() as conn:
        status = conn.first("SELECT status, rows_rejected FROM import_batch")
    assert status == ("partial", 1)


def test_interrupt_during_the_write_leaves_nothing(
    database: Database, sample_csv: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    def boom(*args: object, **kwargs: object) -> None:
        raise KeyboardInterrupt

    monkeypatch.setattr(changes, "apply_changes", boom)
    with pytest.raises(KeyboardInterrupt):
        import_table(database, sample_csv)
    assert count(database, "measurement") == 0
    assert count(database, "import_batch") == 0
    assert count(database, "revision") == 0


def test_dry_run_writes_nothing(database: Database, sample_csv: Path) -> None:
    summary = import_table(database, sample_csv, dry_run=True)
    assert summary["would_add"] == 2
    assert summary["preview"][0]["dg_kj_mol"] == pytest.approx(14.6 * 4.184)
    fields = {row["header"]: row["field"] for row in summary["mapping"]["sample.csv"]}
    assert fields["Tc (°C)"] == "tc" and fields["notebook"] is None
    assert count(database, "measurement") == 0 and count(database, "import_batch") == 0


def test_validation_findings_are_counted(database: Database, tmp_path: Path) -> None:
    # Tc 343.15 K, Δν 48 Hz → ΔG‡ 17.0 kcal/mol (Gutowsky–Holm); 18.1 is off → one error
    path = write_csv(
        tmp_path / "v.csv",
        ["compound", "method", "solvent", "Tc/K", "Δν (Hz)", "ΔG‡ (kcal/mol)"],
        [
            ["V1", "coalescence", "DMSO-d6", 343.15, 48, 18.1],
            ["V2", "coalescence", "DMSO-d6", 343.15, 48, 17.0],
        ],
    )
    summary = import_table(database, path)
    assert summary["validation"]["available"] is True
    assert summary["validation"]["findings"]["error"] == 1
    assert {f["rule_id"] for f in summary["validation"]["list"]} == {"coalescence-barrier"}


def test_the_process_pool_gives_the_same_result(
    database: Database, tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    monkeypatch.setattr(parallel, "PARALLEL_MIN_ROWS", 4)
    monkeypatch.setattr(parallel, "CHUNK_ROWS", 3)
    monkeypatch.setattr(parallel, "CHUNK_SMILES", 2)
    smiles = ["CCO", "CCN", "CCC", "c1ccccc1", "CC(=O)N(C)C", "C1CCOC1"]
    rows = [
        [f"P{i}", smiles[i % 6], "coalescence", "CDCl3", 300, 20 + i, 10 + i] for i in range(12)
    ]
    headers = ["label", "SMILES", "method", "solvent", "field (MHz)", "Tc (K)", "Δν (Hz)"]
    rows = [[r[0], r[1], r[2], r[3], r[4], 250 + i, r[6]] for i, r in enumerate(rows)]
    path = write_csv(tmp_path / "pool.csv", headers, rows)
    summary = import_table(database, path, workers=2)
    assert summary["added"] == 12 and summary["compounds_added"] == 6
    record = api.get_measurement(database, summary["measurement_ids"]["added"][7])
    assert record["label"] == "P7" and record["coalescence"][0]["tc_k"] == pytest.approx(257.0)
    # every stored structure value is what this process computes for the same SMILES
    fields = ("smiles_canonical", "inchi", "inchikey", "formula", "mol_binary", "pattern_fp")
    with database.read() as conn:
        stored = conn.rows(f"SELECT smiles_input, {', '.join(fields)} FROM compound")
    assert sorted(r[0] for r in stored) == sorted(smiles)
    for smi, *values in stored:
        here = read_structure(smi)
        assert tuple(values) == tuple(getattr(here, f) for f in fields)


def test_structures_queued_early_and_late_are_all_read(monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setattr(parallel, "PARALLEL_MIN_ROWS", 3)  # a pool from one distinct SMILES on
    monkeypatch.setattr(parallel, "CHUNK_SMILES", 2)
    with parallel.Workers(2) as workers:
        assert workers.submit_structures(["CCO", None, "CCO", "c1ccccc1", "C1CC("]) == 3
        assert workers.parsing
        got = workers.structures(["CCO", "CCN", "C1CC("])  # CCN was never queued
        assert not workers.parsing
    assert set(got) == {"CCO", "CCN", "C1CC("}
    assert got["CCO"][0] == read_structure("CCO")
    assert got["CCN"][0] == read_structure("CCN")
    assert got["C1CC("][0] is None and "syntax error" in (got["C1CC("][1] or "")
    with parallel.Workers(1) as single:  # one worker: everything in this process
        assert single.submit_structures(["CCO", "CCN"]) == 2
        assert single.pool(10**6, 1) is None and not single.parsing
        assert single.structures(["CCN"])["CCN"][0] == read_structure("CCN")


def test_early_stop_after_structures_were_queued(
    database: Database, tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    # the rates sheet's problem is found after the entries' SMILES went to the pool: the
    # import reports it without waiting for the structures, and writes nothing
    monkeypatch.setattr(parallel, "PARALLEL_MIN_ROWS", 3)
    monkeypatch.setattr(parallel, "CHUNK_SMILES", 1)
    monkeypatch.setattr(results, "EARLY_STOP_MIN_ROWS", 2)
    entries = [["label", "compound", "SMILES", "method", "ΔH‡ (kJ/mol)"]] + [
        [f"L{i}", f"B{i}", "C" * (i + 1), "DNMR", 70.0] for i in range(6)
    ]
    path = write_xlsx(
        tmp_path / "book.xlsx",
        {"entries": entries, "rates": [["label", "T (°C)", "k (s-1)"], ["L1", 80, "fast"]]},
    )
    with pytest.raises(ImportRowError) as info:
        import_table(database, path, workers=2)
    (problem,) = info.value.problems
    assert (problem.sheet, problem.row, problem.column) == ("rates", 2, "k (s-1)")
    assert count(database, "measurement") == 0


def test_cli_import_and_dry_run(cli, tmp_path: Path, sample_csv: Path) -> None:  # type: ignore[no-untyped-def]
    result = cli("import", str(sample_csv), "--dry-run")
    assert result.exit_code == 0, result.stderr
    assert "dry run of" in result.stdout and "would add 2" in result.stdout
    result = cli("import", str(sample_csv), "--json")
    assert result.exit_code == 0, result.stderr
    assert json.loads(result.stdout)["added"] == 2
    result = cli("import", str(sample_csv))
    assert result.exit_code == 0
    assert "0 added, 0 updated, 2 unchanged" in result.stdout


def test_ods_and_tsv_files(database: Database, tmp_path: Path) -> None:
    import pandas as pd

    frame = pd.DataFrame(
        {"compound": ["O1"], "method": ["coalescence"], "Tc/K": [300], "dnu (Hz)": [20.0],
         "dG (kJ/mol)": ["60.1"]}
    )  # fmt: skip
    frame.to_excel(tmp_path / "s.ods", index=False, engine="odf", sheet_name="data")
    summary = import_table(database, tmp_path / "s.ods", sheet="data")
    assert summary["added"] == 1
    frame["compound"] = ["O2"]
    frame.to_csv(tmp_path / "s.tsv", sep="\t", index=False)
    assert import_table(database, tmp_path / "s.tsv")["added"] == 1
    record = api.get_measurement(database, summary["measurement_ids"]["added"][0])
    assert record["dg_kj_mol"] == pytest.approx(60.1)
    assert record["coalescence"][0]["tc_k"] == pytest.approx(300.0)


def test_semicolon_csv_with_decimal_commas(database: Database, tmp_path: Path) -> None:
    path = tmp_path / "eu.csv"
    path.write_text(
        "compound;method;Tc (°C);Δν (Hz);ΔG‡ (kJ/mol);Bemerkung\nK1;coalescence;-12,5;24,5;55,3;gut\n",
        encoding="utf-8",
    )
    summary = import_table(database, path)
    record = api.get_measurement(database, summary["measurement_ids"]["added"][0])
    # -12.5 °C = 260.65 K (NIST SP 811 (2008) 4.2.1.1)
    assert record["coalescence"][0]["tc_k"] == pytest.approx(260.65)
    assert record["dg_kj_mol"] == pytest.approx(55.3)
    assert record["extra"] == {"Bemerkung": "gut"}


def test_progress_is_reported_by_stage(database: Database, sample_csv: Path) -> None:
    calls: list[tuple[str, int, int]] = []
    summary = import_table(database, sample_csv, progress=lambda *a: calls.append(a))
    assert summary["added"] == 2
    # two rows to normalize, then two distinct SMILES to parse: four units in all
    assert {total for _, _, total in calls} == {4}
    done = {stage: sum(d for s, d, _ in calls if s == stage) for stage, _, _ in calls}
    assert done == {"rows": 2, "structures": 2}
    assert [s for s, _, _ in calls].index("structures") > [s for s, _, _ in calls].index("rows")


def test_cli_progress_bar_only_on_a_terminal_for_big_imports(
    monkeypatch: pytest.MonkeyPatch,
) -> None:
    import io

    from registry.cli import io_commands

    class Terminal(io.StringIO):
        def isatty(self) -> bool:
            return True

    screen = Terminal()
    bar = io_commands.ProgressBar(screen)
    bar("rows", 10, 100)  # below PROGRESS_MIN_ROWS: nothing drawn
    assert screen.getvalue() == ""
    monkeypatch.setattr(io_commands, "PROGRESS_MIN_ROWS", 1)
    bar("rows", 60, 100)
    bar("structures", 40, 100)
    bar.close()
    assert "structures" in screen.getvalue()
    piped = io.StringIO()  # not a terminal (a pipe, a file): no bar
    io_commands.ProgressBar(piped)("rows", 10**6, 10**6)
    assert piped.getvalue() == ""


MAPPING = """
[columns]
"Cmpd code" = "compound"
"Temp." = "tc"
"Sep." = "dnu"
"Barrier" = { field = "dg", unit = "kcal/mol" }
"Notes" = "extra"
"Junk" = "ignore"

[units]
tc = "°C"
dnu = "Hz"

[defaults]
method = "coalescence"
solvent = "CDCl3"
"""


def test_mapping_file_columns_units_and_defaults(database: Database, tmp_path: Path) -> None:
    path = write_csv(
        tmp_path / "odd.csv",
        ["Cmpd code", "Temp.", "Sep.", "Barrier", "Notes", "Junk"],
        [["K-7", 25, 38.5, 14.8, "ok", "xx"], ["K-8", "", "", 15.0, "", ""]],
    )
    mapping = tmp_path / "odd.toml"
    mapping.write_text(MAPPING, encoding="utf-8")
    summary = import_table(database, path, mapping=mapping)
    assert summary["added"] == 2
    first = api.get_measurement(database, summary["measurement_ids"]["added"][0])
    assert (first["method"], first["solvent_text"]) == ("coalescence", "CDCl3")
    # 25 °C = 298.15 K (NIST SP 811 (2008) 4.2.1.1); 1 kcal = 4.184 kJ (NIST SP 811 B.8)
    assert first["coalescence"][0]["tc_k"] == pytest.approx(298.15)
    assert first["coalescence"][0]["dnu_hz"] == pytest.approx(38.5)
    assert first["dg_kj_mol"] == pytest.approx(14.8 * 4.184)
    assert first["extra"] == {"Notes": "ok"}  # "Junk" is ignored, not kept
    described = {r["header"]: (r["field"], r["from"]) for r in summary["mapping"]["odd.csv"]}
    assert described["Temp."] == ("tc", "mapping file")
    assert described["Junk"] == (None, "mapping file")


def test_mapping_file_names_the_sheets(database: Database, tmp_path: Path) -> None:
    # "Kinetics" has a compound column, so on its own it would be read as an entries sheet
    path = write_xlsx(
        tmp_path / "named.xlsx",
        {
            "Barriers": [["label", "compound", "method", "ΔH‡ (kJ/mol)"], ["R1", "Q1", "DNMR", 55]],
            "Kinetics": [["label", "compound", "T (K)", "k (s-1)"], ["R1", "Q1", 300, 12.0]],
        },
    )
    mapping = tmp_path / "sheets.toml"
    mapping.write_text('[sheets]\nentries = "Barriers"\nrates = "Kinetics"\n', encoding="utf-8")
    summary = import_table(database, path, mapping=mapping)
    assert summary["sheet_kinds"] == {"Barriers": "entries", "Kinetics": "rates"}
    record = api.get_measurement(database, summary["measurement_ids"]["added"][0])
    assert [(p["t_k"], p["k_per_s"]) for p in record["rate_points"]] == [(300.0, 12.0)]
    mapping.write_text('[sheets]\nrates = "Barriers"\n', encoding="utf-8")  # no T, no k there
    with pytest.raises(ImportRowError) as info:
        import_table(database, path, mapping=mapping)
    (problem,) = info.value.problems
    assert (problem.sheet, problem.row) == ("Barriers", 1)
    assert problem.reason == "a rates sheet needs label, T and k columns; this one has no T, k"


def test_cli_map_rejects_and_dry_run_exit_codes(cli, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    path = write_csv(
        tmp_path / "odd.csv",
        ["Cmpd code", "Temp.", "Sep.", "Barrier"],
        [["K-7", 25, 38.5, 14.8], ["K-9", "hot", 30, 15.0]],
    )
    mapping = tmp_path / "odd.toml"
    mapping.write_text(MAPPING, encoding="utf-8")
    dry = cli("import", str(path), "--map", str(mapping), "--dry-run")
    assert dry.exit_code == 1  # a dry run that finds problems says so in its exit code
    assert "would add 1, update 0, leave 0 unchanged; 1 row(s) with problems" in dry.stdout
    assert "row 3, column 'Temp.': 'hot': not a number" in dry.stdout
    rejects = tmp_path / "out" / "bad.csv"
    rejects.parent.mkdir()
    done = cli("import", str(path), "--map", str(mapping), "--skip-bad", "--rejects", str(rejects))
    assert done.exit_code == 0, done.stderr
    assert "1 added, 0 updated, 0 unchanged, 1 rejected" in done.stdout
    with rejects.open(encoding="utf-8") as fh:
        (line,) = list(csv.DictReader(fh))
    assert (line["row"], line["column"], line["text"]) == ("3", "Temp.", "hot")
    missing = cli("import", str(path), "--map", str(tmp_path / "nope.toml"))
    assert missing.exit_code == 2
    assert missing.stderr == f"error: mapping file {tmp_path / 'nope.toml'}: no such file\n"
