"""Import a spreadsheet: map headers, read and check every row, then write it all in one go.

The flow (STYLE.md §9): read the file (:mod:`.readers`) → plan the columns (:mod:`.mapping`) →
build one :class:`~registry.record.entry.EntryInput` per row and normalize it (values through
:mod:`registry.record.units`, structures through :mod:`registry.record.chem`, both in a process pool for big
files, :mod:`.parallel`) → collect *every* problem with its file, sheet, row, column and text →
only then open one write transaction: the import batch row, new measurements
(:func:`registry.storage.writer.write_entries`), updates of matching ones (:mod:`.upsert`) and rate
points. Any failure or Ctrl-C before the commit leaves the registry as it was.

With ``skip_bad`` the rows with problems are left out (and written to a side CSV with the
reason) and the rest is imported, still in one transaction.
"""

from __future__ import annotations

import contextlib
import csv
import re
from collections import defaultdict
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field
from datetime import UTC, datetime
from pathlib import Path
from typing import Any

from sqlalchemy import Connection, insert, select, update

from registry.errors import FileFormatError, ImportRowError, RowProblem, UnitError
from registry.io import parallel, upsert
from registry.io.cells import EMPTY_MARKERS, cell_text, is_formula_text, looks_numeric
from registry.io.headers import EXTRA_PREFIX, FIELD_TITLES
from registry.io.mapping import Column, SheetPlan, load_mapping, plan_sheet
from registry.io.readers import RawSheet, column_letter, read_file
from registry.record.chem import Structure
from registry.record.entry import EntryInput, NormalizedEntry, Problem, text_of
from registry.record.units import parse_value
from registry.storage.database import Database, current_user
from registry.storage.lookup import rows_where_in
from registry.storage.models import Compound, ImportBatch, Measurement
from registry.storage.writer import known_process_kinds, solvent_index, write_entries

#: more rows than this show a progress bar (when asked for one)
PROGRESS_MIN_ROWS = 5000
PREVIEW_ROWS = 5

_PLAIN_NUMBER = re.compile(
    r"^[+\-−–]?(?:\d+(?:[.,]\d*)?|[.,]\d+)(?:[eE][+\-]?\d+)?(?:\(\d+\))?"
    r"(?:\s*(?:±|\+/-|\+-)\s*\+?(?:\d+(?:[.,]\d*)?|[.,]\d+)(?:[eE][+\-]?\d+)?)?$"
)
_NUMBER_PREFIX = re.compile(r"^\s*([+\-−–]?(?:\d+(?:[.,]\d*)?|[.,]\d+)(?:[eE][+\-]?\d+)?)(.*)$")

_ENTRY_TEXT_FIELDS = (
    "method",
    "label",
    "compound",
    "name",
    "smiles",
    "process",
    "sites",
    "nucleus",
    "solvent",
    "population",
    "reference",
    "status",
    "log10_a",
)
_ENTRY_VALUE_FIELDS = ("field", "t_min", "t_max", "dg", "dg_t", "dh", "ds", "ea", "tc", "dnu", "j")


@dataclass
class RowSource:
    """Where an entry came from, to name the sheet, row and columns in messages."""

    sheet: str | None
    row: int
    plan: SheetPlan
    texts: dict[int, list[str | None]]  # the sheet's cell texts by column (shared by its rows)
    offset: int  # this row's position in those lists
    rates: list[tuple[str | None, int]] = field(default_factory=list)  # (sheet, row) per rate

    @property
    def cells(self) -> dict[str, Any]:
        """Header → raw text, for the rejected-rows file (built only for rows that need it)."""
        return {
            c.header: self.texts[c.index][self.offset]
            for c in self.plan.columns
            if c.index in self.texts
        }


@dataclass
class RateRow:
    sheet: str | None
    row: int
    label: str
    t_text: str
    k_text: str
    parsed: dict[str, Any]
    cells: dict[str, Any]


@dataclass
class ReadResult:
    """Everything read from a file, before anything touches the database."""

    file: str
    sha256: str
    plans: list[SheetPlan]
    inputs: list[EntryInput]
    sources: list[RowSource]
    rate_rows: list[RateRow]
    problems: list[RowProblem]
    bad_rate_rows: set[tuple[str | None, int]]
    notes: list[str]
    blank_markers: int = 0
    stop_early: bool = False


#: sheets at least this long stop after the cheap screen when it finds problems (speed)
EARLY_STOP_MIN_ROWS = 20_000


def _file_label(path: Path) -> str:
    return path.name


def _header_row(frame: Any) -> int | None:
    """0-based index of the first row with any non-empty cell."""
    for i in range(len(frame)):
        if any(cell_text(v) for v in frame.iloc[i].tolist()):
            return i
    return None


def _combine_error(value: str, error: str | None) -> str:
    """'14.2' + '0.3' → '14.2 ± 0.3'; '14.2 kcal/mol' + '0.3' → '14.2 ± 0.3 kcal/mol'."""
    if not error:
        return value
    m = _NUMBER_PREFIX.match(value)
    e = _NUMBER_PREFIX.match(error)
    if not m or not e or "±" in value or "+/-" in value:
        return value
    return f"{m[1]} ± {e[1]}{m[2]}"


def _with_unit(text: str, unit: str | None) -> str:
    """Append the header's unit to a bare number, so the stored text says what was meant."""
    if unit and _PLAIN_NUMBER.match(text):
        return f"{text} {unit}"
    return text


def parse_rate_list(text: str) -> list[tuple[str, str]]:
    """An export's embedded rate points, ``k @ T; k @ T`` (or ``T, k; T, k``) → [(T, k)]."""
    out = []
    for part in text.split(";"):
        part = part.strip()
        if not part:
            continue
        if "@" in part:
            k_text, t_text = (p.strip() for p in part.split("@", 1))
        elif "," in part:
            t_text, k_text = (p.strip() for p in part.split(",", 1))
        else:
            raise UnitError("rates", part, "write rate points as 'k @ T; k @ T'")
        out.append((t_text, k_text))
    return out


def format_rate_list(rates: Sequence[tuple[str, str]]) -> str:
    """Inverse of :func:`parse_rate_list`: [(T, k)] → ``k @ T; k @ T``."""
    return "; ".join(f"{k} @ {t}" for t, k in rates)


def read_input(
    path: Path,
    *,
    sheet: str | None = None,
    mapping_path: str | Path | None = None,
    stop_early: bool = False,
    on_smiles: Callable[[list[str | None]], object] | None = None,
) -> ReadResult:
    """Read and map a file and build the entries; problems are collected, not raised.

    ``on_smiles`` is given each entry sheet's SMILES column as soon as it is read (and passed
    the cheap screen), so that structures can be parsed while the entries are being built.
    """
    mapping = load_mapping(mapping_path)
    raw = read_file(path, sheet)
    file = _file_label(path)
    problems: list[RowProblem] = []
    notes = list(raw.notes)
    plans: list[SheetPlan] = []
    sheets: list[tuple[RawSheet, SheetPlan, int]] = []
    later: list[RowProblem] = []  # problems of single data rows (merged cells below the header)
    for rs in raw.sheets:
        notes.extend(n for n in rs.notes if n not in notes)
        head = _header_row(rs.frame)
        if head is None:
            if sheet is not None or len(raw.sheets) == 1:
                raise FileFormatError(str(path), "the sheet has no rows", rs.name)
            notes.append(f"sheet {rs.name!r} is empty; skipped")
            continue
        _merged_problems(file, rs, head, problems, later)
        headers = rs.frame.iloc[head].tolist()
        data_cols = {
            j
            for j in range(rs.frame.shape[1])
            if any(cell_text(v) for v in rs.frame.iloc[head + 1 :, j].tolist()[:1000])
        }
        plan = plan_sheet(file, rs.name, headers, head + 1, mapping, problems, data_cols)
        if plan.kind == "skip":
            notes.append(
                f"sheet {rs.name!r}: no recognised entry or rate columns "
                f"(headers: {', '.join(c.header for c in plan.columns) or 'none'}); skipped"
            )
            continue
        notes.extend(plan.notes)
        plans.append(plan)
        sheets.append((rs, plan, head))
    if not plans and not problems:
        where = f"sheet {sheet!r}" if sheet else "the file"
        raise FileFormatError(
            str(path),
            f"{where} has no column this importer recognises as entry or rate data; "
            "check the header row or give a mapping file (--map)",
            sheet,
        )
    result = ReadResult(file, raw.sha256, plans, [], [], [], problems, set(), notes)
    result.stop_early = stop_early
    if problems:  # header problems concern every row: stop here
        return result
    for rs, plan, head in sheets:
        if plan.kind == "entries":
            _read_entries(result, rs, plan, head, on_smiles)
        else:
            _read_rates(result, rs, plan, head)
    result.problems.extend(later)
    merged_rows = {(p.sheet, p.row or 0) for p in later}
    for rr in [rr for rr in result.rate_rows if (rr.sheet, rr.row) in merged_rows]:
        result.rate_rows.remove(rr)
        result.bad_rate_rows.add((rr.sheet, rr.row))
    _attach_rates(result)
    result.problems[:] = _one_problem_per_formula_cell(result.problems)
    return result


def _one_problem_per_formula_cell(problems: list[RowProblem]) -> list[RowProblem]:
    """A cell that holds a formula is reported as such, not also as 'not a number'."""
    formula_cells = {
        (p.sheet, p.row, p.column) for p in problems if p.reason.startswith(_FORMULA_REASON)
    }
    return [
        p
        for p in problems
        if p.reason.startswith(_FORMULA_REASON) or (p.sheet, p.row, p.column) not in formula_cells
    ]


def _merged_problems(
    file: str, rs: RawSheet, head: int, problems: list[RowProblem], later: list[RowProblem]
) -> None:
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


def column_texts(series: Any) -> list[str | None]:
    """One column's cells as text (see :func:`cell_text`); text cells take a fast path."""
    out: list[str | None] = []
    append = out.append
    for v in series.tolist():
        if type(v) is str:
            t = v.strip()
            if len(t) > 1 and t[0] == "'" and t[1] in _TRIGGERS:
                t = t[1:].strip()
            append(t or None)
        else:
            append(cell_text(v))
    return out


_TRIGGERS = "=+-@\t\r"


def _raw_formulas(series: Any) -> list[int]:
    """Positions of text cells that are formulas (un-neutralised leading '=')."""
    return [
        i
        for i, v in enumerate(series.tolist())
        if type(v) is str and v[:1] in ("=", " ") and is_formula_text(v.strip())
    ]


def _read_entries(
    result: ReadResult,
    rs: RawSheet,
    plan: SheetPlan,
    head: int,
    on_smiles: Callable[[list[str | None]], object] | None = None,
) -> None:
    body = rs.frame.iloc[head + 1 :]
    n_rows = len(body)
    values = plan.value_columns()
    errors = plan.error_columns()
    extras = plan.extra_columns()
    units = {f: c.unit for f, c in values.items() if c.unit}
    # a bare spectrometer frequency is in MHz (common practice, no source); as for `add`, the
    # text stays as written and the unit goes to the parser only
    units.setdefault("field", "MHz")
    used = {c.index for c in plan.columns if c.role in ("value", "error", "extra")}
    texts: dict[int, list[str | None]] = {
        j: column_texts(body.iloc[:, j]) if j < body.shape[1] else [None] * n_rows for j in used
    }
    all_cols = {c.index for c in plan.columns if c.index < body.shape[1]}
    row_texts = {j: (texts[j] if j in texts else column_texts(body.iloc[:, j])) for j in all_cols}
    nonblank = [False] * n_rows
    for col_texts in row_texts.values():
        for i, t in enumerate(col_texts):
            if t is not None:
                nonblank[i] = True
    bad: dict[int, list[RowProblem]] = defaultdict(list)
    by_index = {c.index: c for c in plan.columns}
    for (row0, j), formula in rs.formulas.items():
        i = row0 - head - 1
        if 0 <= i < n_rows and j in by_index:
            bad[i].append(_formula_problem(result.file, rs.name, row0 + 1, by_index[j], formula))
    for j in used:
        if j >= body.shape[1]:
            continue
        for i in _raw_formulas(body.iloc[:, j]):
            if not any(p.column == by_index[j].header for p in bad[i]):
                raw = str(body.iat[i, j]).strip()
                bad[i].append(
                    _formula_problem(result.file, rs.name, head + i + 2, by_index[j], raw)
                )
    if result.stop_early and n_rows >= EARLY_STOP_MIN_ROWS:
        # cheap screen first on big sheets: text in number columns; a file with such cells is
        # reported without building entries (a 200,000-row sheet answers in about a second).
        # Smaller sheets go through every check, so that all their problems are listed at once.
        for name in _ENTRY_VALUE_FIELDS:
            col = values.get(name)
            if col is None:
                continue
            for i, t in enumerate(texts[col.index]):
                if any(p.column == col.header for p in bad.get(i, ())):
                    continue  # already reported for this cell (a formula)
                if t is not None and not looks_numeric(t) and t.lower() not in EMPTY_MARKERS:
                    bad[i].append(
                        RowProblem(
                            result.file,
                            rs.name,
                            head + i + 2,
                            col.header,
                            t,
                            f"not a number; {FIELD_TITLES.get(name, name)} needs a value such "
                            f"as '{_example(name)}'",
                        )
                    )
        found = [p for i in sorted(bad) for p in bad[i]]
        if found:
            result.problems.extend(found)
            result.notes.append(
                f"sheet {rs.name!r} has {n_rows:,} rows: only formulas and text in number columns "
                "were checked so far; fix these and import again for the remaining checks"
            )
            return
    smiles_col = values.get("smiles")
    if on_smiles is not None and smiles_col is not None:
        on_smiles(texts[smiles_col.index])
    text_cols = [(name, values[name].index) for name in _ENTRY_TEXT_FIELDS if name in values]
    text_defaults = {n: plan.defaults[n] for n in _ENTRY_TEXT_FIELDS if n in plan.defaults}
    value_cols = []
    for name in _ENTRY_VALUE_FIELDS:
        col = values.get(name)
        if col is None:
            if name in plan.defaults:
                value_cols.append((name, None, None, None, plan.defaults[name]))
            continue
        err = errors.get(name)
        value_cols.append(
            (name, col, col.unit, err.index if err else None, plan.defaults.get(name))
        )
    extra_cols = []
    for col in extras:
        key = col.header
        if key.lower().startswith(EXTRA_PREFIX):
            key = key[len(EXTRA_PREFIX) :].strip()
        extra_cols.append((key, col.index))
    rates_col = values.get("rates")
    k_col = values.get("k")
    k_err = errors.get("k")
    for i in range(n_rows):
        if not nonblank[i]:
            continue
        row_no = head + i + 2
        problems = bad.get(i, [])
        kw: dict[str, Any] = dict(text_defaults)
        for name, j in text_cols:
            t = texts[j][i]
            if t is not None:
                kw[name] = t
        for name, col, unit, err_j, default in value_cols:
            t = texts[col.index][i] if col is not None else None
            if t is not None and t.lower() in EMPTY_MARKERS:
                result.blank_markers += 1
                t = None
            if t is None:
                if default is not None:
                    kw[name] = _with_unit(default, unit)
                continue
            if not looks_numeric(t):
                problems.append(
                    RowProblem(
                        result.file,
                        rs.name,
                        row_no,
                        col.header,
                        t,
                        f"not a number; {FIELD_TITLES.get(name, name)} needs a value such as "
                        f"'{_example(name)}'",
                    )
                )
                continue
            err = texts[err_j][i] if err_j is not None else None
            if err is not None and err.lower() in EMPTY_MARKERS:
                err = None
            kw[name] = _with_unit(_combine_error(t, err), unit)
        inp = EntryInput(**kw, units=dict(units))
        for key, j in extra_cols:
            t = texts[j][i]
            if t is not None:
                inp.extra[key] = t
        rates_sources: list[tuple[str | None, int]] = []
        if rates_col is not None and texts[rates_col.index][i]:
            try:
                inp.rates = parse_rate_list(texts[rates_col.index][i] or "")
                rates_sources = [(rs.name, row_no)] * len(inp.rates)
            except UnitError as exc:
                problems.append(
                    RowProblem(result.file, rs.name, row_no, rates_col.header, exc.text, exc.reason)
                )
        if k_col is not None and texts[k_col.index][i]:
            k_text = texts[k_col.index][i] or ""
            if not inp.dg_t:
                problems.append(
                    RowProblem(
                        result.file,
                        rs.name,
                        row_no,
                        k_col.header,
                        k_text,
                        "a rate constant needs its temperature (a T column)",
                    )
                )
            else:
                err = texts[k_err.index][i] if k_err is not None else None
                inp.rates.append((inp.dg_t, _with_unit(_combine_error(k_text, err), k_col.unit)))
                rates_sources.append((rs.name, row_no))
        result.problems.extend(problems)
        result.inputs.append(inp)
        result.sources.append(RowSource(rs.name, row_no, plan, row_texts, i, rates_sources))


_FORMULA_REASON = "the cell holds a formula"


def _formula_problem(
    file: str, sheet: str | None, row: int, col: Column, formula: str
) -> RowProblem:
    return RowProblem(
        file,
        sheet,
        row,
        col.header,
        formula,
        _FORMULA_REASON + "; the registry stores values as reported — paste the value instead",
    )


def _example(name: str) -> str:
    return {
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
    }.get(name, "1.0")


def _read_rates(result: ReadResult, rs: RawSheet, plan: SheetPlan, head: int) -> None:
    values = plan.value_columns()
    errors = plan.error_columns()
    label_col, t_col, k_col = values["label"], values["t"], values["k"]
    rows = rs.frame.iloc[head + 1 :].to_numpy(dtype=object, na_value=None).tolist()
    for offset, cells in enumerate(rows):
        row0 = head + 1 + offset
        texts = [cell_text(v) for v in cells]
        if not any(texts):
            continue
        row_no = row0 + 1
        raw_cells = {c.header: texts[c.index] for c in plan.columns if c.index < len(texts)}
        bad = False
        for col in (label_col, t_col, k_col, *errors.values()):
            raw = cells[col.index] if col.index < len(cells) else None
            if (row0, col.index) in rs.formulas or (
                isinstance(raw, str) and is_formula_text(raw.strip())
            ):
                result.problems.append(
                    RowProblem(
                        result.file,
                        rs.name,
                        row_no,
                        col.header,
                        rs.formulas.get((row0, col.index)) or str(raw),
                        "the cell holds a formula; paste the value instead",
                    )
                )
                bad = True
        label = texts[label_col.index]
        t_raw, k_raw = texts[t_col.index], texts[k_col.index]
        if not label:
            result.problems.append(
                RowProblem(
                    result.file,
                    rs.name,
                    row_no,
                    label_col.header,
                    None,
                    "a rate point needs the label of its measurement",
                )
            )
            bad = True
        parsed: dict[str, Any] = {}
        for col, text, quantity, key in (
            (t_col, t_raw, "temperature", "t"),
            (k_col, k_raw, "rate", "k"),
        ):
            if not text:
                result.problems.append(
                    RowProblem(result.file, rs.name, row_no, col.header, None, "empty value")
                )
                bad = True
                continue
            err_col = errors.get(key)
            full = _with_unit(
                _combine_error(text, texts[err_col.index] if err_col else None), col.unit
            )
            try:
                pv = parse_value(full, quantity, field=col.header, default_unit=col.unit)
                if key == "k" and pv.value <= 0:
                    raise UnitError(col.header, text, "a rate constant must be positive")
            except UnitError as exc:
                result.problems.append(
                    RowProblem(result.file, rs.name, row_no, col.header, text, exc.reason)
                )
                bad = True
                continue
            parsed[key] = (full, pv)
        if bad:
            result.bad_rate_rows.add((rs.name, row_no))
            continue
        (t_full, t_pv), (k_full, k_pv) = parsed["t"], parsed["k"]
        result.rate_rows.append(
            RateRow(
                rs.name,
                row_no,
                label or "",
                t_full,
                k_full,
                {
                    "t_k": t_pv.value,
                    "t_err_k": t_pv.error,
                    "t_text": t_pv.text,
                    "k_per_s": k_pv.value,
                    "k_err_per_s": k_pv.error,
                    "k_text": k_pv.text,
                },
                raw_cells,
            )
        )


def _attach_rates(result: ReadResult) -> None:
    """Give rate-sheet rows to the entries of this file that carry their label."""
    by_label: dict[str, list[int]] = defaultdict(list)
    for i, inp in enumerate(result.inputs):
        if inp.label:
            by_label[str(inp.label)].append(i)
    remaining = []
    for rr in result.rate_rows:
        idx = by_label.get(rr.label, [])
        if len(idx) > 1:
            result.problems.append(
                RowProblem(
                    result.file,
                    rr.sheet,
                    rr.row,
                    "label",
                    rr.label,
                    f"{len(idx)} entries carry this label; rate points need a unique label",
                )
            )
            result.bad_rate_rows.add((rr.sheet, rr.row))
        elif idx:
            result.inputs[idx[0]].rates.append((rr.t_text, rr.k_text))
            result.sources[idx[0]].rates.append((rr.sheet, rr.row))
        else:
            remaining.append(rr)
    result.rate_rows = remaining  # rate points for measurements already in the registry


# --- checking ---------------------------------------------------------------------------


def _field_of(problem_field: str) -> str:
    name = problem_field.split(" ", 1)[0]
    return name


def _problem_to_row(file: str, src: RowSource, p: Problem) -> RowProblem:
    m = re.match(r"rate (\d+) ([Tk])", p.field)
    if m:
        i = int(m[1]) - 1
        sheet, row = src.rates[i] if i < len(src.rates) else (src.sheet, src.row)
        return RowProblem(file, sheet, row, f"rate point {m[2]}", p.text, p.reason)
    name = _field_of(p.field)
    col: Column | None = src.plan.value_columns().get(name)
    if col is None and name == "dg_t":
        col = src.plan.value_columns().get("t")
    column = col.header if col is not None else FIELD_TITLES.get(name, name)
    return RowProblem(file, src.sheet, src.row, column, p.text or None, p.reason)


def _identity(entry: NormalizedEntry, structure: Structure | None) -> str:
    if structure is not None and structure.inchikey:
        return structure.inchikey
    if entry.compound.get("label"):
        return f"label:{entry.compound['label']}"
    return f"name:{entry.compound.get('name')}"


def _match_key(
    entry: NormalizedEntry, structure: Structure | None, solvents: dict[str, int]
) -> tuple[Any, ...]:
    m = entry.measurement
    process = (
        (entry.process["kind"], entry.process["sites"], entry.process["nucleus"])
        if entry.process
        else None
    )
    sid = solvents.get(entry.solvent_key) if entry.solvent_key else None
    solvent = ("id", sid) if sid is not None else ("text", entry.solvent_key or "")
    return (
        _identity(entry, structure),
        process,
        m["method"],
        solvent,
        m["reference"] or "",
        m["label"] or "",
    )


def _compound_conflicts(
    conn: Connection, entries: Sequence[NormalizedEntry], structures: Sequence[Structure | None]
) -> dict[int, str]:
    """Entries whose compound label and structure disagree with each other or the registry."""
    out: dict[int, str] = {}
    keys = sorted({s.inchikey for s in structures if s is not None and s.inchikey})
    labels = sorted({e.compound["label"] for e in entries if e.compound.get("label")})
    db_key: dict[str, str | None] = {}
    db_label: dict[str, str | None] = {}
    columns = [Compound.inchikey, Compound.label]
    for key, label in rows_where_in(conn, columns, Compound.inchikey, keys):
        db_key[key] = label
    for key, label in rows_where_in(conn, columns, Compound.label, labels):
        db_label[label] = key
    file_key: dict[str, tuple[str, int]] = {}
    file_label: dict[str, tuple[str, int]] = {}
    for i, (e, s) in enumerate(zip(entries, structures, strict=True)):
        label = e.compound.get("label")
        key = s.inchikey if s is not None else None
        if key and key in db_key and label and db_key[key] and db_key[key] != label:
            out[i] = (
                f"this structure is already registered as compound {db_key[key]!r} "
                f"(InChIKey {key}); use that label"
            )
        elif label and label in db_label and key and db_label[label] and db_label[label] != key:
            out[i] = (
                f"compound {label!r} already names a different structure "
                f"(InChIKey {db_label[label]}); choose another label"
            )
        elif key and label and key in file_key and file_key[key][0] != label:
            out[i] = f"the same structure is labelled {file_key[key][0]!r} in an earlier row"
        elif key and label and label in file_label and file_label[label][0] != key:
            out[i] = f"compound {label!r} names a different structure in an earlier row"
        else:
            if key and label:
                file_key.setdefault(key, (label, i))
                file_label.setdefault(label, (key, i))
    return out


# --- the whole import -------------------------------------------------------------------


@dataclass
class Prepared:
    read: ReadResult
    entries: list[NormalizedEntry]
    structures: list[Structure | None]
    kept: list[int]  # index into read.inputs of each prepared entry
    rejected: dict[tuple[str | None, int], list[RowProblem]]


def prepare(
    database: Database,
    path: Path,
    *,
    sheet: str | None = None,
    mapping_path: str | Path | None = None,
    workers: int | None = None,
    progress: bool = False,
    stop_early: bool = False,
) -> Prepared:
    """Everything up to the write: read, normalize, parse structures, check; problems collected.

    ``stop_early``: when reading a big file already found problems (formulas, text in number
    columns, headers), report those without the costly unit and structure pass.
    """
    with parallel.Workers(workers) as pool:
        read = read_input(
            path,
            sheet=sheet,
            mapping_path=mapping_path,
            stop_early=stop_early,
            on_smiles=pool.submit_structures,
        )
        big = len(read.inputs) >= EARLY_STOP_MIN_ROWS  # small files: list every problem at once
        if read.problems and ((stop_early and big) or (not read.inputs and not read.rate_rows)):
            return Prepared(read, [], [], [], _by_row(read.problems))
        with database.read() as conn:
            kinds = known_process_kinds(conn)
            solvents = solvent_index(conn)
        n = len(read.inputs)
        smiles_texts = [text_of(inp.smiles) for inp in read.inputs]
        bar = _progress_bar(progress, n + len(set(filter(None, smiles_texts))), read.file)
        tick: Callable[[int], None] | None = bar.update if bar is not None else None
        try:
            # while the pool parses structures, this process normalizes; without structures
            # to parse, the pool normalizes
            normalized = parallel.normalize_all(
                read.inputs,
                kinds,
                None if pool.parsing else pool.pool(n, parallel.PARALLEL_MIN_ROWS),
                tick,
            )
            if bar is not None:
                bar.set_description("structures")
                bar.refresh()
            parsed = pool.structures(
                [
                    ne.compound["smiles_input"]
                    for ne, _ in normalized
                    if ne is not None and ne.compound.get("smiles_input")
                ],
                tick,
            )
        finally:
            if bar is not None:
                bar.close()
    problems = list(read.problems)
    entries: list[NormalizedEntry] = []
    structures: list[Structure | None] = []
    kept: list[int] = []
    bad_rows = {(p.sheet, p.row) for p in problems}
    for i, ((ne, probs), src) in enumerate(zip(normalized, read.sources, strict=True)):
        if (src.sheet, src.row) in bad_rows:
            # already rejected while reading (formula, merged or unreadable cell): what the
            # later checks say of it would only echo the blank left by that cell
            continue
        if probs:
            problems.extend(_without_echoes([_problem_to_row(read.file, src, p) for p in probs]))
            continue
        assert ne is not None
        structure = None
        smiles_text = ne.compound.get("smiles_input")
        if smiles_text:
            structure, why = parsed[smiles_text]
            if structure is None:
                col = src.plan.value_columns().get("smiles")
                problems.append(
                    RowProblem(
                        read.file,
                        src.sheet,
                        src.row,
                        col.header if col else "SMILES",
                        smiles_text,
                        f"unreadable SMILES: {why}",
                    )
                )
                continue
        entries.append(ne)
        structures.append(structure)
        kept.append(i)
    # duplicates and compound conflicts, judged on the rows that are otherwise fine
    seen: dict[tuple[Any, ...], int] = {}
    with database.read() as conn:
        conflicts = _compound_conflicts(conn, entries, structures)
    drop: set[int] = set()
    for j, (ne, st) in enumerate(zip(entries, structures, strict=True)):
        src = read.sources[kept[j]]
        if j in conflicts:
            col = src.plan.value_columns().get("compound") or src.plan.value_columns().get("smiles")
            problems.append(
                RowProblem(
                    read.file,
                    src.sheet,
                    src.row,
                    col.header if col else "compound",
                    ne.compound.get("label") or ne.compound.get("smiles_input"),
                    conflicts[j],
                )
            )
            drop.add(j)
            continue
        key = _match_key(ne, st, solvents)
        if key in seen:
            first = read.sources[kept[seen[key]]]
            problems.append(
                RowProblem(
                    read.file,
                    src.sheet,
                    src.row,
                    None,
                    None,
                    f"duplicate of row {first.row}: same compound, process, solvent, method, "
                    "reference and label; remove it or give each measurement its own label",
                )
            )
            drop.add(j)
            continue
        seen[key] = j
    if drop:
        keep = [j for j in range(len(entries)) if j not in drop]
        entries = [entries[j] for j in keep]
        structures = [structures[j] for j in keep]
        kept = [kept[j] for j in keep]
    # an entry whose rate row was bad is imported without that point only with --skip-bad
    return Prepared(read, entries, structures, kept, _by_row(problems))


def _without_echoes(problems: list[RowProblem]) -> list[RowProblem]:
    """Drop "coalescence data needs both Tc and Δν" when Tc or Δν itself was the problem."""
    flagged = {p.column for p in problems if p.text}
    pair = [p for p in problems if "needs both Tc and Δν" in p.reason]
    if pair and len(problems) > len(pair) and flagged:
        return [p for p in problems if p not in pair]
    return problems


def _by_row(problems: Sequence[RowProblem]) -> dict[tuple[str | None, int], list[RowProblem]]:
    out: dict[tuple[str | None, int], list[RowProblem]] = defaultdict(list)
    for p in problems:
        out[(p.sheet, p.row if p.row is not None else 0)].append(p)
    return out


def _progress_bar(enabled: bool, total: int, name: str) -> Any:
    if not enabled or total < PROGRESS_MIN_ROWS:
        return None
    import sys

    if not sys.stderr.isatty():
        return None
    from tqdm import tqdm

    return tqdm(total=total, desc="rows", unit="row", file=sys.stderr, leave=False)


def _all_problems(prep: Prepared) -> list[RowProblem]:
    out = [p for probs in prep.rejected.values() for p in probs]
    return sorted(out, key=lambda p: (p.sheet or "", p.row or 0, p.column or ""))


def import_table(
    database: Database,
    path: str | Path,
    *,
    sheet: str | None = None,
    mapping_path: str | Path | None = None,
    dry_run: bool = False,
    skip_bad: bool = False,
    rejects_path: str | Path | None = None,
    actor: str | None = None,
    progress: bool = False,
    workers: int | None = None,
) -> dict[str, Any]:
    """Import one file; returns a summary (counts, mapping, notes, findings, problems).

    Without ``skip_bad`` any problem raises :class:`ImportRowError` listing all of them and
    nothing is written. A dry run reads and checks everything, and writes nothing.
    """
    path = Path(path)
    who = actor or current_user()
    prep = prepare(
        database,
        path,
        sheet=sheet,
        mapping_path=mapping_path,
        workers=workers,
        progress=progress,
        stop_early=not skip_bad and not dry_run,
    )
    read = prep.read
    problems = _all_problems(prep)
    header_problem = any(p.row == plan.header_row for p in problems for plan in read.plans)
    compare_status = any("status" in plan.value_columns() for plan in read.plans)
    compare_extra = any(plan.extra_columns() for plan in read.plans)
    extras = [read.inputs[i].extra or None for i in prep.kept]
    source_rows = [read.sources[i].row for i in prep.kept]
    summary: dict[str, Any] = {
        "file": str(path),
        "sha256": read.sha256,
        "sheets": [p.sheet for p in read.plans],
        "mapping": {p.sheet or path.name: p.describe() for p in read.plans},
        "sheet_kinds": {p.sheet or path.name: p.kind for p in read.plans},
        "rows_read": len(read.inputs) + len(read.rate_rows) + len(read.bad_rate_rows),
        "notes": read.notes
        + (
            [f"{read.blank_markers} cell(s) such as 'n.d.' or '–' were read as empty"]
            if read.blank_markers
            else []
        ),
        "problems": [_problem_dict(p) for p in problems],
        "dry_run": dry_run,
    }
    if problems and (not skip_bad or header_problem) and not dry_run:
        raise ImportRowError(problems)
    if dry_run:
        with database.read() as conn:
            plan = upsert.plan_upsert(
                conn,
                prep.entries,
                prep.structures,
                extras,
                compare_status=compare_status,
                compare_extra=compare_extra,
            )
            rate_plan, rate_problems = _plan_rate_rows(conn, read, skip_bad=True)
        summary.update(
            would_add=len(plan.new),
            would_update=len(plan.changes),
            unchanged=len(plan.unchanged),
            would_reject=len({(p.sheet, p.row) for p in problems + rate_problems}),
            rate_points_for_existing=sum(len(v) for v in rate_plan.values()),
            preview=[_preview(e, s) for e, s in zip(prep.entries, prep.structures, strict=False)][
                :PREVIEW_ROWS
            ],
            changes=[
                {"measurement_id": c.measurement_id, "before": c.before, "after": c.after}
                for c in plan.changes[:PREVIEW_ROWS]
            ],
            problems=[_problem_dict(p) for p in problems + rate_problems],
        )
        return summary

    started = datetime.now(UTC)
    solvent_ids: dict[str, int] = {}

    def work(conn: Connection) -> dict[str, Any]:
        batch_id = conn.execute(
            insert(ImportBatch).returning(ImportBatch.id),
            [
                {
                    "file_name": path.name,
                    "sha256": read.sha256,
                    "sheet": ", ".join(p.sheet for p in read.plans if p.sheet) or None,
                    "actor": who,
                    "started_at": started,
                    "finished_at": None,
                    "status": "running",
                }
            ],
        ).scalar_one()
        plan = upsert.plan_upsert(
            conn,
            prep.entries,
            prep.structures,
            extras,
            compare_status=compare_status,
            compare_extra=compare_extra,
        )
        late: list[RowProblem] = []
        for i, ids in plan.ambiguous:
            src = read.sources[prep.kept[i]]
            late.append(
                RowProblem(
                    read.file,
                    src.sheet,
                    src.row,
                    None,
                    None,
                    f"matches {len(ids)} measurements already in the registry "
                    f"(ids {', '.join(map(str, ids))}); give it a label to tell them apart",
                )
            )
        rate_plan, rate_problems = _plan_rate_rows(conn, read, skip_bad=skip_bad)
        late.extend(rate_problems)
        if late and not skip_bad:
            raise ImportRowError(sorted(problems + late, key=lambda p: (p.sheet or "", p.row or 0)))
        new_idx = plan.new
        result = (
            write_entries(
                conn,
                [prep.entries[i] for i in new_idx],
                [prep.structures[i] for i in new_idx],
                actor=who,
                batch_id=batch_id,
                extras=[extras[i] for i in new_idx],
                source_rows=[source_rows[i] for i in new_idx],
            )
            if new_idx
            else None
        )
        solvent_ids.update(solvent_index(conn))
        upsert.apply_changes(
            conn,
            plan.changes,
            actor=who,
            batch_id=batch_id,
            solvent_ids=solvent_ids,
            entries=prep.entries,
        )
        rates_changed = _apply_rate_plan(conn, rate_plan, who, batch_id)
        rejected_rows = {(p.sheet, p.row) for p in problems + late}
        counts = {
            "rows_total": summary["rows_read"],
            "rows_added": len(new_idx),
            "rows_updated": len(plan.changes) + rates_changed,
            "rows_unchanged": len(plan.unchanged) + len(rate_plan) - rates_changed,
            "rows_rejected": len(rejected_rows),
        }
        conn.execute(
            update(ImportBatch)
            .where(ImportBatch.id == batch_id)
            .values(
                finished_at=datetime.now(UTC),
                status="partial" if rejected_rows else "done",
                **counts,
            )
        )
        return {
            "batch_id": batch_id,
            "added_ids": result.measurement_ids if result else [],
            "updated_ids": [c.measurement_id for c in plan.changes],
            "unchanged_ids": [mid for _, mid in plan.unchanged],
            "compounds_added": result.compounds_added if result else 0,
            "late_problems": late,
            "counts": counts,
            "rate_points_replaced_for": rates_changed,
        }

    outcome = database.write(work)
    all_problems = problems + outcome.pop("late_problems")
    summary["problems"] = [_problem_dict(p) for p in all_problems]
    counts = outcome.pop("counts")
    summary.update(
        batch_id=outcome["batch_id"],
        added=counts["rows_added"],
        updated=counts["rows_updated"],
        unchanged=counts["rows_unchanged"],
        rejected=counts["rows_rejected"],
        compounds_added=outcome["compounds_added"],
        measurement_ids={
            "added": outcome["added_ids"],
            "updated": outcome["updated_ids"],
            "unchanged": outcome["unchanged_ids"],
        },
    )
    if all_problems:
        target = Path(rejects_path) if rejects_path else default_rejects_path(path)
        write_rejects(target, read, all_problems)
        summary["rejects_file"] = str(target)
    touched = outcome["added_ids"] + outcome["updated_ids"]
    summary["validation"] = run_validation_hook(database, touched, who)
    return summary


def default_rejects_path(path: Path) -> Path:
    """``data.xlsx`` → ``data.rejected.csv`` beside it."""
    return path.with_name(f"{path.stem}.rejected.csv")


def _problem_dict(p: RowProblem) -> dict[str, Any]:
    return {
        "file": p.file,
        "sheet": p.sheet,
        "row": p.row,
        "column": p.column,
        "text": p.text,
        "reason": p.reason,
    }


def _preview(entry: NormalizedEntry, structure: Structure | None) -> dict[str, Any]:
    m = entry.measurement
    co = entry.coalescence or {}
    return {
        "compound": entry.compound.get("label") or entry.compound.get("name"),
        "smiles": structure.smiles_canonical if structure else None,
        "inchikey": structure.inchikey if structure else None,
        "process": entry.process["kind"] if entry.process else None,
        "method": m["method"],
        "solvent": m["solvent_text"],
        "dg_kj_mol": m["dg_kj_mol"],
        "dg_text": m["dg_text"],
        "tc_k": co.get("tc_k"),
        "dnu_hz": co.get("dnu_hz"),
        "field_mhz": m["field_mhz"],
        "rate_points": len(entry.rates),
        "label": m["label"],
    }


def _plan_rate_rows(
    conn: Connection, read: ReadResult, *, skip_bad: bool
) -> tuple[dict[int, list[dict[str, Any]]], list[RowProblem]]:
    """Rate rows whose label names a measurement already in the registry → {id: points}."""
    problems: list[RowProblem] = []
    labels = sorted({rr.label for rr in read.rate_rows})
    ids: dict[str, list[int]] = defaultdict(list)
    for i in range(0, len(labels), 500):
        for mid, label in conn.execute(
            select(Measurement.id, Measurement.label).where(
                Measurement.label.in_(labels[i : i + 500])
            )
        ):
            ids[label].append(mid)
    plan: dict[int, list[dict[str, Any]]] = defaultdict(list)
    for rr in read.rate_rows:
        found = ids.get(rr.label, [])
        if len(found) != 1:
            reason = (
                f"no measurement labelled {rr.label!r} in this file or the registry"
                if not found
                else f"{len(found)} measurements in the registry carry this label"
            )
            problems.append(RowProblem(read.file, rr.sheet, rr.row, "label", rr.label, reason))
            continue
        plan[found[0]].append(rr.parsed)
    return dict(plan), problems


def _apply_rate_plan(
    conn: Connection, plan: dict[int, list[dict[str, Any]]], actor: str, batch_id: int
) -> int:
    """Replace rate points of existing measurements where the file's set differs; count them."""
    from registry.storage import audit

    if not plan:
        return 0
    stored = upsert.stored_rates(conn, list(plan))
    changed = []
    for mid, points in plan.items():
        if upsert.same_rates(stored.get(mid, []), points):
            continue
        upsert.replace_rate_points(conn, mid, points)
        changed.append(
            {
                "entity": "measurement",
                "entity_id": mid,
                "action": "import-rates",
                "before": {"rates": [[r["t_text"], r["k_text"]] for r in stored.get(mid, [])]},
                "after": {"rates": [[r["t_text"], r["k_text"]] for r in points]},
                "batch_id": batch_id,
            }
        )
    audit.record_many(conn, changed, actor)
    return len(changed)


def write_rejects(target: Path, read: ReadResult, problems: Sequence[RowProblem]) -> None:
    """The rejected rows with sheet, row, column and reason, plus their original cells."""
    by_row: dict[tuple[str | None, int], list[RowProblem]] = defaultdict(list)
    for p in problems:
        by_row[(p.sheet, p.row or 0)].append(p)
    sources = {(src.sheet, src.row): src for src in read.sources}
    cells = {key: sources[key].cells for key in by_row if key in sources}
    headers: list[str] = []
    for plan in read.plans:
        for c in plan.columns:
            if c.header not in headers:
                headers.append(c.header)
    with target.open("w", newline="", encoding="utf-8") as fh:
        writer = csv.writer(fh)
        writer.writerow(["sheet", "row", "column", "text", "reason", *headers])
        for (sheet, row), probs in sorted(
            by_row.items(), key=lambda kv: (kv[0][0] or "", kv[0][1])
        ):
            original = cells.get((sheet, row), {})
            writer.writerow(
                [
                    sheet or "",
                    row,
                    " | ".join(p.column or "" for p in probs),
                    " | ".join(p.text or "" for p in probs),
                    " | ".join(p.reason for p in probs),
                    *[_neutral(original.get(h)) for h in headers],
                ]
            )


def _neutral(value: Any) -> str:
    from registry.io.cells import neutralise

    return neutralise("" if value is None else str(value))


def run_validation_hook(
    database: Database, measurement_ids: Sequence[int], actor: str | None = None
) -> dict[str, Any]:
    """Run the validation rules (:func:`registry.validation.check_measurements`) on the new and
    changed measurements; their findings are stored and counted in the import summary."""
    if not measurement_ids:
        return {"available": True, "checked": 0, "findings": {}, "list": []}
    try:
        from registry.validation import check_measurements
    except ImportError:  # an installation without the rules: the import still stands
        return {"available": False, "checked": 0, "findings": {}, "list": []}
    report = check_measurements(database, list(measurement_ids), actor=actor)
    counts = {k: v for k, v in report.counts.items() if k in ("error", "warning", "note")}
    return {
        "available": True,
        "checked": report.checked,
        "findings": counts,
        "accepted": report.counts.get("accepted", 0),
        "list": [
            {
                "measurement_id": f.measurement_id,
                "severity": f.severity,
                "rule_id": f.rule_id,
                "message": f.message,
                "likely_cause": f.likely_cause,
            }
            for f in report.findings
            if not f.accepted
        ],
    }
