"""Migration 0008 (the raw data of 2D-exchange, transfer and time-course measurements) runs up
and down on SQLite and PostgreSQL and keeps every row; an upgraded registry takes raw data."""

from __future__ import annotations

from test_migrations_conventions import _columns, empty, one_measurement  # noqa: F401

from registry import api
from registry.storage import migrate
from registry.storage.database import Database

pytest_plugins = ("conftest_pg",)

NEW_COLUMNS = {"mixing_text", "mixing_json", "volumes_text", "volumes_json", "volume_err",
               "volume_err_text", "populations_text", "populations_json", "site_names",
               "ss_ratio", "ss_ratio_err", "ss_ratio_text", "t1_s", "t1_err_s", "t1_text",
               "t1_kind", "course_text", "course_json", "course_quantity", "x_eq",
               "x_eq_text"}  # fmt: skip


def test_0008_up_and_down_keeps_rows(empty: Database) -> None:  # noqa: F811 (the fixture)
    database = empty
    migrate.upgrade(database, "0007")
    assert not NEW_COLUMNS & _columns(database)
    one_measurement(database, "2d-exchange", dg_kj_mol=70.0)
    migrate.upgrade(database, "0008")
    assert _columns(database) >= NEW_COLUMNS
    with database.read() as conn:
        row = conn.record("SELECT volumes_json, ss_ratio, course_json, dg_kj_mol FROM measurement")
    assert row == {"volumes_json": None, "ss_ratio": None, "course_json": None, "dg_kj_mol": 70.0}
    migrate.downgrade(database, "0007")
    assert not NEW_COLUMNS & _columns(database)
    with database.read() as conn:
        assert conn.scalar("SELECT dg_kj_mol FROM measurement") == 70.0
    migrate.upgrade(database)
    assert migrate.current_revision(database) == migrate.head_revision()
    mid = api.add_measurement(
        database,
        {"method": "saturation-transfer", "compound": "X-2", "ss_ratio": "0.5", "t1": "2 s"},
        actor="tester",
    )
    assert api.get_measurement(database, mid)["raw_data"]["t1_kind"] == "apparent"
