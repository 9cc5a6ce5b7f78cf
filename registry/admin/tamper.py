"""Tamper evidence beyond the hash chain: the history must account for what the registry holds.

The chain (:func:`registry.storage.audit.verify_chain`) shows a revision edited or removed in
the middle; it cannot show the newest revisions removed, or rows changed without any revision.
So ``verify`` also checks that

* the chain still reaches a head the user kept (:func:`anchor` — printed by ``backup`` and
  ``history``, given back to ``verify`` as ``anchor``): removing the newest revisions, or all
  of them, shows there;
* every measurement was created by a revision, and every measurement a revision names exists
  (an inserted or deleted row shows);
* every acceptance of a finding was recorded, as it is stored (``accepted_by`` set by hand
  shows; :mod:`registry.admin.derived`);
* every stored number is finite (infinity written behind fluxledger's back shows).

What each measurement holds is held against its replayed history in :mod:`registry.admin.replay`,
and the findings and statuses against the rules in :mod:`registry.admin.derived`.
"""

from __future__ import annotations

import math
import re
from typing import Any

from registry.admin.derived import acceptance_problems
from registry.admin.replay import History
from registry.errors import UsageError
from registry.record import fields
from registry.storage.connection import Connection

_ANCHOR = re.compile(r"^\s*(\d+)\s*:\s*([0-9a-fA-F]{8,64})\s*$")


def anchor(conn: Connection) -> str | None:
    """The head of the history as ``REVISION:HASH`` (16 hex digits), or None when empty."""
    row = conn.first("SELECT id, hash FROM revision ORDER BY id DESC LIMIT 1")
    return None if row is None else f"{row[0]}:{row[1][:16]}"


def anchor_problems(conn: Connection, kept: str) -> list[str]:
    """Why the history does not reach the head ``kept`` (empty when it does)."""
    found = _ANCHOR.match(kept or "")
    if not found:
        raise UsageError(f"anchor {kept!r}: write REVISION:HASH as backup and history print it")
    revision, prefix = int(found[1]), found[2].lower()
    stored = conn.scalar("SELECT hash FROM revision WHERE id = :id", {"id": revision})
    if stored is None:
        newest = conn.scalar("SELECT max(id) FROM revision")
        return [
            f"revision {revision} of the kept anchor is gone (the history ends at "
            f"{newest if newest is not None else 'nothing'}): revisions were removed"
        ]
    if not stored.startswith(prefix):
        return [f"revision {revision} no longer has the kept hash {prefix}…: it was rewritten"]
    return []


def unaccounted(conn: Connection, history: History) -> list[str]:
    """Rows whose existence (or acceptance) the history does not account for."""
    problems: list[str] = []
    created = {mid for mid, state in history.measurements.items() if state.created is not None}
    stored = set(conn.column("SELECT id FROM measurement"))
    for mid in sorted(stored - created):
        problems.append(f"measurement {mid} has no revision that created it (inserted by hand?)")
    for mid in sorted(set(history.measurements) - stored):
        problems.append(f"measurement {mid} is in the history but not in the registry (deleted?)")
    problems += acceptance_problems(conn, history)
    return problems


#: the float columns of each table that hold measured or derived numbers
_NUMBER_COLUMNS: dict[str, tuple[str, ...]] = {
    table: tuple(
        c for f in fields.stored_values(table) for c in (f.value_column, f.error_column) if c
    )
    for table in ("measurement", "coalescence", "rate_point")
}
_NUMBER_COLUMNS["coalescence"] += ("population_ratio", "field_mhz")
_NUMBER_COLUMNS["measurement"] += ("t_calibration_err_k",)
_NUMBER_COLUMNS["validation_finding"] = ("reported", "recomputed", "difference")


def non_finite(conn: Connection) -> list[str]:
    """Stored numbers that are not finite (NaN or infinity: never written by fluxledger)."""
    problems: list[str] = []
    for table, columns in _NUMBER_COLUMNS.items():
        picked = ", ".join(columns)
        for row in conn.rows(f"SELECT id, {picked} FROM {table}"):
            for column, value in zip(columns, row[1:], strict=True):
                if _bad(value):
                    problems.append(f"{table} {row[0]}: {column} is {value!r}, not a finite number")
    return problems


def _bad(value: Any) -> bool:
    return isinstance(value, float) and not math.isfinite(value)
