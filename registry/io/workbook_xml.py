"""What a workbook's own XML tells that the cell reader hides: formulas, and how large it is.

calamine returns a formula cell's cached value (or nothing), so formulas are found in the XML.
The XML is read with a real parser (``defusedxml``: entity declarations refused, no external
entities, no expansion), whatever namespace prefixes the elements carry, and a document that
cannot be read is refused — a formula must never pass because its sheet could not be scanned.

Before any cell is read, the workbook's size is checked: the bytes its parts inflate to, and
the area its cells span (calamine allocates that whole area: one cell at XFD1048576 asks for
half a terabyte).
"""

from __future__ import annotations

import io
import re
import zipfile
from collections.abc import Iterator
from pathlib import Path
from typing import Any

from registry.errors import FileFormatError

#: most bytes all parts of a workbook may inflate to
MAX_INFLATED_BYTES = 1 << 30
#: most cells (rows × columns of the area the cells span) one sheet may cover
MAX_SHEET_CELLS = 50_000_000
_CELL_REF = re.compile(rb"<(?:[\w.-]+:)?c\b[^>]*?\br=\"([A-Z]{1,3})([0-9]{1,7})\"")
_ODS_TABLE = "urn:oasis:names:tc:opendocument:xmlns:table:1.0"
_REL = "http://schemas.openxmlformats.org/officeDocument/2006/relationships"


def _local(tag: str) -> str:
    """An element's name without its namespace."""
    return tag.rsplit("}", 1)[-1]


def _events(path: Path, data: bytes, part: str, sheet: str | None = None) -> Iterator[Any]:
    """(event, element) pairs of one XML part, parsed safely; unreadable XML is refused."""
    from defusedxml import DefusedXmlException
    from defusedxml.ElementTree import iterparse

    try:
        yield from iterparse(io.BytesIO(data), events=("start", "end"), forbid_dtd=False)
    except DefusedXmlException as exc:
        raise FileFormatError(
            str(path), f"{part} declares XML entities ({exc}); save the workbook again", sheet
        ) from exc
    except Exception as exc:  # ParseError and the like: never pass a sheet we could not scan
        raise FileFormatError(
            str(path), f"{part} cannot be read to look for formulas: {exc}", sheet
        ) from exc


def check_size(path: Path, zf: zipfile.ZipFile) -> None:
    """Refuse a workbook whose parts inflate to more than :data:`MAX_INFLATED_BYTES`."""
    total = sum(info.file_size for info in zf.infolist())
    if total > MAX_INFLATED_BYTES:
        raise FileFormatError(
            str(path),
            f"the workbook inflates to {total / 2**20:,.0f} MiB (more than "
            f"{MAX_INFLATED_BYTES / 2**20:,.0f} MiB); save the data as CSV or split it",
        )


def column_index(letters: bytes) -> int:
    col = 0
    for ch in letters:
        col = col * 26 + ch - 64
    return col - 1


def check_span(path: Path, sheet: str, xml: bytes) -> None:
    """Refuse a sheet whose cells span more than :data:`MAX_SHEET_CELLS` (rows × columns)."""
    rows = cols = 0
    for m in _CELL_REF.finditer(xml):
        rows = max(rows, int(m[2]))
        cols = max(cols, column_index(m[1]) + 1)
    if rows * cols > MAX_SHEET_CELLS:
        raise FileFormatError(
            str(path),
            f"the cells span {rows:,} rows × {cols:,} columns (a cell far from the others?); "
            f"at most {MAX_SHEET_CELLS:,} cells can be read — delete the stray cells",
            sheet,
        )


def xlsx_sheet_parts(path: Path, zf: zipfile.ZipFile) -> dict[str, str]:
    """Sheet name → the zip member holding its XML."""
    rels: dict[str, str] = {}
    for event, el in _events(path, zf.read("xl/_rels/workbook.xml.rels"), "the workbook's links"):
        if event == "end" and _local(el.tag) == "Relationship":
            rels[el.get("Id", "")] = el.get("Target", "")
    parts: dict[str, str] = {}
    for event, el in _events(path, zf.read("xl/workbook.xml"), "the workbook's sheet list"):
        if event == "end" and _local(el.tag) == "sheet":
            rid = el.get(f"{{{_REL}}}id") or el.get("id") or ""
            target = rels.get(rid, "")
            parts[el.get("name", "")] = (
                target.lstrip("/") if target.startswith("/") else f"xl/{target}"
            )
    return parts


def xlsx_formulas(path: Path, sheet: str, xml: bytes) -> dict[tuple[int, int], str]:
    """(row0, col0) → formula of every cell of one sheet that holds one."""
    cells: dict[tuple[int, int], str] = {}
    ref: tuple[int, int] | None = None
    for event, el in _events(path, xml, f"sheet {sheet!r}", sheet):
        name = _local(el.tag)
        if event == "start":
            if name == "c":
                ref = _cell(el.get("r", ""))
            continue
        if name == "f" and ref is not None:
            cells[ref] = "=" + (el.text or "(shared formula)")
        elif name == "c":
            ref = None
            el.clear()
        elif name == "row":
            el.clear()
    return cells


def _cell(ref: str) -> tuple[int, int] | None:
    m = re.fullmatch(r"([A-Z]{1,3})([0-9]{1,7})", ref)
    if not m:
        return None
    return int(m[2]) - 1, column_index(m[1].encode("ascii"))


def ods_formulas(
    path: Path, content: bytes, sheets: list[str]
) -> dict[str, dict[tuple[int, int], str]]:
    """Cells holding formulas, per sheet, from an .ods file's ``content.xml``.

    Rows and cells repeat with ``number-rows-repeated`` / ``number-columns-repeated``; covered
    (merged) cells take their column too, so positions are those of the sheet's grid.
    """
    out: dict[str, dict[tuple[int, int], str]] = {}
    cells: dict[tuple[int, int], str] | None = None
    row, col = -1, 0
    t = f"{{{_ODS_TABLE}}}"
    for event, el in _events(path, content, "content.xml"):
        name = _local(el.tag)
        if event == "start":
            if name == "table":
                title = el.get(f"{t}name", "")
                cells = out.setdefault(title, {}) if title in sheets else None
                row = -1
            elif name == "table-row":
                row, col = row + 1, 0
            continue
        if name == "table-row":
            row += int(el.get(f"{t}number-rows-repeated", "1")) - 1
            el.clear()
        elif name in ("table-cell", "covered-table-cell"):
            formula = el.get(f"{t}formula")
            if formula is not None and cells is not None:
                text = formula.split(":", 1)[1] if formula.startswith("of:") else formula
                cells[(row, col)] = text if text.startswith("=") else "=" + text
            col += int(el.get(f"{t}number-columns-repeated", "1"))
    return out
