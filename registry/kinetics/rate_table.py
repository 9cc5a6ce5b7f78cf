"""Reading rate points (T, k and optionally σ_k) as a chemist types them, for the fits.

A table (CSV, TSV or spreadsheet) has a temperature column and a rate-constant column and
may have an uncertainty column; units go in the header ("T (°C)", "k / s-1", "T [K]") or in
each cell ("25 °C"). A cell's own unit wins. All bad cells are reported at once, with their
spreadsheet row number, before anything is fitted. A point on the command line is
``"T, k"`` or ``"T; k; σk"`` with units in each part or K and s⁻¹ by default.
pandas is imported inside the functions so importing this module stays cheap.
"""

from __future__ import annotations

import io
import re
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import numpy as np
from numpy.typing import NDArray

from registry.errors import (
    FileFormatError,
    FluxledgerError,
    ImportRowError,
    NotFoundError,
    RowProblem,
    UnitError,
    UsageError,
)
from registry.record.units import parse_value


@dataclass(frozen=True)
class RatePoints:
    """Rate points in canonical units; ``k_err_per_s`` is None when no σ_k was given."""

    t_k: NDArray[np.float64]
    k_per_s: NDArray[np.float64]
    k_err_per_s: NDArray[np.float64] | None
    source: str


_HEADER_RE = re.compile(
    r"^\s*(?P<name>[^(\[/]+?)\s*(?:[(\[]\s*(?P<u1>[^)\]]*)\s*[)\]]|/\s*(?P<u2>.+?))?\s*$"
)
_TEMPERATURE_NAMES = {"t", "temp", "temperature"}
_RATE_NAMES = {"k", "kex", "rate", "rateconstant", "kobs"}
_ERROR_NAMES = {
    "σk", "sigmak", "sigma", "σ", "sk", "dk", "δk", "kerr", "errk", "kerror", "errork",
    "uk", "sdk", "ksd", "stdk", "kstd", "uncertainty", "err", "error", "±",
}  # fmt: skip
_SUFFIX_UNITS = {"k": "K", "c": "°C", "degc": "°C", "pers": "s-1", "s": "s-1", "s1": "s-1"}


def _classify(header: str) -> tuple[str | None, str | None]:
    """(role, unit from the header) for one column header; role None for other columns."""
    match = _HEADER_RE.match(str(header))
    if not match:
        return None, None
    unit = match["u1"] or match["u2"]
    key = re.sub(r"[\s_\-.,:]+", "", match["name"].lower())
    if key in _ERROR_NAMES:
        return "err", unit
    for names, role in ((_TEMPERATURE_NAMES, "t"), (_RATE_NAMES, "k")):
        if key in names:
            return role, unit
        for name in names:  # "T_K", "t_c", "k_per_s", "kex_s-1"
            parts = re.split(r"[_\s]+", str(match["name"]).strip().lower(), maxsplit=1)
            if parts[0] == name and len(parts) == 2:
                suffix = re.sub(r"[\s_\-^]+", "", parts[1])
                if suffix in _SUFFIX_UNITS:
                    return role, unit or _SUFFIX_UNITS[suffix]
    return None, None


def points_from_frame(
    frame: Any, source: str, *, first_row: int = 2, decimal_comma: bool = False
) -> RatePoints:
    """Map the headers of a DataFrame of text cells and read every row; all problems at once.

    ``decimal_comma``: the file separates fields with ';', so a ',' in a cell is a decimal mark.
    """
    roles: dict[str, tuple[str, str | None]] = {}
    for column in frame.columns:
        role, unit = _classify(column)
        if role is None:
            continue
        if role in (r for r, _ in roles.values()):
            raise FileFormatError(source, f"two columns look like {_ROLE_TEXT[role]}: {column!r}")
        roles[column] = (role, unit)
    found = {r for r, _ in roles.values()}
    if not {"t", "k"} <= found:
        missing = " and ".join(_ROLE_TEXT[r] for r in ("t", "k") if r not in found)
        headers = ", ".join(repr(str(c)) for c in frame.columns) or "none"
        raise FileFormatError(
            source,
            f"no column for {missing} (headers: {headers}); name them e.g. 'T (°C)' and 'k (s-1)'",
        )
    rate_unit = next(u for r, u in roles.values() if r == "k")
    for col, (role, unit) in list(roles.items()):
        if role == "err" and unit is None:
            roles[col] = (role, rate_unit)  # σk in the unit of k unless its header says
        elif unit is None and _all_bare_numbers(frame[col]):
            example = "T (K)' or 'T (°C)" if role == "t" else "k (s-1)"
            raise FileFormatError(
                source, f"column {str(col)!r} has no unit: write it in the header, e.g. '{example}'"
            )
    values: dict[str, list[float]] = {"t": [], "k": [], "err": []}
    problems: list[RowProblem] = []
    rows = 0
    for offset, (_, row) in enumerate(frame.iterrows()):
        cells = {col: _text(row[col], decimal_comma) for col in roles}
        if not any(cells.values()):
            continue
        rows += 1
        for col, (role, unit) in roles.items():
            quantity = {"t": "temperature", "k": "rate", "err": "rate"}[role]
            text = cells[col]
            if role == "err" and not text:
                values[role].append(np.nan)
                continue
            try:
                parsed = parse_value(text, quantity, field=str(col), default_unit=unit)
                if role != "t" and parsed.value <= 0:
                    raise UnitError(str(col), text, "must be > 0")
                values[role].append(parsed.value)
                if role == "k" and parsed.error is not None and "err" not in found:
                    values.setdefault("inline_err", []).append(parsed.error)
            except UnitError as exc:
                problems.append(
                    RowProblem(source, None, first_row + offset, str(col), text, exc.reason)
                )
    if problems:
        raise ImportRowError(problems)
    if rows == 0:
        raise FileFormatError(source, "no data rows")
    err = _errors(values, source)
    return RatePoints(np.array(values["t"]), np.array(values["k"]), err, source)


_ROLE_TEXT = {"t": "the temperature", "k": "the rate constant", "err": "the uncertainty of k"}


def _errors(values: dict[str, list[float]], source: str) -> NDArray[np.float64] | None:
    """σ_k from its own column or from "k ± σ" cells; all points or none."""
    err = values["err"] or values.get("inline_err", [])
    if not err:
        return None
    arr = np.array(err, dtype=float)
    if len(arr) != len(values["k"]) or np.isnan(arr).any():
        raise FileFormatError(source, "σ_k is given for some points but not all; give all or none")
    return arr


def _text(value: Any, decimal_comma: bool = False) -> str:
    if value is None or (isinstance(value, float) and np.isnan(value)):
        return ""
    text = str(value).strip()
    return text.replace(",", ".") if decimal_comma else text


_BARE_NUMBER = re.compile(r"^\s*[-+−]?[\d.,]+(?:[eE][-+]?\d+)?\s*(?:(?:±|\+/-)\s*[\d.,]+)?\s*$")


def _all_bare_numbers(column: Any) -> bool:
    """True when every non-empty cell of a column is a number with no unit written."""
    cells = [_text(v) for v in column]
    cells = [c for c in cells if c]
    return bool(cells) and all(_BARE_NUMBER.match(c) for c in cells)


def read_rate_table(path: str | Path, *, sheet: str | None = None) -> RatePoints:
    """Read rate points from a CSV/TSV/text file or a spreadsheet (.xlsx, .xls, .ods)."""
    import pandas as pd

    file = Path(path)
    name = str(path)
    if not file.exists():
        raise NotFoundError(f"{name}: no such file")
    if file.is_dir():
        raise FileFormatError(name, "is a directory, not a table")
    suffix = file.suffix.lower()
    try:
        if suffix in (".xlsx", ".xlsm", ".xls", ".ods"):
            frame = pd.read_excel(
                file, sheet_name=sheet or 0, dtype=str, engine="calamine", header=0
            )
        else:
            if sheet:
                raise UsageError(
                    f"sheet {sheet!r}: only spreadsheets have sheets; {name} is a text table"
                )
            text = _decode(file, name)
            sep = _separator(text)
            frame = pd.read_csv(io.StringIO(text), sep=sep, dtype=str, keep_default_na=False)
            return points_from_frame(frame, name, decimal_comma=sep == ";")
    except (pd.errors.EmptyDataError, pd.errors.ParserError) as exc:
        raise FileFormatError(name, f"cannot read as a table: {_first_line(exc)}") from exc
    except ValueError as exc:  # e.g. a missing sheet
        raise FileFormatError(name, _first_line(exc), sheet=sheet) from exc
    except FluxledgerError:
        raise
    except Exception as exc:  # calamine raises its own errors on damaged files
        raise FileFormatError(name, f"cannot read as a spreadsheet: {_first_line(exc)}") from exc
    return points_from_frame(frame, name)


def _separator(text: str) -> str:
    """';' (with decimal commas), tab or ',' — whichever the header line uses."""
    header = text.lstrip().splitlines()[0]
    if ";" in header:
        return ";"
    return "\t" if "\t" in header else ","


def _decode(file: Path, name: str) -> str:
    """The file's text: UTF-8 with or without BOM, else Windows-1252."""
    raw = file.read_bytes()
    if not raw.strip():
        raise FileFormatError(name, "the file is empty")
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError:
        text = raw.decode("cp1252", errors="replace")
    return text


def _first_line(exc: Exception) -> str:
    return (str(exc).strip().splitlines() or [type(exc).__name__])[0]


def parse_point(text: str, *, field: str = "point") -> tuple[float, float, float | None]:
    """One rate point from the command line: ``"T, k"`` or ``"T; k; σk"`` (K and s⁻¹ by default).

    Parts are split at ';' when there is one (so decimal commas stay usable), else at ','.
    """
    parts = [p.strip() for p in (text.split(";") if ";" in text else text.split(","))]
    if len(parts) not in (2, 3) or not all(parts):
        raise UsageError(
            f"{field}: cannot read {text!r}: write 'T, k' or 'T; k; σk', e.g. '25 °C; 0.012 s-1'"
        )
    t_parsed = parse_value(parts[0], "temperature", field=field, default_unit="K")
    if t_parsed.unit == "K" and not _has_unit(parts[0]) and t_parsed.value < 100.0:
        raise UnitError(field, text, f"{parts[0]} K? write the unit, e.g. '{parts[0]} °C'")
    t = t_parsed.value
    k_parsed = parse_value(parts[1], "rate", field=field, default_unit="1/s")
    err = (
        parse_value(parts[2], "rate", field=field, default_unit="1/s").value
        if len(parts) == 3
        else k_parsed.error
    )
    if k_parsed.value <= 0:
        raise UnitError(field, text, "a rate constant must be > 0")
    if err is not None and err <= 0:
        raise UnitError(field, text, "σk must be > 0")
    return t, k_parsed.value, err


def _has_unit(text: str) -> bool:
    return bool(re.search(r"[A-Za-z°º˚]", text.replace("e-", "").replace("E-", "")))
