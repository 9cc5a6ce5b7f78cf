"""Schema migrations driven through Alembic's API with a Config built in code.

The migration scripts live in the top-level ``migrations/`` folder, which installs as the
package ``registry._migrations``; running from a source checkout finds the folder directly.
Alembic (and SQLAlchemy) are loaded only when a migration or a schema comparison runs.
"""

from __future__ import annotations

import io
import sys
from pathlib import Path
from typing import TYPE_CHECKING

from registry.storage.database import Database, head_revision, schema_revision
from registry.storage.schema import script_location

if TYPE_CHECKING:
    from alembic.config import Config

__all__ = ["alembic_head", "check", "current_revision", "head_revision", "known_revisions"]


def alembic_config(database: Database | None = None) -> Config:
    from alembic.config import Config

    cfg = Config()
    cfg.set_main_option("script_location", script_location())
    cfg.set_main_option("path_separator", "os")
    if database is not None:
        cfg.set_main_option("sqlalchemy.url", database.url.replace("%", "%%"))
    return cfg


def alembic_head() -> str:
    """The head as Alembic computes it (needed only when the scripts branch)."""
    from alembic.script import ScriptDirectory

    return ScriptDirectory.from_config(alembic_config()).get_current_head() or ""


def known_revisions() -> list[str]:
    """Every migration revision, oldest first."""
    from alembic.script import ScriptDirectory

    script = ScriptDirectory.from_config(alembic_config())
    return [r.revision for r in reversed(list(script.walk_revisions()))]


def current_revision(database: Database) -> str | None:
    """The revision stamped in the database (None for an empty one)."""
    return schema_revision(database)


def _run(database: Database, action: str, *args: object) -> None:
    from alembic import command

    cfg = alembic_config(database)
    cfg.stdout = io.StringIO()  # Alembic's own chatter ("No new upgrade operations …")
    with database.sqlalchemy_engine().begin() as conn:
        cfg.attributes["connection"] = conn
        getattr(command, action)(cfg, *args)


def upgrade(database: Database, target: str = "head") -> None:
    """Bring the schema to ``target``; each migration runs in its own transaction."""
    _run(database, "upgrade", target)


def downgrade(database: Database, target: str) -> None:
    _run(database, "downgrade", target)


def check(database: Database) -> None:
    """Raise if the models and the migration head have drifted apart (Alembic autogenerate)."""
    _run(database, "check")


def _main(argv: list[str]) -> None:
    """Developer entry: ``python -m registry.storage.migrate revision -m MSG`` autogenerates one."""
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
        with database.sqlalchemy_engine().begin() as conn:
            cfg.attributes["connection"] = conn
            command.revision(cfg, message=args.message, autogenerate=True)
        database.close()


if __name__ == "__main__":
    _main(sys.argv[1:])
