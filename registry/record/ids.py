"""Row ids as a caller gives them: whole numbers a database can hold, or a clear refusal.

SQLite and PostgreSQL keep ids as signed 64-bit integers; a larger Python int would end in the
driver's OverflowError, a bool or a float would quietly become some other row. The library and
the CLI read every id through :func:`as_id`.
"""

from __future__ import annotations

import operator
import re
from collections.abc import Iterable
from typing import Any

from registry.errors import UsageError

#: the largest id a signed 64-bit column holds
MAX_ID = 2**63 - 1
_DIGITS = re.compile(r"\+?\d+")


def as_id(value: Any, what: str = "measurement") -> int:
    """``value`` (an int, or the text of one) as an id from 1 to :data:`MAX_ID`."""
    number: int | None = None
    if isinstance(value, str):
        text = value.strip()
        if _DIGITS.fullmatch(text) and len(text) <= 25:
            number = int(text)
    elif not isinstance(value, bool):
        try:
            number = operator.index(value)  # int, numpy integers; not floats
        except TypeError:
            number = None
    if number is None or not 1 <= number <= MAX_ID:
        shown = repr(value) if len(repr(value)) <= 40 else repr(value)[:37] + "…"
        raise UsageError(f"{shown} is not a {what} id (a whole number from 1)")
    return number


def as_ids(values: Iterable[Any], what: str = "measurement") -> list[int]:
    """Every value of ``values`` through :func:`as_id`."""
    return [as_id(v, what) for v in values]
