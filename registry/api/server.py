"""Server registries: copy a registry to or from PostgreSQL, and the server-side motif screen."""

from __future__ import annotations

from collections.abc import Callable
from typing import TYPE_CHECKING, Any

from registry.errors import DatabaseError, UsageError
from registry.storage.database import Database

if TYPE_CHECKING:
    from registry.pg.copy import CopyReport


def migrate_to(
    database: Database,
    url: str,
    *,
    chunk_rows: int = 5000,
    progress: Callable[[str, int], None] | None = None,
) -> CopyReport:
    """Copy the whole registry into ``url`` (a PostgreSQL URL or a SQLite path; new or empty),
    keeping every id, then check the copy (row counts, contents, the history's hash chain).

    The report's ``ok`` says whether the copy matches; the source is never changed.
    """
    from registry.pg.copy import migrate_to as copy

    return copy(database, url, chunk_rows=chunk_rows, progress=progress)


def server_search_status(database: Database) -> dict[str, Any]:
    """Whether motif search is screened on the server (PostgreSQL + RDKit cartridge)."""
    from registry.pg import cartridge

    with database.read() as conn:
        return cartridge.status(conn).as_dict()


def enable_server_search(database: Database) -> dict[str, Any]:
    """Add the cartridge's molecule column, trigger and index; then the status.

    Needs PostgreSQL with the RDKit cartridge installed on the server (and the right to create
    the extension if it is not there yet).
    """
    from registry.pg import cartridge

    if database.is_sqlite:
        raise UsageError("server-side search needs a PostgreSQL registry; this is SQLite")
    if not database.write(cartridge.install_mol_column):
        raise DatabaseError(
            "the server has no usable RDKit cartridge: install the server package "
            "(Debian: postgresql-15-rdkit) and have an administrator run "
            "'CREATE EXTENSION rdkit' in this database, then try again"
        )
    return server_search_status(database)
