"""The one data layer: what it stores, how it reads many keys, its transactions and its messages.

Registries written by earlier versions went through SQLAlchemy Core; the layer must read them as
they are and write what Core would have written (timestamps as UTC text, booleans as 0/1), so a
registry stays readable by Alembic, ``migrate-to`` and older copies of fluxledger.
"""

from __future__ import annotations

import sqlite3
import threading
from datetime import UTC, datetime, timedelta, timezone
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from sqlalchemy import insert, select

from registry.errors import DatabaseError
from registry.storage import changes, connection
from registry.storage import database as store
from registry.storage.defaults import COLUMN_DEFAULTS
from registry.storage.models import Base, Compound

AT = datetime(2026, 3, 4, 5, 6, 7, 8, tzinfo=UTC)


def _compound(label: str, **extra: object) -> dict[str, object]:
    return {"label": label, "created_at": AT, **extra}


# ---------------------------------------------------------------- what is stored


def test_rows_written_here_read_back_through_sqlalchemy_as_core_wrote_them(
    database: store.Database,
) -> None:
    row = _compound("A", structure_ok=False, mol_binary=b"\0\1\xff")
    cid = database.write(lambda c: c.insert("compound", row, returning="id"))
    engine = database.sqlalchemy_engine()
    with engine.connect() as sa:
        core_id = sa.execute(
            insert(Compound).returning(Compound.id),
            _compound("B", structure_ok=False, mol_binary=b"\0\1\xff"),
        ).scalar_one()
        sa.commit()
        ours = sa.execute(
            select(Compound.created_at, Compound.structure_ok, Compound.mol_binary).where(
                Compound.id == cid
            )
        ).one()
        raw = sa.exec_driver_sql(
            "SELECT created_at, typeof(created_at), structure_ok, typeof(structure_ok) "
            "FROM compound ORDER BY id"
        ).all()
    assert ours.created_at.replace(tzinfo=UTC) == AT
    assert ours.structure_ok is False and ours.mol_binary == b"\0\1\xff"
    assert raw[0] == raw[1]  # the same text and type as SQLAlchemy Core stores
    assert core_id == cid + 1


def test_values_come_back_typed_on_sqlite(database: store.Database) -> None:
    database.write(lambda c: c.insert("compound", _compound("A")))
    with database.read() as conn:
        row = conn.record("SELECT created_at, structure_ok, label FROM compound")
    assert row == {"created_at": AT, "structure_ok": True, "label": "A"}
    assert row["created_at"].tzinfo is UTC  # aware, as PostgreSQL returns them


def test_missing_columns_take_the_model_defaults(database: store.Database) -> None:
    def work(conn: connection.Connection) -> int:
        cid = conn.insert("compound", {"label": "D-1", "created_at": AT}, returning="id")
        return conn.insert(
            "measurement",
            {"compound_id": cid, "method": "computed", "entered_by": "t", "entered_at": AT},
            returning="id",
        )

    mid = database.write(work)
    with database.read() as conn:
        assert conn.scalar("SELECT structure_ok FROM compound") is True
        assert conn.scalar("SELECT status FROM measurement WHERE id = :id", {"id": mid}) == "draft"


def test_the_defaults_table_is_the_models_defaults() -> None:
    from_models = {
        t.name: {c.key: c.default.arg for c in t.columns if c.default is not None}
        for t in Base.metadata.sorted_tables
    }
    assert {name: d for name, d in from_models.items() if d} == COLUMN_DEFAULTS


def test_many_rows_get_consecutive_ids_in_order(database: store.Database) -> None:
    database.write(lambda c: c.insert("compound", _compound("first")))
    rows = [_compound(f"M-{i}") for i in range(2500)]
    ids = database.write(lambda c: c.insert_many("compound", rows, new_ids=True))
    assert ids == list(range(2, 2502))
    with database.read() as conn:
        stored = dict(conn.rows("SELECT id, label FROM compound"))
    assert all(stored[i] == r["label"] for i, r in zip(ids, rows, strict=True))


def test_rows_of_different_shapes_are_refused(database: store.Database) -> None:
    rows = [{"label": "a", "created_at": AT}, {"label": "b"}]
    with pytest.raises(ValueError, match="same columns"):
        database.write(lambda c: c.insert_many("compound", rows))


text_values = st.text(min_size=0, max_size=40)
floats = st.floats(allow_nan=False, allow_infinity=False, width=64)
moments = st.datetimes(
    min_value=datetime(1900, 1, 1), max_value=datetime(2200, 1, 1), timezones=st.just(UTC)
)


@settings(max_examples=60, deadline=None)
@given(label=text_values, name=st.none() | text_values, charge=st.none() | st.integers(-9, 9),
       blob=st.none() | st.binary(max_size=64), at=moments, ok=st.booleans())  # fmt: skip
def test_round_trip_of_every_kind_of_value(
    tmp_path_factory: pytest.TempPathFactory,
    label: str, name: str | None, charge: int | None, blob: bytes | None, at: datetime, ok: bool,
) -> None:  # fmt: skip
    database = _fresh(tmp_path_factory.mktemp("rt"))
    try:
        row = {"label": label, "name": name, "net_charge": charge, "mol_binary": blob,
               "created_at": at, "structure_ok": ok}  # fmt: skip
        cid = database.write(lambda c: c.insert("compound", row, returning="id"))
        with database.read() as conn:
            back = conn.record(
                "SELECT label, name, net_charge, mol_binary, created_at, structure_ok "
                "FROM compound WHERE id = :id",
                {"id": cid},
            )
    finally:
        database.close()
    assert back == row


@settings(max_examples=40, deadline=None)
@given(value=floats)
def test_floats_keep_every_bit(tmp_path_factory: pytest.TempPathFactory, value: float) -> None:
    database = _fresh(tmp_path_factory.mktemp("fl"))
    try:
        database.write(
            lambda c: c.execute("UPDATE solvent SET mp_k = :v WHERE id = 1", {"v": value})
        )
        with database.read() as conn:
            assert conn.scalar("SELECT mp_k FROM solvent WHERE id = 1") == value
    finally:
        database.close()


_TEMPLATE: dict[str, Path] = {}


def _fresh(folder: Path) -> store.Database:
    """A new registry file (copied from one made once: migrations take a while)."""
    import shutil

    if "path" not in _TEMPLATE:
        template = folder.parent / "template.sqlite"
        store.create_registry(str(template)).close()
        _TEMPLATE["path"] = template
    path = folder / "r.sqlite"
    shutil.copy(_TEMPLATE["path"], path)
    return store.open_registry(str(path))


# ---------------------------------------------------------------- many keys


@pytest.fixture(params=["json", "bound lists"])
def key_style(request: pytest.FixtureRequest, monkeypatch: pytest.MonkeyPatch) -> str:
    """Both ways the keys can travel: one JSON array, or bound IN lists (SQLite without JSON)."""
    if request.param == "bound lists":
        monkeypatch.setattr(connection, "SQLITE_JSON", False)
        monkeypatch.setattr(connection, "IN_CHUNK", 3)  # several lists even for a few keys
    return str(request.param)


def test_rows_by_many_keys(database: store.Database, key_style: str) -> None:
    labels = [f"K{i}" for i in range(40)]
    database.write(lambda c: c.insert_many("compound", [_compound(x) for x in labels]))
    sql = "SELECT id, label FROM compound WHERE label != :skip"
    with database.read() as conn:
        assert conn.rows_where_in(sql, "label", [], {"skip": "K1"}) == []
        assert conn.rows_where_in(sql, "label", [None], {"skip": "K1"}) == []
        found = conn.rows_where_in(
            sql, "label", ["K0", "K1", "K3", "nope", None, "K3", "K39"], {"skip": "K1"}
        )
        by_id = conn.rows_where_in("SELECT label FROM compound WHERE 1 = 1", "id", range(1, 100))
    assert sorted(label for _, label in found) == ["K0", "K3", "K39"]  # the extra condition holds
    assert sorted(r[0] for r in by_id) == sorted(labels)


def test_rows_by_a_hundred_thousand_keys(database: store.Database) -> None:
    rows = [_compound(f"L{i}") for i in range(3000)]
    database.write(lambda c: c.insert_many("compound", rows))
    wanted = [f"L{i}" for i in range(0, 100_000)]  # most are not there
    with database.read() as conn:
        found = conn.rows_where_in("SELECT label FROM compound WHERE 1 = 1", "label", wanted)
    assert len(found) == 3000


def test_text_keys_with_quotes_and_unicode(database: store.Database, key_style: str) -> None:
    odd = ['O"Brien', "it's", "ΔG‡ 1", "back\\slash", "[1,2]"]
    database.write(lambda c: c.insert_many("compound", [_compound(x) for x in odd]))
    with database.read() as conn:
        found = conn.rows_where_in("SELECT label FROM compound WHERE 1 = 1", "label", odd)
    assert sorted(r[0] for r in found) == sorted(odd)


# ---------------------------------------------------------------- transactions


def test_a_failed_write_leaves_nothing(database: store.Database) -> None:
    def work(conn: connection.Connection) -> None:
        conn.insert("compound", _compound("gone"))
        raise RuntimeError("half-way")

    with pytest.raises(RuntimeError):
        database.write(work)
    with database.read() as conn:
        assert conn.scalar("SELECT count(*) FROM compound") == 0


def test_a_read_is_one_snapshot(database: store.Database) -> None:
    database.write(lambda c: c.insert("compound", _compound("before")))
    with database.read() as conn:
        first = conn.scalar("SELECT count(*) FROM compound")
        other = store.open_registry(str(database.path))
        try:
            other.write(lambda c: c.insert("compound", _compound("during")))
        finally:
            other.close()
        assert conn.scalar("SELECT count(*) FROM compound") == first == 1
    with database.read() as conn:
        assert conn.scalar("SELECT count(*) FROM compound") == 2


def test_reads_nest_and_a_write_inside_a_read_is_refused(database: store.Database) -> None:
    with database.read() as outer, database.read() as inner:
        assert inner is outer
        with pytest.raises(RuntimeError, match="inside a read"):
            database.write(lambda c: None)


def test_a_writer_waits_for_another_and_both_commit(database: store.Database) -> None:
    holder = sqlite3.connect(
        str(database.path), isolation_level=None, timeout=5, check_same_thread=False
    )
    holder.execute("BEGIN IMMEDIATE")
    holder.execute("INSERT INTO compound (label, structure_ok, created_at) VALUES ('h', 1, 'x')")
    release = threading.Timer(0.3, lambda: holder.execute("COMMIT"))
    release.start()
    try:
        database.write(lambda c: c.insert("compound", _compound("waited")))
    finally:
        release.join(timeout=10)
        holder.close()
    with database.read() as conn:
        assert sorted(conn.column("SELECT label FROM compound")) == ["h", "waited"]


def test_a_lock_that_never_clears_becomes_a_clear_error(
    database: store.Database, monkeypatch: pytest.MonkeyPatch
) -> None:
    monkeypatch.setattr(store, "WRITE_RETRIES", 3)
    monkeypatch.setattr(store, "BUSY_TIMEOUT_MS", 50)
    monkeypatch.setattr(store.time, "sleep", lambda _s: None)
    database.close()  # connections are made again with the short timeout
    holder = sqlite3.connect(str(database.path), isolation_level=None, timeout=5)
    holder.execute("BEGIN IMMEDIATE")
    try:
        with pytest.raises(DatabaseError, match=r"stayed locked by another writer .*3 attempts"):
            database.write(lambda c: c.insert("compound", _compound("never")))
    finally:
        holder.execute("ROLLBACK")
        holder.close()


def test_connections_are_set_up_for_a_shared_file(database: store.Database) -> None:
    with database.read() as conn:
        assert conn.scalar("PRAGMA journal_mode") == "wal"
        assert conn.scalar("PRAGMA foreign_keys") == 1
        assert conn.scalar("PRAGMA busy_timeout") == store.BUSY_TIMEOUT_MS


def test_an_in_memory_registry_works_one_transaction_at_a_time() -> None:
    from registry.storage import migrate

    memory = store.open_database(":memory:", must_exist=False)
    try:
        with memory.read() as conn:
            assert conn.scalar("SELECT 1") == 1
        memory.write(lambda c: c.execute("CREATE TABLE t (id INTEGER PRIMARY KEY, x TEXT)"))
        memory.write(lambda c: c.insert("t", {"x": "kept"}))
        with memory.read() as conn:
            assert conn.column("SELECT x FROM t") == ["kept"]
        assert migrate  # the module imports without a database (Alembic loads lazily)
    finally:
        memory.close()


# ---------------------------------------------------------------- opening


def test_opening_refuses_with_messages_that_say_what_to_do(tmp_path: Path) -> None:
    missing = tmp_path / "nope.sqlite"
    with pytest.raises(DatabaseError) as info:
        store.open_registry(str(missing))
    assert str(info.value) == (
        f"no registry at {missing}; create one with 'fluxledger init' or give an existing one"
    )
    junk = tmp_path / "junk.sqlite"
    junk.write_bytes(b"this is not a database file" * 100)
    with pytest.raises(DatabaseError, match=r"is not a readable registry: file is not a database"):
        store.open_registry(str(junk))
    empty = tmp_path / "empty.sqlite"
    sqlite3.connect(empty).close()
    with pytest.raises(DatabaseError, match=r"has no fluxledger schema; run 'fluxledger init'"):
        store.open_registry(str(empty))
    with pytest.raises(DatabaseError, match=r"folder .* does not exist"):
        store.open_database(str(tmp_path / "no" / "such" / "r.sqlite"), must_exist=False)


def test_an_older_schema_is_refused_until_upgraded(db_path: Path) -> None:
    with sqlite3.connect(db_path) as raw:
        raw.execute("UPDATE alembic_version SET version_num = '0001'")
    with pytest.raises(DatabaseError) as info:
        store.open_registry(str(db_path))
    assert str(info.value) == (
        f"the registry's schema is at 0001, this fluxledger needs {store.head_revision()}; "
        "run 'fluxledger db upgrade' (it takes a backup first)"
    )


def test_passwords_never_reach_a_message() -> None:
    assert store.redact("postgresql+psycopg://ann:secret@db:5432/reg") == (
        "postgresql+psycopg://ann:***@db:5432/reg"
    )


# ---------------------------------------------------------------- change counters


def test_counters_see_updates_and_deletes_also_by_plain_sql(database: store.Database) -> None:
    kinds, tables = ("structure", "listing", "vocabulary"), ("compound", "measurement")

    def now() -> changes.State:
        with database.read() as conn:
            return changes.state(conn, kinds, tables)

    start = now()
    database.write(lambda c: c.insert_many("compound", [_compound("a"), _compound("b")]))
    grown = now()
    assert grown.counters == start.counters  # new rows: seen by the table's size, no trigger
    assert grown.table("compound") == changes.TableState(2, 2)
    assert changes.only_appended(start.table("compound"), grown.table("compound"), 2)
    with sqlite3.connect(database.path) as raw:  # behind fluxledger's back
        raw.execute("UPDATE compound SET label = 'a2' WHERE label = 'a'")
    renamed = now()
    assert renamed.counter("listing") == grown.counter("listing") + 1
    assert renamed.counter("structure") == grown.counter("structure")  # a label is no structure
    with sqlite3.connect(database.path) as raw:
        raw.execute("UPDATE compound SET smiles_canonical = 'C' WHERE label = 'b'")
        raw.execute("UPDATE solvent SET aliases = aliases || '|x' WHERE id = 1")
    edited = now()
    assert edited.counter("structure") == renamed.counter("structure") + 1
    assert edited.counter("vocabulary") == renamed.counter("vocabulary") + 1
    database.write(lambda c: c.execute("DELETE FROM compound WHERE label = 'a2'"))
    gone = now()
    assert gone.counter("structure") == edited.counter("structure") + 1
    assert not changes.only_appended(grown.table("compound"), gone.table("compound"), 0)
    assert gone.as_json()["tables"]["compound"] == [1, 2]


def test_time_is_stored_in_utc_whatever_the_zone_given(database: store.Database) -> None:
    east = datetime(2026, 1, 1, 12, 0, tzinfo=UTC).astimezone(timezone(timedelta(hours=5)))
    database.write(lambda c: c.insert("compound", {"label": "z", "created_at": east}))
    with database.read() as conn:
        assert conn.scalar("SELECT created_at FROM compound") == datetime(
            2026, 1, 1, 12, tzinfo=UTC
        )
        assert conn.first("SELECT CAST(created_at AS TEXT) FROM compound")[0] == (
            "2026-01-01 12:00:00.000000"
        )
