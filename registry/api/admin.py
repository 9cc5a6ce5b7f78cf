"""Keeping a registry safe: backup, restore, verify, schema version and upgrade.

These also work on a registry that is not at the current schema (an old one to back up,
verify or upgrade), so they take an open handle *or* the registry's location (a path or URL);
``restore`` takes the location only, since its target may not exist yet.
"""

from __future__ import annotations

from collections.abc import Callable, Iterator
from contextlib import contextmanager
from pathlib import Path
from typing import Any, TypeVar

from registry.storage.database import Database, open_database

T = TypeVar("T")


@contextmanager
def _handle(registry: Database | str) -> Iterator[Database]:
    """The handle given, or one opened on the location (without the schema check) and closed."""
    if isinstance(registry, Database):
        yield registry
        return
    database = open_database(registry, must_exist=True)
    try:
        yield database
    finally:
        database.close()


def _on(registry: Database | str, run: Callable[[Database], T]) -> T:
    with _handle(registry) as database:
        return run(database)


def backup(
    registry: Database | str, dest: str | Path, *, overwrite: bool = False
) -> dict[str, Any]:
    """Copy a SQLite registry to ``dest`` (a file, or a folder for a time-stamped name) while
    others keep working; the copy is checked before it takes its name."""
    from registry.admin.backup import backup as run

    return _on(registry, lambda database: run(database, dest, overwrite=overwrite))


def restore(db: str, source: str | Path, *, force: bool = False) -> dict[str, Any]:
    """Replace the registry at ``db`` with a verified backup (an existing one only with
    ``force``, after a safety backup of it)."""
    from registry.admin.backup import restore as run

    return run(db, source, force=force)


def verify(registry: Database | str, *, anchor: str | None = None) -> dict[str, Any]:
    """Integrity, foreign keys, schema, history chain (reaching ``anchor``, the
    ``REVISION:HASH`` a user kept from :func:`history_anchor` when given), the history
    accounting for every row, finite numbers, and every value against its text; ``ok`` is
    False when any check finds a problem."""
    from registry.admin.verify import verify as run

    return _on(registry, lambda database: run(database, anchor=anchor))


def history_anchor(registry: Database | str) -> str | None:
    """The head of the history as ``REVISION:HASH``: keep it somewhere safe, and give it to
    :func:`verify` later to prove no revision was removed since (None for an empty history)."""
    from registry.admin.tamper import anchor

    def read(database: Database) -> str | None:
        with database.read() as conn:
            return anchor(conn)

    return _on(registry, read)


def schema_state(db: str) -> dict[str, Any]:
    """The registry's schema version, the head this code knows, and what is pending."""
    from registry.admin.upgrade import schema_state as run

    return run(db)


def upgrade_schema(
    db: str, *, backup_dir: str | Path | None = None, no_backup: bool = False
) -> dict[str, Any]:
    """Bring the schema to the head, taking a backup first; a no-op when already there."""
    from registry.admin.upgrade import upgrade as run

    return run(db, backup_dir=backup_dir, no_backup=no_backup)
