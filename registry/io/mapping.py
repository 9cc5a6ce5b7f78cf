"""From a sheet's header row to a column plan: which column feeds which field, in which unit.

The guess (:mod:`registry.io.headers`) is overridden by a mapping file (TOML)::

    [sheets]                 # which sheet holds what (default: recognised from the headers)
    entries = "Barriers"
    rates = "Kinetics"

    [columns]                # header → field, "extra" (keep as attribute) or "ignore"
    "Temp." = "tc"
    "Barrier" = { field = "dg", unit = "kcal/mol" }
    "Notes" = "extra"

    [units]                  # field → unit for cells that carry none
    tc = "°C"

    [defaults]               # field → text used for every row where the cell is empty,
    method = "coalescence"   # in the entries sheets only (never in a rates sheet)
    solvent = "CDCl3"

    [defaults."Lit data"]    # defaults of one sheet (over those above)
    method = "lineshape"

    [spellings.method]       # cell texts this file uses → what they mean (method, process,
    "VT-NMR (Tc)" = "coalescence"          # solvent, nucleus); compared folded (case,
    [spellings.solvent]                    # spaces and punctuation do not matter)
    "CDCl3/CS2" = "chloroform-d"

Header units are checked once here (a temperature unit over an energy column is an error in the
header, not a hundred errors in the rows). A sheet with Tc and Δν columns but no method column
and no method default is read as coalescence data (:attr:`SheetPlan.implied_method`); a header
that looks like a quantity but is not recognised gets a note naming the field it probably is.
"""

from __future__ import annotations

import tomllib
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from registry.errors import FileFormatError, RowProblem, UnitError, UsageError
from registry.io.headers import (
    EXTRA_PREFIX,
    FIELDS,
    VALUE_QUANTITY,
    HeaderGuess,
    guess_header,
    quantity_hint,
)
from registry.io.readers import column_letter
from registry.record import fields as field_table
from registry.record import vocab
from registry.record.populations import population_unit
from registry.record.spelling import fold
from registry.record.units import unit_of

ROLES = ("extra", "ignore")

#: fields whose cell texts a mapping file may translate (``[spellings.<field>]``)
SPELLING_FIELDS = ("method", "process", "solvent", "nucleus")
#: what a sheet with Tc and Δν but no method is read as
IMPLIED_METHOD = "coalescence"

#: fields that make a sheet an entries sheet
_ENTRY_FIELDS = {
    "method",
    "dg",
    "tc",
    "dnu",
    "smiles",
    "compound",
    "name",
    "dh",
    "ea",
    "rates",
    "process",
}


#: the columns every rates sheet needs (field, as messages name it)
_RATE_COLUMNS = (("label", "label"), ("t", "T"), ("k", "k"))


@dataclass
class MappingFile:
    """A parsed mapping file; every part optional."""

    columns: dict[str, tuple[str, str | None]] = field(default_factory=dict)
    units: dict[str, str] = field(default_factory=dict)
    defaults: dict[str, str] = field(default_factory=dict)
    sheets: dict[str, str] = field(default_factory=dict)
    #: defaults of one sheet (sheet name → field → text), over ``defaults``
    sheet_defaults: dict[str, dict[str, str]] = field(default_factory=dict)
    #: field → folded cell text → the text it means
    spellings: dict[str, dict[str, str]] = field(default_factory=dict)


@dataclass
class Column:
    """One column of a sheet and what the importer does with it."""

    index: int
    header: str
    field: str | None  # entry field, or None for extra/ignore/derived
    unit: str | None
    role: str  # value | error | extra | ignore | derived
    source: str  # guess | mapping file
    #: for a rate column: the rate constant its header names (``kex`` → exchange), else None
    convention: str | None = None

    @property
    def letter(self) -> str:
        return column_letter(self.index)


@dataclass
class SheetPlan:
    """The plan for one sheet: its kind and columns, header row, problems and notes."""

    sheet: str | None
    kind: str  # entries | rates | skip
    header_row: int  # 1-based spreadsheet row of the header
    columns: list[Column]
    defaults: dict[str, str] = field(default_factory=dict)
    notes: list[str] = field(default_factory=list)
    #: field → folded cell text → the text it means (the mapping file's ``[spellings]``)
    spellings: dict[str, dict[str, str]] = field(default_factory=dict)
    #: the method of rows that give Tc and Δν, when the sheet names none
    implied_method: str | None = None

    def value_columns(self) -> dict[str, Column]:
        return {c.field: c for c in self.columns if c.role == "value" and c.field}

    def error_columns(self) -> dict[str, Column]:
        return {c.field: c for c in self.columns if c.role == "error" and c.field}

    def extra_columns(self) -> list[Column]:
        return [c for c in self.columns if c.role == "extra"]

    def describe(self) -> list[dict[str, Any]]:
        """The mapping as rows for the dry-run table and --json."""
        return [
            {
                "column": c.letter,
                "header": c.header,
                "field": c.field
                if c.role == "value"
                else (f"{c.field} (uncertainty)" if c.role == "error" else None),
                "unit": c.unit,
                "role": c.role,
                "from": c.source,
            }
            for c in self.columns
        ]


def load_mapping(path: str | Path | None) -> MappingFile:
    """Read a mapping file; unknown fields are a usage error naming the key."""
    if path is None:
        return MappingFile()
    p = Path(path)
    try:
        data = tomllib.loads(p.read_text(encoding="utf-8"))
    except FileNotFoundError as exc:
        raise UsageError(f"mapping file {p}: no such file") from exc
    except (tomllib.TOMLDecodeError, UnicodeDecodeError) as exc:
        raise UsageError(f"mapping file {p}: not valid TOML: {exc}") from exc
    out = MappingFile()
    allowed = set(FIELDS) | {f"{f}_err" for f in VALUE_QUANTITY} | set(ROLES)
    for header, target in (data.get("columns") or {}).items():
        unit = None
        if isinstance(target, dict):
            unit = target.get("unit")
            target = target.get("field", "extra")
        if not isinstance(target, str) or target not in allowed:
            raise UsageError(
                f"mapping file {p}: column {header!r} → {target!r} is not a field; "
                f"use one of {', '.join(sorted(allowed))}"
            )
        out.columns[str(header).strip()] = (target, unit)
    for name, value in (data.get("units") or {}).items():
        if name not in FIELDS:
            raise UsageError(f"mapping file {p}: [units] {name!r} is not a field")
        out.units[name] = str(value)
    _load_defaults(p, data.get("defaults") or {}, out)
    _load_spellings(p, data.get("spellings") or {}, out)
    for kind, name in (data.get("sheets") or {}).items():
        if kind not in ("entries", "rates"):
            raise UsageError(f"mapping file {p}: [sheets] keys are 'entries' and 'rates'")
        out.sheets[kind] = str(name)
    unknown = set(data) - {"columns", "units", "defaults", "sheets", "spellings"}
    if unknown:
        raise UsageError(f"mapping file {p}: unknown section(s) {', '.join(sorted(unknown))}")
    return out


def _load_defaults(p: Path, section: dict[str, Any], out: MappingFile) -> None:
    """``[defaults]``: field = text, or a table of one sheet's defaults."""
    for name, value in section.items():
        table = value if isinstance(value, dict) else {name: value}
        for field_name, text in table.items():
            if field_name not in FIELDS:
                where = f"[defaults.{name!r}]" if isinstance(value, dict) else "[defaults]"
                raise UsageError(f"mapping file {p}: {where} {field_name!r} is not a field")
            if isinstance(value, dict):
                out.sheet_defaults.setdefault(str(name), {})[field_name] = str(text)
            else:
                out.defaults[field_name] = str(text)


def _load_spellings(p: Path, section: dict[str, Any], out: MappingFile) -> None:
    """``[spellings.<field>]``: cell text = what it means; methods and nuclei checked here."""
    for name, table in section.items():
        if name not in SPELLING_FIELDS:
            raise UsageError(
                f"mapping file {p}: [spellings.{name}]: spellings are for "
                f"{', '.join(SPELLING_FIELDS)}"
            )
        if not isinstance(table, dict):
            raise UsageError(
                f"mapping file {p}: [spellings.{name}] is a table of cell text = meaning, "
                f'e.g. "VT-NMR (Tc)" = "coalescence"'
            )
        for spelled, target in table.items():
            key = fold(str(spelled))
            where = f"mapping file {p}: [spellings.{name}] {spelled!r} → {target!r}"
            if not key or not isinstance(target, str) or not target.strip():
                raise UsageError(f"{where}: give a cell text and a non-empty meaning")
            try:
                if name == "method":
                    target = vocab.method_name(target)
                elif name == "nucleus":
                    target = vocab.nucleus_name(target)
            except UnitError as exc:
                raise UsageError(f"{where}: {exc.reason}") from exc
            out.spellings.setdefault(name, {})[key] = target.strip()


def plan_sheet(
    file: str,
    sheet: str | None,
    headers: list[Any],
    header_row: int,
    mapping: MappingFile,
    problems: list[RowProblem],
    data_columns: set[int] | None = None,
) -> SheetPlan:
    """Decide what each column means; header problems go to ``problems``."""
    columns: list[Column] = []
    notes: list[str] = []
    for index, raw in enumerate(headers):
        header = "" if raw is None else str(raw).strip()
        if header.lower() in ("nan", "none"):
            header = ""
        if header:
            columns.append(_column(index, header, mapping, columns[-1] if columns else None))
        elif data_columns is not None and index in data_columns:
            reason = "this column has values but no header; name it (or map it in a mapping file)"
            problems.append(RowProblem(file, sheet, header_row, column_letter(index), None, reason))
    _demote_repeats(columns, notes)
    kind = _sheet_kind(sheet, columns, mapping)
    if kind == "rates":  # chosen by the mapping file: the columns may still be missing
        have = {c.field for c in columns if c.role == "value"}
        missing = [title for name, title in _RATE_COLUMNS if name not in have]
        if missing:
            reason = (
                f"a rates sheet needs label, T and k columns; this one has no {', '.join(missing)}"
            )
            problems.append(RowProblem(file, sheet, header_row, None, None, reason))
    _rates_without_label(file, sheet, header_row, columns, kind, problems)
    for field_name, unit in mapping.units.items():
        for col in columns:
            if col.field == field_name and col.role in ("value", "error") and not col.unit:
                col.unit = unit
    for col in columns:
        if col.role in ("value", "error") and col.field in VALUE_QUANTITY and col.unit:
            _check_header_unit(file, sheet, header_row, col, problems, notes)
        elif col.role == "value" and col.field == "population" and population_unit(col.unit):
            pass  # "population (%)", "p_A (fraction)": how the column's bare numbers read
        elif col.role == "value" and col.field == "mixing" and col.unit:
            _check_time_unit(col, notes)  # "mixing time (ms)": the unit of bare mixing times
        elif col.role == "value" and col.field not in VALUE_QUANTITY and col.unit:
            col.unit = None  # "Solvent (deuterated)": a remark, not a unit
    notes.extend(_hints(columns))
    plan = SheetPlan(sheet, kind, header_row, columns, notes=notes, spellings=mapping.spellings)
    if kind == "entries":  # defaults belong to entry rows: a rates sheet never gets them
        plan.defaults = {**mapping.defaults, **mapping.sheet_defaults.get(sheet or "", {})}
        have = {c.field for c in columns if c.role == "value"}
        if "method" not in have and "method" not in plan.defaults and {"tc", "dnu"} <= have:
            plan.implied_method = IMPLIED_METHOD
    return plan


def _rates_without_label(
    file: str,
    sheet: str | None,
    header_row: int,
    columns: list[Column],
    kind: str,
    problems: list[RowProblem],
) -> None:
    """A sheet of rate constants that names compounds instead of labels reads as entries and
    would fail every row for want of a method: say once what a rates sheet needs instead."""
    have = {c.field for c in columns if c.role == "value"}
    if kind != "entries" or "label" in have or "k" not in have or not have & {"t", "dg_t"}:
        return
    if have & (_ENTRY_FIELDS - {"compound", "name"}):
        return
    reason = (
        "this sheet has T and k columns but no label column: a rates sheet gives each rate "
        "constant the label of its measurement (the entries sheet's label column); name that "
        "column 'label' (or map it in a mapping file)"
    )
    problems.append(RowProblem(file, sheet, header_row, None, None, reason))


def _titled(name: str) -> str:
    """``ΔG‡ (dg)``; ``Tc``, ``k (rate point)`` where the title already says the name."""
    title = field_table.BY_NAME[name].title
    return title if fold(title).startswith(fold(name)) else f"{title} ({name})"


def _hints(columns: list[Column]) -> list[str]:
    """Notes on unrecognised headers that look like a quantity: the field each probably is."""
    out = []
    for col in columns:
        if col.role != "extra" or col.source != "guess":
            continue
        if col.header.lower().startswith(EXTRA_PREFIX):
            continue
        likely = quantity_hint(col.header)
        if not likely:
            continue
        named = [_titled(f) for f in likely]
        which = named[0] if len(named) == 1 else "one of " + ", ".join(named)
        out.append(
            f"column {col.letter} {col.header!r} looks like a quantity but was not recognised: "
            f"probably {which}; kept as an extra attribute — rename the header or map it in a "
            f'mapping file ([columns] "{col.header}" = "{likely[0]}")'
        )
    return out


def _column(index: int, header: str, mapping: MappingFile, previous: Column | None) -> Column:
    """What one named column is: from the mapping file when it names it, else guessed."""
    if header in mapping.columns:
        target, unit = mapping.columns[header]
        if target in ROLES:
            return Column(index, header, None, None, target, "mapping file")
        if target.endswith("_err") and target[:-4] in VALUE_QUANTITY:
            return Column(index, header, target[:-4], unit, "error", "mapping file")
        guessed = guess_header(header)
        return Column(
            index, header, target, unit or guessed.unit, "value", "mapping file",
            guessed.convention if target == "k" else None,
        )  # fmt: skip
    guess: HeaderGuess = guess_header(header)
    if guess.role == "error" and guess.field is None:
        # a bare "±" column: the uncertainty of the value column just before it
        if previous is not None and previous.role == "value" and previous.field:
            return Column(index, header, previous.field, guess.unit, "error", "guess")
        return Column(index, header, None, None, "extra", "guess")
    return Column(index, header, guess.field, guess.unit, guess.role, "guess", guess.convention)


def _demote_repeats(columns: list[Column], notes: list[str]) -> None:
    """A second column for the same field is kept as an extra attribute (with a note)."""
    seen: dict[tuple[str, str], Column] = {}
    for col in columns:
        if col.role not in ("value", "error") or not col.field:
            continue
        key = (col.role, col.field)
        if key in seen and not (col.field == "reference" and col.role == "value"):
            first = seen[key]
            notes.append(
                f"column {col.letter} {col.header!r} also looks like {col.field} (as does "
                f"{first.letter} {first.header!r}); kept as an extra attribute — "
                "use a mapping file to choose"
            )
            col.role, col.field = "extra", None
            continue
        seen.setdefault(key, col)


def _sheet_kind(sheet: str | None, columns: list[Column], mapping: MappingFile) -> str:
    """entries, rates or skip; a bare T is ΔG‡'s temperature in entries, the rate's in rates."""
    value_fields = {c.field for c in columns if c.role == "value"}
    kind = "skip"
    if value_fields & _ENTRY_FIELDS:
        kind = "entries"
    elif "k" in value_fields and ({"t", "dg_t"} & value_fields) and "label" in value_fields:
        kind = "rates"
    if sheet is not None and mapping.sheets.get("entries") == sheet:
        kind = "entries"
    if sheet is not None and mapping.sheets.get("rates") == sheet:
        kind = "rates"
    if kind == "entries":
        for col in columns:  # in an entries sheet a bare "T" is the temperature of ΔG‡
            if col.field == "t" and "dg_t" not in value_fields:
                col.field = "dg_t"
    elif kind == "rates":
        for col in columns:
            if col.field == "dg_t":
                col.field = "t"
    return kind


def _check_time_unit(col: Column, notes: list[str]) -> None:
    """A time unit over the (text) column of mixing times is kept for its bare numbers."""
    try:
        unit_of(col.unit or "", "time", field=col.header)
    except Exception:  # not a time unit (pint raises assorted errors): a remark
        notes.append(f"column {col.letter} {col.header!r}: {col.unit!r} is not a time unit")
        col.unit = None


def _check_header_unit(
    file: str,
    sheet: str | None,
    header_row: int,
    col: Column,
    problems: list[RowProblem],
    notes: list[str],
) -> None:
    quantity = VALUE_QUANTITY[col.field or ""]
    try:
        unit_of(col.unit or "", quantity, field=col.header)
    except UnitError as exc:
        if exc.reason.startswith("unknown unit"):
            notes.append(
                f"column {col.letter} {col.header!r}: {col.unit!r} is not a unit; read as a "
                "remark (cells must then carry their own unit)"
            )
            col.unit = None
            return
        problems.append(
            RowProblem(
                file,
                sheet,
                header_row,
                col.header,
                col.unit,
                f"the header's unit does not fit {col.field}: {exc.reason}",
            )
        )
    except Exception as exc:  # pint's parser raises assorted errors on odd text
        raise FileFormatError(
            file, f"column {col.header!r}: unreadable unit: {exc}", sheet
        ) from exc
