"""Engines, transactions and schema state for one registry (a SQLite file or a server URL).

SQLite is opened in WAL mode with foreign keys on and a busy timeout; write transactions begin
with ``BEGIN IMMEDIATE`` so that two writers queue for the lock instead of failing half-way, and
:meth:`Database.write` retries with backoff if SQLite still reports the file as locked.
"""

from __future__ import annotations

import os
import random
import time
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from dataclasses import dataclass, field
from pathlib import Path
from typing import TypeVar

from sqlalchemy import Connection, Engine, create_engine, event, text
from sqlalchemy.exc import OperationalError

from registry.errors import DatabaseError
from registry.storage.schema import network_fs_warning

T = TypeVar("T")

BUSY_TIMEOUT_MS = 30_000
WRITE_RETRIES = 12
READ_RETRIES = 12
PG_WRITE_LOCK_KEY = 0x666C7578  # the advisory lock audit.py takes for the hash chain


def to_url(db: str) -> str:
    """A SQLAlchemy URL for a path or URL; plain paths become SQLite files."""
    for plain in ("postgresql://", "postgres://"):  # the driver fluxledger installs: psycopg 3
        if db.startswith(plain):
            return "postgresql+psycopg://" + db[len(plain) :]
    if "://" in db:
        return db
    if db == ":memory:":
        return "sqlite://"
    return f"sqlite:///{Path(db).expanduser().resolve()}"


@dataclass
class Database:
    """One open registry. ``write`` runs a function in a retried write transaction."""

    url: str
    engine: Engine
    is_sqlite: bool
    path: Path | None = None
    warnings: list[str] = field(default_factory=list)
    #: ids added inside ``api.deferred_checks`` whose check waits for the end of that block
    deferred_checks: list[int] | None = field(default=None, repr=False)

    @contextmanager
    def read(self) -> Iterator[Connection]:
        """A read transaction: one consistent snapshot under WAL, never blocked by writers.

        Under WAL a reader can still meet ``SQLITE_BUSY`` while it *starts* its snapshot (the
        WAL index is being rebuilt or reset by another connection, when the busy handler is not
        always called). The snapshot is therefore opened here, with retries, before the caller's
        first statement runs; after that SQLite guarantees the snapshot stays readable.
        """
        delay = 0.01
        for attempt in range(READ_RETRIES):
            conn = self.engine.connect()
            try:
                trans = conn.begin()
                if self.is_sqlite:
                    conn.exec_driver_sql("SELECT count(*) FROM sqlite_master").scalar()
            except OperationalError as exc:
                conn.close()
                if not _is_lock_error(exc) or attempt == READ_RETRIES - 1:
                    raise
                time.sleep(delay + random.uniform(0, delay))
                delay = min(delay * 2, 1.0)
                continue
            with conn:
                with trans:
                    yield conn
                return
        raise AssertionError("unreachable")  # pragma: no cover

    @contextmanager
    def _write_once(self) -> Iterator[Connection]:
        with self.engine.connect() as conn:
            conn.execution_options(sqlite_begin="IMMEDIATE")
            with conn.begin():
                if conn.dialect.name == "postgresql":
                    # writers queue here, as BEGIN IMMEDIATE makes them queue on SQLite
                    conn.exec_driver_sql(f"SELECT pg_advisory_xact_lock({PG_WRITE_LOCK_KEY})")
                yield conn

    def write(self, work: Callable[[Connection], T]) -> T:
        """Run ``work(conn)`` in one write transaction; all of it commits or none of it does.

        ``work`` may run more than once: when SQLite still reports the file as locked after the
        busy timeout (or reports a busy state in which it does not wait, such as WAL recovery),
        the transaction is rolled back and ``work`` is called again on a fresh transaction,
        after an exponential backoff with jitter. ``work`` must therefore not have effects
        outside the database. A lock that outlasts every retry becomes a :class:`DatabaseError`
        with a message a user can act on, never a traceback.
        """
        delay = 0.05
        for attempt in range(WRITE_RETRIES):
            try:
                with self._write_once() as conn:
                    return work(conn)
            except OperationalError as exc:
                if not _is_lock_error(exc):
                    raise
                if attempt == WRITE_RETRIES - 1:
                    raise DatabaseError(
                        f"{redacted_url(self)} stayed locked by another writer for too long "
                        f"({WRITE_RETRIES} attempts); try again, or find the process that holds it"
                    ) from exc
                time.sleep(delay + random.uniform(0, delay))
                delay = min(delay * 2, 2.0)
        raise AssertionError("unreachable")  # pragma: no cover

    def dispose(self) -> None:
        self.engine.dispose()


def _is_lock_error(exc: OperationalError) -> bool:
    message = str(exc.orig).lower() if exc.orig else str(exc).lower()
    return "locked" in message or "busy" in message or "could not serialize" in message


#: warnings about databases opened since the CLI last asked (see :func:`take_warnings`)
_WARNINGS_SEEN: list[str] = []


def take_warnings() -> list[str]:
    """Warnings about the databases opened since the last call, each text once; then forget them.

    The CLI boundary calls this once per command and prints what it gets, so a warning shows
    once however many times a command opens the database.
    """
    fresh = list(dict.fromkeys(_WARNINGS_SEEN))
    _WARNINGS_SEEN.clear()
    return fresh


def _attach_sqlite_events(engine: Engine) -> None:
    @event.listens_for(engine, "connect")
    def _on_connect(dbapi_conn, _record):  # type: ignore[no-untyped-def]
        dbapi_conn.isolation_level = None  # we issue BEGIN ourselves
        cur = dbapi_conn.cursor()
        cur.execute(f"PRAGMA busy_timeout = {BUSY_TIMEOUT_MS}")
        cur.execute("PRAGMA foreign_keys = ON")
        cur.execute("PRAGMA journal_mode = WAL")
        cur.execute("PRAGMA synchronous = NORMAL")
        cur.close()

    @event.listens_for(engine, "begin")
    def _on_begin(conn):  # type: ignore[no-untyped-def]
        mode = conn.get_execution_options().get("sqlite_begin", "DEFERRED")
        conn.exec_driver_sql(f"BEGIN {mode}")


def open_database(db: str, *, must_exist: bool = True) -> Database:
    """Open a registry by path or URL; ``must_exist`` guards against typos creating empty files."""
    url = to_url(db)
    if url.startswith("sqlite"):
        path = Path(url.split("///", 1)[1]) if "///" in url else None
        if path is not None and str(path) != ":memory:":
            if must_exist and not path.exists():
                raise DatabaseError(
                    f"no registry at {path}; create one with 'fluxledger init' or choose one with --db"
                )
            if not path.parent.exists():
                raise DatabaseError(f"folder {path.parent} does not exist")
        engine = create_engine(url, connect_args={"timeout": BUSY_TIMEOUT_MS / 1000})
        _attach_sqlite_events(engine)
        database = Database(url=url, engine=engine, is_sqlite=True, path=path)
        if path is not None:
            warning = network_fs_warning(path)
            if warning:
                database.warnings.append(warning)
                _WARNINGS_SEEN.append(warning)
        return database
    try:
        engine = create_engine(url, pool_pre_ping=True)
    except Exception as exc:  # bad driver name, missing driver package
        raise DatabaseError(f"cannot use database URL {_redact(url)}: {exc}") from exc
    return Database(url=url, engine=engine, is_sqlite=False)


def _redact(url: str) -> str:
    """Hide a password in a URL before it reaches a message."""
    if "@" in url and "://" in url:
        scheme, rest = url.split("://", 1)
        cred, host = rest.rsplit("@", 1)
        user = cred.split(":", 1)[0]
        return f"{scheme}://{user}:***@{host}"
    return url


def redacted_url(database: Database) -> str:
    return _redact(database.url)


def current_user() -> str:
    """The OS user, for the history when no ``--as`` name is given."""
    for var in ("FLUXLEDGER_USER", "USER", "LOGNAME", "USERNAME"):
        if os.environ.get(var):
            return os.environ[var]
    try:
        import pwd

        return pwd.getpwuid(os.getuid()).pw_name
    except Exception:  # pragma: no cover - platform without pwd
        return "unknown"


def schema_revision(conn: Connection) -> str | None:
    """The Alembic revision the database is at, or None for an empty database."""
    try:
        return conn.execute(text("SELECT version_num FROM alembic_version")).scalar()
    except Exception:
        return None
