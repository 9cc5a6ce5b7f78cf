"""One transaction on a registry, whatever the database: SQL text in, plain tuples or dicts out.

Every query of fluxledger is one SQL text with ``:named`` parameters, written once and run on
SQLite and PostgreSQL alike. :class:`Connection` is the one door to a transaction: SQLite runs on
Python's own ``sqlite3`` (no SQLAlchemy to import, rows as plain tuples), a server through
SQLAlchemy's ``text()``. What differs between the two stays behind this door:

* many keys in one query (:meth:`Connection.rows_where_in`): one JSON array on SQLite
  (``json_each``), one array parameter (``= ANY(:keys)``) on PostgreSQL;
* new ids for a batch of rows (:meth:`Connection.insert_many`): counted on from the largest id
  under SQLite's write lock, drawn from the table's sequence on PostgreSQL;
* timestamps: stored by SQLite as UTC text (``2026-12-04 10:00:00.000000``, the form registries
  have always held), returned on both as timezone-aware UTC datetimes; booleans as ``bool``.
"""

from __future__ import annotations

import sqlite3
from abc import ABC, abstractmethod
from collections.abc import Iterable, Mapping, Sequence
from datetime import UTC, datetime
from typing import Any

from registry.storage.defaults import COLUMN_DEFAULTS, with_defaults

Params = Mapping[str, Any] | None
Row = tuple[Any, ...]

#: most values one bound IN (...) list carries where there are no JSON functions
IN_CHUNK = 500


# ---------------------------------------------------------------- SQLite value conversion


def _datetime_text(value: datetime) -> str:
    """A datetime as SQLite registries store it: UTC, no zone, microseconds."""
    if value.tzinfo is not None:
        value = value.astimezone(UTC).replace(tzinfo=None)
    return value.strftime("%Y-%m-%d %H:%M:%S.%f")


def _read_datetime(raw: bytes) -> datetime:
    return datetime.fromisoformat(raw.decode("ascii")).replace(tzinfo=UTC)


def _read_boolean(raw: bytes) -> bool:
    return raw not in (b"0", b"")


sqlite3.register_adapter(datetime, _datetime_text)
# only connections opened with detect_types (ours) convert by declared column type
sqlite3.register_converter("DATETIME", _read_datetime)
sqlite3.register_converter("BOOLEAN", _read_boolean)


def utc(value: datetime | None) -> datetime | None:
    """A datetime as aware UTC (a naive one is taken to be UTC already)."""
    if value is None:
        return None
    return value.replace(tzinfo=UTC) if value.tzinfo is None else value.astimezone(UTC)


# ---------------------------------------------------------------- the connection


class Connection(ABC):
    """One open transaction (a read snapshot or the write transaction) on a registry.

    Obtained from :meth:`registry.storage.database.Database.read` or ``write``; never commit or
    roll back through it. Table and column names in generated SQL come from the code, never
    from user input; every value is bound.
    """

    dialect: str = ""
    #: which registry this transaction is on (its URL): a key for per-registry memos
    source: str = ""

    # -- the primitive every other method uses

    @abstractmethod
    def rows(self, sql: str, params: Params = None) -> list[Row]:
        """Every row of ``sql`` as a tuple."""

    @abstractmethod
    def records(self, sql: str, params: Params = None) -> list[dict[str, Any]]:
        """Every row of ``sql`` as a dict (column name → value)."""

    @abstractmethod
    def execute(self, sql: str, params: Params = None) -> int:
        """Run one statement; the number of rows it changed."""

    @abstractmethod
    def execute_many(self, sql: str, rows: Sequence[Mapping[str, Any]]) -> None:
        """Run one statement once per parameter set (one round trip per batch where possible)."""

    @abstractmethod
    def _new_ids(self, table: str, count: int) -> list[int]:
        """``count`` new ids of ``table`` (under the write lock on SQLite; a server sequence)."""

    @abstractmethod
    def _where_in(self, column: str, keys: list[Any], params: dict[str, Any]) -> str:
        """SQL testing ``column`` against ``keys``, binding them into ``params``."""

    # -- built on the primitives

    def first(self, sql: str, params: Params = None) -> Row | None:
        """The first row of ``sql``, or None."""
        found = self.rows(sql, params)
        return found[0] if found else None

    def record(self, sql: str, params: Params = None) -> dict[str, Any] | None:
        """The first row of ``sql`` as a dict, or None."""
        found = self.records(sql, params)
        return found[0] if found else None

    def scalar(self, sql: str, params: Params = None) -> Any:
        """The first value of the first row (None when there is no row)."""
        row = self.first(sql, params)
        return None if row is None else row[0]

    def column(self, sql: str, params: Params = None) -> list[Any]:
        """The first value of every row."""
        return [r[0] for r in self.rows(sql, params)]

    def rows_where_in(
        self, sql: str, column: str, keys: Iterable[Any], params: Params = None
    ) -> list[Row]:
        """Rows of ``sql`` (which ends in a WHERE clause) that also have ``column`` in ``keys``.

        The one way to ask for rows by many keys, on every database and for any number of keys
        (one key from a single add, a hundred thousand InChIKeys from an import): the keys go in
        as one parameter, so there is one statement to prepare and run whatever their number.
        Order of the rows is not defined; ``None`` keys are ignored.
        """
        wanted = list(dict.fromkeys(k for k in keys if k is not None))
        if not wanted:
            return []
        bound = dict(params or {})
        return self.rows(f"{sql} AND {self._where_in(column, wanted, bound)}", bound)

    def records_where_in(
        self, sql: str, column: str, keys: Iterable[Any], params: Params = None
    ) -> list[dict[str, Any]]:
        """As :meth:`rows_where_in`, each row as a dict."""
        wanted = list(dict.fromkeys(k for k in keys if k is not None))
        if not wanted:
            return []
        bound = dict(params or {})
        return self.records(f"{sql} AND {self._where_in(column, wanted, bound)}", bound)

    def insert(self, table: str, row: Mapping[str, Any], *, returning: str | None = None) -> Any:
        """Insert one row; the ``returning`` column's value (e.g. the new id), or None.

        Columns the row leaves out take their defaults (:mod:`registry.storage.defaults`).
        """
        row = with_defaults(table, dict(row))
        names = ", ".join(row)
        marks = ", ".join(f":{c}" for c in row)
        sql = f"INSERT INTO {table} ({names}) VALUES ({marks})"
        if returning:
            return self.scalar(f"{sql} RETURNING {returning}", row)
        self.execute(sql, row)
        return None

    def insert_many(
        self, table: str, rows: Sequence[Mapping[str, Any]], *, new_ids: bool = False
    ) -> list[int]:
        """Insert rows that all have the same keys; with ``new_ids`` their new ids, in order.

        The caller holds the write transaction, so ids handed out here cannot be taken by
        another writer in between.
        """
        if not rows:
            return []
        shape = list(rows[0])
        if any(list(r) != shape for r in rows):
            raise ValueError(f"rows for {table} do not all have the same columns")
        missing = {k: v for k, v in COLUMN_DEFAULTS.get(table, {}).items() if k not in shape}
        if missing:
            rows = [{**r, **missing} for r in rows]
            shape += list(missing)
        ids = self._new_ids(table, len(rows)) if new_ids else []
        self._insert_rows(table, shape, rows, ids)
        return ids

    def _insert_rows(
        self, table: str, shape: list[str], rows: Sequence[Mapping[str, Any]], ids: list[int]
    ) -> None:
        if ids:
            rows = [{"id": i, **r} for i, r in zip(ids, rows, strict=True)]
            shape = ["id", *shape]
        names = ", ".join(shape)
        marks = ", ".join(f":{c}" for c in shape)
        self.execute_many(f"INSERT INTO {table} ({names}) VALUES ({marks})", rows)

    def update(self, table: str, values: Mapping[str, Any], *, id: int) -> int:
        """Set columns of the row with this id; the number of rows changed (0 or 1)."""
        if not values:
            return 0
        sets = ", ".join(f"{c} = :{c}" for c in values)
        return self.execute(f"UPDATE {table} SET {sets} WHERE id = :id_", {**values, "id_": id})


class SQLiteConnection(Connection):
    """A transaction on a SQLite registry, on Python's ``sqlite3`` connection itself."""

    dialect = "sqlite"

    def __init__(self, raw: sqlite3.Connection, source: str = "") -> None:
        self.raw = raw
        self.source = source

    def rows(self, sql: str, params: Params = None) -> list[Row]:
        cursor = self.raw.execute(sql, params or {})
        try:
            return cursor.fetchall()
        finally:
            cursor.close()

    def records(self, sql: str, params: Params = None) -> list[dict[str, Any]]:
        cursor = self.raw.execute(sql, params or {})
        try:
            names = [d[0] for d in cursor.description]
            return [dict(zip(names, r, strict=True)) for r in cursor.fetchall()]
        finally:
            cursor.close()

    def execute(self, sql: str, params: Params = None) -> int:
        cursor = self.raw.execute(sql, params or {})
        try:
            return cursor.rowcount
        finally:
            cursor.close()

    def execute_many(self, sql: str, rows: Sequence[Mapping[str, Any]]) -> None:
        if rows:
            self.raw.executemany(sql, _with_datetime_texts(rows)).close()

    def _insert_rows(
        self, table: str, shape: list[str], rows: Sequence[Mapping[str, Any]], ids: list[int]
    ) -> None:
        # positional parameters: SQLite then needs no name lookup per value of a large batch
        columns = ["id", *shape] if ids else shape
        marks = ", ".join("?" * len(columns))
        sql = f"INSERT INTO {table} ({', '.join(columns)}) VALUES ({marks})"
        stamped = [i for i, k in enumerate(shape) if isinstance(rows[0].get(k), datetime)]
        seen: dict[datetime, str] = {}

        def values(row: Mapping[str, Any]) -> list[Any]:
            out = [row[k] for k in shape]
            for i in stamped:  # a batch shares its timestamps: each converted once
                v = out[i]
                if isinstance(v, datetime):
                    text = seen.get(v)
                    out[i] = text if text is not None else seen.setdefault(v, _datetime_text(v))
            return out

        params: Any = map(values, rows)
        if ids:
            params = ([i, *p] for i, p in zip(ids, params, strict=True))
        self.raw.executemany(sql, params).close()

    def _new_ids(self, table: str, count: int) -> list[int]:
        # what SQLite itself would hand out (no AUTOINCREMENT tables): the write lock is ours
        first = int(self.scalar(f"SELECT coalesce(max(id), 0) + 1 FROM {table}"))
        return list(range(first, first + count))

    def _where_in(self, column: str, keys: list[Any], params: dict[str, Any]) -> str:
        if SQLITE_JSON:
            params["in_keys_"] = _json_array(keys)
            return f"{column} IN (SELECT value FROM json_each(:in_keys_))"
        return _bound_in(column, keys, params)


def _with_datetime_texts(rows: Sequence[Mapping[str, Any]]) -> Sequence[Mapping[str, Any]]:
    """The rows with their timestamps as stored text, each distinct value converted once (a
    batch shares one timestamp: converting it per row was a tenth of a large write)."""
    first = rows[0]
    stamped = [k for k, v in first.items() if isinstance(v, datetime)]
    if not stamped:
        return rows
    seen: dict[datetime, str] = {}

    def text(value: Any) -> Any:
        if not isinstance(value, datetime):
            return value
        found = seen.get(value)
        if found is None:
            found = seen[value] = _datetime_text(value)
        return found

    return [{**r, **{k: text(r[k]) for k in stamped}} for r in rows]


def _json_array(keys: list[Any]) -> str:
    import json

    if all(type(k) is int for k in keys):
        return "[" + ",".join(map(str, keys)) + "]"
    return json.dumps(keys, ensure_ascii=False)


def _sqlite_has_json() -> bool:
    """Whether this SQLite library has its JSON functions (built in since 3.38, optional before)."""
    probe = sqlite3.connect(":memory:")
    try:
        probe.execute("SELECT value FROM json_each('[1]')").close()
        return True
    except sqlite3.OperationalError:
        return False
    finally:
        probe.close()


#: keys go in as one JSON array where SQLite has ``json_each``, else as bound IN lists
SQLITE_JSON = _sqlite_has_json()


def _bound_in(column: str, keys: list[Any], params: dict[str, Any]) -> str:
    """``(column IN (:k0, …) OR column IN (…))`` in lists of :data:`IN_CHUNK` bound values."""
    parts = []
    for start in range(0, len(keys), IN_CHUNK):
        names = []
        for i, key in enumerate(keys[start : start + IN_CHUNK], start=start):
            params[f"in_key_{i}"] = key
            names.append(f":in_key_{i}")
        parts.append(f"{column} IN ({', '.join(names)})")
    return "(" + " OR ".join(parts) + ")"


class ServerConnection(Connection):
    """A transaction on a server database (PostgreSQL), through SQLAlchemy's ``text()``."""

    def __init__(self, sa_connection: Any, source: str = "") -> None:
        self.sa = sa_connection
        self.dialect = str(sa_connection.dialect.name)
        self.source = source

    def _run(self, sql: str, params: Any) -> Any:
        from sqlalchemy import text

        return self.sa.execute(text(sql), params)

    def rows(self, sql: str, params: Params = None) -> list[Row]:
        return [tuple(r) for r in self._run(sql, dict(params or {}))]

    def records(self, sql: str, params: Params = None) -> list[dict[str, Any]]:
        return [dict(r) for r in self._run(sql, dict(params or {})).mappings()]

    def execute(self, sql: str, params: Params = None) -> int:
        return int(self._run(sql, dict(params or {})).rowcount)

    def execute_many(self, sql: str, rows: Sequence[Mapping[str, Any]]) -> None:
        if rows:
            self._run(sql, [dict(r) for r in rows])

    def _new_ids(self, table: str, count: int) -> list[int]:
        return [
            int(i)
            for i in self.column(
                "SELECT nextval(pg_get_serial_sequence(:table, 'id')) "
                "FROM generate_series(1, :count)",
                {"table": table, "count": count},
            )
        ]

    def _where_in(self, column: str, keys: list[Any], params: dict[str, Any]) -> str:
        params["in_keys_"] = keys
        return f"{column} = ANY(:in_keys_)"
