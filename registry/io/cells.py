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
from datetime import date, datetime, time
from typing import Any

#: characters that make a spreadsheet program read a text cell as a formula
FORMULA_TRIGGERS = ("=", "+", "-", "@", "\t", "\r")

#: texts that mean "no value" in the tables groups keep; read as an empty cell (and counted)
EMPTY_MARKERS = frozenset({"-", "–", "—", "−", "n.d.", "nd", "n/a", "na", "n.a.", "?", "--"})

_NUMBER_START = re.compile(r"^\s*[~≈]?\s*[+\-−–]?\s*(?:\d|[.,]\d)")


def neutralise(text: str) -> str:
    """Prefix a text cell that a spreadsheet would evaluate with an apostrophe."""
    if text and text.startswith(FORMULA_TRIGGERS):
        return "'" + text
    return text


def unneutralise(text: str) -> str:
    """Undo :func:`neutralise`: drop a leading apostrophe that guards a formula trigger."""
    if len(text) > 1 and text[0] == "'" and text[1] in "=+-@\t\r":
        return text[1:]
    return text


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
