"""The same registry on PostgreSQL: migrations, commands, history chain and concurrent writers."""

from __future__ import annotations

import json
import threading
from pathlib import Path

import pytest
from sqlalchemy import inspect
from typer.testing import CliRunner

from registry import api
from registry.record.entry import EntryInput
from registry.storage import audit, migrate
from registry.storage.database import open_database, to_url

pytest_plugins = ("conftest_pg",)

# Invented demo measurements on real structures (N,N-dimethylformamide, N,N-dimethylacetamide).
ADDS = [
    [
        "add",
        "--method",
        "coalescence",
        "--smiles",
        "CN(C)C=O",
        "--compound",
        "DMF",
        "--process",
        "bond-rotation",
        "--solvent",
        "CDCl3",
        "--field",
        "400 MHz",
        "--tc",
        "-12 °C",
        "--dnu",
        "24 Hz",
    ],
    [
        "add",
        "--method",
        "lineshape",
        "--smiles",
        "CN(C)C(C)=O",
        "--compound",
        "DMA",
        "--process",
        "bond-rotation",
        "--dg",
        "18.1 kcal/mol",
        "--dg-t",
        "300 K",
    ],
]


def test_plain_postgresql_urls_use_psycopg3() -> None:
    assert to_url("postgresql://u@h:5432/db") == "postgresql+psycopg://u@h:5432/db"
    assert to_url("postgres://u@h/db") == "postgresql+psycopg://u@h/db"
    assert to_url("postgresql+psycopg://u@h/db") == "postgresql+psycopg://u@h/db"


@pytest.mark.postgres
def test_migrations_run_both_ways_on_postgresql(pg_url: str) -> None:
    database = open_database(pg_url, must_exist=False)
    try:
        migrate.upgrade(database)
        assert migrate.current_revision(database) == migrate.head_revision()
        migrate.check(database)  # models and migrations agree (the cartridge column is excluded)
        migrate.downgrade(database, "base")
        assert migrate.current_revision(database) is None
        with database.sqlalchemy_engine().connect() as conn:  # the schema as Alembic sees it
            assert set(inspect(conn).get_table_names()) <= {"alembic_version"}
        migrate.upgrade(database)
        with database.read() as conn:
            solvents = conn.scalar("SELECT count(*) FROM solvent")
        assert solvents and solvents >= 15
    finally:
        database.close()


@pytest.mark.postgres
def test_same_commands_same_answers_on_sqlite_and_postgresql(pg_url: str, tmp_path: Path) -> None:
    from registry.cli.main import app

    runner = CliRunner()
    outputs = {}
    for backend, db in (("sqlite", str(tmp_path / "r.sqlite")), ("postgresql", pg_url)):
        init = runner.invoke(app, ["--db", db, "init"])
        assert init.exit_code == 0, init.stderr
        for args in ADDS:
            added = runner.invoke(app, ["--db", db, *args])
            assert added.exit_code == 0, added.stderr
        listed = runner.invoke(app, ["--db", db, "list", "--json"])
        shown = runner.invoke(app, ["--db", db, "show", "2", "--json"])
        info = runner.invoke(app, ["--db", db, "info", "--json"])
        assert listed.exit_code == shown.exit_code == info.exit_code == 0
        record = json.loads(shown.stdout)
        for key in ("entered_at", "updated_at", "uid"):  # times and random ids differ
            record.pop(key, None)
        record["compound"].pop("created_at", None)
        outputs[backend] = (json.loads(listed.stdout), record, json.loads(info.stdout)["counts"])
        assert json.loads(info.stdout)["backend"] == backend
    assert outputs["sqlite"] == outputs["postgresql"]
    assert outputs["postgresql"][0][0]["compound"] == "DMF"


@pytest.mark.postgres
def test_history_chain_detects_an_edit_on_postgresql(pg_url: str) -> None:
    api.init_registry(pg_url)
    database = api.open_registry(pg_url)
    try:
        for label in ("DMF", "DMA", "DMF"):
            api.add_measurement(
                database,
                EntryInput(method="lineshape", compound=label, dg="70 kJ/mol", dg_t="298 K"),
                actor="tester",
            )
        with database.read() as conn:
            assert audit.verify_chain(conn) == []
        database.write(
            lambda conn: conn.execute("UPDATE revision SET actor = 'someone' WHERE id = 2")
        )
        with database.read() as conn:
            problems = audit.verify_chain(conn)
        assert problems and problems[0].startswith("revision 2: content does not match")
    finally:
        database.close()


@pytest.mark.postgres
def test_concurrent_writers_queue_and_keep_the_chain(pg_url: str) -> None:
    """Four writers adding the same new compound at once: no unique-key race, an intact chain."""
    api.init_registry(pg_url)
    errors: list[BaseException] = []

    def writer(n: int) -> None:
        database = api.open_registry(pg_url)
        try:
            for i in range(5):
                api.add_measurement(
                    database,
                    EntryInput(
                        method="coalescence",
                        compound="DMF",
                        smiles="CN(C)C=O",
                        tc=f"{250 + i} K",
                        dnu=f"{20 + n} Hz",
                        field="400 MHz",
                    ),
                    actor=f"writer{n}",
                )
        except BaseException as exc:  # collected and re-raised in the main thread
            errors.append(exc)
        finally:
            database.close()

    threads = [threading.Thread(target=writer, args=(n,)) for n in range(4)]
    for t in threads:
        t.start()
    for t in threads:
        t.join()
    assert errors == []
    database = api.open_registry(pg_url)
    try:
        info = api.registry_info(database)
        assert info["counts"]["measurements"] == 20
        assert info["counts"]["compounds"] == 1
        assert info["counts"]["revisions"] == 20
        with database.read() as conn:
            assert audit.verify_chain(conn) == []
    finally:
        database.close()
