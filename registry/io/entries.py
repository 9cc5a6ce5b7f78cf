"""Build stage: one :class:`~registry.record.entry.EntryInput` per row of an entries sheet.

Cells are read column by column (one pass per used column, a 100,000-row sheet in well under a
second), then each non-blank row becomes an entry: text fields as written, value fields with the
header's unit appended to bare numbers and a separate uncertainty column folded in, unknown
columns as extra attributes, embedded or per-row rate points. A mapping file's
``[spellings]`` translate method, process, solvent and nucleus texts here, and a sheet that gives
Tc and Δν but no method has its rows that carry both read as coalescence data (said in a note).
Nothing is converted here; the unit layer reads the texts in the next stage. Problems found on
the way (formulas, text in a number column, an unreadable rate list) are collected with their
sheet, row, column and text.
"""

from __future__ import annotations

from collections import defaultdict
from collections.abc import Callable
from dataclasses import dataclass
from typing import Any

from registry.errors import RowProblem, UnitError
from registry.io import results
from registry.io.cells import (
    EMPTY_MARKERS,
    column_texts,
    combine_error,
    looks_numeric,
    parse_rate_list,
    raw_formula_rows,
    with_unit,
)
from registry.io.headers import EXTRA_PREFIX, FIELD_TITLES, TEXT_FIELDS, VALUE_QUANTITY
from registry.io.mapping import Column, SheetPlan
from registry.io.readers import RawSheet
from registry.io.results import ReadResult, RowSource
from registry.record import fields
from registry.record.conventions import read_convention
from registry.record.entry import EntryInput, blank
from registry.record.spelling import fold

#: fields of one entry whose cells are kept as text (log10 A too: a bare number, read later)
ENTRY_TEXT_FIELDS = tuple(n for n in TEXT_FIELDS if fields.BY_NAME[n].entry)
#: fields of one entry whose cells are physical values (screened as numbers)
ENTRY_VALUE_FIELDS = tuple(n for n in VALUE_QUANTITY if fields.BY_NAME[n].entry)

FORMULA_REASON = "the cell holds a formula"

#: what a value cell could hold, for messages (common practice, no source)
_EXAMPLES = {
    "dg": "14.2 kcal/mol",
    "dh": "60 kJ/mol",
    "ds": "-5 e.u.",
    "ea": "62 kJ/mol",
    "tc": "-20 °C",
    "dg_t": "298 K",
    "t_min": "200 K",
    "t_max": "350 K",
    "dnu": "24 Hz",
    "j": "12 Hz",
    "field": "400 MHz",
    "t": "298 K",
    "k": "12.5 s-1",
}


def not_a_number(file: str, sheet: str | None, row: int, col: Column, text: str) -> RowProblem:
    """The problem of a value cell that does not start with a number."""
    name = col.field or ""
    return RowProblem(
        file,
        sheet,
        row,
        col.header,
        text,
        f"not a number; {FIELD_TITLES.get(name, name)} needs a value such as "
        f"'{_EXAMPLES.get(name, '1.0')}'",
    )


def formula_problem(
    file: str, sheet: str | None, row: int, col: Column, formula: str
) -> RowProblem:
    return RowProblem(
        file,
        sheet,
        row,
        col.header,
        formula,
        FORMULA_REASON + "; the registry stores values as reported — paste the value instead",
    )


@dataclass
class _Columns:
    """An entries sheet's column plan resolved to cell texts, once per sheet."""

    texts: dict[int, list[str | None]]  # every mapped column's cell texts, by column index
    #: each text field and its cell texts (translated by the mapping file's spellings)
    text_fields: list[tuple[str, list[str | None]]]
    text_defaults: dict[str, str]
    #: (field, column or None, header unit, uncertainty column index, mapping default)
    value_fields: list[tuple[str, Column | None, str | None, int | None, str | None]]
    extras: list[tuple[str, int]]
    units: dict[str, str]
    rates: Column | None
    k: Column | None
    k_error: Column | None
    implied_method: str | None = None
    implied_rows: int = 0  # rows given the implied method


def read_entries(
    result: ReadResult,
    rs: RawSheet,
    plan: SheetPlan,
    head: int,
    on_smiles: Callable[[list[str | None]], object] | None = None,
) -> None:
    """Add the sheet's entries (and their problems) to ``result``.

    ``on_smiles`` gets the SMILES column as soon as it has passed the cheap screen, so a
    process pool can parse structures while the entries are built.
    """
    body = rs.frame.iloc[head + 1 :]
    n_rows = len(body)
    texts = _sheet_texts(plan, body)
    bad = _formula_problems(result.file, rs, plan, head, body)
    big = result.stop_early and n_rows >= results.EARLY_STOP_MIN_ROWS
    if big and _cheap_screen(result, rs, plan, head, texts, bad):
        return
    values = plan.value_columns()
    smiles = values.get("smiles")
    if on_smiles is not None and smiles is not None:
        on_smiles(texts[smiles.index])
    cols = _columns(plan, texts)
    nonblank = [False] * n_rows
    for col_texts in texts.values():
        for i, t in enumerate(col_texts):
            if t is not None:
                nonblank[i] = True
    for i in range(n_rows):
        if not nonblank[i]:
            continue
        row_no = head + i + 2
        problems = bad.get(i, [])
        entry, rate_rows = _build_entry(result, rs.name, cols, i, row_no, problems)
        result.problems.extend(problems)
        result.inputs.append(entry)
        result.sources.append(RowSource(rs.name, row_no, plan, texts, i, rate_rows))
    if cols.implied_rows:
        where = f"sheet {rs.name!r}" if rs.name else result.file
        result.notes.append(
            f"{where} has Tc and Δν columns but no method column: {cols.implied_rows} row(s) "
            f"giving both were read as {cols.implied_method} data (a method column or a "
            "mapping-file default says otherwise)"
        )


def _sheet_texts(plan: SheetPlan, body: Any) -> dict[int, list[str | None]]:
    """Cell texts of every mapped column present in the sheet."""
    return {
        c.index: column_texts(body.iloc[:, c.index])
        for c in plan.columns
        if c.index < body.shape[1]
    }


def _formula_problems(
    file: str, rs: RawSheet, plan: SheetPlan, head: int, body: Any
) -> dict[int, list[RowProblem]]:
    """Formula cells of used columns by row offset: from the workbook, or written as text."""
    bad: dict[int, list[RowProblem]] = defaultdict(list)
    by_index = {c.index: c for c in plan.columns}
    n_rows = len(body)
    for (row0, j), formula in rs.formulas.items():
        i = row0 - head - 1
        if 0 <= i < n_rows and j in by_index:
            bad[i].append(formula_problem(file, rs.name, row0 + 1, by_index[j], formula))
    used = {c.index for c in plan.columns if c.role in ("value", "error", "extra")}
    for j in sorted(used):
        if j >= body.shape[1]:
            continue
        for i in raw_formula_rows(body.iloc[:, j]):
            if not any(p.column == by_index[j].header for p in bad[i]):
                raw = str(body.iat[i, j]).strip()
                bad[i].append(formula_problem(file, rs.name, head + i + 2, by_index[j], raw))
    return bad


def _cheap_screen(
    result: ReadResult,
    rs: RawSheet,
    plan: SheetPlan,
    head: int,
    texts: dict[int, list[str | None]],
    bad: dict[int, list[RowProblem]],
) -> bool:
    """On a big sheet, look only for formulas and text in number columns; True when found.

    A file with such cells is reported without building entries (a 200,000-row sheet answers
    in about a second). Smaller sheets go through every check, so that all their problems are
    listed at once.
    """
    values = plan.value_columns()
    for name in ENTRY_VALUE_FIELDS:
        col = values.get(name)
        if col is None:
            continue
        for i, t in enumerate(texts[col.index]):
            if t is None or looks_numeric(t) or t.lower() in EMPTY_MARKERS:
                continue
            if any(p.column == col.header for p in bad.get(i, ())):
                continue  # already reported for this cell (a formula)
            bad[i].append(not_a_number(result.file, rs.name, head + i + 2, col, t))
    found = [p for i in sorted(bad) for p in bad[i]]
    if not found:
        return False
    result.problems.extend(found)
    result.notes.append(
        f"sheet {rs.name!r} has {len(rs.frame) - head - 1:,} rows: only formulas and text in "
        "number columns were checked so far; fix these and import again for the remaining checks"
    )
    return True


def _columns(plan: SheetPlan, texts: dict[int, list[str | None]]) -> _Columns:
    values = plan.value_columns()
    errors = plan.error_columns()
    units = {f: c.unit for f, c in values.items() if c.unit}
    # a bare spectrometer frequency is in MHz (common practice, no source); as for `add`, the
    # text stays as written and the unit goes to the parser only
    units.setdefault("field", "MHz")
    value_fields: list[tuple[str, Column | None, str | None, int | None, str | None]] = []
    for name in ENTRY_VALUE_FIELDS:
        col = values.get(name)
        if col is None:
            if name in plan.defaults:
                value_fields.append((name, None, None, None, plan.defaults[name]))
            continue
        err = errors.get(name)
        value_fields.append(
            (name, col, col.unit, err.index if err else None, plan.defaults.get(name))
        )
    extras = []
    for col in plan.extra_columns():
        key = col.header
        if key.lower().startswith(EXTRA_PREFIX):
            key = key[len(EXTRA_PREFIX) :].strip()
        extras.append((key, col.index))
    return _Columns(
        texts=texts,
        text_fields=[
            (n, _translated(texts[values[n].index], plan.spellings.get(n)))
            for n in ENTRY_TEXT_FIELDS
            if n in values
        ],
        text_defaults={
            n: plan.spellings.get(n, {}).get(fold(plan.defaults[n]), plan.defaults[n])
            for n in ENTRY_TEXT_FIELDS
            if n in plan.defaults
        },
        value_fields=value_fields,
        extras=extras,
        units=units,
        rates=values.get("rates"),
        k=values.get("k"),
        k_error=errors.get("k"),
        implied_method=plan.implied_method,
    )


def _translated(texts: list[str | None], spellings: dict[str, str] | None) -> list[str | None]:
    """A column's cell texts with the mapping file's spellings applied (the same list when none
    apply; the sheet's own texts stay as read, for the rejected-rows file)."""
    if not spellings:
        return texts
    return [spellings.get(fold(t), t) if t is not None else None for t in texts]


def _build_entry(
    result: ReadResult,
    sheet: str | None,
    cols: _Columns,
    i: int,
    row_no: int,
    problems: list[RowProblem],
) -> tuple[EntryInput, list[tuple[str | None, int]]]:
    """Row ``i`` as an entry, and the (sheet, row) each of its rate points came from."""
    texts = cols.texts
    kw: dict[str, Any] = dict(cols.text_defaults)
    for name, column in cols.text_fields:
        t = column[i]
        if t is not None:
            kw[name] = t
    for name, col, unit, err_j, default in cols.value_fields:
        t = texts[col.index][i] if col is not None else None
        if t is not None and t.lower() in EMPTY_MARKERS:
            result.blank_markers += 1
            t = None
        if t is None:
            if default is not None:
                kw[name] = with_unit(default, unit)
            continue
        if col is not None and not looks_numeric(t):  # (a default has no column)
            problems.append(not_a_number(result.file, sheet, row_no, col, t))
            continue
        err = texts[err_j][i] if err_j is not None else None
        if err is not None and err.lower() in EMPTY_MARKERS:
            err = None
        kw[name] = with_unit(combine_error(t, err), unit)
    if cols.implied_method and "method" not in kw and kw.get("tc") and kw.get("dnu"):
        kw["method"] = cols.implied_method
        cols.implied_rows += 1
    entry = EntryInput(**kw, units=dict(cols.units))
    for key, j in cols.extras:
        t = texts[j][i]
        if t is not None:
            entry.extra[key] = t
    return entry, _row_rates(result.file, sheet, cols, i, row_no, entry, problems)


def _row_rates(
    file: str,
    sheet: str | None,
    cols: _Columns,
    i: int,
    row_no: int,
    entry: EntryInput,
    problems: list[RowProblem],
) -> list[tuple[str | None, int]]:
    """Rate points written in the row itself: an export's rate list, or a k column at ΔG‡'s T."""
    sources: list[tuple[str | None, int]] = []
    texts = cols.texts
    if cols.rates is not None and texts[cols.rates.index][i]:
        try:
            entry.rates = parse_rate_list(texts[cols.rates.index][i] or "")
            sources = [(sheet, row_no)] * len(entry.rates)
        except UnitError as exc:
            problems.append(
                RowProblem(file, sheet, row_no, cols.rates.header, exc.text, exc.reason)
            )
    k_col = cols.k
    if k_col is not None and texts[k_col.index][i]:
        k_text = texts[k_col.index][i] or ""
        if not entry.dg_t:
            reason = "a rate constant needs its temperature (a T column)"
            problems.append(RowProblem(file, sheet, row_no, k_col.header, k_text, reason))
        else:
            conflict = take_convention(entry, k_col.convention, k_col.header)
            if conflict:
                problems.append(
                    RowProblem(file, sheet, row_no, k_col.header, entry.convention, conflict)
                )
            err = texts[cols.k_error.index][i] if cols.k_error is not None else None
            entry.rates.append((entry.dg_t, with_unit(combine_error(k_text, err), k_col.unit)))
            sources.append((sheet, row_no))
    return sources


def take_convention(entry: EntryInput, convention: str | None, header: str) -> str | None:
    """Give ``entry`` the convention a rate column's header names; the reason when the entry
    already says another one (a ``kex`` column under a row that records per-site k)."""
    if convention is None:
        return None
    if blank(entry.convention):
        entry.convention = convention
        return None
    try:
        stated = read_convention(str(entry.convention))
    except UnitError:
        return None  # the entry's own text is reported when the entry is normalized
    if stated == convention:
        return None
    return (
        f"the column {header!r} holds {convention} rate constants, but the entry records the "
        f"convention {stated}; one of them is wrong"
    )
