"""Look up registry rows by many keys at once, the cheaper of two ways.

An import asks "which of these 100,000 InChIKeys and labels are registered already?". Asking in
chunks of 500 bound values compiles and runs 200 statements per column; when the keys are a good
part of the table, one pass over the table's few narrow columns costs a fraction of that (and on
an empty registry nothing at all). A single add asks for one key: that goes straight to SQLite's
cursor (:mod:`registry.storage.rawsql`) without counting the table first.
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from typing import Any

from sqlalchemy import Connection, func, select
from sqlalchemy.sql import ColumnElement

from registry.storage import rawsql

#: look up by IN lists of this many values
IN_CHUNK = rawsql.IN_CHUNK
#: up to this many keys (a single add) go straight to an IN list, without counting the table
FEW_KEYS = 50
#: scan the whole table when there are at least this many keys per row of it
SCAN_KEYS_PER_ROW = 0.25


def rows_where_in(
    conn: Connection,
    columns: Sequence[ColumnElement[Any]],
    key: ColumnElement[Any],
    values: Iterable[Any],
    *extra: ColumnElement[bool],
) -> list[tuple[Any, ...]]:
    """Rows of ``columns`` whose ``key`` is one of ``values`` (and that meet ``extra``).

    ``key`` must be among ``columns``. The same rows either way; only the cost differs.
    """
    wanted = sorted({v for v in values if v is not None})
    if not wanted:
        return []
    table = key.table  # type: ignore[attr-defined]
    if len(wanted) > FEW_KEYS:
        size = conn.execute(select(func.count()).select_from(table)).scalar_one()
        if size == 0:
            return []
        if len(wanted) >= SCAN_KEYS_PER_ROW * size:
            at = list(columns).index(key)
            keep = set(wanted)
            query = select(*columns).where(key.is_not(None), *extra)
            return [tuple(r) for r in conn.execute(query) if r[at] in keep]
    if not extra and rawsql.on_sqlite(conn) and all(c.table is table for c in columns):
        names = [c.expression.key for c in columns]  # type: ignore[attr-defined]
        return rawsql.fetch_in(conn, table, names, key.expression.key, wanted)  # type: ignore[attr-defined]
    out: list[tuple[Any, ...]] = []
    for i in range(0, len(wanted), IN_CHUNK):
        chunk = wanted[i : i + IN_CHUNK]
        out.extend(tuple(r) for r in conn.execute(select(*columns).where(key.in_(chunk), *extra)))
    return out
