"""Small tables of a time course (time against ee, a fraction, or magnetizations) from a file.

The file is read by the importer's reader (:func:`registry.io.readers.read_file`: CSV/TSV
with any encoding it accepts, .xlsx/.ods through calamine with the workbook size guards),
headers are split into name and unit by :func:`registry.io.headers.split_header` (``t (min)``,
``time / h``, ``ee [%]``, ``t, s``) and folded by :func:`~registry.io.headers.concept_key`,
cells are read by :func:`registry.io.cells.cell_text` and every quantity by
:func:`registry.record.units.parse_value` (a unit in a cell wins over the header's). All bad
cells of the columns read are reported at once, with their row numbers, before anything is
fitted. pandas (through the reader) is loaded only here, only when a file is read.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

import numpy as np
from numpy.typing import NDArray

from registry.errors import FileFormatError, ImportRowError, RowProblem, UnitError

FloatArray = NDArray[np.float64]

#: concept keys (see registry.io.headers.concept_key) of a time column
TIME_NAMES = frozenset({"t", "time", "delay", "tau", "vd", "mixing", "mixingtime", "elapsed"})


@dataclass(frozen=True)
class SeriesColumn:
    """One column: its position, header as written, folded name and the unit the header gives."""

    index: int
    header: str
    concept: str
    unit: str | None


@dataclass(frozen=True)
class SeriesTable:
    """The data rows of the first sheet with data (or the sheet named), as cell texts."""

    source: str
    sheet: str | None
    header_row: int  # spreadsheet row number of the header
    columns: tuple[SeriesColumn, ...]
    row_numbers: tuple[int, ...]  # spreadsheet row number of each data row
    cells: tuple[tuple[str | None, ...], ...]  # per data row, one text per column
    notes: tuple[str, ...]

    def find(self, names: frozenset[str] | set[str]) -> SeriesColumn | None:
        """The first column whose folded name is one of ``names``."""
        return next((c for c in self.columns if c.concept in names), None)

    def headers_text(self) -> str:
        """The headers, for messages: ``headers: 't (s)', 'A', 'B'``."""
        return "headers: " + (", ".join(repr(c.header) for c in self.columns) or "none")

    def problem(
        self, column: SeriesColumn, row: int | None, text: str | None, reason: str
    ) -> RowProblem:
        """A problem in data row ``row`` (0-based; None: the header) of ``column``."""
        number = self.header_row if row is None else self.row_numbers[row]
        return RowProblem(self.source, self.sheet, number, column.header, text, reason)


def read_series(path: str | Path, *, sheet: str | None = None) -> SeriesTable:
    """Read the header row (the first non-empty row) and the data rows below it."""
    from registry.io.cells import cell_text
    from registry.io.headers import concept_key, split_header
    from registry.io.readers import read_file

    raw = read_file(Path(path), sheet)
    name = str(path)
    for rs in raw.sheets:
        rows = [[cell_text(v) for v in rs.frame.iloc[i].tolist()] for i in range(len(rs.frame))]
        head = next((i for i, r in enumerate(rows) if any(r)), None)
        if head is None:
            continue
        columns = []
        for j, text in enumerate(rows[head]):
            if text:
                concept, unit = split_header(text)
                columns.append(SeriesColumn(j, text, concept_key(concept), unit))
        data = [(i, r) for i, r in enumerate(rows[head + 1 :], start=head + 1) if any(r)]
        if not data:
            raise FileFormatError(name, "no data rows below the header row", rs.name)
        cells = tuple(tuple(_cell(r, c.index, rs.formulas, i) for c in columns) for i, r in data)
        notes = list(raw.notes)
        if len(raw.sheets) > 1 and sheet is None:
            notes.append(f"read sheet {rs.name!r}, the first with data")
        return SeriesTable(
            name,
            rs.name,
            head + 1,
            tuple(columns),
            tuple(i + 1 for i, _ in data),
            cells,
            tuple(notes),
        )
    raise FileFormatError(name, "no rows with data", sheet)


def _cell(
    row: list[str | None], index: int, formulas: dict[tuple[int, int], str], row0: int
) -> str | None:
    text = row[index] if index < len(row) else None
    if text is None and (row0, index) in formulas:
        return "=" + formulas[(row0, index)].lstrip("=")  # a formula without a stored value
    return text


def read_column(
    table: SeriesTable,
    column: SeriesColumn,
    quantity: str,
    problems: list[RowProblem],
    *,
    unit: str | None = None,
) -> FloatArray:
    """The column's values in the canonical unit of ``quantity`` (``unit``: the default unit
    when the header gives none); bad cells become NaN and a problem with their row number.

    ``quantity="fraction"`` reads plain numbers, or percentages when the header says ``%``.
    """
    from registry.record.units import convert, parse_value

    scale = 1.0
    if quantity == "fraction":
        if column.unit not in (None, "%", "percent"):
            problems.append(table.problem(column, None, column.header, "write '%' or no unit"))
            return np.full(len(table.cells), np.nan)
        scale = convert(1.0, "percent", "") if column.unit else 1.0
        quantity = "dimensionless"
    out = np.full(len(table.cells), np.nan)
    for row, cells in enumerate(table.cells):
        text = cells[table.columns.index(column)]
        try:
            if text is None:
                raise UnitError(column.header, "", "empty cell")
            if text.startswith("=") and len(text) > 1:
                raise UnitError(column.header, text, "a formula without a stored value")
            default = None if quantity == "dimensionless" else (column.unit or unit)
            out[row] = parse_value(text, quantity, field=column.header, default_unit=default).value
        except UnitError as exc:
            problems.append(table.problem(column, row, text, exc.reason))
    return out * scale


def read_times(table: SeriesTable, column: SeriesColumn, problems: list[RowProblem]) -> FloatArray:
    """The time column in s; a negative time is a problem of its row (times count from the
    start of the experiment, so one below 0 is a slip in the file)."""
    secs = read_column(table, column, "time", problems)
    index = table.columns.index(column)
    for row in np.flatnonzero(secs < 0):
        text = table.cells[row][index]
        problems.append(table.problem(column, int(row), text, "a time cannot be negative"))
    return secs


def require_times(table: SeriesTable, secs: FloatArray, minimum: int, what: str) -> None:
    """Refuse a table with fewer than ``minimum`` different times, naming the file."""
    distinct = int(np.unique(secs).size)
    if distinct < minimum:
        raise FileFormatError(
            table.source,
            f"{distinct} different time(s) in {len(secs)} data row(s): {what} needs at least "
            f"{minimum}",
            table.sheet,
        )


def raise_problems(problems: list[RowProblem]) -> None:
    """Every bad cell at once (nothing is fitted while one is wrong)."""
    if problems:
        raise ImportRowError(problems)
