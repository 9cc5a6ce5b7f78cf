"""A user's situation — a full disk, a read-only file, odd arguments — gets a plain message.

Tests run as root in CI, where file permissions do not stop anything, so a read-only file is
made read-only to SQLite itself (``PRAGMA query_only``) and a full disk by capping the file's
pages (``PRAGMA max_page_count``): SQLite then raises exactly the errors the real situations
raise ("attempt to write a readonly database", "database or disk is full").
"""

from __future__ import annotations

import sqlite3
from pathlib import Path

import pytest
from hypothesis import given
from hypothesis import strategies as st

from registry import api
from registry.errors import DatabaseError, UsageError
from registry.storage import database as store
from registry.storage.database import Database

ADD = ["add", "--method", "computed", "--compound", "S-1", "--dg", "60 kJ/mol"]


def _with_pragma(monkeypatch: pytest.MonkeyPatch, pragma: str) -> None:
    plain = store.Database._connect_sqlite

    def connect(self: store.Database) -> sqlite3.Connection:
        raw = plain(self)
        raw.execute(pragma).fetchall()
        return raw

    monkeypatch.setattr(store.Database, "_connect_sqlite", connect)


def test_a_read_only_registry_is_said_to_be_read_only(
    cli, db_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:  # type: ignore[no-untyped-def]
    _with_pragma(monkeypatch, "PRAGMA query_only = ON")
    result = cli(*ADD)
    assert result.exit_code == 1
    assert result.stderr == (
        f"error: cannot write {db_path}: the file (or its folder) is read-only; ask for write "
        "access, or work on a copy\n"
    )


def test_a_full_disk_is_said_to_be_full_and_nothing_is_written(
    cli, db_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:  # type: ignore[no-untyped-def]
    pages = sqlite3.connect(db_path).execute("PRAGMA page_count").fetchone()[0]
    _with_pragma(monkeypatch, f"PRAGMA max_page_count = {pages}")
    lines = ["compound,method,ΔG‡ (kJ/mol)"] + [f"F{i},computed,{40 + i % 50}" for i in range(3000)]
    sheet = db_path.parent / "many.csv"
    sheet.write_text("\n".join(lines) + "\n", encoding="utf-8")
    result = cli("import", str(sheet))
    assert result.exit_code == 1
    assert result.stderr.startswith(f"error: cannot write {db_path}: the disk is full or failing")
    assert result.stderr.rstrip().endswith("nothing was written")
    monkeypatch.undo()
    assert api.list_measurements(api.open_registry(str(db_path))) == []


def test_an_unwritable_folder_is_named(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    database = store.open_database(str(tmp_path / "r.sqlite"), must_exist=False)
    monkeypatch.setattr(store.os, "access", lambda path, mode: Path(path) != tmp_path)
    found = database.situation(sqlite3.OperationalError("unable to open database file"))
    assert isinstance(found, DatabaseError)
    assert str(found) == (
        f"cannot open {tmp_path / 'r.sqlite'}: its folder {tmp_path} is not writable (SQLite "
        "keeps r.sqlite-wal and r.sqlite-shm beside the file); ask for write access, or copy "
        "the registry somewhere writable"
    )
    assert database.situation(sqlite3.OperationalError("no such table: x")) is None


def test_init_leaves_another_programs_database_alone(tmp_path: Path, cli) -> None:  # type: ignore[no-untyped-def]
    other = tmp_path / "recipes.sqlite"
    with sqlite3.connect(other) as conn:
        conn.execute("CREATE TABLE recipe (id INTEGER PRIMARY KEY, name TEXT)")
    before = other.read_bytes()
    result = cli("--db", str(other), "init")
    assert result.exit_code == 1
    assert result.stderr == (
        f"error: sqlite:///{other} holds tables of another program (recipe); a registry needs "
        "a new file or an empty database\n"
    )
    assert other.read_bytes() == before


@pytest.mark.parametrize(
    "command", [[*ADD[:4], "Caf\udce9", *ADD[5:]], ["list", "--compound", "\udcff"]]
)
def test_arguments_that_are_not_utf8_are_refused(cli, command: list[str]) -> None:  # type: ignore[no-untyped-def]
    result = cli(*command)
    assert result.exit_code == 2
    assert "is not valid UTF-8 text" in result.stderr
    assert "Traceback" not in result.stderr + result.stdout


@pytest.mark.parametrize("text", ["99999999999999999999", "9223372036854775808", "0"])
def test_ids_out_of_range_are_not_ids(cli, text: str) -> None:  # type: ignore[no-untyped-def]
    for command in (["show", text], ["history", text], ["retract", text, "--reason", "x"]):
        result = cli(*command)
        assert result.exit_code == 2, command
        assert result.stderr == f"error: {text!r} is not a measurement id (a whole number from 1)\n"


# ---------------------------------------------------------------- ids given to the library


@pytest.mark.parametrize(
    "bad", [2**63, 2**70, 0, -5, True, 2.0, "x", "1e3", "", None, [1]], ids=repr
)
def test_the_library_refuses_what_is_not_an_id(database: Database, bad: object) -> None:
    calls = (
        lambda: api.get_measurement(database, bad),  # type: ignore[arg-type]
        lambda: api.history(database, bad),  # type: ignore[arg-type]
        lambda: api.edit_measurement(database, bad, {"dg": "60 kJ/mol"}),  # type: ignore[arg-type]
        lambda: api.retract_measurement(database, bad, "x"),  # type: ignore[arg-type]
        lambda: api.list_measurements(database, ids=[bad]),
        lambda: api.accept_finding(database, bad, "x"),  # type: ignore[arg-type]
    )
    for call in calls:
        if bad is None and call is calls[1]:
            continue  # history(None) is the whole history
        with pytest.raises(UsageError, match=r"is not a (measurement|finding) id"):
            call()


@given(st.integers(min_value=1, max_value=2**63 - 1))
def test_every_64_bit_id_is_an_id_as_number_and_as_text(number: int) -> None:
    assert api.as_id(number) == api.as_id(str(number)) == api.as_id(f" +{number} ") == number


@given(st.integers().filter(lambda n: not 1 <= n <= 2**63 - 1))
def test_no_other_integer_is_an_id(number: int) -> None:
    with pytest.raises(UsageError):
        api.as_id(number)
    with pytest.raises(UsageError):
        api.as_id(str(number))
