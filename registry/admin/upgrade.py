"""The registry's schema version and its upgrade (a SQLite registry is backed up first)."""

from __future__ import annotations

from pathlib import Path
from typing import Any

from registry.admin.backup import backup, backup_target, sqlite_file
from registry.errors import DatabaseError, UsageError
from registry.storage import migrate
from registry.storage.database import head_revision, open_database, schema_revision


def schema_state(db: str) -> dict[str, Any]:
    """The schema version of a registry, the head this fluxledger knows, and what is pending."""
    database = open_database(db, must_exist=True)
    try:
        current = schema_revision(database)
    finally:
        database.close()
    known = migrate.known_revisions()
    head = head_revision()
    pending = known[known.index(current) + 1 :] if current in known else []
    if current is None:
        pending = known
    return {
        "database": database.name,
        "current": current,
        "head": head,
        "pending": pending,
        "known": current is None or current in known,
    }


def upgrade(
    db: str, *, backup_dir: str | Path | None = None, no_backup: bool = False
) -> dict[str, Any]:
    """Bring the schema to the head, taking a backup first; a no-op when already there."""
    database = open_database(db, must_exist=True)
    try:
        before = schema_revision(database)
        head = head_revision()
        known = migrate.known_revisions()
        if before is None:
            raise DatabaseError(
                f"{database.name} has no fluxledger schema; create one with 'fluxledger init'"
            )
        if before not in known:
            raise DatabaseError(
                f"the registry's schema {before} is unknown to this fluxledger (made by a newer "
                "version?); upgrade fluxledger instead"
            )
        result: dict[str, Any] = {
            "database": database.name,
            "from": before,
            "to": head,
            "applied": known[known.index(before) + 1 :],
            "backup": None,
        }
        if before == head:
            return result
        if not no_backup:
            if not database.is_sqlite:
                raise UsageError(
                    "back the server database up with its own tools (pg_dump) first, then "
                    "upgrade without a backup of ours (no_backup)"
                )
            path = sqlite_file(database, "backup")
            folder = Path(backup_dir).expanduser() if backup_dir else path.parent
            target = backup_target(folder, path, f"before-upgrade-{before}")
            result["backup"] = backup(database, target)["backup"]
        migrate.upgrade(database)
        result["to"] = schema_revision(database)
        return result
    finally:
        database.close()
