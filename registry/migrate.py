"""Schema migrations driven through Alembic's API with a Config built in code.

The migration scripts live in the top-level ``migrations/`` folder, which installs as the
package ``registry._migrations``; running from a source checkout finds the folder directly.
"""

from __future__ import annotations

import sys
from pathlib import Path

from alembic import command
from alembic.config import Config
from alembic.runtime.migration import MigrationContext
from alembic.script import ScriptDirectory

from registry.store import Database


def script_location() -> str:
    """Where the migration scripts are, installed or in a checkout."""
    try:
        import registry._migrations as pkg

        return str(Path(pkg.__file__).parent)
    except ImportError:
        return str(Path(__file__).resolve().parent.parent / "migrations")


def alembic_config(database: Database | None = None) -> Config:
    cfg = Config()
    cfg.set_main_option("script_location", script_location())
    cfg.set_main_option("path_separator", "os")
    if database is not None:
        cfg.set_main_option("sqlalchemy.url", database.url.replace("%", "%%"))
    return cfg


def head_revision() -> str:
    return ScriptDirectory.from_config(alembic_config()).get_current_head() or ""


def current_revision(database: Database) -> str | None:
    with database.engine.connect() as conn:
        return MigrationContext.configure(conn).get_current_revision()


def upgrade(database: Database, target: str = "head") -> None:
    """Bring the schema to ``target``; each migration runs in its own transaction."""
    cfg = alembic_config(database)
    with database.engine.begin() as conn:
        cfg.attributes["connection"] = conn
        command.upgrade(cfg, target)


def downgrade(database: Database, target: str) -> None:
    cfg = alembic_config(database)
    with database.engine.begin() as conn:
        cfg.attributes["connection"] = conn
        command.downgrade(cfg, target)


def check(database: Database) -> None:
    """Raise if the models and the migration head have drifted apart (Alembic autogenerate)."""
    cfg = alembic_config(database)
    with database.engine.begin() as conn:
        cfg.attributes["connection"] = conn
        command.check(cfg)


def _main(argv: list[str]) -> None:
    """Developer entry: ``python -m registry.migrate revision -m MSG`` autogenerates a revision."""
    import argparse
    import tempfile

    from registry.store import open_database

    parser = argparse.ArgumentParser(prog="python -m registry.migrate")
    parser.add_argument("action", choices=["revision"])
    parser.add_argument("-m", "--message", required=True)
    args = parser.parse_args(argv)
    with tempfile.TemporaryDirectory() as tmp:
        database = open_database(str(Path(tmp) / "scratch.sqlite"), must_exist=False)
        upgrade(database)
        cfg = alembic_config(database)
        cfg.set_main_option(
            "script_location", str(Path(__file__).resolve().parent.parent / "migrations")
        )
        with database.engine.begin() as conn:
            cfg.attributes["connection"] = conn
            command.revision(cfg, message=args.message, autogenerate=True)


if __name__ == "__main__":
    _main(sys.argv[1:])
