"""Export: reported and normalized values, the formula guard, and export → import round trips."""

from __future__ import annotations

import csv
import json
from pathlib import Path
from typing import Any

import pytest
from hypothesis import assume, given, settings
from hypothesis import strategies as st
from openpyxl import load_workbook
from test_io_import import write_csv, write_xlsx

from registry import api
from registry.api import export_measurements, import_table
from registry.errors import UsageError
from registry.storage.database import Database

SEED = Path(__file__).resolve().parent.parent / "seed_demo"


@pytest.fixture
def filled(database: Database, tmp_path: Path) -> Database:
    """A registry with coalescence (AB, ppm), rate points, extras, odd texts and a bad structure."""
    entries = [
        ["label", "compound", "name", "SMILES", "process", "nucleus", "sites", "solvent",
         "field (MHz)", "Tc (°C)", "Δν (Hz)", "J (Hz)", "ΔG‡ (kcal/mol)", "method",
         "ΔH‡ (kJ/mol)", "ΔS‡ (e.u.)", "T (K)", "ref", "operator", "population"],
        ["E1", "X1", "N,N-dimethylbenzamide", "CN(C)C(=O)c1ccccc1", "amide rotation", "1H",
         "N-CH3", "CDCl3", 400, "-20 °C", "0.1 ppm", None, 12.9, "coalescence", None, None,
         None, "'=HYPERLINK(\"x\")", "@ik", None],
        ["E2", "X2", None, "CC1CN1Cc1ccccc1", "N-inversion", "1H", "CH2 (AB)", "tol-d8", 500,
         35, 24.0, 13.5, "15.1 ± 0.2", "coalescence", None, None, None, "+ref 2", "-MB", "60:40"],
        ["E3", "X3", None, "Cc1ccccc1-c1cccc2ccccc12", "biaryl rotation", "1H", "Ar-CH3",
         "TCE-d2", 400, None, None, None, 19.53, "DNMR", 78.0, -3.0, 298.15, "r3", None, None],
        ["E4", "X4", "a complex", "O=C=[Fe+](=C=O)C1C=CC=C1.c1cc[cH-]c1", "ring whizzing",
         "1H", None, "CD2Cl2", 400, -40, "0.85 ppm", None, None, "coalescence", None, None,
         None, "r4", None, None],
    ]  # fmt: skip
    rates = [["label", "T (°C)", "k (s-1)", "σ_k"], ["E3", 80, 20.5, 1.0], ["E3", 90, 48.0, 2.5]]
    import_table(database, write_xlsx(tmp_path / "src.xlsx", {"entries": entries, "rates": rates}))
    from registry.record.entry import EntryInput

    api.add_measurement(  # entered on the command line: the field text is a bare "400"
        database,
        EntryInput(
            method="coalescence", compound="X5", smiles="CC(=O)N1CCCCC1", solvent="CDCl3",
            field="400", tc="40 °C", dnu="0.1 ppm", label="E5", units={"field": "MHz"},
        ),
    )  # fmt: skip
    return database


_VOLATILE = {"id", "compound_id", "process_id", "solvent_id", "batch_id", "entered_at",
             "updated_at", "entered_by", "measurement_id", "found_at", "revision_count",
             "created_at", "source_row"}  # fmt: skip


def _canonical(database: Database, *, uid: bool = True) -> list[dict[str, Any]]:
    """Everything a registry holds about its measurements, minus ids and timestamps (and minus
    the uids with ``uid=False``: registries filled from the same sheets give different ones)."""
    volatile = _VOLATILE if uid else _VOLATILE | {"uid"}

    def strip(value: Any) -> Any:
        if isinstance(value, dict):
            return {k: strip(v) for k, v in value.items() if k not in volatile}
        if isinstance(value, list):
            return [strip(v) for v in value]
        if isinstance(value, bytes):
            return value.hex()
        return value

    rows = []
    for item in api.list_measurements(database, include_retracted=True):
        record = api.get_measurement(database, item["id"])
        record.pop("findings")
        rows.append(strip(record))
    return sorted(rows, key=lambda r: (r["label"] or "", r["compound"].get("label") or ""))


@pytest.mark.parametrize("fmt", ["csv", "xlsx"])
def test_export_then_import_into_an_empty_registry_reproduces_it(
    filled: Database, tmp_path: Path, fmt: str
) -> None:
    out = tmp_path / f"export.{fmt}"
    summary = export_measurements(filled, out, format=fmt)
    assert summary["measurements"] == 5 and summary["rate_points"] == 2
    empty_path = tmp_path / "empty.sqlite"
    api.init_registry(str(empty_path))
    empty = api.open_registry(str(empty_path))
    try:
        result = import_table(empty, out)
        assert result["added"] == 5
        assert _canonical(empty) == _canonical(filled)
        again = import_table(empty, out)
        assert (again["added"], again["updated"]) == (0, 0)
    finally:
        empty.dispose()


def test_demo_files_round_trip(database: Database, tmp_path: Path) -> None:
    import_table(database, SEED / "halvorsen_barriers.xlsx")
    import_table(database, SEED / "literature_barriers.csv")
    out = tmp_path / "all.xlsx"
    export_measurements(database, out)
    copy_path = tmp_path / "copy.sqlite"
    api.init_registry(str(copy_path))
    copy = api.open_registry(str(copy_path))
    try:
        assert import_table(copy, out)["added"] == 40
        assert _canonical(copy) == _canonical(database)
    finally:
        copy.dispose()


def test_text_cells_are_guarded_and_numbers_stay_numbers(filled: Database, tmp_path: Path) -> None:
    out = tmp_path / "e.csv"
    export_measurements(filled, out, format="csv")
    with out.open(encoding="utf-8") as fh:
        rows = {r["label"]: r for r in csv.DictReader(fh)}
    assert rows["E1"]["tc"] == "'-20 °C"
    assert rows["E1"]["reference"] == '\'=HYPERLINK("x")'
    assert rows["E1"]["extra: operator"] == "'@ik"
    assert rows["E2"]["reference"] == "'+ref 2"
    assert rows["E2"]["extra: operator"] == "'-MB"
    assert float(rows["E1"]["tc_k (normalized)"]) == pytest.approx(253.15)
    book = load_workbook(export_measurements(filled, tmp_path / "e.xlsx")["file"])
    sheet = book["entries"]
    header = [c.value for c in sheet[1]]
    row = [c for c in sheet[2]]
    cells = dict(zip(header, row, strict=True))
    assert cells["tc_k (normalized)"].data_type == "n"
    assert cells["tc"].value == "'-20 °C" and cells["tc"].data_type == "s"
    assert all(c.data_type != "f" for c in row)


def test_json_export_has_reported_normalized_findings(filled: Database, tmp_path: Path) -> None:
    out = tmp_path / "e.json"
    export_measurements(filled, out)
    data = json.loads(out.read_text(encoding="utf-8"))
    e3 = next(r for r in data if r["label"] == "E3")
    assert e3["reported"]["ds"] == "-3 e.u."  # a whole-number cell loses its ".0"
    # -3 e.u. = -3 × 4.184 J/(mol·K) (thermochemical calorie, NIST SP 811 (2008) B.8)
    assert e3["normalized"]["ds_j_mol_k"] == pytest.approx(-12.552)
    assert len(e3["rate_points"]) == 2
    assert all("findings" in r for r in data)


def test_filters_and_bad_format(filled: Database, tmp_path: Path) -> None:
    assert export_measurements(filled, tmp_path / "a.csv", method="DNMR")["measurements"] == 1
    with pytest.raises(
        UsageError, match="format must be one of csv, xlsx, json, sdf, latex, markdown"
    ):
        export_measurements(filled, tmp_path / "a.txt")
    with pytest.raises(UsageError, match=r"folder .* does not exist"):
        export_measurements(filled, tmp_path / "no" / "a.csv")


def test_cli_export(cli, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    src = write_csv(
        tmp_path / "s.csv",
        ["compound", "method", "solvent", "Tc/K", "Δν (Hz)", "ΔG‡ (kcal/mol)"],
        [["C1", "coalescence", "DMSO-d6", 343.15, 48, 17.0]],
    )
    assert cli("import", str(src)).exit_code == 0
    out = tmp_path / "out.xlsx"
    result = cli("export", "-o", str(out))
    assert result.exit_code == 0, result.stderr
    assert result.stdout.startswith("exported 1 measurement(s), 0 rate point(s)")
    result = cli("export", "-o", str(tmp_path / "o.json"), "--format", "json", "--json")
    assert json.loads(result.stdout)["measurements"] == 1


def test_demo_findings_fall_on_the_planted_slips_only(database: Database) -> None:
    """seed_demo/README.md lists five planted slips; the clean entries must give no finding."""
    flagged: dict[str, set[str]] = {}
    for name in ("halvorsen_barriers.xlsx", "literature_barriers.csv"):
        summary = import_table(database, SEED / name)
        for f in summary["validation"]["list"]:
            label = api.get_measurement(database, f["measurement_id"])["label"]
            flagged.setdefault(label, set()).add(f["rule_id"])
    assert set(flagged) == {"HG-07", "HG-15", "HG-21", "LIT-05", "LIT-09"}
    assert all("coalescence-barrier" in rules for rules in flagged.values())


#: texts with the pieces a workbook escape has to get right, among any other characters
_TRICKY = st.lists(
    st.sampled_from(["_x0041_", "_x005F_", "_x", "x0001_", "_", "\x01", "\x1f", "\r", "\r\n",
                     "\n", "\t", " ", "\ufffe", "=1+1", "é"])
    | st.text(alphabet=st.characters(blacklist_categories=("Cs",)), max_size=5),
    max_size=8,
).map("".join)  # fmt: skip


@settings(max_examples=200, deadline=None)
@given(text=_TRICKY)
def test_any_text_goes_through_a_workbook_unchanged(text: str) -> None:
    """The workbook format's own escapes (ECMA-376 ST_Xstring, ``_xHHHH_``): whatever a text
    holds — control characters, a carriage return, a literal ``_x0041_``, a formula guarded by
    its apostrophe — a reader that honours them (calamine, which the importer uses; Excel) gives
    back exactly the text.
    (A cell of nothing but blanks reads as empty, as every reader has it; the importer reads
    it as empty anyway.)"""
    import io

    import python_calamine
    from openpyxl import Workbook

    from registry.io.cells import neutralise, unneutralise
    from registry.io.export import workbook_text

    assume(not text or not set(text) <= set(" \t\n"))
    book = Workbook(write_only=True)
    sheet = book.create_sheet("s")
    sheet.append(["head", workbook_text(neutralise(text))])  # as the export writes it
    buffer = io.BytesIO()
    book.save(buffer)
    buffer.seek(0)
    read = python_calamine.CalamineWorkbook.from_filelike(buffer).get_sheet_by_name("s")
    cells = read.to_python()[0]
    back = unneutralise(cells[1] if len(cells) > 1 else "")  # as the importer reads it
    assert back == text.replace("\ufffe", "\ufffd")
