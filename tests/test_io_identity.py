"""One identity per measurement through every round trip: the uid column, rows that claim one
measurement, moves between compounds; and the export's ``flagged`` column.

Invented demo data (see :mod:`test_io_roundtrip`, whose sheet and helpers these tests share).
"""

from __future__ import annotations

import csv
import json
import math
from pathlib import Path

import pytest
from openpyxl import load_workbook
from scipy import constants
from test_io_roundtrip import HEADERS, KCAL, ROWS, changed, imported, revisions, sheet

from registry import api
from registry.api import import_table
from registry.errors import ImportRowError
from registry.storage.database import Database

__all__ = ["imported"]  # the fixture, shared with test_io_roundtrip


def test_export_carries_the_uid_and_a_reimport_matches_on_it(
    imported: Database, tmp_path: Path
) -> None:
    out = tmp_path / "export.xlsx"
    api.export_measurements(imported, out)
    book = load_workbook(out)
    header = [c.value for c in book["entries"][1]]
    assert header[0] == "uid"
    uids = [book["entries"].cell(row=r, column=1).value for r in (2, 3, 4)]
    assert uids == [api.get_measurement(imported, i)["uid"] for i in (1, 2, 3)]
    # the label and solvent of m1 corrected in the exported file: still measurement 1
    book["entries"].cell(row=2, column=header.index("label") + 1).value = "m1-corrected"
    book["entries"].cell(row=2, column=header.index("solvent") + 1).value = "CDCl3"
    book.save(out)
    summary = import_table(imported, out)
    assert summary["matched_by"] == {"uid": 3}
    assert (summary["added"], summary["updated"]) == (0, 1)
    record = api.get_measurement(imported, 1)
    assert (record["label"], record["solvent_text"]) == ("m1-corrected", "CDCl3")


def test_a_uid_from_another_registry_is_kept(
    imported: Database, tmp_path: Path, _template_registry: Path
) -> None:
    import shutil

    out = tmp_path / "export.csv"
    api.export_measurements(imported, out)
    other_path = tmp_path / "other.sqlite"
    shutil.copyfile(_template_registry, other_path)
    other = api.open_registry(str(other_path))
    try:
        assert import_table(other, out)["added"] == 3
        assert [api.get_measurement(other, i)["uid"] for i in (1, 2, 3)] == [
            api.get_measurement(imported, i)["uid"] for i in (1, 2, 3)
        ]
        assert import_table(other, out)["matched_by"] == {"uid": 3}
    finally:
        other.dispose()
    # a registry that has the same measurements from the group's own sheet matches by label,
    # and its measurements keep their own uids
    own = [api.get_measurement(imported, i)["uid"] for i in (1, 2, 3)]
    rewritten = tmp_path / "foreign.csv"
    with (
        out.open(encoding="utf-8") as src,
        rewritten.open("w", newline="", encoding="utf-8") as dst,
    ):
        rows = list(csv.reader(src))
        for row in rows[1:]:
            row[0] = row[1][-1] * 32  # 111…, 222…, 333…: not this registry's
        csv.writer(dst).writerows(rows)
    summary = import_table(imported, rewritten)
    assert summary["matched_by"] == {"label": 3} and summary["added"] == 0
    assert [api.get_measurement(imported, i)["uid"] for i in (1, 2, 3)] == own


def test_two_rows_claiming_one_measurement_are_an_error(imported: Database, tmp_path: Path) -> None:
    out = tmp_path / "export.csv"
    api.export_measurements(imported, out)
    lines = out.read_text(encoding="utf-8").splitlines()
    out.write_text("\n".join([*lines, lines[1]]) + "\n", encoding="utf-8")  # row 2 again as row 5
    with pytest.raises(ImportRowError) as info:
        import_table(imported, out)
    (p,) = info.value.problems
    uid = api.get_measurement(imported, 1)["uid"]
    assert (p.file, p.sheet, p.row) == ("export.csv", None, 5)
    assert p.reason == f"duplicate of row 2: both rows carry uid {uid}; one measurement, one row"
    # the same compound and label twice (the solvent differs): one label, one measurement
    rows = [*ROWS, changed(ROWS, m1_solvent="CD2Cl2")[0]]
    with pytest.raises(ImportRowError) as info:
        import_table(imported, sheet(tmp_path, "twice.xlsx", rows))
    (p,) = info.value.problems
    assert (p.file, p.sheet, p.row) == ("twice.xlsx", "entries", 5)
    assert p.reason.startswith("duplicate of row 2: compound 'HG-A1' has one measurement labelled")
    assert str(p).startswith("twice.xlsx, sheet 'entries', row 5: duplicate of row 2")


def test_two_rows_matching_one_stored_measurement_are_an_error(
    imported: Database, tmp_path: Path
) -> None:
    out = tmp_path / "export.csv"
    api.export_measurements(imported, out)
    with out.open(encoding="utf-8") as fh:
        rows = list(csv.reader(fh))
    header = rows[0]
    relabelled = list(rows[1])
    relabelled[header.index("label")] = "m1-new"  # row 2: measurement 1 by its uid
    by_label = list(rows[1])
    by_label[header.index("uid")] = ""  # row 3: measurement 1 by compound and label
    with out.open("w", newline="", encoding="utf-8") as fh:
        csv.writer(fh).writerows([header, relabelled, by_label])
    with pytest.raises(ImportRowError) as info:
        import_table(imported, out)
    (p,) = info.value.problems
    assert p.row == 3 and p.reason == (
        "duplicate of row 2: both rows are measurement 1 (matched by uid and by label); "
        "one measurement, one row"
    )


def test_uid_cells_that_are_not_identifiers(database: Database, tmp_path: Path) -> None:
    headers = ["uid", *HEADERS]
    own_codes = [[f"S-00{i}", *row] for i, row in enumerate(ROWS, start=1)]
    summary = import_table(database, sheet(tmp_path, "codes.csv", own_codes, headers))
    assert summary["added"] == 3
    assert api.get_measurement(database, 1)["extra"] == {"uid": "S-001", "notebook": "p1"}
    assert any("holds no measurement identifiers" in note for note in summary["notes"])
    out = tmp_path / "export.csv"
    api.export_measurements(database, out)
    lines = out.read_text(encoding="utf-8").splitlines()
    lines[2] = "not-a-uid" + lines[2][32:]
    out.write_text("\n".join(lines) + "\n", encoding="utf-8")
    with pytest.raises(ImportRowError) as info:
        import_table(database, out)
    (p,) = info.value.problems
    assert (p.row, p.column, p.text) == (3, "uid", "not-a-uid")
    assert p.reason.startswith("not a measurement identifier")


# ---------------------------------------------------------------- compounds and processes


def test_a_measurement_moves_to_the_compound_its_row_now_names(
    database: Database, tmp_path: Path
) -> None:
    headers = ["label", "compound", "method", "ΔG‡ (kJ/mol)", "process"]
    rows = [["r1", "X1", "lineshape", 70, "bond rotation"], ["r2", "X1", "lineshape", 72, None]]
    import_table(database, sheet(tmp_path, "plain.csv", rows, headers))
    out = tmp_path / "export.csv"
    api.export_measurements(database, out)
    with out.open(encoding="utf-8") as fh:
        data = list(csv.reader(fh))
    data[1][data[0].index("compound")] = "X2"  # r1 belongs to compound X2
    data[1][data[0].index("process")] = "ring inversion"
    with out.open("w", newline="", encoding="utf-8") as fh:
        csv.writer(fh).writerows(data)
    summary = import_table(database, out)
    assert (summary["added"], summary["updated"], summary["compounds_added"]) == (0, 1, 0)
    record = api.get_measurement(database, 1)
    assert record["compound"]["label"] == "X2" and record["process"]["kind"] == "ring-inversion"
    assert api.get_measurement(database, 2)["compound"]["label"] == "X1"
    (rev,) = revisions(database, 1, "import-update")
    assert rev["before"]["compound"]["label"] == "X1" and rev["after"]["compound"]["label"] == "X2"
    assert (rev["before"]["process"]["kind"], rev["after"]["process"]["kind"]) == (
        "bond-rotation", "ring-inversion"
    )  # fmt: skip


def test_tc_correction_moves_the_temperature_of_the_barrier(
    imported: Database, tmp_path: Path
) -> None:
    """A corrected Tc is normalized with the rest of the entry: ΔG‡ is reported at Tc."""
    import_table(imported, sheet(tmp_path, "group.xlsx", changed(ROWS, m2_tc=-15)))
    record = api.get_measurement(imported, 2)
    # -15 °C = 258.15 K (NIST SP 811 (2008) 4.2.1.1)
    assert record["coalescence"][0]["tc_k"] == pytest.approx(258.15)
    assert record["dg_t_k"] == pytest.approx(258.15)


# ---------------------------------------------------------------- the flagged column


def _eyring_kcal(tc_k: float, dnu_hz: float) -> float:
    """ΔG‡ at coalescence, computed here independently: k_c = πΔν/√2 (Gutowsky & Holm, J. Chem.
    Phys. 25, 1228 (1956)) in the Eyring equation ΔG‡ = RT ln(k_B T / (h k_c)), CODATA
    constants from scipy.constants; kJ → kcal by 4.184 (NIST SP 811)."""
    kc = math.pi * dnu_hz / math.sqrt(2)
    dg = constants.R * tc_k * math.log(constants.k * tc_k / (constants.h * kc))
    return dg / 1000 / KCAL


def test_export_marks_measurements_with_an_open_error_finding(
    database: Database, tmp_path: Path
) -> None:
    good = round(_eyring_kcal(285.15, 38.5), 2)  # 12 °C, 38.5 Hz: 14.15 kcal/mol
    rows = [changed(ROWS, m1_dg=good)[0], ROWS[1]]  # m2's 4.2 kcal/mol is 8 kcal/mol too low
    assert abs(_eyring_kcal(253.15, 48.0) - 4.2) > 5
    import_table(database, sheet(tmp_path, "group.csv", rows))
    out = tmp_path / "export.csv"
    api.export_measurements(database, out)
    with out.open(encoding="utf-8") as fh:
        flagged = {r["label"]: r["flagged (derived)"] for r in csv.DictReader(fh)}
    assert flagged == {"m1": "no", "m2": "yes"}
    (finding,) = [
        f for f in api.get_measurement(database, 2)["findings"] if f["severity"] == "error"
    ]
    api.accept_finding(database, finding["id"], "checked the spectra: Tc is right", actor="ingrid")
    api.export_measurements(database, out)
    with out.open(encoding="utf-8") as fh:
        assert {r["label"]: r["flagged (derived)"] for r in csv.DictReader(fh)}["m2"] == "no"
    js = tmp_path / "export.json"
    api.export_measurements(database, js)
    assert [r["flagged"] for r in json.loads(js.read_text(encoding="utf-8"))] == [False, False]
    # the derived column is not read back
    assert import_table(database, out)["updated"] == 0
