"""The data layer on PostgreSQL: the same SQL texts, the same answers as on SQLite."""

from __future__ import annotations

from datetime import UTC, datetime
from pathlib import Path

import pytest

from registry.storage import changes
from registry.storage import database as store

pytest_plugins = ("conftest_pg",)
pytestmark = pytest.mark.postgres

AT = datetime(2026, 3, 4, 5, 6, 7, 8, tzinfo=UTC)


@pytest.fixture(params=["sqlite", "postgresql"])
def both(request: pytest.FixtureRequest, tmp_path: Path) -> store.Database:
    if request.param == "sqlite":
        location = str(tmp_path / "r.sqlite")
    else:
        location = request.getfixturevalue("pg_url")
    database = store.create_registry(location)
    yield database
    database.close()


def test_new_ids_many_keys_and_typed_values(both: store.Database) -> None:
    rows = [{"label": f"K{i}", "created_at": AT, "structure_ok": i % 2 == 0} for i in range(700)]
    ids = both.write(lambda c: c.insert_many("compound", rows, new_ids=True))
    one = both.write(
        lambda c: c.insert("compound", {"label": "one", "created_at": AT}, returning="id")
    )
    assert ids == list(range(1, 701)) and one == 701
    with both.read() as conn:
        found = conn.rows_where_in(
            "SELECT id, label, created_at, structure_ok FROM compound WHERE id > :low",
            "label",
            ["K0", "K1", "K699", "none", "one"],
            {"low": 0},
        )
        by_id = conn.records_where_in("SELECT id FROM compound WHERE 1 = 1", "id", range(690, 800))
    assert sorted(found) == [
        (1, "K0", AT, True), (2, "K1", AT, False), (700, "K699", AT, False), (701, "one", AT, True),
    ]  # fmt: skip
    assert len(by_id) == 12


def test_counters_move_on_both_backends(both: store.Database) -> None:
    both.write(lambda c: c.insert("compound", {"label": "a", "created_at": AT}))
    with both.read() as conn:
        before = changes.state(conn, ("structure", "listing"), ("compound",))
    both.write(lambda c: c.execute("UPDATE compound SET smiles_canonical = 'C'"))
    with both.read() as conn:
        after = changes.state(conn, ("structure", "listing"), ("compound",))
    assert after.counter("structure") > before.counter("structure")
    assert after.counter("listing") > before.counter("listing")
    assert after.table("compound") == before.table("compound")


def test_a_failed_write_leaves_nothing_on_both(both: store.Database) -> None:
    def work(conn):  # type: ignore[no-untyped-def]
        conn.insert("compound", {"label": "gone", "created_at": AT})
        raise RuntimeError("half-way")

    with pytest.raises(RuntimeError):
        both.write(work)
    with both.read() as conn:
        assert conn.scalar("SELECT count(*) FROM compound") == 0
