"""Copy a whole registry from one database to another (SQLite → PostgreSQL, or back).

Why a copy and not a dump: the two engines disagree on types (timestamps with time zone,
booleans, blobs) and on how ids are handed out. Rows go through
:class:`~registry.storage.connection.Connection` on both sides, which reads and writes the same
Python values on either database (aware UTC datetimes, bools, bytes); copying table by table in
dependency order, in id-ordered chunks, keeps every id, so revisions, findings and links still
point at the same rows. Afterwards PostgreSQL's id sequences are moved past the copied ids, and
the copy is checked: row counts and a content digest per table, and the revision hash chain
(the last hash must be the same on both sides).

``change_counter`` is not copied: its counts say how often *this* database changed, for the
caches of *this* database (which start empty on the target anyway); the target keeps the
counters its own schema started with.
"""

from __future__ import annotations

import hashlib
import time
from collections.abc import Callable, Iterator
from dataclasses import dataclass, field
from datetime import datetime
from typing import Any

from registry.errors import DatabaseError, UsageError
from registry.pg import cartridge
from registry.storage import audit, migrate
from registry.storage.connection import Connection, utc
from registry.storage.database import Database, head_revision, open_database, to_url

CHUNK_ROWS = 5000

#: tables the first migration fills with reference data; the copy replaces them with the source's
REFERENCE_TABLES = ("process_kind", "solvent")
#: tables of the database itself, not of the registry (see the module docstring)
NOT_COPIED = ("change_counter",)

Progress = Callable[[str, int], None]


@dataclass(frozen=True)
class TableSpec:
    """A table to copy: its name, columns and the key its rows are read in order of."""

    name: str
    columns: tuple[str, ...]
    key: str


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
    """What ``migrate_to`` did and what the checks found."""

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


def copy_order() -> list[TableSpec]:
    """Every registry table, parents before children (foreign keys resolve as rows arrive).

    The order and columns come from the schema's models (the copy runs migrations on the target
    anyway, so SQLAlchemy is loaded); the rows themselves go through :class:`Connection`.
    """
    from registry.storage.models import Base

    out = []
    for table in Base.metadata.sorted_tables:
        if table.name in NOT_COPIED:
            continue
        key = "id" if "id" in table.columns else next(iter(table.primary_key.columns)).name
        out.append(TableSpec(table.name, tuple(c.name for c in table.columns), key))
    return out


def _chunks(conn: Connection, spec: TableSpec, chunk_rows: int) -> Iterator[list[tuple]]:
    """The table's rows in key order, ``chunk_rows`` at a time (keyset pages: no OFFSET scans)."""
    names = ", ".join(spec.columns)
    if spec.key != "id":  # the small reference table keyed by name: one page
        yield conn.rows(f"SELECT {names} FROM {spec.name} ORDER BY {spec.key}")
        return
    after = None
    while True:
        where = "" if after is None else "WHERE id > :after "
        rows = conn.rows(
            f"SELECT {names} FROM {spec.name} {where}ORDER BY id LIMIT :n",
            {"after": after, "n": chunk_rows},
        )
        if not rows:
            return
        yield rows
        after = rows[-1][spec.columns.index("id")]


def user_rows(conn: Connection) -> int:
    """Rows outside the reference tables: anything here means the target is not empty."""
    return sum(
        int(conn.scalar(f"SELECT count(*) FROM {t.name}"))
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
    """Copy every table (ids included) inside the callers' transactions; rows per table."""
    tables = copy_order()
    for spec in reversed(tables):
        if spec.name in REFERENCE_TABLES:
            target.execute(f"DELETE FROM {spec.name}")
    # one bulk build of the cartridge's GiST index beats 100k single inserts into it
    rebuild_index = target.dialect == "postgresql" and cartridge.mol_column_exists(target)
    if rebuild_index:
        target.execute(f"DROP INDEX IF EXISTS {cartridge.MOL_INDEX}")
    copied: dict[str, int] = {}
    for spec in tables:
        done = 0
        for chunk in _chunks(source, spec, chunk_rows):
            target.insert_many(spec.name, [dict(zip(spec.columns, r, strict=True)) for r in chunk])
            done += len(chunk)
            if progress:
                progress(spec.name, done)
        copied[spec.name] = done
    if rebuild_index:
        target.execute(
            f"CREATE INDEX IF NOT EXISTS {cartridge.MOL_INDEX} ON compound "
            f"USING gist ({cartridge.MOL_COLUMN})"
        )
    if target.dialect == "postgresql":
        reset_sequences(target)
    return copied


def reset_sequences(conn: Connection) -> None:
    """Move each PostgreSQL id sequence past the largest copied id (explicit ids skip it)."""
    for spec in copy_order():
        if spec.key == "id":
            conn.scalar(
                f"SELECT setval(pg_get_serial_sequence(:table, 'id'), "
                f"(SELECT COALESCE(MAX(id), 0) + 1 FROM {spec.name}), false)",
                {"table": spec.name},
            )


def _spelled(value: Any) -> Any:
    """One spelling per value whichever database it came from (timestamps as UTC ISO text,
    blobs as bytes)."""
    if isinstance(value, datetime):
        stamp = utc(value)
        return stamp.isoformat(timespec="microseconds") if stamp else None
    if isinstance(value, memoryview):
        return bytes(value)
    return value


def table_digest(conn: Connection, spec: TableSpec) -> tuple[int, str]:
    """Row count and sha256 over every row in key order, in an engine-neutral spelling."""
    digest = hashlib.sha256()
    count = 0
    for chunk in _chunks(conn, spec, CHUNK_ROWS):
        for row in chunk:
            digest.update(repr([_spelled(v) for v in row]).encode())
        count += len(chunk)
    return count, digest.hexdigest()


def _repeatable(conn: Connection) -> Connection:
    """One snapshot for every statement of this read (PostgreSQL's default reads each
    statement afresh; SQLite's read transaction is one snapshot already)."""
    if conn.dialect == "postgresql":
        conn.execute("SET TRANSACTION ISOLATION LEVEL REPEATABLE READ")
    return conn


def check_copy(source: Database, target: Database) -> CopyReport:
    """Compare two registries table by table and check both hash chains."""
    report = CopyReport(source=source.name, target=target.name, target_backend=target.backend)
    with source.read() as src_conn, target.read() as dst_conn:
        src, dst = _repeatable(src_conn), _repeatable(dst_conn)
        for spec in copy_order():
            n_src, d_src = table_digest(src, spec)
            n_dst, d_dst = table_digest(dst, spec)
            report.tables.append(TableCheck(spec.name, n_src, n_dst, d_src == d_dst))
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
        raise UsageError(f"chunk_rows {chunk_rows}: give at least 1")
    if to_url(target_db) == source.url:
        raise UsageError("the target is the registry itself; name another database")
    head = head_revision()
    if migrate.current_revision(source) != head:
        raise DatabaseError(f"{source.name} is not at schema {head}; upgrade it first")
    started = time.perf_counter()
    target = open_database(target_db, must_exist=False)
    try:
        try:
            migrate.upgrade(target)
        except DatabaseError:
            raise
        except Exception as exc:  # server unreachable, database missing, no permission
            reason = str(getattr(exc, "orig", None) or exc).strip().splitlines()[0]
            raise DatabaseError(f"cannot open {target.name}: {reason}") from exc
        with source.read() as src_conn:
            src = _repeatable(src_conn)

            def work(dst: Connection) -> None:
                existing = user_rows(dst)
                if existing:
                    raise DatabaseError(
                        f"{target.name} already holds {existing} registry rows; "
                        "migrate-to copies only into a new or empty registry"
                    )
                copy_tables(src, dst, chunk_rows=chunk_rows, progress=progress)

            target.write(work)
        report = check_copy(source, target)
    finally:
        target.close()
    report.seconds = time.perf_counter() - started
    return report
