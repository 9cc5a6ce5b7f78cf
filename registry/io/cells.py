"""Spreadsheet cells as text: reading them, and guarding them against formula injection.

A spreadsheet program evaluates a text cell that begins with ``=``, ``+``, ``-`` or ``@`` (and,
in some programs, a tab or carriage return) as a formula; a file exported from a shared
registry must never carry one. The usual defence (OWASP, "CSV injection") is a leading
apostrophe, which spreadsheet programs show as text. The importer strips exactly that
apostrophe again, so "-20 °C" survives an export → edit → import round trip unchanged.
"""

from __future__ import annotations

import math
import re
from collections.abc import Sequence
from datetime import date, datetime, time
from typing import Any

from registry.errors import UnitError
from registry.record import fields

#: characters that make a spreadsheet program read a text cell as a formula
FORMULA_TRIGGERS = ("=", "+", "-", "@", "\t", "\r")

#: texts that mean "no value" in the tables groups keep; read as an empty cell (and counted)
EMPTY_MARKERS = frozenset({"-", "–", "—", "−", "n.d.", "nd", "n/a", "na", "n.a.", "?", "--"})

_NUMBER_START = re.compile(r"^\s*[~≈]?\s*[+\-−–]?\s*(?:\d|[.,]\d)")
_PLAIN_NUMBER = re.compile(
    r"^[+\-−–]?(?:\d+(?:[.,]\d*)?|[.,]\d+)(?:[eE][+\-]?\d+)?(?:\(\d+\))?"
    r"(?:\s*(?:±|\+/-|\+-)\s*\+?(?:\d+(?:[.,]\d*)?|[.,]\d+)(?:[eE][+\-]?\d+)?)?$"
)
_NUMBER_PREFIX = re.compile(r"^\s*([+\-−–]?(?:\d+(?:[.,]\d*)?|[.,]\d+)(?:[eE][+\-]?\d+)?)(.*)$")


#: where a spreadsheet may start a cell: the start of the text, and after a separator that a
#: reader in another locale splits on (';', ',' or a tab inside the text)
_TO_GUARD = re.compile(r"(^|[;,\t])('*[=+\-@\t\r])")
_GUARDED = re.compile(r"(^|[;,\t])'('*[=+\-@\t\r])")


def neutralise(text: str) -> str:
    """Guard every place a spreadsheet could start a formula with an apostrophe: the start of
    the text, and a trigger right after ';', ',' or a tab (a reader splitting on them would
    start a cell there). Apostrophes the user typed before a trigger get one more, so
    :func:`unneutralise` gives back exactly the text."""
    return _TO_GUARD.sub(r"\1'\2", text) if text else text


_APOSTROPHE_RUN = re.compile(r"(^|[;,\t])('+[=+\-@\t\r])")


def keep_apostrophes(text: str) -> str:
    """For files no spreadsheet opens (SD files): no guard, but an apostrophe the user typed
    before a trigger gets one more, so that the importer's :func:`unneutralise` keeps it."""
    return _APOSTROPHE_RUN.sub(r"\1'\2", text) if text else text


def unneutralise(text: str) -> str:
    """Undo :func:`neutralise`: drop the one apostrophe that guards each formula trigger."""
    return _GUARDED.sub(r"\1\2", text) if text else text


def cell_text(value: Any) -> str | None:
    """One cell as stripped text (None when empty); whole floats lose their '.0'."""
    if value is None:
        return None
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, float):
        if math.isnan(value):
            return None
        if value.is_integer() and abs(value) < 1e15:
            return str(int(value))
        return repr(value)
    if isinstance(value, int):
        return str(value)
    if isinstance(value, (datetime, date, time)):
        return value.isoformat()
    text = unneutralise(str(value).strip())
    text = text.strip()
    return text or None


def looks_numeric(text: str) -> bool:
    """True when a value cell starts with a number (cheap screen before the unit parser)."""
    return bool(_NUMBER_START.match(text))


def is_formula_text(text: str) -> bool:
    """A cell text that is a spreadsheet formula (an un-neutralised leading '=')."""
    return text.startswith("=") and len(text) > 1


def column_texts(series: Any) -> list[str | None]:
    """One column's cells as text (see :func:`cell_text`); text cells take a fast path.

    The importer reads every cell of a used column through here (a 100,000-row sheet: a few
    hundred thousand cells), so plain strings skip :func:`cell_text`'s type tests.
    """
    out: list[str | None] = []
    append = out.append
    for v in series.tolist():
        if type(v) is str:
            t = v.strip()
            if "'" in t:  # the same reading as cell_text's, only for texts that may need it
                t = unneutralise(t).strip()
            append(t or None)
        else:
            append(cell_text(v))
    return out


def raw_formula_rows(series: Any) -> list[int]:
    """Positions of text cells that are formulas (an un-neutralised leading '=')."""
    return [
        i
        for i, v in enumerate(series.tolist())
        if type(v) is str and v[:1] in ("=", " ") and is_formula_text(v.strip())
    ]


def combine_error(value: str, error: str | None) -> str:
    """'14.2' + '0.3' → '14.2 ± 0.3'; '14.2 kcal/mol' + '0.3' → '14.2 ± 0.3 kcal/mol'.

    A separate uncertainty column is folded into the value's text, so the stored text says
    what the sheet said and the unit layer reads both at once.
    """
    if not error:
        return value
    m = _NUMBER_PREFIX.match(value)
    e = _NUMBER_PREFIX.match(error)
    if not m or not e or "±" in value or "+/-" in value:
        return value
    return f"{m[1]} ± {e[1]}{m[2]}"


def with_unit(text: str, unit: str | None) -> str:
    """Append the header's unit to a bare number, so the stored text says what was meant."""
    if unit and _PLAIN_NUMBER.match(text):
        return f"{text} {unit}"
    return text


#: the columns of one rate point (T and k: value, uncertainty, text as reported)
RATE_COLUMNS: tuple[str, ...] = tuple(
    c
    for f in fields.stored_values("rate_point")
    for c in (f.value_column, f.error_column, f.text_column)
    if c
)


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
