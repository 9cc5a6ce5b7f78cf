"""Server-side motif screening with the RDKit PostgreSQL cartridge (when the server has it).

Why screen on the server: a department registry on PostgreSQL may hold far more compounds than
the client wants to pull over the network and parse. The cartridge keeps a ``mol`` column on
``compound`` with a GiST index over its substructure fingerprints, so a SMARTS query
(``mol @> qmol``) touches only the rows whose fingerprints can match.

Why the client still confirms every hit: the server's RDKit (the Debian cartridge) is older than
the RDKit installed with fluxledger, and aromaticity or SMARTS details can differ between
versions. The server's answer is therefore used only as a *screen*: compounds the server could
not read (``mol`` is NULL) are always returned as candidates, and callers confirm each candidate
with the client's RDKit, so results on PostgreSQL equal those on SQLite.

The column is not part of :mod:`registry.storage.models` (SQLite has no such type); migration
0002 adds it on PostgreSQL when the extension is available (that DDL runs on Alembic's
connection), and enabling server search adds it later if the cartridge is installed after the
registry was created. Everything else runs through :class:`~registry.storage.connection.Connection`.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from typing import TYPE_CHECKING, TypeVar

from registry.storage.connection import Connection, ServerConnection

if TYPE_CHECKING:  # what Alembic hands migration 0002
    from sqlalchemy.engine import Connection as AlembicConnection

T = TypeVar("T")

#: the extra column, indexes, trigger and function that the cartridge setup creates
MOL_COLUMN = "mol"
MOL_INDEX = "ix_compound_mol"
MISSING_INDEX = "ix_compound_mol_missing"
TRIGGER = "trg_compound_mol"
SAFE_MOL_FUNCTION = "fluxledger_safe_mol"
TRIGGER_FUNCTION = "fluxledger_compound_mol"

# mol_from_smiles() returns NULL for SMILES it cannot read; the exception block also turns a
# hard error inside the cartridge into NULL, so one odd structure never blocks a write.
_SETUP_SQL = (
    f"ALTER TABLE compound ADD COLUMN IF NOT EXISTS {MOL_COLUMN} mol",
    f"""
    CREATE OR REPLACE FUNCTION {SAFE_MOL_FUNCTION}(smiles text) RETURNS mol
    LANGUAGE plpgsql STABLE AS $$
    BEGIN
        IF smiles IS NULL THEN
            RETURN NULL;
        END IF;
        RETURN mol_from_smiles(smiles::cstring);
    EXCEPTION WHEN OTHERS THEN
        RETURN NULL;
    END
    $$
    """,
    f"""
    CREATE OR REPLACE FUNCTION {TRIGGER_FUNCTION}() RETURNS trigger
    LANGUAGE plpgsql AS $$
    BEGIN
        NEW.{MOL_COLUMN} := {SAFE_MOL_FUNCTION}(NEW.smiles_canonical);
        RETURN NEW;
    END
    $$
    """,
    f"DROP TRIGGER IF EXISTS {TRIGGER} ON compound",
    f"""
    CREATE TRIGGER {TRIGGER} BEFORE INSERT OR UPDATE OF smiles_canonical ON compound
    FOR EACH ROW EXECUTE FUNCTION {TRIGGER_FUNCTION}()
    """,
    f"UPDATE compound SET {MOL_COLUMN} = {SAFE_MOL_FUNCTION}(smiles_canonical)",
    f"CREATE INDEX IF NOT EXISTS {MOL_INDEX} ON compound USING gist ({MOL_COLUMN})",
    f"CREATE INDEX IF NOT EXISTS {MISSING_INDEX} ON compound (id) WHERE {MOL_COLUMN} IS NULL",
)

_TEARDOWN_SQL = (
    f"DROP TRIGGER IF EXISTS {TRIGGER} ON compound",
    f"DROP FUNCTION IF EXISTS {TRIGGER_FUNCTION}()",
    f"DROP INDEX IF EXISTS {MISSING_INDEX}",
    f"DROP INDEX IF EXISTS {MOL_INDEX}",
    f"ALTER TABLE compound DROP COLUMN IF EXISTS {MOL_COLUMN}",
    f"DROP FUNCTION IF EXISTS {SAFE_MOL_FUNCTION}(text)",
)


@dataclass(frozen=True)
class CartridgeStatus:
    """What the server offers for motif search, for ``server-search`` and ``info``-like output."""

    backend: str
    extension_available: bool
    extension_installed: bool
    cartridge_version: str | None
    mol_column: bool
    molecules_indexed: int | None
    molecules_unreadable: int | None

    @property
    def active(self) -> bool:
        return self.extension_installed and self.mol_column

    def as_dict(self) -> dict[str, object]:
        return {
            "backend": self.backend,
            "extension_available": self.extension_available,
            "extension_installed": self.extension_installed,
            "cartridge_version": self.cartridge_version,
            "mol_column": self.mol_column,
            "server_search_active": self.active,
            "molecules_indexed": self.molecules_indexed,
            "molecules_unreadable_on_server": self.molecules_unreadable,
        }


def _conn(conn: Connection | AlembicConnection) -> Connection:
    """A :class:`Connection` (Alembic's migration 0002 hands over its SQLAlchemy connection)."""
    return conn if isinstance(conn, Connection) else ServerConnection(conn)


def _is_postgresql(conn: Connection) -> bool:
    return conn.dialect == "postgresql"


def extension_installed(conn: Connection) -> bool:
    if not _is_postgresql(conn):
        return False
    return bool(conn.scalar("SELECT 1 FROM pg_extension WHERE extname = 'rdkit'"))


def extension_available(conn: Connection) -> bool:
    """The cartridge's files are on the server (it may still need ``CREATE EXTENSION``)."""
    if not _is_postgresql(conn):
        return False
    return bool(conn.scalar("SELECT 1 FROM pg_available_extensions WHERE name = 'rdkit'"))


def mol_column_exists(conn: Connection) -> bool:
    """Whether ``compound.mol`` exists in the schema the connection works in."""
    if not _is_postgresql(conn):
        return False
    return bool(
        conn.scalar(
            "SELECT 1 FROM information_schema.columns WHERE table_schema = current_schema() "
            "AND table_name = 'compound' AND column_name = :col",
            {"col": MOL_COLUMN},
        )
    )


def has_server_search(conn: Connection) -> bool:
    """True when ``find`` can screen on the server: PostgreSQL, cartridge, ``mol`` column."""
    return _is_postgresql(conn) and extension_installed(conn) and mol_column_exists(conn)


def _guarded(conn: Connection, name: str, statements: Callable[[Connection], T]) -> T | None:
    """Run ``statements(conn)`` inside a savepoint: a server error rolls back to it (the
    transaction goes on) and gives None."""
    conn.execute(f"SAVEPOINT {name}")
    try:
        result = statements(conn)
    except Exception:  # the server refused (no right, a pattern its RDKit cannot read …)
        conn.execute(f"ROLLBACK TO SAVEPOINT {name}")
        return None
    conn.execute(f"RELEASE SAVEPOINT {name}")
    return result


def try_create_extension(conn: Connection | AlembicConnection) -> bool:
    """``CREATE EXTENSION rdkit`` if the server has it and we may; False (no error) otherwise.

    Creating this extension usually needs a superuser; a department server's administrator
    may have done it already, or may do it later (then enable server search).
    """
    conn = _conn(conn)
    if extension_installed(conn):
        return True
    if not extension_available(conn):
        return False
    done = _guarded(
        conn, "flx_extension", lambda c: c.execute("CREATE EXTENSION IF NOT EXISTS rdkit")
    )
    return done is not None


def install_mol_column(conn: Connection | AlembicConnection) -> bool:
    """Add the ``mol`` column, its trigger and GiST index (idempotent); False when impossible."""
    conn = _conn(conn)
    if not _is_postgresql(conn) or not try_create_extension(conn):
        return False
    for statement in _SETUP_SQL:
        conn.execute(statement)
    return True


def remove_mol_column(conn: Connection | AlembicConnection) -> None:
    """Undo :func:`install_mol_column` (leaves the extension itself alone: others may use it)."""
    conn = _conn(conn)
    if not _is_postgresql(conn):
        return
    for statement in _TEARDOWN_SQL:
        conn.execute(statement)


def status(conn: Connection) -> CartridgeStatus:
    """What the connected database offers for server-side motif search."""
    if not _is_postgresql(conn):
        return CartridgeStatus(conn.dialect, False, False, None, False, None, None)
    installed = extension_installed(conn)
    version = None
    if installed:
        version = conn.scalar("SELECT extversion FROM pg_extension WHERE extname = 'rdkit'")
    column = mol_column_exists(conn)
    indexed = unreadable = None
    if column:
        indexed, unreadable = conn.first(
            f"SELECT count({MOL_COLUMN}), count(*) - count({MOL_COLUMN}) FROM compound "
            "WHERE smiles_canonical IS NOT NULL"
        ) or (0, 0)
    return CartridgeStatus(
        backend="postgresql",
        extension_available=extension_available(conn),
        extension_installed=installed,
        cartridge_version=version,
        mol_column=column,
        molecules_indexed=indexed,
        molecules_unreadable=unreadable,
    )


def server_screen(conn: Connection, smarts: str, *, smiles: bool = False) -> list[int] | None:
    """Candidate compound ids for a SMARTS, screened by the server; None to fall back.

    The list holds every compound whose server-side molecule matches the query plus every
    compound the server could not read (``mol`` NULL: unsanitizable structures, missing SMILES),
    sorted by id. ``None`` means "no server-side screen here": SQLite, no cartridge, no ``mol``
    column, or a pattern the server's (older) RDKit cannot read or match. With ``smiles=True``
    the text is a SMILES read as a substructure query (as the client reads a SMILES query).
    Callers must confirm the candidates with the client's RDKit (see the module docstring).
    """
    if not has_server_search(conn):
        return None
    reader = "mol_from_smiles" if smiles else "qmol_from_smarts"
    pattern = f"{reader}(CAST(:pattern AS cstring))"

    def screen(c: Connection) -> list[int] | None:
        if not c.scalar(f"SELECT {pattern} IS NOT NULL", {"pattern": smarts}):
            return None
        # the client ignores stereo unless asked and then checks it itself: a server set to
        # match chirality could drop true hits, so the screen never does
        c.execute("SET LOCAL rdkit.do_chiral_sss = off")
        return [
            int(i)
            for i in c.column(
                f"SELECT id FROM compound WHERE {MOL_COLUMN} @> {pattern} "
                f"UNION SELECT id FROM compound WHERE {MOL_COLUMN} IS NULL ORDER BY id",
                {"pattern": smarts},
            )
        ]

    return _guarded(conn, "flx_screen", screen)
