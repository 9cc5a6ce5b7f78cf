"""Create, open and describe a registry."""

from __future__ import annotations

from typing import Any

from registry.storage.database import (
    Database,
    create_registry,
    current_user,
    head_revision,
    schema_revision,
)
from registry.storage.database import open_registry as _open_registry

#: the tables ``info`` counts, in the order it shows them
_COUNTED = (
    ("compounds", "compound"),
    ("processes", "process"),
    ("measurements", "measurement"),
    ("coalescence_observations", "coalescence"),
    ("rate_points", "rate_point"),
    ("solvents", "solvent"),
    ("import_batches", "import_batch"),
    ("findings", "validation_finding"),
    ("revisions", "revision"),
)


def open_registry(db: str) -> Database:
    """Open an existing registry (a SQLite path or a server URL) at the current schema.

    Every action on a registry takes the handle this returns; close it with ``.close()`` (or
    let the process end). The few actions that work on a registry *not* at the current schema
    (``init_registry``, ``schema_state``, ``upgrade_schema``, ``restore``) take its location.
    """
    return _open_registry(db)


def init_registry(db: str) -> dict[str, Any]:
    """Create a registry (or bring an existing one to the current schema); say what it holds."""
    database = create_registry(db)
    try:
        return registry_info(database)
    finally:
        database.close()


def registry_info(database: Database) -> dict[str, Any]:
    """Which database, its schema version, and how many rows each main table holds."""
    counts_sql = ", ".join(f"(SELECT count(*) FROM {table})" for _, table in _COUNTED)
    with database.read() as conn:
        values = conn.first(f"SELECT {counts_sql}") or ()
        retracted = conn.scalar("SELECT count(*) FROM measurement WHERE status = 'retracted'")
    return {
        "database": database.name,
        "backend": database.backend,
        "schema_version": schema_revision(database),
        "schema_head": head_revision(),
        "counts": {name: int(n) for (name, _), n in zip(_COUNTED, values, strict=True)},
        "retracted_measurements": int(retracted),
        "warnings": list(database.warnings),
    }


def actor_name(actor: str | None) -> str:
    """The name recorded in the history: the one given, else the OS user."""
    return actor or current_user()
