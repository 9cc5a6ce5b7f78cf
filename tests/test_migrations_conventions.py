"""Migration 0005 (rate-constant conventions, temperature calibration, water apart from D2O)
runs up and down on SQLite and PostgreSQL, keeps every row and corrects only seed values.

Check values: ordinary water melts at 0 °C (273.15 K) — 0.00 °C at 1 atm on ITS-90, CRC
Handbook of Chemistry and Physics, fixed points of water; heavy water D2O melts at 3.82 °C
(CRC Handbook, properties of D2O; from memory); DMSO-d6 at 20.2 °C (supplier data sheet; from
memory), not the parent DMSO's 18.5 °C (Dictionary of Organic Compounds).
"""

from __future__ import annotations

from collections.abc import Iterator
from datetime import UTC, datetime
from pathlib import Path

import pytest
from sqlalchemy import inspect, text

from registry.record.vocab import SEED_CORRECTIONS
from registry.storage import migrate
from registry.storage.database import Database, open_database

pytest_plugins = ("conftest_pg",)

NEW_COLUMNS = {"k_convention", "path_degeneracy", "kappa", "reaction_order", "concentration_m",
               "dg_direction", "t_calibration", "t_calibration_text", "t_calibration_err_k",
               "dh_ds_corr"}  # fmt: skip


@pytest.fixture(params=["sqlite", pytest.param("postgres", marks=pytest.mark.postgres)])
def empty(request: pytest.FixtureRequest, tmp_path: Path) -> Iterator[Database]:
    if request.param == "sqlite":
        location = str(tmp_path / "m.sqlite")
    else:
        location = request.getfixturevalue("pg_url")
    database = open_database(location, must_exist=False)
    yield database
    database.close()


def one_measurement(database: Database, method: str, **values: object) -> None:
    """Compound 100 and measurement 100 (``method``, extra ``values``) written in SQL, as an
    older schema holds them (invented)."""
    now = datetime(2026, 1, 1, tzinfo=UTC)
    names = "".join(f", {k}" for k in values)
    marks = "".join(f", :{k}" for k in values)
    with database.sqlalchemy_engine().begin() as sa:
        sa.execute(text("INSERT INTO compound (id, label, structure_ok, created_at) "
                        "VALUES (100, 'X-1', :ok, :now)"), {"ok": True, "now": now})  # fmt: skip
        sa.execute(
            text("INSERT INTO measurement (id, compound_id, method, status, entered_by, "
                 f"entered_at, uid{names}) VALUES (100, 100, :method, 'draft', 'tester', :now, "
                 f"'u1'{marks})"),
            {"now": now, "method": method, **values},
        )  # fmt: skip


def _columns(database: Database) -> set[str]:
    return {c["name"] for c in inspect(database.sqlalchemy_engine()).get_columns("measurement")}


def _at_0004_with_rows(database: Database) -> None:
    """A registry at 0004 holding a 'water' sample linked to D2O (the old alias) and the old
    seed melting point of DMSO-d6."""
    migrate.upgrade(database, "0004")
    now = datetime(2026, 1, 1, tzinfo=UTC)
    with database.sqlalchemy_engine().begin() as sa:
        # the seed runs with today's table: make the rows what the older seed wrote
        sa.execute(text("DELETE FROM solvent WHERE name = 'water'"))
        for name, (mp_c, bp_c, aliases) in SEED_CORRECTIONS.items():
            sa.execute(
                text("UPDATE solvent SET mp_k = :mp, bp_k = :bp, aliases = :aliases "
                     "WHERE name = :name"),
                {"mp": round(mp_c + 273.15, 2), "bp": round(bp_c + 273.15, 2),
                 "aliases": aliases, "name": name},
            )  # fmt: skip
        d2o = sa.execute(text("SELECT id FROM solvent WHERE name = 'deuterium oxide'")).scalar()
        sa.execute(
            text("INSERT INTO compound (id, label, structure_ok, created_at) "
                 "VALUES (1, 'W-1', :ok, :now)"),
            {"ok": True, "now": now},
        )  # fmt: skip
        for mid, solvent_text in ((1, "water"), (2, "D2O")):
            sa.execute(
                text(
                    "INSERT INTO measurement (id, compound_id, method, status, entered_by, "
                    "entered_at, solvent_id, solvent_text, uid) VALUES (:id, 1, 'coalescence', "
                    "'draft', 'tester', :now, :d2o, :text, :uid)"
                ),
                {"id": mid, "now": now, "d2o": d2o, "text": solvent_text, "uid": f"u{mid}"},
            )


def test_0005_up_and_down(empty: Database) -> None:
    database = empty
    _at_0004_with_rows(database)
    with database.read() as conn:
        old_mp = conn.scalar("SELECT mp_k FROM solvent WHERE name = 'dimethyl sulfoxide-d6'")
    assert old_mp == pytest.approx(18.5 + 273.15)
    assert not NEW_COLUMNS & _columns(database)

    migrate.upgrade(database)
    assert _columns(database) >= NEW_COLUMNS
    with database.read() as conn:
        solvents = dict(conn.rows("SELECT name, mp_k FROM solvent"))
        linked = dict(conn.rows(
            "SELECT m.solvent_text, s.name FROM measurement m JOIN solvent s ON s.id = m.solvent_id"
        ))  # fmt: skip
        conventions = conn.column("SELECT k_convention FROM measurement ORDER BY id")
    assert solvents["water"] == pytest.approx(273.15)
    assert solvents["deuterium oxide"] == pytest.approx(3.82 + 273.15)
    assert solvents["dimethyl sulfoxide-d6"] == pytest.approx(20.2 + 273.15)
    assert linked == {"water": "water", "D2O": "deuterium oxide"}
    assert conventions == [None, None]  # unspecified, never guessed

    migrate.downgrade(database, "0004")
    assert not NEW_COLUMNS & _columns(database)
    with database.read() as conn:
        assert conn.scalar("SELECT count(*) FROM measurement") == 2
    migrate.upgrade(database)
    assert migrate.current_revision(database) == migrate.head_revision()


def test_a_changed_seed_value_is_kept(empty: Database) -> None:
    database = empty
    migrate.upgrade(database, "0004")
    with database.sqlalchemy_engine().begin() as sa:
        sa.execute(text("UPDATE solvent SET mp_k = 292.0 WHERE name = 'dimethyl sulfoxide-d6'"))
    migrate.upgrade(database)
    with database.read() as conn:
        mp = conn.scalar("SELECT mp_k FROM solvent WHERE name = 'dimethyl sulfoxide-d6'")
    assert mp == pytest.approx(292.0)  # the group's own value, not the new seed
