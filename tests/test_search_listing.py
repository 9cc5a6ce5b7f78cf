"""The measurement listing (``<db>.listing``): the same answers as reading the rows through SQL,
kept in step with every kind of change, rebuilt when damaged, and exact CSV lines.

The reference throughout is the plain SQL path (the one server databases use), reached by
switching the listing off. Whether the file is current is decided by the change counters the
schema's triggers keep (plain SQL included) and the measurement table's size.
"""

from __future__ import annotations

import csv
import io
import sqlite3
import subprocess
import sys
from collections import Counter
from pathlib import Path
from typing import Any

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from search_data import registry_copy

from registry import api
from registry.admin import edits
from registry.record.entry import EntryInput
from registry.search import build_query, cachefile, find, get_motif, make_filters
from registry.search import engine as engine_module
from registry.search import listing as listing_module
from registry.search import result as result_module
from registry.search.listing import from_rows
from registry.search.result import CSV_COLUMNS, ROW_COLUMNS, csv_lines


@pytest.fixture
def registry_file(tmp_path: Path, tmp_path_factory: pytest.TempPathFactory) -> Path:
    """A copy (per test) of a small registry built once, with retracted and reviewed rows,
    lower-case labels, and missing solvents and barriers."""
    return registry_copy(
        "listing", tmp_path, tmp_path_factory,
        sql=(
            "UPDATE measurement SET status = 'retracted' WHERE id % 7 = 0",
            "UPDATE measurement SET status = 'reviewed' WHERE id % 5 = 0",
            "UPDATE compound SET label = lower(label) WHERE id % 3 = 0",
            "UPDATE measurement SET solvent_text = NULL WHERE id % 11 = 0",
            "UPDATE measurement SET dg_kj_mol = NULL WHERE id % 13 = 0",
        ),
    )  # fmt: skip


@pytest.fixture
def database(registry_file: Path):  # type: ignore[no-untyped-def]
    handle = api.open_registry(str(registry_file))
    yield handle
    handle.close()


def _through_sql(database: Any, monkeypatch: pytest.MonkeyPatch, **kwargs: Any) -> Any:
    with monkeypatch.context() as patch:
        patch.setattr(engine_module, "load_listing", lambda *_args, **_kw: None)
        return find(database, **kwargs)


def _listing_path(database: Any) -> Path:
    path = cachefile.path_for(database, listing_module.SUFFIX)
    assert path is not None
    return path


def _csv(result: Any) -> bytes:
    out = io.BytesIO()
    result.write_csv(out)
    return out.getvalue()


FILTERS = {
    "none": {},
    "barrier": {"barrier": ">= 60 kJ/mol"},
    "nonpolar": {"solvent": "nonpolar"},
    "retracted too": {"include_retracted": True},
    "reviewed": {"status": "reviewed"},
    "process+nucleus": {"process": "bond-rotation", "nucleus": "1H"},
}


@pytest.mark.parametrize("filters", FILTERS, ids=list(FILTERS))
@pytest.mark.parametrize(
    "sort", ["id", "-barrier", "barrier", "temperature", "compound", "solvent"]
)
def test_listing_gives_what_sql_gives(database, monkeypatch, filters, sort) -> None:  # type: ignore[no-untyped-def]
    query = build_query(motif=get_motif("amide"))
    chosen = make_filters(**FILTERS[filters])
    listed = find(database, query=query, filters=chosen, sort=sort)
    assert _listing_path(database).exists()  # the rows came from the listing
    plain = _through_sql(database, monkeypatch, query=query, filters=chosen, sort=sort)
    assert listed.rows and listed.as_dict() == plain.as_dict()
    assert listed.stats.with_rows == plain.stats.with_rows
    cachefile.forget()  # a new process: the listing is mapped from its file
    once = find(database, query=query, filters=chosen, sort=sort)
    assert once.as_dict() == plain.as_dict()
    as_csv = find(database, query=query, filters=chosen, sort=sort, output="csv", limit=9)
    assert as_csv.table == [] and as_csv.csv_body is not None
    assert as_csv.returned == min(9, plain.total_rows) and as_csv.total_rows == plain.total_rows
    assert _csv(as_csv) == _csv(_through_sql(database, monkeypatch, query=query,
                                             filters=chosen, sort=sort, limit=9))  # fmt: skip


def test_matched_atoms_and_limits_through_the_listing(database, monkeypatch) -> None:  # type: ignore[no-untyped-def]
    query = build_query(smarts="[CX3](=O)[NX3]")
    kwargs = {"query": query, "atoms": True, "sort": "-barrier", "limit": 5}
    listed = find(database, output="csv", **kwargs)  # atoms need the rows: no CSV shortcut
    assert listed.csv_body is None and len(listed.table) == 5
    assert listed.as_dict() == _through_sql(database, monkeypatch, **kwargs).as_dict()


def test_listing_file_is_written_and_reused(database, registry_file: Path, monkeypatch) -> None:  # type: ignore[no-untyped-def]
    query = build_query(motif=get_motif("urea"))
    first = find(database, query=query, output="csv")
    path = Path(f"{registry_file}.listing")
    assert path.read_bytes().startswith(listing_module.MAGIC)
    stamp = path.stat().st_mtime_ns
    cachefile.forget()  # as in a new process

    def no_build(*_args: Any) -> None:
        raise AssertionError("listing rebuilt although nothing changed")

    monkeypatch.setattr(listing_module, "from_rows", no_build)
    again = find(database, query=query, output="csv")
    assert _csv(again) == _csv(first) and path.stat().st_mtime_ns == stamp


def _amide_rows(database: Any) -> dict[int, dict[str, Any]]:
    result = find(database, query=build_query(motif=get_motif("amide")))
    return {r["id"]: r for r in result.rows}


def test_library_edits_retractions_and_adds_are_seen(database) -> None:  # type: ignore[no-untyped-def]
    before = _amide_rows(database)
    target = min(before)
    edits.edit_measurement(database, target, {"dg": "99.5 kJ/mol"}, actor="ann", reason="typo")
    assert _amide_rows(database)[target]["dg_kj_mol"] == pytest.approx(99.5)
    edits.retract_measurement(database, target, "duplicate", actor="ann")
    assert target not in _amide_rows(database)
    added = api.add_measurement(
        database,
        EntryInput(method="lineshape", smiles="CC(=O)N(C)Cc1ccccc1", compound="NEW-AMIDE",
                   dg="16 kcal/mol", reference="café, \"quoted\"\nsecond line"),
    )  # fmt: skip
    rows = _amide_rows(database)
    assert "NEW-AMIDE" in [r["compound"] for r in rows.values()]
    assert len(rows) == len(before)  # one retracted, one added
    del added


@pytest.mark.parametrize("new_process", [False, True], ids=["same-process", "new-process"])
def test_plain_sql_edits_are_seen(database, registry_file: Path, new_process) -> None:  # type: ignore[no-untyped-def]
    """No revision is recorded behind fluxledger's back, and these edits keep every length
    (a label of the same length, a value swapped for another); the triggers still count them."""
    rows = _amide_rows(database)
    target = max(i for i, r in rows.items() if r["compound"] and r["dg_kj_mol"] is not None)
    label = rows[target]["compound"]
    renamed = "Z" * len(label)
    with sqlite3.connect(registry_file) as conn:
        conn.execute("UPDATE measurement SET dg_kj_mol = dg_kj_mol + 1 WHERE id = ?", (target,))
        conn.execute("UPDATE compound SET label = ? WHERE id = ?",
                     (renamed, rows[target]["compound_id"]))  # fmt: skip
        conn.execute("UPDATE process SET nucleus = '13C' WHERE id = (SELECT process_id "
                     "FROM measurement WHERE id = ?)", (target,))  # fmt: skip
    if new_process:
        cachefile.forget()
    after = _amide_rows(database)[target]
    assert after["dg_kj_mol"] == pytest.approx(rows[target]["dg_kj_mol"] + 1)
    assert after["compound"] == renamed and after["nucleus"] == "13C"
    csv_text = _csv(find(database, query=build_query(motif=get_motif("amide")), output="csv"))
    assert f"{target},{rows[target]['compound_id']},{renamed}," in csv_text.decode("utf-8")


def test_rebuild_option_and_damaged_file(database, registry_file: Path, monkeypatch) -> None:  # type: ignore[no-untyped-def]
    query = build_query(motif=get_motif("urea"))
    expected = _csv(find(database, query=query, output="csv"))
    path = Path(f"{registry_file}.listing")
    path.write_bytes(b"FLXLIST1 but nothing after it")
    cachefile.forget()
    assert _csv(find(database, query=query, output="csv")) == expected
    assert listing_module.read_listing(path) is not None
    built = []
    real = listing_module.from_rows
    monkeypatch.setattr(listing_module, "from_rows", lambda *a: built.append(1) or real(*a))
    assert _csv(find(database, query=query, output="csv", rebuild_index=True)) == expected
    assert built


def test_unwritable_listing_still_answers(database, monkeypatch) -> None:  # type: ignore[no-untyped-def]
    def refuse(_listing: Any, _path: Path, _state: Any) -> None:
        raise PermissionError(13, "Permission denied")

    monkeypatch.setattr(listing_module, "save_listing", refuse)
    cachefile.forget()
    query = build_query(motif=get_motif("urea"))
    result = find(database, query=query, rebuild_index=True)
    assert result.rows == _through_sql(database, monkeypatch, query=query).rows
    assert any("could not write the listing cache" in w for w in result.warnings)


def test_non_ascii_and_quoted_text_keep_their_line(database, registry_file: Path) -> None:  # type: ignore[no-untyped-def]
    api.add_measurement(
        database,
        EntryInput(method="coalescence", smiles="CC(=O)N(C)C(C)C", compound="Ämid-7",
                   dg="17 kcal/mol", solvent="CDCl3",
                   reference='Müller, "Über Amide", 2019\nzweite Zeile'),
    )  # fmt: skip
    query = build_query(motif=get_motif("amide"))
    result = find(database, query=query, output="csv", sort="compound")
    parsed = list(csv.reader(io.StringIO(_csv(result).decode("utf-8"))))
    assert parsed[0] == list(CSV_COLUMNS)
    by_id = {int(r[0]): r for r in parsed[1:]}
    rows = find(database, query=query).rows
    assert len(by_id) == len(rows)
    for row in rows:
        cells = by_id[row["id"]]
        assert cells[CSV_COLUMNS.index("reference")] == (row["reference"] or "")
        assert cells[CSV_COLUMNS.index("compound")] == (row["compound"] or "")
    assert "Ämid-7" in [r[CSV_COLUMNS.index("compound")] for r in parsed[1:]]


def test_cli_csv_from_the_listing_equals_the_sql_path(registry_file: Path) -> None:
    """Two real processes: the first builds the listing, the second writes its lines."""
    code = (
        "import sys\n"
        "from registry.cli.main import run\n"
        "from registry.search import engine\n"
        "if sys.argv[1] == 'sql':\n"
        "    engine.load_listing = lambda *a, **k: None\n"
        f"sys.argv = ['fluxledger', '--db', {str(registry_file)!r}, 'find', '--motif', 'amide',"
        " '--csv', '--sort', '-barrier']\n"
        "run()\n"
    )

    def run(mode: str) -> str:
        done = subprocess.run([sys.executable, "-c", code, mode], capture_output=True,
                              text=True, check=False, timeout=120)  # fmt: skip
        assert done.returncode == 0, done.stderr
        return done.stdout

    listed = run("listing")
    assert Path(f"{registry_file}.listing").exists()
    assert run("listing") == listed == run("sql")
    assert listed.count("\n") > 10


# ---------------------------------------------------------------- properties, no database

_TEXT = st.one_of(st.none(), st.sampled_from(["a", "A", "b", "B", "é", "", "z, y", 'q"x']))
_NUMBER = st.one_of(st.none(), st.sampled_from([-1.5, 0.0, 2.0, 2.0, 7.25, float("inf")]))


@st.composite
def _tables(draw: Any) -> list[tuple[Any, ...]]:
    n = draw(st.integers(min_value=0, max_value=25))
    rows = []
    for i in range(n):
        values = {name: None for name in ROW_COLUMNS}
        values.update(
            id=i * 3 + 1,
            compound_id=draw(st.integers(min_value=1, max_value=6)),
            compound=draw(_TEXT),
            solvent=draw(_TEXT),
            method=draw(st.sampled_from(["lineshape", "Lineshape", "coalescence"])),
            dg_kj_mol=draw(_NUMBER),
            dg_t_k=draw(_NUMBER),
            status=draw(st.sampled_from(["draft", "retracted", "reviewed"])),
            reference=draw(_TEXT),
        )
        rows.append(tuple(values.values()))
    return rows


@settings(max_examples=150, deadline=None)
@given(table=_tables(), key=st.sampled_from(sorted(result_module.SORT_KEYS)), data=st.data())
def test_listing_order_and_lines_match_sorting_tuples(table, key, data) -> None:  # type: ignore[no-untyped-def]
    listing = from_rows(table)
    n = len(table)
    chosen = sorted(data.draw(st.sets(st.integers(min_value=0, max_value=max(n - 1, 0)))))
    positions = np.asarray([p for p in chosen if p < n], dtype=np.int64)
    column, descending = result_module.SORT_KEYS[key]
    expected = [table[p] for p in positions.tolist()]
    result_module.sort_rows(expected, ROW_COLUMNS, column, descending)
    ordered = listing.order(positions, column, descending)
    assert [table[p] for p in ordered.tolist()] == expected
    picked = [tuple(r[list(ROW_COLUMNS).index(c)] for c in CSV_COLUMNS) for r in expected]
    assert listing.lines(ordered).decode("utf-8") == "".join(csv_lines(picked))


@settings(max_examples=150, deadline=None)
@given(st.lists(st.integers(min_value=1, max_value=9), max_size=40))
def test_first_seen_counts_match_a_counter(values) -> None:  # type: ignore[no-untyped-def]
    counted = result_module.first_seen_counts(np.asarray(values, dtype=np.int64))
    assert counted == list(Counter(values).items())
