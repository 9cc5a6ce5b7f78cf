"""Backups and restores of a SQLite registry, safe while others keep working.

Backups use SQLite's online backup API (``sqlite3.Connection.backup``) in a single step, which
copies one consistent snapshot while other people keep writing (under WAL, readers and the
backup never block writers). A backup is written to a temporary file, checked, and only then
renamed into place, so a half-written backup never carries the final name. A restore copies a
verified backup *into* the registry through the same API, inside one SQLite transaction: other
processes that have the registry open wait for it and then see the restored content, never a mix.

The backup's target is checked like every output (:func:`registry.outputs.check_target`: never
the registry or the files SQLite keeps beside it, a folder, a symlink or a missing folder) and
written through :func:`registry.outputs.write_file`; a full disk is said to be full, and no
partial copy is left behind.
"""

from __future__ import annotations

import contextlib
import errno
import os
import sqlite3
import time
from collections.abc import Iterator
from datetime import UTC, datetime
from pathlib import Path
from typing import Any

from registry.errors import DatabaseError, UsageError
from registry.outputs import check_target, write_file
from registry.storage.database import (
    BUSY_TIMEOUT_MS,
    Database,
    head_revision,
    open_database,
)


def _stamp() -> str:
    return datetime.now(UTC).strftime("%Y%m%dT%H%M%SZ")


def sqlite_file(database: Database, action: str) -> Path:
    if not database.is_sqlite or database.path is None:
        raise DatabaseError(
            f"{action} works on SQLite registry files; for {database.name} use the "
            "server's own tools (pg_dump / pg_restore)"
        )
    return database.path


def _connect(path: Path, *, readonly: bool = False) -> sqlite3.Connection:
    """A plain sqlite3 connection (autocommit) that waits for locks like the registry's own."""
    if readonly:
        uri = f"file:{path.as_posix()}?mode=ro"
        conn = sqlite3.connect(uri, uri=True, timeout=BUSY_TIMEOUT_MS / 1000)
    else:
        conn = sqlite3.connect(str(path), timeout=BUSY_TIMEOUT_MS / 1000)
    conn.isolation_level = None
    return conn


def _fsync(path: Path) -> None:
    fd = os.open(path, os.O_RDONLY)
    try:
        os.fsync(fd)
    finally:
        os.close(fd)


def _copy_snapshot(source: sqlite3.Connection, dest_path: Path) -> int:
    """Copy one consistent snapshot of ``source`` into a new self-contained file; returns pages."""
    dest = _connect(dest_path)
    try:
        source.backup(dest, pages=-1)  # one step: one snapshot, never restarted by writers
        dest.execute("PRAGMA journal_mode = DELETE")  # a single file, no -wal to carry along
        pages = dest.execute("PRAGMA page_count").fetchone()[0]
        problems = _integrity(dest)
    finally:
        dest.close()
    if problems:
        raise DatabaseError(f"the copy in {dest_path} failed its integrity check: {problems[0]}")
    _fsync(dest_path)
    return int(pages)


def _integrity(conn: sqlite3.Connection) -> list[str]:
    rows = [r[0] for r in conn.execute("PRAGMA integrity_check")]
    return [] if rows == ["ok"] else rows


@contextlib.contextmanager
def _temporary(path: Path) -> Iterator[Path]:
    """A temporary file beside ``path`` (same file system, so a rename is atomic); removed on exit."""
    tmp = path.with_name(f".{path.name}.{os.getpid()}.{time.monotonic_ns()}.tmp")
    try:
        yield tmp
    finally:
        for leftover in (tmp, Path(f"{tmp}-journal"), Path(f"{tmp}-wal"), Path(f"{tmp}-shm")):
            with contextlib.suppress(FileNotFoundError):
                leftover.unlink()


def backup_target(dest: str | Path, registry_path: Path, label: str = "backup") -> Path:
    """Where a backup goes: ``dest`` itself, or a time-stamped file when ``dest`` is a folder
    (absolute; a symlinked file is not followed: :func:`backup` refuses it)."""
    target = Path(dest).expanduser()
    if target.is_dir():
        target = target / f"{registry_path.stem}.{label}-{_stamp()}.sqlite"
    return Path(os.path.abspath(target))


def backup(database: Database, dest: str | Path, *, overwrite: bool = False) -> dict[str, Any]:
    """Copy the registry to ``dest`` (a file, or a folder for a time-stamped name) while in use."""
    path = sqlite_file(database, "backup")
    if not str(dest).strip():
        raise UsageError("backup: give a file or folder name")
    target = check_target(
        backup_target(dest, path), what="backup", protect=path, overwrite=overwrite,
        database_output=True,
    )  # fmt: skip
    started = time.perf_counter()
    source = _connect(path)
    copied: list[int] = []
    try:
        write_file(target, lambda tmp: copied.append(_copy_into(source, tmp)))
    finally:
        source.close()
    pages = copied[0]
    counts = _counts(target)
    return {
        "backup": str(target),
        "bytes": target.stat().st_size,
        "pages": pages,
        "seconds": round(time.perf_counter() - started, 3),
        **counts,
    }


#: SQLite's result codes for the situations a file system causes, as the OS errors they are
_SQLITE_AS_OS = {
    sqlite3.SQLITE_FULL: errno.ENOSPC,
    sqlite3.SQLITE_IOERR: errno.EIO,
    sqlite3.SQLITE_READONLY: errno.EROFS,
    sqlite3.SQLITE_CANTOPEN: errno.EACCES,
}


def _copy_into(source: sqlite3.Connection, tmp: Path) -> int:
    """:func:`_copy_snapshot` for a backup: a full disk (SQLite's "database or disk is full")
    becomes the OS error it is, so the message says so; SQLite's side files go with the copy."""
    try:
        return _copy_snapshot(source, tmp)
    except sqlite3.Error as exc:
        code = _SQLITE_AS_OS.get(getattr(exc, "sqlite_errorcode", -1) & 0xFF)
        if code is None:
            raise DatabaseError(f"the backup could not be written: {exc}") from exc
        raise OSError(code, str(exc)) from exc
    finally:
        for side in ("-journal", "-wal", "-shm"):
            Path(f"{tmp}{side}").unlink(missing_ok=True)


def _fsync_dir(folder: Path) -> None:
    with contextlib.suppress(OSError):  # not every platform can fsync a directory
        _fsync(folder)


def _counts(path: Path) -> dict[str, Any]:
    """Schema, counts and the history's head (``REVISION:HASH``) of a registry file."""
    conn = _connect(path, readonly=True)
    try:
        schema = conn.execute("SELECT version_num FROM alembic_version").fetchone()
        measurements = conn.execute("SELECT count(*) FROM measurement").fetchone()[0]
        revisions = conn.execute("SELECT count(*) FROM revision").fetchone()[0]
        head = conn.execute("SELECT id, hash FROM revision ORDER BY id DESC LIMIT 1").fetchone()
    except sqlite3.DatabaseError as exc:
        raise DatabaseError(f"{path} is not a fluxledger registry: {exc}") from exc
    finally:
        conn.close()
    return {
        "schema_version": schema[0] if schema else None,
        "measurements": measurements,
        "revisions": revisions,
        "anchor": f"{head[0]}:{head[1][:16]}" if head else None,
    }


def restore(db: str, source: str | Path, *, force: bool = False) -> dict[str, Any]:
    """Replace the registry's content with a verified copy of ``source`` (a backup file).

    The source is copied to a temporary file and verified first (integrity, foreign keys, schema,
    hash chain, values); nothing is touched when that finds a problem. An existing registry is
    only replaced with ``force``, and then a safety backup of it is taken first.
    """
    src = Path(source).expanduser().resolve()
    if not src.is_file():
        raise UsageError(f"no backup file at {src}")
    target_db = open_database(db, must_exist=False)
    try:
        target = sqlite_file(target_db, "restore")
        if src == target.resolve():
            raise UsageError("the backup to restore is the registry itself")
        exists = target.exists() and target.stat().st_size > 0
        if exists and not force:
            raise UsageError(
                f"{target} exists; allow replacing its content (force) "
                "(a safety backup of the current content is taken first)"
            )
        with _temporary(target) as tmp:
            try:
                source_conn = _connect(src, readonly=True)
                try:
                    _copy_snapshot(source_conn, tmp)
                finally:
                    source_conn.close()
            except sqlite3.DatabaseError as exc:
                raise DatabaseError(f"{src} is not a readable SQLite file: {exc}") from exc
            from registry.admin.verify import verify_file

            report = verify_file(tmp, allow_older_schema=True)
            if not report["ok"]:
                bad = [f"{c['check']}: {p}" for c in report["checks"] for p in c["problems"]]
                listed = "\n  ".join(bad[:20])
                raise DatabaseError(f"{src} failed verification; nothing was restored\n  {listed}")
            safety = None
            if exists:
                safety = backup(target_db, backup_target(target.parent, target, "before-restore"))[
                    "backup"
                ]
                copy = _connect(tmp, readonly=True)
                live = _connect(target)
                try:
                    copy.backup(live, pages=-1)  # one transaction on the live registry
                    live.execute("PRAGMA journal_mode = WAL")
                finally:
                    live.close()
                    copy.close()
            else:
                os.replace(tmp, target)
                _fsync_dir(target.parent)
    finally:
        target_db.close()
    return {
        "restored": str(target),
        "source": str(src),
        "safety_backup": safety,
        "schema_head": head_revision(),
        **_counts(target),
    }
