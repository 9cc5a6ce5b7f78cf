"""Schema migrations driven through Alembic's API with a Config built in code.

The migration scripts live in the top-level ``migrations/`` folder, which installs as the
package ``registry._migrations``; running from a source checkout finds the folder directly.
"""

from __future__ import annotations

import sys
from pathlib import Path
from typing import TYPE_CHECKING

from sqlalchemy import inspect, text

from registry.storage.database import Database
from registry.storage.schema import script_location, scripts_head

if TYPE_CHECKING:  # Alembic is loaded only when a migration actually runs (fast start-up)
    from alembic.config import Config


def alembic_config(database: Database | None = None) -> Config:
    from alembic.config import Config

    cfg = Config()
    cfg.set_main_option("script_location", script_location())
    cfg.set_main_option("path_separator", "os")
    if database is not None:
        cfg.set_main_option("sqlalchemy.url", database.url.replace("%", "%%"))
    return cfg


def head_revision() -> str:
    """The newest revision: from the scripts as text (no Alembic) unless they branch."""
    return scripts_head() or _alembic_head()


def _alembic_head() -> str:
    from alembic.script import ScriptDirectory

    return ScriptDirectory.from_config(alembic_config()).get_current_head() or ""


def current_revision(database: Database) -> str | None:
    """The revision stamped in the database (None for an empty one), read with plain SQL."""
    with database.engine.connect() as conn:
        if not inspect(conn).has_table("alembic_version"):
            return None
        return conn.execute(text("SELECT version_num FROM alembic_version")).scalar()


def upgrade(database: Database, target: str = "head") -> None:
    """Bring the schema to ``target``; each migration runs in its own transaction."""
    from alembic import command

    cfg = alembic_config(database)
    with database.engine.begin() as conn:
        cfg.attributes["connection"] = conn
        command.upgrade(cfg, target)


def downgrade(database: Database, target: str) -> None:
    from alembic import command

    cfg = alembic_config(database)
    with database.engine.begin() as conn:
        cfg.attributes["connection"] = conn
        command.downgrade(cfg, target)


def check(database: Database) -> None:
    """Raise if the models and the migration head have drifted apart (Alembic autogenerate)."""
    from alembic import command

    cfg = alembic_config(database)
    with database.engine.begin() as conn:
        cfg.attributes["connection"] = conn
        command.check(cfg)


def _main(argv: list[str]) -> None:
    """Developer entry: ``python -m registry.storage.migrate revision -m MSG`` autogenerates a revision."""
    import argparse
    import tempfile

    from alembic import command

    from registry.storage.database import open_database

    parser = argparse.ArgumentParser(prog="python -m registry.storage.migrate")
    parser.add_argument("action", choices=["revision"])
    parser.add_argument("-m", "--message", required=True)
    args = parser.parse_args(argv)
    with tempfile.TemporaryDirectory() as tmp:
        database = open_database(str(Path(tmp) / "scratch.sqlite"), must_exist=False)
        upgrade(database)
        cfg = alembic_config(database)
        cfg.set_main_option(
            "script_location", str(Path(__file__).resolve().parents[2] / "migrations")
        )
        with database.engine.begin() as conn:
            cfg.attributes["connection"] = conn
            command.revision(cfg, message=args.message, autogenerate=True)


if __name__ == "__main__":
    _main(sys.argv[1:])
