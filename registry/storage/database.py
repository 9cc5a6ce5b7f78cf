"""Open a registry (a SQLite file or a server URL), read it in snapshots, write it in transactions.

There is one way in: :func:`open_registry` (an existing registry at the schema this code needs,
with the same checks and messages for every command), :func:`open_database` (the file or server
without the schema check, for ``init``, ``db upgrade``, ``verify`` and ``restore``) and
:func:`create_registry`. A :class:`Database` hands out :class:`~.connection.Connection` objects:

* :meth:`Database.read` — one consistent snapshot (under WAL never blocked by writers), opened
  with retries before the caller's first statement;
* :meth:`Database.write` — one transaction, all or nothing. SQLite begins it with ``BEGIN
  IMMEDIATE`` so writers queue for the lock instead of failing half-way, and a lock that
  outlasts the busy timeout is retried with backoff; PostgreSQL writers queue on a
  transaction-scoped advisory lock (which also keeps the history's hash chain linear).

SQLite is opened with Python's ``sqlite3`` in WAL mode with foreign keys on; SQLAlchemy is only
imported for a server URL and for schema migrations (:meth:`Database.sqlalchemy_engine`).
"""

from __future__ import annotations

import os
import random
import sqlite3
import threading
import time
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, TypeVar

from registry.errors import DatabaseError
from registry.storage.connection import Connection, ServerConnection, SQLiteConnection
from registry.storage.schema import network_fs_warning, scripts_head

T = TypeVar("T")

BUSY_TIMEOUT_MS = 30_000
WRITE_RETRIES = 12
READ_RETRIES = 12
#: the advisory lock every PostgreSQL writer takes first (writers queue as on SQLite)
PG_WRITE_LOCK_KEY = 0x666C7578
#: read pages through a memory map (an upper bound of address space, not memory taken)
MMAP_BYTES = 1 << 30


# ---------------------------------------------------------------- where the registry is


def to_url(db: str) -> str:
    """A SQLAlchemy-style URL for a path or URL; plain paths become SQLite files."""
    for plain in ("postgresql://", "postgres://"):  # the driver fluxledger installs: psycopg 3
        if db.startswith(plain):
            return "postgresql+psycopg://" + db[len(plain) :]
    if "://" in db:
        return db
    if db == ":memory:":
        return "sqlite://"
    return f"sqlite:///{Path(db).expanduser().resolve()}"


def sqlite_location(url: str) -> Path | None:
    """The file of a ``sqlite:///`` URL; None for an in-memory database."""
    rest = url.split("///", 1)[1] if "///" in url else ""
    return None if not rest or rest == ":memory:" else Path(rest)


def redact(url: str) -> str:
    """Hide a password in a URL before it reaches a message."""
    if "@" in url and "://" in url:
        scheme, rest = url.split("://", 1)
        cred, host = rest.rsplit("@", 1)
        user = cred.split(":", 1)[0]
        return f"{scheme}://{user}:***@{host}"
    return url


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


# ---------------------------------------------------------------- the handle


@dataclass(eq=False)
class Database:
    """One open registry. ``read()`` gives a snapshot, ``write(work)`` one transaction."""

    url: str
    backend: str  # "sqlite" or the server's dialect name ("postgresql")
    path: Path | None = None  # the SQLite file (None in memory and on servers)
    warnings: list[str] = field(default_factory=list)
    #: ids added inside ``api.deferred_checks`` whose check waits for the end of that block
    deferred_checks: list[int] | None = field(default=None, repr=False)
    _engine: Any = field(default=None, repr=False)  # SQLAlchemy engine: servers, migrations
    _idle: list[sqlite3.Connection] = field(default_factory=list, repr=False)
    _lock: threading.Lock = field(default_factory=threading.Lock, repr=False)
    _local: threading.local = field(default_factory=threading.local, repr=False)
    _memory_busy: bool = field(default=False, repr=False)

    @property
    def is_sqlite(self) -> bool:
        return self.backend == "sqlite"

    @property
    def key(self) -> str:
        """What tells this registry from others in one process (in-memory ones included)."""
        return self.url if self.path is not None or not self.is_sqlite else f"memory:{id(self)}"

    @property
    def name(self) -> str:
        """The registry as messages name it (a server URL without its password)."""
        return redact(self.url)

    # -- SQLite connections: a few kept open, one per concurrent transaction

    def _connect_sqlite(self) -> sqlite3.Connection:
        if self.path is None:
            target, uri = ":memory:", False
        else:
            target, uri = f"file:{uri_path(self.path)}?mode=rwc", True
        try:
            raw = sqlite3.connect(
                target,
                uri=uri,
                timeout=BUSY_TIMEOUT_MS / 1000,
                isolation_level=None,  # BEGIN is ours
                check_same_thread=False,
                detect_types=sqlite3.PARSE_DECLTYPES,
            )
            raw.execute(f"PRAGMA busy_timeout = {BUSY_TIMEOUT_MS}")
            raw.execute("PRAGMA foreign_keys = ON")
            if self.path is not None:
                raw.execute("PRAGMA journal_mode = WAL").fetchall()
                raw.execute(f"PRAGMA mmap_size = {MMAP_BYTES}").fetchall()
            raw.execute("PRAGMA synchronous = NORMAL")
        except sqlite3.DatabaseError as exc:  # a file that cannot be opened, said plainly
            raise self._unreadable(exc) from exc
        return raw

    @contextmanager
    def _sqlite(self) -> Iterator[sqlite3.Connection]:
        """A connection for one transaction: an idle one, or a new one (an in-memory database
        has exactly one connection, so one transaction at a time)."""
        with self._lock:
            if self.path is None:
                if self._memory_busy:
                    raise DatabaseError("an in-memory registry holds one transaction at a time")
                self._memory_busy = True
                if not self._idle:
                    self._idle.append(self._connect_sqlite())
                raw = self._idle[0]
            else:
                raw = self._idle.pop() if self._idle else None
        if raw is None:
            raw = self._connect_sqlite()
        try:
            yield raw
        finally:
            if raw.in_transaction:
                raw.execute("ROLLBACK")
            with self._lock:
                if self.path is None:
                    self._memory_busy = False
                else:
                    self._idle.append(raw)

    # -- reads

    @contextmanager
    def read(self) -> Iterator[Connection]:
        """A read transaction: one consistent snapshot, never blocked by writers.

        Under WAL a reader can still meet ``SQLITE_BUSY`` while it *starts* its snapshot (the
        WAL index is being rebuilt or reset by another connection, when the busy handler is not
        always called). The snapshot is therefore opened here, with retries, before the caller's
        first statement. A read inside a read of the same thread shares its snapshot.
        """
        held = getattr(self._local, "current", None)
        if held is not None:
            yield held
            return
        if not self.is_sqlite:
            with self.sqlalchemy_engine().connect() as sa, sa.begin():
                try:
                    yield self._hold(ServerConnection(sa, self.key))
                finally:
                    self._local.current = None
            return
        with self._sqlite() as raw:
            delay = 0.01
            for attempt in range(READ_RETRIES):
                try:
                    raw.execute("BEGIN")
                    raw.execute("SELECT count(*) FROM sqlite_master").fetchall()
                    break
                except sqlite3.DatabaseError as exc:
                    if raw.in_transaction:
                        raw.execute("ROLLBACK")
                    if not _is_lock_error(exc) or attempt == READ_RETRIES - 1:
                        raise self._unreadable(exc) from exc
                    time.sleep(delay + random.uniform(0, delay))
                    delay = min(delay * 2, 1.0)
            try:
                yield self._hold(SQLiteConnection(raw, self.key))
            finally:
                self._local.current = None
                if raw.in_transaction:
                    raw.execute("ROLLBACK")  # nothing was written: this ends the snapshot

    def _hold(self, conn: Connection) -> Connection:
        self._local.current = conn
        return conn

    def _unreadable(self, exc: Exception) -> DatabaseError:
        if _is_lock_error(exc):
            return DatabaseError(
                f"{self.name} stayed locked for too long ({READ_RETRIES} attempts); try again"
            )
        explained = self.situation(exc)
        if explained is not None:
            return explained
        reason = str(exc).strip().splitlines()[0] if str(exc).strip() else type(exc).__name__
        return DatabaseError(f"{self.name} is not a readable registry: {reason}")

    def situation(self, exc: BaseException) -> DatabaseError | None:
        """A user's situation behind a SQLite error said plainly (see :mod:`.situations`)."""
        from registry.storage.situations import explain

        return explain(self.path, exc)

    # -- writes

    def write(self, work: Callable[[Connection], T]) -> T:
        """Run ``work(conn)`` in one write transaction; all of it commits or none of it does.

        ``work`` may run more than once: when SQLite still reports the file as locked after the
        busy timeout (or reports a busy state in which it does not wait, such as WAL recovery),
        the transaction is rolled back and ``work`` is called again on a fresh transaction,
        after an exponential backoff with jitter. ``work`` must therefore have no effects
        outside the database. A lock that outlasts every retry becomes a :class:`DatabaseError`
        with a message a user can act on, never a traceback.
        """
        if getattr(self._local, "current", None) is not None:
            raise RuntimeError("a write cannot start inside a read of the same thread")
        delay = 0.05
        for attempt in range(WRITE_RETRIES):
            try:
                return self._write_once(work)
            except Exception as exc:
                if not _is_lock_error(exc):
                    explained = self.situation(exc)
                    if explained is not None:
                        raise explained from exc
                    raise
                if attempt == WRITE_RETRIES - 1:
                    raise DatabaseError(
                        f"{self.name} stayed locked by another writer for too long "
                        f"({WRITE_RETRIES} attempts); try again, or find the process that holds it"
                    ) from exc
                time.sleep(delay + random.uniform(0, delay))
                delay = min(delay * 2, 2.0)
        raise AssertionError("unreachable")  # pragma: no cover

    def _write_once(self, work: Callable[[Connection], T]) -> T:
        if not self.is_sqlite:
            with self.sqlalchemy_engine().connect() as sa, sa.begin():
                sa.exec_driver_sql(f"SELECT pg_advisory_xact_lock({PG_WRITE_LOCK_KEY})")
                return work(ServerConnection(sa, self.key))
        with self._sqlite() as raw:
            raw.execute("BEGIN IMMEDIATE")
            try:
                result = work(SQLiteConnection(raw, self.key))
                raw.execute("COMMIT")
            except BaseException:
                if raw.in_transaction:
                    raw.execute("ROLLBACK")
                raise
            return result

    # -- SQLAlchemy, only for servers and for Alembic

    def sqlalchemy_engine(self) -> Any:
        """A SQLAlchemy engine on this registry (servers; migrations and schema checks)."""
        if self._engine is None:
            self._engine = _make_engine(self)
        return self._engine

    def close(self) -> None:
        """Close every connection this handle holds (it can be used again afterwards)."""
        with self._lock:
            idle, self._idle = self._idle, []
        for raw in idle:
            raw.close()
        if self._engine is not None:
            self._engine.dispose()
            self._engine = None

    dispose = close


def uri_path(path: Path) -> str:
    """A file path quoted for an SQLite URI (``?`` and ``#`` would end the path)."""
    return str(path).replace("%", "%25").replace("?", "%3f").replace("#", "%23")


def _is_lock_error(exc: BaseException) -> bool:
    orig = getattr(exc, "orig", None)
    message = str(orig if orig is not None else exc).lower()
    if not isinstance(exc, sqlite3.OperationalError) and orig is None:
        return False
    return "locked" in message or "busy" in message or "could not serialize" in message


def _make_engine(database: Database) -> Any:
    from sqlalchemy import create_engine, event

    if not database.is_sqlite:
        try:
            return create_engine(database.url, pool_pre_ping=True)
        except Exception as exc:  # bad driver name, missing driver package
            raise DatabaseError(f"cannot use database URL {database.name}: {exc}") from exc
    engine = create_engine(database.url, connect_args={"timeout": BUSY_TIMEOUT_MS / 1000})

    @event.listens_for(engine, "connect")
    def _on_connect(dbapi_conn, _record):  # type: ignore[no-untyped-def]
        dbapi_conn.isolation_level = None  # BEGIN is issued below
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

    return engine


# ---------------------------------------------------------------- opening


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


def open_database(db: str, *, must_exist: bool = True) -> Database:
    """Open a registry's file or server without checking its schema.

    ``must_exist`` guards against a typo creating an empty file.
    """
    url = to_url(db)
    if not url.startswith("sqlite"):
        database = Database(url=url, backend=url.split(":", 1)[0].split("+", 1)[0])
        if database.backend == "postgres":
            database.backend = "postgresql"
        database.sqlalchemy_engine()  # a bad URL or a missing driver fails here, clearly
        return database
    path = sqlite_location(url)
    if path is not None:
        if must_exist and not path.exists():
            raise DatabaseError(
                f"no registry at {path}; create one with 'fluxledger init' or give an existing one"
            )
        if not path.parent.exists():
            raise DatabaseError(f"folder {path.parent} does not exist")
    database = Database(url=url, backend="sqlite", path=path)
    if path is not None:
        warning = network_fs_warning(path)
        if warning:
            database.warnings.append(warning)
            _WARNINGS_SEEN.append(warning)
    return database


def stamped_revision(conn: Connection) -> str | None:
    """The migration revision stamped in the database; None when it has no version table."""
    if conn.dialect == "sqlite":
        found = conn.scalar(
            "SELECT 1 FROM sqlite_master WHERE type = 'table' AND name = 'alembic_version'"
        )
    else:
        found = conn.scalar("SELECT to_regclass('alembic_version') IS NOT NULL") or None
    if not found:
        return None
    return conn.scalar("SELECT version_num FROM alembic_version")


def head_revision() -> str:
    """The newest migration revision (from the scripts as text; Alembic only if they branch)."""
    head = scripts_head()
    if head is None:
        from registry.storage import migrate

        return migrate.alembic_head()
    return head


def schema_revision(database: Database) -> str | None:
    """The revision the registry is at (None for an empty database), or a clear error."""
    try:
        with database.read() as conn:
            return stamped_revision(conn)
    except DatabaseError:
        raise
    except Exception as exc:  # not a database file, server unreachable, no permission
        reason = str(getattr(exc, "orig", None) or exc).strip().splitlines()[0]
        raise DatabaseError(f"{database.name} is not a readable registry: {reason}") from exc


def open_registry(db: str) -> Database:
    """Open an existing registry and refuse one whose schema is not the one this code needs."""
    database = open_database(db, must_exist=True)
    try:
        current = schema_revision(database)
        head = head_revision()
        if current is None:
            raise DatabaseError(f"{database.name} has no fluxledger schema; run 'fluxledger init'")
        if current != head:
            raise DatabaseError(
                f"the registry's schema is at {current}, this fluxledger needs {head}; "
                "run 'fluxledger db upgrade' (it takes a backup first)"
            )
    except BaseException:
        database.close()
        raise
    return database


def create_registry(db: str) -> Database:
    """Create a registry (or bring an existing one to the current schema); returns it open."""
    from registry.storage import migrate

    database = open_database(db, must_exist=False)
    try:
        from registry.storage.situations import refuse_foreign

        refuse_foreign(database)
        migrate.upgrade(database)
    except DatabaseError:
        database.close()
        raise
    except Exception as exc:  # server unreachable, database missing, no permission
        database.close()
        reason = str(getattr(exc, "orig", None) or exc).strip().splitlines()[0]
        raise DatabaseError(f"cannot create a registry at {database.name}: {reason}") from exc
    return database
