"""The SQLAlchemy-free search path: same refusals, same rows, no ORM import in the CLI.

``find`` on a SQLite file reads through ``sqlite3`` with plain SQL (:mod:`registry.search.
sqlite_read`). These tests hold it to the full API: the same error messages for a missing file,
a file that is no registry and a registry at another schema; for every filter, the measurement
ids the ORM query (the SQLAlchemy conditions ``find`` used before) selects; identical results
through either handle.
"""

from __future__ import annotations

import sqlite3
import subprocess
import sys
from pathlib import Path

import pytest
from search_data import registry_copy
from sqlalchemy import and_, or_, select, text

from registry import api
from registry.errors import DatabaseError
from registry.record import vocab
from registry.search import brute_force, build_query, find, get_motif, make_filters
from registry.search import engine as engine_module
from registry.search import filters as filters_module
from registry.search import index as index_module
from registry.search import listing as listing_module
from registry.search.sqlite_read import (
    SQLiteReader,
    head_revision,
    network_fs_warning,
    open_for_search,
    sqlite_path,
)
from registry.storage import database as store
from registry.storage import migrate
from registry.storage.models import Measurement, Process, Solvent


@pytest.fixture
def registry_file(tmp_path: Path, tmp_path_factory: pytest.TempPathFactory) -> Path:
    """A copy (per test) of a small registry built once per session, with a retracted row."""
    return registry_copy(
        "sqlite-read", tmp_path, tmp_path_factory,
        sql=(
            "UPDATE measurement SET status = 'retracted' WHERE id % 7 = 0",
            "UPDATE measurement SET status = 'reviewed' WHERE id % 5 = 0",
        ),
    )  # fmt: skip


# ---------------------------------------------------------------- opening


def _message(call, db: str) -> str:  # type: ignore[no-untyped-def]
    with pytest.raises(DatabaseError) as info:
        handle = call(db)
        handle.dispose()
    return str(info.value)


def test_head_revision_is_the_migrations_head() -> None:
    assert head_revision() == migrate.head_revision()


def test_refusals_say_what_the_full_api_says(tmp_path: Path, registry_file: Path) -> None:
    missing = str(tmp_path / "nowhere.sqlite")
    assert _message(open_for_search, missing) == _message(api.open_registry, missing)
    junk = tmp_path / "junk.sqlite"
    junk.write_bytes(b"this is not a database file at all" * 200)
    assert _message(open_for_search, str(junk)) == _message(api.open_registry, str(junk))
    assert "is not a readable registry: file is not a database" in _message(
        open_for_search, str(junk)
    )
    empty = tmp_path / "empty.sqlite"
    sqlite3.connect(empty).close()
    assert _message(open_for_search, str(empty)) == _message(api.open_registry, str(empty))
    with sqlite3.connect(registry_file) as conn:
        conn.execute("UPDATE alembic_version SET version_num = '0001_initial'")
    old = _message(open_for_search, str(registry_file))
    assert old == _message(api.open_registry, str(registry_file))
    assert old.startswith("the registry's schema is at 0001_initial, this fluxledger needs ")


def test_sqlite_urls_and_paths(tmp_path: Path, registry_file: Path) -> None:
    assert sqlite_path(str(registry_file)) == registry_file.resolve()
    assert sqlite_path(f"sqlite:///{registry_file}") == registry_file
    assert sqlite_path("postgresql://ann@db.example/registry") is None
    assert sqlite_path(":memory:") is None
    reader = open_for_search(f"sqlite:///{registry_file}")
    try:
        assert isinstance(reader, SQLiteReader)
        assert reader.url == f"sqlite:///{registry_file}"
    finally:
        reader.dispose()


def test_network_file_system_warning_is_the_store_warning(tmp_path: Path) -> None:
    mounts = tmp_path / "mounts"
    mounts.write_text(
        f"/dev/sda1 / ext4 rw 0 0\nserver:/share {tmp_path} nfs4 rw 0 0\n", encoding="utf-8"
    )
    path = tmp_path / "registry.sqlite"
    ours = network_fs_warning(path, str(mounts))
    assert ours is not None and "(nfs4)" in ours
    assert network_fs_warning is store.network_fs_warning  # one function for both paths
    mounts.write_text("/dev/sda1 / ext4 rw 0 0\n", encoding="utf-8")
    assert network_fs_warning(path, str(mounts)) is None


def test_a_reader_never_creates_a_file(tmp_path: Path) -> None:
    reader = SQLiteReader(tmp_path / "typo.sqlite")
    with pytest.raises(sqlite3.OperationalError), reader.read():
        pass
    assert not (tmp_path / "typo.sqlite").exists()


# ---------------------------------------------------------------- same rows


def test_row_columns_are_the_listing_columns() -> None:
    alias = {"measurement": "m", "compound": "c", "process": "p"}
    listed = {
        name: f"{alias[column.table.name]}.{column.name}"
        for name, column in api.LIST_COLUMNS.items()
    }
    extra = {"compound_id": "m.compound_id", "t_min_k": "m.t_min_k", "t_max_k": "m.t_max_k"}
    assert {**listed, **extra} == engine_module.ROW_COLUMNS


def _orm_conditions(conn, f: filters_module.Filters) -> list:  # type: ignore[no-untyped-def,type-arg]
    """The SQLAlchemy conditions ``find`` built before it used plain SQL (the reference)."""
    out = []
    for rng, column in ((f.barrier, Measurement.dg_kj_mol), (f.temperature, Measurement.dg_t_k)):
        if rng:
            parts = []
            if rng.lo is not None:
                parts.append(column >= rng.lo if rng.lo_inclusive else column > rng.lo)
            if rng.hi is not None:
                parts.append(column <= rng.hi if rng.hi_inclusive else column < rng.hi)
            out.append(and_(*parts))
    if f.method:
        out.append(Measurement.method == f.method)
    if f.process:
        known = tuple(r[0] for r in conn.execute(text("SELECT name FROM process_kind")))
        out.append(Process.kind == vocab.process_kind_name(f.process, known, "--process"))
    if f.nucleus:
        out.append(Process.nucleus == f.nucleus)
    if f.status:
        out.append(Measurement.status == f.status)
    elif not f.include_retracted:
        out.append(Measurement.status != "retracted")
    if f.reference:
        out.append(Measurement.reference.ilike(f"%{f.reference}%"))
    if f.solvents:
        index, names = {}, {}
        for sid, name, formula, aliases in conn.execute(
            select(Solvent.id, Solvent.name, Solvent.formula, Solvent.aliases)
        ):
            names[name] = sid
            for spelling in (name, formula, *(aliases or "").split("|")):
                if spelling:
                    index.setdefault(vocab.solvent_key(spelling), sid)
        ids, texts = set(), []
        for t in f.solvents:
            cls = filters_module.solvent_class(t)
            if cls:
                ids |= {names[n] for n in filters_module.SOLVENT_CLASSES[cls] if n in names}
            elif vocab.solvent_key(t) in index:
                ids.add(index[vocab.solvent_key(t)])
            else:
                texts.append(t)
        parts = [Measurement.solvent_id.in_(sorted(ids))] if ids else []
        parts += [Measurement.solvent_text.ilike(f"%{t}%") for t in texts]
        out.append(or_(*parts))
    return out


FILTERS = [
    {},
    {"barrier": ">= 20 kcal/mol"},
    {"barrier": "60-70 kJ/mol"},
    {"barrier": "< 55 kJ/mol", "temperature": "-20 to 30 °C"},
    {"barrier": "95 ± 30 kJ/mol", "solvent": "nonpolar"},
    {"solvent": ["CDCl3", "dmso", "chlorinated"]},
    {"solvent": "Toluene"},
    {"solvent": ["diphenyl", "CS2"]},  # not a solvent spelling: matched in the text
    {"method": "lineshape", "process": "rotation", "nucleus": "1H"},
    {"status": "reviewed"},
    {"include_retracted": True},
    {"reference": "ROW 1"},
    {"reference": "textbook", "include_retracted": True},
]


@pytest.mark.parametrize("spec", FILTERS, ids=[repr(f) for f in FILTERS])
def test_filters_select_what_the_orm_query_selects(registry_file: Path, spec) -> None:  # type: ignore[no-untyped-def]
    query = build_query(smarts="[#6]~[#7]")
    database = api.open_registry(str(registry_file))
    reader = open_for_search(str(registry_file))
    try:
        filters = make_filters(**spec)
        hits = brute_force(database, query)
        with database.read() as conn:
            expected = sorted(
                conn.execute(
                    select(Measurement.id)
                    .outerjoin(Process, Process.id == Measurement.process_id)
                    .where(*_orm_conditions(conn, filters), Measurement.compound_id.in_(hits))
                ).scalars()
            )
        through_reader = find(reader, query=query, filters=filters)
        through_api = find(database, query=query, filters=filters)
        assert sorted(r["id"] for r in through_reader.rows) == expected
        assert through_reader.as_dict() == through_api.as_dict()
    finally:
        database.dispose()
        reader.dispose()


@pytest.mark.parametrize("scan_above", [0, 10**9], ids=["scan", "by-id"])
@pytest.mark.parametrize("sort", ["id", "-barrier", "temperature", "compound", "solvent"])
def test_both_row_paths_and_sorting_agree(
    registry_file: Path, monkeypatch, scan_above, sort
) -> None:  # type: ignore[no-untyped-def]
    """The SQL row paths (scan, fetch by id) give what the measurement listing gives."""
    query = build_query(motif=get_motif("amide"))
    database = api.open_registry(str(registry_file))
    try:
        reference = find(database, query=query, sort=sort)
        _without_listing(monkeypatch)
        monkeypatch.setattr(engine_module, "_rows_for", _forced(scan_above))
        forced = find(database, query=query, sort=sort, limit=7)
    finally:
        database.dispose()
    assert forced.rows == reference.rows[:7]
    assert forced.total_rows == reference.total_rows > 7


def _without_listing(monkeypatch) -> None:  # type: ignore[no-untyped-def]
    """Search as on a server database: rows through SQL, no measurement listing."""
    monkeypatch.setattr(engine_module, "_listing_for", lambda *_args: None)


def _forced(threshold: int):  # type: ignore[no-untyped-def]
    """``_rows_for`` with the scan-or-fetch-by-id threshold fixed (0: always scan)."""
    real = engine_module._rows_for

    def rows_for(conn, where, ids, scan_above=0):  # type: ignore[no-untyped-def]
        return real(conn, where, ids, scan_above=threshold)

    return rows_for


def test_json_and_compound_view_through_the_reader(registry_file: Path) -> None:
    query = build_query(smarts="[CX3](=O)[NX3]")
    database = api.open_registry(str(registry_file))
    reader = open_for_search(str(registry_file))
    try:
        a = find(reader, query=query, atoms=True, sort="-barrier", limit=5).as_dict()
        b = find(database, query=query, atoms=True, sort="-barrier", limit=5).as_dict()
    finally:
        database.dispose()
        reader.dispose()
    assert a == b
    assert all(r["match_atoms"] for r in a["measurements"])


# ---------------------------------------------------------------- cold process


def test_cli_find_on_sqlite_does_not_load_sqlalchemy(registry_file: Path) -> None:
    code = (
        "import sys\n"
        "from registry.cli.main import run\n"
        f"sys.argv = ['fluxledger', '--db', {str(registry_file)!r}, 'find', '--motif', 'amide',"
        " '--csv', '--barrier', '>= 60 kJ/mol', '--solvent', 'nonpolar']\n"
        "try:\n    run()\nexcept SystemExit as exc:\n    assert not exc.code, exc.code\n"
        "loaded = sorted(m for m in ('sqlalchemy', 'registry.storage.models', 'registry.api')"
        " if m in sys.modules)\n"
        "print('LOADED', loaded, file=sys.stderr)\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert "LOADED []" in out.stderr
    assert out.stdout.startswith("id,compound_id,compound,")


def test_an_open_reader_does_not_change_the_file_state(registry_file: Path) -> None:
    """SQLite creates an empty WAL for every opening connection; that alone must not count as
    a change, or every new process would re-check the index signature."""
    reader = SQLiteReader(registry_file)
    index_module.load_index(reader)
    closed = index_module.file_state(reader)
    with reader.read() as conn:
        conn.execute("SELECT count(*) FROM compound").fetchone()
        assert Path(f"{registry_file}-wal").exists()
        assert index_module.file_state(reader) == closed
    reader.dispose()
    writer = api.open_registry(str(registry_file))
    writer.write(lambda conn: conn.execute(text("UPDATE measurement SET label = 'x' WHERE id = 2")))
    assert index_module.file_state(reader) != closed
    writer.dispose()


def test_rows_without_sqlite_json_functions(registry_file: Path, monkeypatch) -> None:  # type: ignore[no-untyped-def]
    """An SQLite built without ``json_each`` falls back to bound IN lists, on the SQL row path
    (few or many compound ids) and when the listing reads a one-off search's rows by id."""
    from registry.search import sqlite_read

    query = build_query(motif=get_motif("urea"))
    reader = open_for_search(str(registry_file))
    try:
        expected = find(reader, query=query, filters=make_filters(solvent="CDCl3"))
        real = sqlite_read.fetch
        refused = []

        def no_json(conn, sql, params=None):  # type: ignore[no-untyped-def]
            if "json_each" in sql:
                refused.append(sql)
                raise sqlite3.OperationalError("no such table: json_each")
            return real(conn, sql, params)

        monkeypatch.setattr(sqlite_read, "fetch", no_json)
        listing_module._LOADED.clear()  # a new process: the listing keeps no rows
        once = find(reader, query=query, filters=make_filters(solvent="CDCl3"), keep_rows=False)
        assert once.rows == expected.rows and expected.rows
        assert len(refused) == 1
        _without_listing(monkeypatch)
        for threshold in (0, 10**9):
            monkeypatch.setattr(engine_module, "_rows_for", _forced(threshold))
            again = find(reader, query=query, filters=make_filters(solvent="CDCl3"))
            assert again.rows == expected.rows
        assert len(refused) == 3  # each time the JSON form was tried first
    finally:
        reader.dispose()
