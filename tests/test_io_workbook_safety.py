"""Workbooks that tried to slip a formula past the guard, or to exhaust memory, are refused."""

from __future__ import annotations

import re
import zipfile
from pathlib import Path

import pytest
from openpyxl import Workbook

from registry import api
from registry.errors import FileFormatError, ImportRowError
from registry.io import workbook_xml
from registry.storage.database import Database

HEADERS = ["compound", "method", "Tc (K)", "Δν (Hz)", "comment", "ΔG‡ (kJ/mol)"]


def _workbook(path: Path) -> Path:
    """An ordinary sheet whose barrier cell F2 holds a formula (openpyxl writes no cached
    value; the edits below add one, as spreadsheet programs do)."""
    book = Workbook()
    sheet = book.active
    sheet.title = "entries"
    sheet.append(HEADERS)
    sheet.append(["W1", "coalescence", 300, 20, None, "=-10-2"])
    book.save(path)
    return path


def _rewrite(path: Path, member: str, edit) -> Path:  # type: ignore[no-untyped-def]
    """Rewrite one member of a zip file with ``edit(text) -> text``."""
    with zipfile.ZipFile(path) as zf:
        parts = {info.filename: zf.read(info.filename) for info in zf.infolist()}
    parts[member] = edit(parts[member].decode("utf-8")).encode("utf-8")
    with zipfile.ZipFile(path, "w", zipfile.ZIP_DEFLATED) as zf:
        for name, data in parts.items():
            zf.writestr(name, data)
    return path


def _refused_formula(database: Database, path: Path) -> None:
    with pytest.raises(ImportRowError) as info:
        api.import_table(database, path)
    problem = info.value.problems[0]
    assert (problem.row, problem.column, problem.text) == (2, "ΔG‡ (kJ/mol)", "=-10-2")
    assert "formula" in problem.reason
    assert api.list_measurements(database) == []


SHEET = "xl/worksheets/sheet1.xml"


def test_a_formula_after_a_styled_empty_cell_is_found(database: Database, tmp_path: Path) -> None:
    def styled_gap(xml: str) -> str:
        # a self-closing styled cell just before the formula cell, and a cached value
        xml = xml.replace('<c r="F2"', '<c r="E2" s="0"/><c r="F2"', 1)
        return re.sub(r"(<f>-10-2</f>)<v\s*/>|(<f>-10-2</f>)<v></v>|(<f>-10-2</f>)",
                      r"\1\2\3<v>-12</v>", xml, count=1)  # fmt: skip

    _refused_formula(database, _rewrite(_workbook(tmp_path / "gap.xlsx"), SHEET, styled_gap))


def test_a_formula_in_prefixed_elements_is_found(database: Database, tmp_path: Path) -> None:
    def prefixed(xml: str) -> str:
        main = "http://schemas.openxmlformats.org/spreadsheetml/2006/main"
        xml = xml.replace(f'xmlns="{main}"', f'xmlns:x="{main}"', 1)
        return re.sub(r"<(/?)(\w+)([ >/])", lambda m: f"<{m[1]}x:{m[2]}{m[3]}", xml)

    path = _rewrite(_workbook(tmp_path / "prefixed.xlsx"), SHEET, prefixed)
    with zipfile.ZipFile(path) as zf:
        assert "<x:f>" in zf.read(SHEET).decode("utf-8")  # the file really is prefixed
    _refused_formula(database, path)


def _ods(path: Path) -> Path:
    from odf.opendocument import OpenDocumentSpreadsheet
    from odf.table import Table, TableCell, TableRow
    from odf.text import P

    doc = OpenDocumentSpreadsheet()
    table = Table(name="entries")
    head = TableRow()
    for h in HEADERS:
        cell = TableCell(valuetype="string")
        cell.addElement(P(text=h))
        head.addElement(cell)
    table.addElement(head)
    row = TableRow()
    for value in ("W1", "coalescence"):
        cell = TableCell(valuetype="string")
        cell.addElement(P(text=value))
        row.addElement(cell)
    for value in (300, 20):
        row.addElement(TableCell(valuetype="float", value=value))
    row.addElement(TableCell())
    row.addElement(TableCell(valuetype="float", value=-12, formula="of:=-10-2"))
    table.addElement(row)
    doc.spreadsheet.addElement(table)
    doc.save(str(path))
    return path


def _with_doctype(doctype: str):  # type: ignore[no-untyped-def]
    def edit(xml: str) -> str:
        head, _, rest = xml.partition("?>")
        return f"{head}?>{doctype}{rest}"

    return edit


def test_a_formula_in_an_ods_with_a_doctype_is_found(database: Database, tmp_path: Path) -> None:
    path = _rewrite(
        _ods(tmp_path / "doctype.ods"),
        "content.xml",
        _with_doctype("<!DOCTYPE office:document-content>"),
    )
    _refused_formula(database, path)


def test_an_ods_declaring_entities_is_refused_not_skipped(
    database: Database, tmp_path: Path
) -> None:
    laughs = '<!DOCTYPE d [<!ENTITY a "lol"><!ENTITY b "&a;&a;&a;&a;&a;&a;&a;&a;&a;&a;">]>'
    path = _rewrite(_ods(tmp_path / "entities.ods"), "content.xml", _with_doctype(laughs))
    with pytest.raises(FileFormatError) as info:
        api.import_table(database, path)
    assert "content.xml declares XML entities" in str(info.value)
    assert api.list_measurements(database) == []


def test_a_cell_far_from_the_others_is_refused_before_it_is_read(
    database: Database, tmp_path: Path
) -> None:
    book = Workbook()
    sheet = book.active
    sheet.title = "entries"
    sheet.append(HEADERS[:4])
    sheet["XFD1048576"] = 1  # the last cell a workbook can have
    path = tmp_path / "far.xlsx"
    book.save(path)
    assert path.stat().st_size < 10_000
    with pytest.raises(FileFormatError) as info:
        api.import_table(database, path)
    assert str(info.value) == (
        f"{path}, sheet 'entries': the cells span 1,048,576 rows × 16,384 columns (a cell far "
        "from the others?); at most 50,000,000 cells can be read — delete the stray cells"
    )


def test_a_workbook_that_inflates_too_far_is_refused(
    database: Database, tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    path = _workbook(tmp_path / "big.xlsx")
    with zipfile.ZipFile(path) as zf:
        inflated = sum(info.file_size for info in zf.infolist())
    monkeypatch.setattr(workbook_xml, "MAX_INFLATED_BYTES", inflated - 1)
    with pytest.raises(FileFormatError, match=r"the workbook inflates to .* MiB \(more than"):
        api.import_table(database, path)
