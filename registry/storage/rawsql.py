"""Run the few statements of a single write on SQLite's own cursor instead of through Core.

SQLAlchemy Core spends ~0.1–0.2 ms of Python per statement (execution context, result set-up),
while SQLite itself needs ~10 µs for a primary-key lookup or a one-row insert. A single ``add``
runs about ten statements, so Core was most of its cost. These helpers run the same SQL on the
DBAPI cursor of the *same* connection (same transaction), and pass every value through its
column type's own bind processor, so what is stored is exactly what Core would have stored.
Other databases, and batches of more than one row, keep using Core.
"""

from __future__ import annotations

from collections.abc import Callable, Iterable, Iterator, Mapping, Sequence
from functools import lru_cache
from typing import Any

from sqlalchemy import Connection, Table, insert
from sqlalchemy.engine import Dialect

#: most values one IN (...) list carries (SQLite's default host-parameter limit is 32,766)
IN_CHUNK = 500


def on_sqlite(conn: Connection) -> bool:
    return conn.dialect.name == "sqlite"


def _cursor(conn: Connection) -> Any:
    return conn.connection.dbapi_connection.cursor()


def fetch_all(conn: Connection, sql: str, params: Sequence[Any] = ()) -> list[tuple[Any, ...]]:
    """Plain rows of one SQL text on the connection's own cursor (SQLite only)."""
    cursor = _cursor(conn)
    try:
        cursor.execute(sql, tuple(params))
        return cursor.fetchall()
    finally:
        cursor.close()


def fetch_in(
    conn: Connection, table: Table, columns: Sequence[str], key: str, values: Sequence[Any]
) -> list[tuple[Any, ...]]:
    """Rows (``columns`` of ``table``) whose ``key`` is one of ``values``, on SQLite's cursor.

    Table and column names come from the models, never from user input; values are bound.
    """
    names = ", ".join(table.c[c].name for c in columns)
    rows: list[tuple[Any, ...]] = []
    for start in range(0, len(values), IN_CHUNK):
        chunk = list(values[start : start + IN_CHUNK])
        marks = ",".join("?" * len(chunk))
        sql = f"SELECT {names} FROM {table.name} WHERE {table.c[key].name} IN ({marks})"
        rows.extend(fetch_all(conn, sql, chunk))
    return rows


@lru_cache(maxsize=64)
def _insert_plan(
    table: Table, columns: tuple[str, ...], returning: str | None, dialect: Dialect
) -> tuple[str, tuple[Callable[[Any], Any] | None, ...], tuple[tuple[str, Any], ...]]:
    """SQL text, per-column bind processors and the scalar defaults of the missing columns."""
    defaults: list[tuple[str, Any]] = []
    for col in table.columns:
        if col.key in columns or col.default is None:
            continue
        if not col.default.is_scalar:  # a callable default: let Core run it
            raise LookupError(col.key)
        defaults.append((col.key, col.default.arg))
    all_columns = columns + tuple(k for k, _ in defaults)
    names = ", ".join(table.c[c].name for c in all_columns)
    marks = ", ".join("?" * len(all_columns))
    sql = f"INSERT INTO {table.name} ({names}) VALUES ({marks})"
    if returning:
        sql += f" RETURNING {table.c[returning].name}"
    processors = tuple(
        table.c[c].type.dialect_impl(dialect).bind_processor(dialect) for c in all_columns
    )
    return sql, processors, tuple(defaults)


def _bound(processors: Sequence[Callable[[Any], Any] | None], values: Sequence[Any]) -> list[Any]:
    return [v if p is None or v is None else p(v) for p, v in zip(processors, values, strict=True)]


def _bound_rows(
    processors: Sequence[Callable[[Any], Any] | None], rows: Iterable[list[Any]]
) -> Iterator[list[Any]]:
    """Each row with its values bound; a batch repeats values (one timestamp), so memoize."""
    active = [(i, p, {}) for i, p in enumerate(processors) if p is not None]
    for row in rows:
        for i, process, seen in active:
            value = row[i]
            if value is None:
                continue
            try:
                row[i] = seen[value]
            except KeyError:
                row[i] = seen[value] = process(value)
            except TypeError:  # an unhashable value
                row[i] = process(value)
        yield row


def insert_many(
    conn: Connection, table: Table, rows: Sequence[Mapping[str, Any]], *, new_ids: bool = False
) -> list[int] | None:
    """Insert rows that all have the same keys; with ``new_ids``, return their ids in order.

    On SQLite one ``executemany`` on the cursor. The ids are handed out here, counting on from
    the table's largest id, which is what SQLite itself would do (no AUTOINCREMENT tables): the
    caller holds the write lock (``BEGIN IMMEDIATE``), so no other writer can take one in
    between. Core would insert one statement per row to return ids in order. Elsewhere (or
    when a column has a callable default) a Core insert with RETURNING.
    """
    if not rows:
        return [] if new_ids else None
    columns = tuple(rows[0])
    shape = rows[0].keys()
    if any(r.keys() != shape for r in rows):
        raise ValueError(f"rows for {table.name} do not all have the same columns")
    if on_sqlite(conn) and not (new_ids and "id" in columns):
        try:
            sql, processors, defaults = _insert_plan(
                table, (("id",) if new_ids else ()) + columns, None, conn.dialect
            )
        except LookupError:
            pass
        else:
            tail = [v for _, v in defaults]
            ids: list[int] = []
            if new_ids:
                first = fetch_all(conn, f"SELECT coalesce(max(id), 0) + 1 FROM {table.name}")[0][0]
                ids = list(range(first, first + len(rows)))
                raw = ([i, *(r[c] for c in columns), *tail] for i, r in zip(ids, rows, strict=True))
            else:
                raw = ([*(r[c] for c in columns), *tail] for r in rows)
            params = _bound_rows(processors, raw)
            cursor = _cursor(conn)
            try:
                cursor.executemany(sql, params)
            finally:
                cursor.close()
            return ids if new_ids else None
    if not new_ids:
        conn.execute(insert(table), [dict(r) for r in rows])
        return None
    out: list[int] = []
    for start in range(0, len(rows), 2000):
        chunk = [dict(r) for r in rows[start : start + 2000]]
        result = conn.execute(
            insert(table).returning(table.c.id, sort_by_parameter_order=True), chunk
        )
        out.extend(r[0] for r in result)
    return out


def insert_one(
    conn: Connection, table: Table, row: Mapping[str, Any], *, returning: str | None = None
) -> Any:
    """Insert one row; the ``returning`` column's value (e.g. the new id), or None.

    On SQLite this runs on the cursor; elsewhere (or when a column has a callable default)
    it is an ordinary Core insert.
    """
    if on_sqlite(conn):
        try:
            sql, processors, defaults = _insert_plan(table, tuple(row), returning, conn.dialect)
        except LookupError:
            pass
        else:
            params = _bound(processors, [*row.values(), *(v for _, v in defaults)])
            cursor = _cursor(conn)
            try:
                cursor.execute(sql, params)
                return cursor.fetchone()[0] if returning else None
            finally:
                cursor.close()
    statement = insert(table)
    if returning:
        return conn.execute(statement.returning(table.c[returning]), dict(row)).scalar_one()
    conn.execute(statement, dict(row))
    return None
