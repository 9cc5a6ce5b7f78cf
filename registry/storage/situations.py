"""A user's situation behind a database error, said plainly: a read-only file or folder, a full
disk, another program's database. Anything else stays an error of the code, shown as one."""

from __future__ import annotations

import contextlib
import os
import sqlite3
from pathlib import Path
from typing import TYPE_CHECKING

from registry.errors import DatabaseError
from registry.storage.database import uri_path

if TYPE_CHECKING:
    from registry.storage.database import Database


def explain(path: Path | None, exc: BaseException) -> DatabaseError | None:
    """The plain message for a SQLite error about the file at ``path``; None for anything
    that is not a user's situation (which is then a bug, and shows as one)."""
    message = str(exc).lower()
    if path is None or not isinstance(exc, sqlite3.DatabaseError):
        return None
    folder = path.parent
    if "readonly" in message or "read-only" in message:
        return DatabaseError(
            f"cannot write {path}: the file (or its folder) is read-only; ask for write "
            "access, or work on a copy"
        )
    if "disk is full" in message or "disk i/o error" in message:
        return DatabaseError(
            f"cannot write {path}: the disk is full or failing ({exc}); nothing was written"
        )
    if "unable to open database file" in message:
        if not os.access(folder, os.W_OK):
            return DatabaseError(
                f"cannot open {path}: its folder {folder} is not writable (SQLite keeps "
                f"{path.name}-wal and {path.name}-shm beside the file); ask for write "
                "access, or copy the registry somewhere writable"
            )
        if path.exists() and not os.access(path, os.R_OK | os.W_OK):
            return DatabaseError(f"cannot open {path}: permission denied")
    return None


def refuse_foreign(database: Database) -> None:
    """``init`` on a database that holds another program's tables changes nothing in it (a
    SQLite file is looked at read-only: opening it as a registry would switch it to WAL)."""
    if database.is_sqlite:
        path = database.path
        if path is None or not path.exists() or not path.stat().st_size:
            return
        try:
            with contextlib.closing(
                sqlite3.connect(f"file:{uri_path(path)}?mode=ro", uri=True)
            ) as raw:
                tables = [r[0] for r in raw.execute(_SQLITE_TABLES)]
        except sqlite3.DatabaseError as exc:
            raise database._unreadable(exc) from exc
    else:
        with database.read() as conn:
            tables = conn.column(
                "SELECT table_name FROM information_schema.tables "
                "WHERE table_schema = current_schema() AND table_type = 'BASE TABLE'"
            )
    if tables and "alembic_version" not in tables:
        shown = ", ".join(sorted(tables)[:5]) + (" …" if len(tables) > 5 else "")
        raise DatabaseError(
            f"{database.name} holds tables of another program ({shown}); a registry needs a "
            "new file or an empty database"
        )


_SQLITE_TABLES = "SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%'"
