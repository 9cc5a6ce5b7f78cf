"""Migration 0009 (how each rate point was fitted) runs up and down on SQLite and PostgreSQL
and keeps every row; an upgraded registry stores fit records."""

from __future__ import annotations

from sqlalchemy import inspect, text
from test_migrations_conventions import empty, one_measurement  # noqa: F401

from registry import api
from registry.storage import migrate
from registry.storage.database import Database

pytest_plugins = ("conftest_pg",)


def _rate_columns(database: Database) -> set[str]:
    return {c["name"] for c in inspect(database.sqlalchemy_engine()).get_columns("rate_point")}


def test_0009_up_and_down_keeps_rows(empty: Database) -> None:  # noqa: F811 (the fixture)
    database = empty
    migrate.upgrade(database, "0008")
    assert "fit_json" not in _rate_columns(database)
    one_measurement(database, "lineshape")
    with database.sqlalchemy_engine().begin() as sa:
        sa.execute(text("INSERT INTO rate_point (measurement_id, t_k, t_text, k_per_s, k_text) "
                        "VALUES (100, 300.0, '300 K', 12.5, '12.5 s-1')"))  # fmt: skip
    migrate.upgrade(database, "0009")
    assert "fit_json" in _rate_columns(database)
    with database.read() as conn:
        assert conn.record("SELECT k_per_s, fit_json FROM rate_point") == {
            "k_per_s": 12.5, "fit_json": None
        }  # fmt: skip
    migrate.downgrade(database, "0008")
    assert "fit_json" not in _rate_columns(database)
    with database.read() as conn:
        assert conn.scalar("SELECT k_text FROM rate_point") == "12.5 s-1"
    migrate.upgrade(database)
    assert migrate.current_revision(database) == migrate.head_revision()
    api.add_rate_points(database, 100, [{"t_k": 310.0, "k_per_s": 30.0, "fit_json": {"a": 1}}])
    with database.read() as conn:
        assert conn.column("SELECT fit_json FROM rate_point ORDER BY id") == [None, '{"a":1}']
