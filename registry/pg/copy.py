"""Copy a whole registry from one database to another (SQLite → PostgreSQL, or back).

Why a copy and not a dump: the two engines disagree on types (timestamps with time zone,
booleans, blobs) and on how ids are handed out. Going through the SQLAlchemy models converts the
types, and copying table by table in dependency order with Core ``executemany`` in chunks keeps
every id, so revisions, findings and links still point at the same rows. Afterwards PostgreSQL's
id sequences are moved past the copied ids, and the copy is checked: row counts and a content
digest per table, and the revision hash chain (the last hash must be the same on both sides).
"""

from __future__ import annotations

import hashlib
import time
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from dataclasses import dataclass, field
from datetime import UTC, datetime
from typing import Any

from sqlalchemy import Connection, Table, func, insert, select
from sqlalchemy.exc import OperationalError

from registry.errors import DatabaseError, UsageError
from registry.pg import cartridge
from registry.storage import audit, migrate
from registry.storage.database import Database, open_database, redacted_url, to_url
from registry.storage.models import Base

CHUNK_ROWS = 5000

#: tables the first migration fills with reference data; the copy replaces them with the source's
REFERENCE_TABLES = ("process_kind", "solvent")

Progress = Callable[[str, int], None]


@dataclass
class TableCheck:
    """One table after the copy: rows on both sides and whether the contents are identical."""

    table: str
    source_rows: int
    target_rows: int
    same_content: bool

    @property
    def ok(self) -> bool:
        return self.source_rows == self.target_rows and self.same_content


@dataclass
class CopyReport:
    """What ``migrate-to`` did and what the checks found."""

    source: str
    target: str
    target_backend: str
    tables: list[TableCheck] = field(default_factory=list)
    source_chain_problems: list[str] = field(default_factory=list)
    target_chain_problems: list[str] = field(default_factory=list)
    source_last_hash: str = ""
    target_last_hash: str = ""
    seconds: float = 0.0

    @property
    def ok(self) -> bool:
        return (
            all(t.ok for t in self.tables)
            and self.source_last_hash == self.target_last_hash
            and self.target_chain_problems == self.source_chain_problems
        )

    def as_dict(self) -> dict[str, Any]:
        return {
            "source": self.source,
            "target": self.target,
            "target_backend": self.target_backend,
            "ok": self.ok,
            "tables": [
                {
                    "table": t.table,
                    "source_rows": t.source_rows,
                    "target_rows": t.target_rows,
                    "same_content": t.same_content,
                }
                for t in self.tables
            ],
            "hash_chain_intact": not self.target_chain_problems,
            "source_chain_problems": self.source_chain_problems,
            "target_chain_problems": self.target_chain_problems,
            "last_hash": self.target_last_hash,
            "seconds": round(self.seconds, 2),
        }


def copy_order() -> list[Table]:
    """Every model table, parents before children (foreign keys resolve as rows arrive)."""
    return list(Base.metadata.sorted_tables)


def _as_utc(value: Any) -> Any:
    """Timestamps are UTC: SQLite keeps them naive, PostgreSQL aware; make both aware UTC."""
    if isinstance(value, datetime):
        return value.replace(tzinfo=UTC) if value.tzinfo is None else value.astimezone(UTC)
    return value


def _normalized(row: Any, datetime_columns: set[str]) -> dict[str, Any]:
    data = dict(row._mapping)
    for name in datetime_columns:
        data[name] = _as_utc(data[name])
    return data


def _datetime_columns(table: Table) -> set[str]:
    return {c.name for c in table.columns if c.type.python_type is datetime}


def _ordered(table: Table) -> Any:
    return select(table).order_by(*table.primary_key.columns)


@contextmanager
def snapshot(database: Database) -> Iterator[Connection]:
    """A read transaction that sees one consistent state for the whole copy."""
    with database.engine.connect() as conn:
        if not database.is_sqlite:
            conn = conn.execution_options(isolation_level="REPEATABLE READ")
        with conn.begin():
            yield conn


def user_rows(conn: Connection) -> int:
    """Rows outside the reference tables: anything here means the target is not empty."""
    return sum(
        conn.execute(select(func.count()).select_from(t)).scalar_one()
        for t in copy_order()
        if t.name not in REFERENCE_TABLES
    )


def copy_tables(
    source: Connection,
    target: Connection,
    *,
    chunk_rows: int = CHUNK_ROWS,
    progress: Progress | None = None,
) -> dict[str, int]:
    """Copy every table (ids included) inside the caller's transactions; returns rows per table."""
    tables = copy_order()
    for table in reversed(tables):
        if table.name in REFERENCE_TABLES:
            target.execute(table.delete())
    # one bulk build of the cartridge's GiST index beats 100k single inserts into it
    rebuild_index = target.dialect.name == "postgresql" and cartridge.mol_column_exists(target)
    if rebuild_index:
        target.exec_driver_sql(f"DROP INDEX IF EXISTS {cartridge.MOL_INDEX}")
    copied: dict[str, int] = {}
    for table in tables:
        stamps = _datetime_columns(table)
        result = source.execute(_ordered(table))
        done = 0
        while chunk := result.fetchmany(chunk_rows):
            target.execute(insert(table), [_normalized(r, stamps) for r in chunk])
            done += len(chunk)
            if progress:
                progress(table.name, done)
        copied[table.name] = done
    if rebuild_index:
        target.exec_driver_sql(
            f"CREATE INDEX IF NOT EXISTS {cartridge.MOL_INDEX} ON compound "
            f"USING gist ({cartridge.MOL_COLUMN})"
        )
    if target.dialect.name == "postgresql":
        reset_sequences(target)
    return copied


def reset_sequences(conn: Connection) -> None:
    """Move each PostgreSQL id sequence past the largest copied id (explicit ids skip it)."""
    for table in copy_order():
        if "id" not in table.primary_key.columns:
            continue
        conn.exec_driver_sql(
            f"SELECT setval(pg_get_serial_sequence('{table.name}', 'id'), "
            f"(SELECT COALESCE(MAX(id), 0) + 1 FROM {table.name}), false)"
        )


def table_digest(conn: Connection, table: Table) -> tuple[int, str]:
    """Row count and sha256 over every row in id order, in an engine-neutral spelling.

    Timestamps are spelled as UTC ISO text and blobs as bytes, so a row reads the same from
    SQLite and PostgreSQL; everything else is compared by its Python ``repr``.
    """
    stamps = [i for i, c in enumerate(table.columns) if c.type.python_type is datetime]
    digest = hashlib.sha256()
    count = 0
    result = conn.execute(_ordered(table))
    while chunk := result.fetchmany(CHUNK_ROWS):
        for row in chunk:
            values = [bytes(v) if isinstance(v, memoryview) else v for v in row]
            for i in stamps:
                if values[i] is not None:
                    values[i] = _as_utc(values[i]).isoformat(timespec="microseconds")
            digest.update(repr(values).encode())
        count += len(chunk)
    return count, digest.hexdigest()


def check_copy(source: Database, target: Database) -> CopyReport:
    """Compare two registries table by table and check both hash chains."""
    report = CopyReport(
        source=redacted_url(source),
        target=redacted_url(target),
        target_backend="sqlite" if target.is_sqlite else target.engine.dialect.name,
    )
    with snapshot(source) as src, snapshot(target) as dst:
        for table in copy_order():
            n_src, d_src = table_digest(src, table)
            n_dst, d_dst = table_digest(dst, table)
            report.tables.append(TableCheck(table.name, n_src, n_dst, d_src == d_dst))
        report.source_chain_problems = audit.verify_chain(src)
        report.target_chain_problems = audit.verify_chain(dst)
        report.source_last_hash = audit.last_hash(src)
        report.target_last_hash = audit.last_hash(dst)
    return report


def migrate_to(
    source: Database,
    target_db: str,
    *,
    chunk_rows: int = CHUNK_ROWS,
    progress: Progress | None = None,
) -> CopyReport:
    """Copy the registry ``source`` into ``target_db`` (new or empty), then check the copy.

    The target is created at the current schema (on PostgreSQL with the cartridge this adds the
    ``mol`` column, which its trigger fills as compounds arrive). The copy runs in one target
    transaction: if anything fails nothing is left behind but the empty schema.
    """
    if chunk_rows < 1:
        raise UsageError("--chunk-rows must be at least 1")
    if to_url(target_db) == source.url:
        raise UsageError("the target is the registry itself; name another database")
    head = migrate.head_revision()
    if migrate.current_revision(source) != head:
        raise DatabaseError(
            f"{redacted_url(source)} is not at schema {head}; run 'fluxledger db upgrade' first"
        )
    started = time.perf_counter()
    target = open_database(target_db, must_exist=False)
    try:
        try:
            migrate.upgrade(target)
        except OperationalError as exc:
            reason = str(exc.orig or exc).strip().splitlines()[0]
            raise DatabaseError(f"cannot open {redacted_url(target)}: {reason}") from exc
        with snapshot(source) as src:

            def work(dst: Connection) -> None:
                existing = user_rows(dst)
                if existing:
                    raise DatabaseError(
                        f"{redacted_url(target)} already holds {existing} registry rows; "
                        "migrate-to copies only into a new or empty registry"
                    )
                copy_tables(src, dst, chunk_rows=chunk_rows, progress=progress)

            target.write(work)
        report = check_copy(source, target)
    finally:
        target.dispose()
    report.seconds = time.perf_counter() - started
    return report
