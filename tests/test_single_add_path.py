"""Cursor-level SQL on SQLite stores what Core stores (one row and many); an add's check can wait."""

from __future__ import annotations

import math
from datetime import UTC, datetime

import pytest
from scipy import constants as C
from sqlalchemy import insert, select

from registry import api
from registry.record.entry import EntryInput
from registry.storage import audit, rawsql
from registry.storage.database import Database
from registry.storage.models import Compound, Measurement


def _compound_row(label: str, at: datetime) -> dict[str, object]:
    return {
        "label": label,
        "name": "N,N-dimethylacetamide",
        "smiles_input": "CC(=O)N(C)C",
        "smiles_canonical": "CC(=O)N(C)C",
        "inchikey": None,
        "structure_ok": False,
        "mol_binary": b"\x00\x01\xff",
        "pattern_fp": None,
        "created_at": at,
    }


def test_one_row_insert_stores_the_same_bytes_as_core(database: Database) -> None:
    at = datetime(2026, 3, 4, 5, 6, 7, 8, tzinfo=UTC)

    def work(conn):  # type: ignore[no-untyped-def]
        fast = rawsql.insert_one(
            conn, Compound.__table__, _compound_row("FAST", at), returning="id"
        )
        core = conn.execute(
            insert(Compound).returning(Compound.id), _compound_row("CORE", at)
        ).scalar_one()
        return fast, core

    fast, core = database.write(work)
    with database.read() as conn:
        stored = rawsql.fetch_all(
            conn,
            "SELECT id, name, smiles_input, structure_ok, mol_binary, created_at, typeof(created_at) "
            "FROM compound WHERE id IN (?, ?) ORDER BY id",
            (fast, core),
        )
        read_back = conn.execute(
            select(Compound.created_at, Compound.structure_ok).where(Compound.id == fast)
        ).one()
    assert len(stored) == 2
    assert stored[0][1:] == stored[1][1:]  # every column byte for byte as Core wrote it
    assert read_back.structure_ok is False
    assert read_back.created_at.replace(tzinfo=UTC) == at


def test_many_rows_get_consecutive_ids_and_the_same_bytes_as_core(database: Database) -> None:
    at = datetime(2026, 5, 6, 7, 8, 9, 10, tzinfo=UTC)
    rows = [_compound_row(f"BULK-{i}", at) for i in range(5)]
    core_rows = [_compound_row(f"CORE-{i}", at) for i in range(5)]

    def work(conn):  # type: ignore[no-untyped-def]
        first = rawsql.insert_one(
            conn, Compound.__table__, _compound_row("ONE", at), returning="id"
        )
        ids = rawsql.insert_many(conn, Compound.__table__, rows, new_ids=True)
        conn.execute(insert(Compound), core_rows)
        return first, ids

    first, ids = database.write(work)
    assert ids == list(range(first + 1, first + 6))
    with database.read() as conn:
        stored = rawsql.fetch_all(
            conn,
            "SELECT id, label, name, structure_ok, mol_binary, created_at FROM compound ORDER BY id",
        )
    by_label = {row[1]: row for row in stored}
    for i, mid in enumerate(ids):
        assert by_label[f"BULK-{i}"][0] == mid  # each row got the id it was given back
        assert by_label[f"BULK-{i}"][2:] == by_label[f"CORE-{i}"][2:]


def test_rows_of_different_shapes_are_refused(database: Database) -> None:
    now = datetime.now(UTC)
    rows = [{"label": "A", "created_at": now}, {"label": "B", "name": "b", "created_at": now}]
    with pytest.raises(ValueError, match="same columns"):
        database.write(lambda conn: rawsql.insert_many(conn, Compound.__table__, rows))


def test_missing_columns_get_their_model_defaults(database: Database) -> None:
    def work(conn):  # type: ignore[no-untyped-def]
        cid = rawsql.insert_one(
            conn,
            Compound.__table__,
            {"label": "D-1", "created_at": datetime.now(UTC)},
            returning="id",
        )
        mid = rawsql.insert_one(
            conn,
            Measurement.__table__,
            {
                "compound_id": cid,
                "method": "computed",
                "entered_by": "t",
                "entered_at": datetime.now(UTC),
            },
            returning="id",
        )
        return cid, mid

    cid, mid = database.write(work)
    with database.read() as conn:
        ok = conn.execute(select(Compound.structure_ok).where(Compound.id == cid)).scalar_one()
        status = conn.execute(select(Measurement.status).where(Measurement.id == mid)).scalar_one()
    assert ok is True  # Compound.structure_ok default
    assert status == "draft"  # Measurement.status default


def test_lookup_in_chunks_finds_every_value(database: Database) -> None:
    now = datetime.now(UTC)
    rows = [{"label": f"L-{i}", "created_at": now} for i in range(rawsql.IN_CHUNK * 2 + 7)]
    database.write(lambda conn: conn.execute(insert(Compound), rows))
    wanted = [r["label"] for r in rows] + ["not-there"]
    with database.read() as conn:
        found = rawsql.fetch_in(conn, Compound.__table__, ("id", "label"), "label", wanted)
    assert sorted(label for _, label in found) == sorted(r["label"] for r in rows)


def _entry(i: int, dg: str = "16.0 kcal/mol") -> EntryInput:
    # Δν 0.10 ppm at 400 MHz (40 Hz), Tc 300 K: ΔG‡ = 14.9 kcal/mol (DG_EXPECTED_KCAL), so the
    # reported 16.0 kcal/mol is flagged
    return EntryInput(
        method="coalescence",
        smiles="CC(=O)N(C)C",
        process="bond-rotation",
        nucleus="1H",
        solvent="CDCl3",
        field="400 MHz",
        tc="300 K",
        dnu="0.10 ppm",
        dg=dg,
        reference=f"deferred test {i}",
    )


def _findings(database: Database, mid: int) -> list[dict[str, object]]:
    return api.get_measurement(database, mid)["findings"]


#: Gutowsky–Holm k_c = πΔν/√2 (H. S. Gutowsky, C. H. Holm, J. Chem. Phys. 25, 1228 (1956)) in
#: the Eyring equation, ΔG‡ = RT·ln(k_B·T/(h·k_c)), with CODATA constants (scipy.constants) and
#: the thermochemical calorie, 4.184 J (NIST SP 811 (2008), B.8)
DG_EXPECTED_KCAL = (
    C.R * 300 * math.log(C.Boltzmann * 300 / (C.Planck * math.pi * 40 / math.sqrt(2))) / 4184
)


def test_an_add_is_checked_at_once_by_default(database: Database) -> None:
    mid = api.add_measurement(database, _entry(0))
    found = [f for f in _findings(database, mid) if f["rule_id"] == "coalescence-barrier"]
    assert len(found) == 1
    assert found[0]["unit"] == "kcal/mol"  # said in the unit the user wrote
    assert found[0]["recomputed"] == pytest.approx(DG_EXPECTED_KCAL, abs=0.005)
    assert found[0]["reported"] == 16.0


def test_deferred_checks_run_once_when_the_block_ends(database: Database) -> None:
    with api.deferred_checks(database) as block:
        ids = [api.add_measurement(database, _entry(i)) for i in range(5)]
        # each add is committed at once; its check waits for the end of the block
        assert all(_findings(database, mid) == [] for mid in ids)
        assert api.get_measurement(database, ids[-1])["id"] == ids[-1]
    assert block.ids == ids
    assert block.report is not None and block.report.checked == 5
    for mid in ids:
        assert any(f["rule_id"] == "coalescence-barrier" for f in _findings(database, mid))
    assert database.deferred_checks is None  # later adds are checked at once again


def test_deferred_checks_still_run_when_the_block_fails(database: Database) -> None:
    with pytest.raises(ValueError), api.deferred_checks(database):
        first = api.add_measurement(database, _entry(0))
        raise ValueError("the caller's own error")
    assert any(f["rule_id"] == "coalescence-barrier" for f in _findings(database, first))


def test_a_bad_add_inside_the_block_writes_nothing_and_keeps_the_rest(
    database: Database,
) -> None:
    with api.deferred_checks(database) as block:
        good = api.add_measurement(database, _entry(0))
        with pytest.raises(Exception, match="kcal"):
            api.add_measurement(database, _entry(1, dg="16.0 kcal/K"))
    assert block.ids == [good]
    assert len(api.list_measurements(database)) == 1
    with database.read() as conn:
        assert audit.verify_chain(conn) == []
