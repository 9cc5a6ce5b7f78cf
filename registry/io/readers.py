"""Reading .xlsx, .ods, .csv, .tsv and SD files into sheets of raw cells, with their row numbers.

pandas reads the cells (the calamine engine for workbooks: ~15× faster than openpyxl, see
PERFORMANCE.md); what pandas cannot tell us — formulas (calamine returns their cached value,
or nothing when the file was written by a program that stores none) and merged cells — is read
from the workbook itself. CSV text that is not UTF-8 is read as Windows-1252 (then Latin-1) with
a note, since that is what spreadsheet programs on Windows write.
"""

from __future__ import annotations

import csv
import hashlib
import io
import re
import zipfile
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from registry.errors import FileFormatError
from registry.io import workbook_xml

SUPPORTED = (".xlsx", ".xlsm", ".ods", ".csv", ".tsv", ".txt", ".sdf", ".sd")


@dataclass
class RawSheet:
    """One sheet: a DataFrame of raw cells (row i of the frame is spreadsheet row i + 1)."""

    name: str | None
    frame: Any  # pandas.DataFrame, header=None, object/str cells
    formulas: dict[tuple[int, int], str] = field(default_factory=dict)  # (row0, col0) → formula
    merged: list[tuple[tuple[int, int], tuple[int, int]]] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)


@dataclass
class RawFile:
    path: Path
    sha256: str
    sheets: list[RawSheet]
    notes: list[str] = field(default_factory=list)


def column_letter(index0: int) -> str:
    """0 → A, 25 → Z, 26 → AA (spreadsheet column names)."""
    name = ""
    n = index0 + 1
    while n:
        n, rem = divmod(n - 1, 26)
        name = chr(65 + rem) + name
    return name


def read_file(path: Path, sheet: str | None = None) -> RawFile:
    """All sheets of a file (or the one named); errors name the file and say what is wrong."""
    path = Path(path)
    if not path.exists():
        raise FileFormatError(str(path), "no such file")
    if path.is_dir():
        raise FileFormatError(str(path), "is a folder, not a file")
    data = path.read_bytes()
    digest = hashlib.sha256(data).hexdigest()
    if not data.strip():
        raise FileFormatError(str(path), "the file is empty")
    suffix = path.suffix.lower()
    if suffix in (".csv", ".tsv", ".txt"):
        if sheet:
            raise FileFormatError(
                str(path), "a CSV/TSV file has no sheets; import it without a sheet name", sheet
            )
        raw = _read_delimited(path, data, suffix)
        return RawFile(path, digest, [raw], list(raw.notes))
    if suffix in (".xlsx", ".xlsm", ".ods"):
        return RawFile(path, digest, _read_workbook(path, data, sheet, suffix))
    if suffix in (".sdf", ".sd"):
        if sheet:
            raise FileFormatError(str(path), "an SD file has no sheets; import it without one")
        raw = _read_sd(path, data)
        return RawFile(path, digest, [raw], list(raw.notes))
    raise FileFormatError(
        str(path),
        f"unsupported file type {suffix or '(none)'}; use .xlsx, .ods, .csv, .tsv or .sdf",
    )


def decode_text(path: Path, data: bytes) -> tuple[str, str | None]:
    """Text of a CSV and a note when it was not UTF-8."""
    try:
        return data.decode("utf-8-sig"), None
    except UnicodeDecodeError as exc:
        where = f"byte {exc.start}"
    for encoding, label in (("cp1252", "Windows-1252 (cp1252)"), ("latin-1", "Latin-1")):
        try:
            text = data.decode(encoding)
        except UnicodeDecodeError:
            continue
        return text, (
            f"{path.name} is not UTF-8 (first bad {where}); read as {label} — "
            "check accented letters and symbols such as ° and ‡, or save the file as UTF-8"
        )
    raise FileFormatError(str(path), "cannot decode the file as UTF-8 or Windows-1252")


def _read_delimited(path: Path, data: bytes, suffix: str) -> RawSheet:
    import pandas as pd

    if b"\x00" in data[:4096]:
        raise FileFormatError(
            str(path), "looks like a binary file (or UTF-16 text); save it as UTF-8 CSV"
        )
    text, note = decode_text(path, data)
    if suffix == ".tsv":
        sep = "\t"
    else:
        sample = text[:65536]
        try:
            sep = csv.Sniffer().sniff(sample, delimiters=",;\t").delimiter
        except csv.Error:
            sep = ","
    try:
        frame = pd.read_csv(
            io.StringIO(text),
            sep=sep,
            header=None,
            dtype=str,
            keep_default_na=False,
            na_filter=False,
            skip_blank_lines=False,
            quotechar='"',
            engine="c",
        )
    except pd.errors.EmptyDataError as exc:
        raise FileFormatError(str(path), "the file has no rows") from exc
    except (pd.errors.ParserError, ValueError) as exc:
        raise FileFormatError(str(path), f"not a well-formed table: {exc}") from exc
    sheet = RawSheet(None, frame)
    if note:
        sheet.notes.append(note)
    return sheet


def _read_sd(path: Path, data: bytes) -> RawSheet:
    """An SD file as a sheet: one row per record (:mod:`registry.io.sdfile`)."""
    import pandas as pd

    from registry.io.sdfile import read_sd

    text, note = decode_text(path, data)
    rows, notes = read_sd(path, text)
    frame = pd.DataFrame([["" if c is None else c for c in row] for row in rows], dtype=object)
    return RawSheet(None, frame, notes=[*notes, *([note] if note else [])])


def _read_workbook(path: Path, data: bytes, sheet: str | None, suffix: str) -> list[RawSheet]:
    import pandas as pd
    import python_calamine as pc

    try:
        book = pc.CalamineWorkbook.from_filelike(io.BytesIO(data))
    except Exception as exc:  # calamine raises its own errors for damaged/unknown files
        raise FileFormatError(str(path), f"not a readable {suffix} workbook: {exc}") from exc
    names = list(book.sheet_names)
    if sheet is not None and sheet not in names:
        raise FileFormatError(
            str(path), f"no sheet named {sheet!r}; the sheets are {', '.join(names)}", sheet
        )
    wanted = [sheet] if sheet is not None else names
    formulas = _workbook_formulas(path, data, wanted, suffix)  # also checks the sizes first
    out = []
    for name in wanted:
        try:
            frame = pd.read_excel(
                io.BytesIO(data), sheet_name=name, header=None, dtype=object, engine="calamine"
            )
        except Exception as exc:
            raise FileFormatError(str(path), f"cannot read the sheet: {exc}", name) from exc
        raw = RawSheet(name, frame, formulas=formulas.get(name, {}))
        try:
            raw.merged = list(book.get_sheet_by_name(name).merged_cell_ranges or [])
        except Exception:  # merged ranges are not known for every format
            raw.merged = []
        out.append(raw)
    return out


_FORMULA_ELEMENT = re.compile(rb"<(?:[\w.-]+:)?f\b")


def _workbook_formulas(
    path: Path, data: bytes, sheets: list[str], suffix: str
) -> dict[str, dict[tuple[int, int], str]]:
    """Formula cells per sheet, from the workbook's XML (calamine hides them); before that,
    the workbook's inflated size and each sheet's cell span are checked."""
    try:
        with zipfile.ZipFile(io.BytesIO(data)) as zf:
            workbook_xml.check_size(path, zf)
            if suffix == ".ods":
                content = zf.read("content.xml")
                if b"formula" not in content:
                    return {}
                return workbook_xml.ods_formulas(path, content, sheets)
            parts = workbook_xml.xlsx_sheet_parts(path, zf)
            out: dict[str, dict[tuple[int, int], str]] = {}
            for name in sheets:
                member = parts.get(name)
                if member is None or member not in zf.namelist():
                    continue
                xml = zf.read(member)
                workbook_xml.check_span(path, name, xml)
                if _FORMULA_ELEMENT.search(xml):
                    out[name] = workbook_xml.xlsx_formulas(path, name, xml)
            return out
    except (KeyError, zipfile.BadZipFile) as exc:
        raise FileFormatError(str(path), f"not a readable {suffix} workbook: {exc}") from exc
