"""A read-only registry handle for searching a SQLite file without SQLAlchemy, and plain SQL.

``fluxledger find`` only reads. On a SQLite file it needs neither the ORM models nor the engine
machinery, whose import alone costs about half a second of every cold CLI run; Python's own
``sqlite3`` reads the same rows as plain tuples, several times cheaper than SQLAlchemy rows.
:func:`open_for_search` opens such a handle after the same checks as
:func:`registry.api.open_registry` (the file exists, is a registry, and its schema is at the
head revision this code needs) with the same messages; server URLs go to the full API.

:func:`fetch` runs one SQL text with named parameters (``:name``) on any connection the search
meets: a ``sqlite3`` connection, a SQLAlchemy connection to SQLite (its DBAPI connection is used,
inside the same transaction) or a SQLAlchemy connection to another database (``text()``).
"""

from __future__ import annotations

import random
import sqlite3
import time
from collections.abc import Iterator, Sequence
from contextlib import contextmanager
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from registry.errors import DatabaseError
from registry.storage.schema import network_fs_warning, scripts_head

#: as in :mod:`registry.storage.database` (busy timeout and read retries of a SQLite registry)
BUSY_TIMEOUT_S = 30.0
READ_RETRIES = 12
#: read pages through a memory map (no copy per page read: a search's row fetch visits pages
#: all over the file); an upper bound of address space, not memory taken
MMAP_BYTES = 1 << 30


# ---------------------------------------------------------------- SQL on any connection


def dialect_name(conn: Any) -> str:
    """'sqlite' for a ``sqlite3`` connection, else the SQLAlchemy dialect's name."""
    if isinstance(conn, sqlite3.Connection):
        return "sqlite"
    return str(conn.dialect.name)


def _raw_sqlite(conn: Any) -> sqlite3.Connection | None:
    """The ``sqlite3`` connection behind ``conn`` (same transaction), if it is SQLite."""
    if isinstance(conn, sqlite3.Connection):
        return conn
    if conn.dialect.name == "sqlite":
        raw = conn.connection.dbapi_connection
        if isinstance(raw, sqlite3.Connection):
            return raw
    return None


def use_memory_map(conn: Any) -> None:
    """Let SQLite read this connection's pages through a memory map unless it already does
    (a read setting of the connection: results are the same, random page reads cheaper)."""
    raw = _raw_sqlite(conn)
    if raw is None:
        return
    current = raw.execute("PRAGMA mmap_size").fetchone()
    if current is not None and not current[0]:
        raw.execute(f"PRAGMA mmap_size = {MMAP_BYTES}").fetchall()


def fetch(conn: Any, sql: str, params: dict[str, Any] | None = None) -> list[Sequence[Any]]:
    """All rows of ``sql`` (named ``:parameters``) as tuples (SQLAlchemy rows on servers)."""
    raw = _raw_sqlite(conn)
    if raw is not None:
        cursor = raw.execute(sql, params or {})
        try:
            return cursor.fetchall()
        finally:
            cursor.close()
    from sqlalchemy import text

    return list(conn.execute(text(sql), params or {}).all())


def fetch_with_ids(
    conn: Any,
    sql: str,
    column: str,
    ids: Sequence[int],
    params: dict[str, Any] | None = None,
    *,
    chunk: int = 500,
) -> list[Sequence[Any]]:
    """Rows of ``sql`` (which ends in a WHERE clause) that also have ``column IN ids``.

    On SQLite the ids go in as one JSON array (``json_each``), however many there are; on other
    databases, or an SQLite built without its JSON functions, as bound IN lists of ``chunk``.
    """
    ids = list(ids)
    if not ids:
        return []
    if dialect_name(conn) == "sqlite":
        json_params = {**(params or {}), "in_ids": "[" + ",".join(map(str, ids)) + "]"}
        try:
            return fetch(conn, f"{sql} AND {column} IN (SELECT value FROM json_each(:in_ids))",
                         json_params)  # fmt: skip
        except sqlite3.OperationalError as exc:
            if "json_each" not in str(exc):
                raise
    found: list[Sequence[Any]] = []
    for start in range(0, len(ids), chunk):
        chunk_params = dict(params or {})
        names = binds("in_id", ids[start : start + chunk], chunk_params)
        found += fetch(conn, f"{sql} AND {column} IN ({names})", chunk_params)
    return found


def binds(prefix: str, values: Sequence[Any], params: dict[str, Any]) -> str:
    """``:prefix0, :prefix1, …`` for an IN list, with the values added to ``params``."""
    names = []
    for i, value in enumerate(values):
        params[f"{prefix}{i}"] = value
        names.append(f":{prefix}{i}")
    return ", ".join(names)


# ---------------------------------------------------------------- the read-only handle


@dataclass
class SQLiteReader:
    """A SQLite registry opened for reading, with the parts of :class:`registry.storage.database.Database`
    that the search uses (``url``, ``path``, ``is_sqlite``, ``read()``, ``dispose()``).

    It holds one connection, so one read at a time (no nesting, one thread at a time); it
    never writes (``find`` and the motif lookup only read) — writers use the full API.
    """

    path: Path
    url: str = ""
    is_sqlite: bool = True
    warnings: list[str] = field(default_factory=list)
    _conn: sqlite3.Connection | None = None

    def __post_init__(self) -> None:
        self.url = self.url or f"sqlite:///{self.path}"

    def _connect(self) -> sqlite3.Connection:
        if self._conn is None:
            # mode=rw: never create a file; isolation_level=None: BEGIN is issued in read()
            conn = sqlite3.connect(
                f"file:{_uri_path(self.path)}?mode=rw",
                uri=True,
                timeout=BUSY_TIMEOUT_S,
                isolation_level=None,
                check_same_thread=False,
            )
            conn.execute(f"PRAGMA busy_timeout = {int(BUSY_TIMEOUT_S * 1000)}")
            conn.execute(f"PRAGMA mmap_size = {MMAP_BYTES}").fetchall()
            self._conn = conn
        return self._conn

    @contextmanager
    def read(self) -> Iterator[sqlite3.Connection]:
        """One read transaction (a consistent WAL snapshot), opened with retries like
        :meth:`registry.storage.database.Database.read`."""
        delay = 0.01
        for attempt in range(READ_RETRIES):
            conn = self._connect()
            try:
                conn.execute("BEGIN")
                conn.execute("SELECT count(*) FROM sqlite_master").fetchone()
            except sqlite3.OperationalError as exc:
                if conn.in_transaction:
                    conn.execute("ROLLBACK")
                message = str(exc).lower()
                if ("locked" not in message and "busy" not in message) or (
                    attempt == READ_RETRIES - 1
                ):
                    raise
                time.sleep(delay + random.uniform(0, delay))
                delay = min(delay * 2, 1.0)
                continue
            try:
                yield conn
            finally:
                if conn.in_transaction:
                    conn.execute("ROLLBACK")  # nothing was written: ending the snapshot
            return
        raise AssertionError("unreachable")  # pragma: no cover

    def dispose(self) -> None:
        if self._conn is not None:
            self._conn.close()
            self._conn = None


def _uri_path(path: Path) -> str:
    """A file path quoted for an SQLite URI (``?`` and ``#`` would end the path)."""
    return str(path).replace("%", "%25").replace("?", "%3f").replace("#", "%23")


def sqlite_path(db: str) -> Path | None:
    """The file of a SQLite registry given as a path or ``sqlite:///`` URL; None otherwise
    (server URLs and in-memory databases), mirroring :func:`registry.storage.database.to_url`."""
    if db.startswith("sqlite:///"):
        rest = db[len("sqlite:///") :]
        return None if not rest or rest == ":memory:" or "?" in rest else Path(rest)
    if "://" in db or db == ":memory:":
        return None
    return Path(db).expanduser().resolve()


def open_for_search(db: str) -> Any:
    """A registry handle for searching: :class:`SQLiteReader` for a SQLite file, else the
    full :func:`registry.api.open_registry` (which refuses a missing file or a wrong schema
    with the same messages as here)."""
    path = sqlite_path(db)
    if path is None:
        from registry import api

        return api.open_registry(db)
    if not path.exists():
        raise DatabaseError(
            f"no registry at {path}; create one with 'fluxledger init' or choose one with --db"
        )
    reader = SQLiteReader(path, url=db if db.startswith("sqlite:///") else "")
    warning = network_fs_warning(path)
    if warning:
        reader.warnings.append(warning)
    try:
        current = stamped_revision(reader)
    except sqlite3.Error as exc:
        reader.dispose()
        reason = str(exc).strip().splitlines()[0] if str(exc).strip() else type(exc).__name__
        raise DatabaseError(f"{reader.url} is not a readable registry: {reason}") from exc
    head = head_revision()
    if current is None:
        reader.dispose()
        raise DatabaseError(f"{reader.url} has no fluxledger schema; run 'fluxledger init'")
    if current != head:
        reader.dispose()
        raise DatabaseError(
            f"the registry's schema is at {current}, this fluxledger needs {head}; "
            "run 'fluxledger db upgrade' (it takes a backup first)"
        )
    return reader


def stamped_revision(reader: SQLiteReader) -> str | None:
    """The Alembic revision stamped in the file (None when there is no version table)."""
    with reader.read() as conn:
        has = conn.execute(
            "SELECT 1 FROM sqlite_master WHERE type = 'table' AND name = 'alembic_version'"
        ).fetchone()
        if has is None:
            return None
        row = conn.execute("SELECT version_num FROM alembic_version").fetchone()
    return None if row is None else row[0]


def head_revision() -> str:
    """The newest migration revision, as :func:`registry.storage.migrate.head_revision` gives it; only
    scripts that branch need Alembic (and with it SQLAlchemy)."""
    head = scripts_head()
    if head is None:
        from registry.storage import migrate

        return migrate.head_revision()
    return head
