"""Alembic environment: runs on the connection fluxledger hands over (SQLite or PostgreSQL)."""

from alembic import context

from registry.models import Base

config = context.config
target_metadata = Base.metadata


def run_migrations_online() -> None:
    connection = config.attributes.get("connection")
    if connection is None:  # pragma: no cover - we always pass a connection
        raise RuntimeError("fluxledger migrations run through registry.migrate only")
    context.configure(
        connection=connection,
        target_metadata=target_metadata,
        render_as_batch=connection.dialect.name == "sqlite",
        compare_type=True,
    )
    with context.begin_transaction():
        context.run_migrations()


run_migrations_online()
