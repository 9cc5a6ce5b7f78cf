"""Read stage: a file's sheets, each with its column plan, built into entries and rate rows.

:func:`read_input` reads the file (:mod:`.readers`), finds each sheet's header row, plans its
columns (:mod:`.mapping`; header problems such as merged header cells or a wrong unit concern
every row, so they stop the import here), and hands entries sheets to :mod:`.entries` and rates
sheets to :mod:`.rates`. Problems are collected, never raised one by one; only a file that
cannot be read at all raises :class:`~registry.errors.FileFormatError`.
"""

from __future__ import annotations

import contextlib
from collections.abc import Callable
from pathlib import Path
from typing import Any

from registry.errors import FileFormatError, RowProblem
from registry.io.cells import cell_text
from registry.io.entries import FORMULA_REASON, read_entries
from registry.io.mapping import MappingFile, SheetPlan, load_mapping, plan_sheet
from registry.io.rates import attach_rates, read_rates
from registry.io.readers import RawSheet, column_letter, read_file
from registry.io.results import ReadResult


def read_input(
    path: Path,
    *,
    sheet: str | None = None,
    mapping: str | Path | None = None,
    stop_early: bool = False,
    on_smiles: Callable[[list[str | None]], object] | None = None,
) -> ReadResult:
    """Read and map a file and build the entries; problems are collected, not raised.

    ``on_smiles`` is given each entry sheet's SMILES column as soon as it is read (and passed
    the cheap screen), so that structures can be parsed while the entries are being built.
    """
    raw = read_file(path, sheet)
    result = ReadResult(path.name, raw.sha256, [], [], [], [], [], set(), list(raw.notes))
    result.stop_early = stop_early
    later: list[RowProblem] = []  # problems of single data rows (merged cells below the header)
    planned = _plan_sheets(path, raw.sheets, sheet, load_mapping(mapping), result, later)
    if result.problems:  # header problems concern every row: stop here
        return result
    for rs, plan, head in planned:
        if plan.kind == "entries":
            read_entries(result, rs, plan, head, on_smiles)
        else:
            read_rates(result, rs, plan, head)
    result.problems.extend(later)
    merged_rows = {(p.sheet, p.row or 0) for p in later}
    for rr in [rr for rr in result.rate_rows if (rr.sheet, rr.row) in merged_rows]:
        result.rate_rows.remove(rr)
        result.bad_rate_rows.add((rr.sheet, rr.row))
    attach_rates(result)
    result.problems[:] = _one_problem_per_formula_cell(result.problems)
    return result


def _plan_sheets(
    path: Path,
    sheets: list[RawSheet],
    wanted: str | None,
    mapping: MappingFile,
    result: ReadResult,
    later: list[RowProblem],
) -> list[tuple[RawSheet, SheetPlan, int]]:
    """Each sheet with data: its column plan and 0-based header row; others get a note."""
    planned: list[tuple[RawSheet, SheetPlan, int]] = []
    for rs in sheets:
        result.notes.extend(n for n in rs.notes if n not in result.notes)
        head = _header_row(rs.frame)
        if head is None:
            if wanted is not None or len(sheets) == 1:
                raise FileFormatError(str(path), "the sheet has no rows", rs.name)
            result.notes.append(f"sheet {rs.name!r} is empty; skipped")
            continue
        _merged_problems(result.file, rs, head, result.problems, later)
        headers = rs.frame.iloc[head].tolist()
        data_cols = {
            j
            for j in range(rs.frame.shape[1])
            if any(cell_text(v) for v in rs.frame.iloc[head + 1 :, j].tolist()[:1000])
        }
        plan = plan_sheet(
            result.file, rs.name, headers, head + 1, mapping, result.problems, data_cols
        )
        if plan.kind == "skip":
            result.notes.append(
                f"sheet {rs.name!r}: no recognised entry or rate columns "
                f"(headers: {', '.join(c.header for c in plan.columns) or 'none'}); skipped"
            )
            result.notes.extend(plan.notes)  # hints on headers that look like quantities
            continue
        result.notes.extend(plan.notes)
        result.plans.append(plan)
        planned.append((rs, plan, head))
    named = {rs.name for rs in sheets}
    for name in mapping.sheet_defaults:
        if name not in named:
            result.notes.append(f"mapping file: [defaults.{name!r}] names no sheet of this file")
    if not planned and not result.problems:
        where = f"sheet {wanted!r}" if wanted else "the file"
        raise FileFormatError(
            str(path),
            f"{where} has no column this importer recognises as entry or rate data; "
            "check the header row or give a mapping file",
            wanted,
        )
    return planned


def _header_row(frame: Any) -> int | None:
    """0-based index of the first row with any non-empty cell."""
    for i in range(len(frame)):
        if any(cell_text(v) for v in frame.iloc[i].tolist()):
            return i
    return None


def _merged_problems(
    file: str, rs: RawSheet, head: int, problems: list[RowProblem], later: list[RowProblem]
) -> None:
    """Merged header cells are a header problem; merged data cells reject their rows."""
    for (r0, c0), (r1, c1) in rs.merged:
        ref = f"{column_letter(c0)}{r0 + 1}:{column_letter(c1)}{r1 + 1}"
        text = None
        with contextlib.suppress(IndexError):
            text = cell_text(rs.frame.iat[r0, c0])
        if r0 <= head:
            reason = f"merged header cells ({ref}); use one header row with one name per column"
            problems.append(RowProblem(file, rs.name, r0 + 1, column_letter(c0), text, reason))
        else:
            reason = (
                f"merged cells ({ref}): only the first cell holds the value; unmerge them and "
                "fill every cell"
            )
            for row0 in range(r0, r1 + 1):
                later.append(RowProblem(file, rs.name, row0 + 1, column_letter(c0), text, reason))


def _one_problem_per_formula_cell(problems: list[RowProblem]) -> list[RowProblem]:
    """A cell that holds a formula is reported as such, not also as 'not a number'."""
    formula_cells = {
        (p.sheet, p.row, p.column) for p in problems if p.reason.startswith(FORMULA_REASON)
    }
    return [
        p
        for p in problems
        if p.reason.startswith(FORMULA_REASON) or (p.sheet, p.row, p.column) not in formula_cells
    ]
