"""Alembic environment: runs on the connection fluxledger hands over (SQLite or PostgreSQL)."""

import warnings

from alembic import context
from sqlalchemy.exc import SAWarning

from registry.storage.models import Base

config = context.config
target_metadata = Base.metadata

# PostgreSQL-only objects of the RDKit cartridge (migration 0002): not in the models on purpose
_SERVER_ONLY = {
    ("column", "mol"),
    ("index", "ix_compound_mol"),
    ("index", "ix_compound_mol_missing"),
}


def include_object(obj, name, type_, reflected, compare_to) -> bool:  # type: ignore[no-untyped-def]
    """Leave the cartridge's column and indexes out of autogenerate/check comparisons."""
    if reflected and compare_to is None and (type_, name) in _SERVER_ONLY:
        table = getattr(obj, "table", None)
        return table is not None and table.name != "compound"
    return True


def run_migrations_online() -> None:
    connection = config.attributes.get("connection")
    if connection is None:  # pragma: no cover - we always pass a connection
        raise RuntimeError("fluxledger migrations run through registry.storage.migrate only")
    context.configure(
        connection=connection,
        target_metadata=target_metadata,
        render_as_batch=connection.dialect.name == "sqlite",
        compare_type=True,
        include_object=include_object,
    )
    with warnings.catch_warnings(), context.begin_transaction():
        # reflection does not know the cartridge's column type; the column is excluded above
        warnings.filterwarnings("ignore", "Did not recognize type 'mol'", SAWarning)
        context.run_migrations()


run_migrations_online()
