"""Bulk look-ups of registry rows: a table scan and IN lists must give the same rows."""

from __future__ import annotations

import math

import pytest

from registry import api
from registry.record.entry import EntryInput
from registry.storage import lookup
from registry.storage.database import Database
from registry.storage.models import Compound


def _fill(database: Database) -> None:
    smiles = ["CCO", "CCN", "CC(=O)N(C)C", "c1ccccc1", None, None]
    for i, smi in enumerate(smiles):
        api.add_measurement(
            database,
            EntryInput(
                method="computed",
                smiles=smi,
                compound=f"K{i}" if i != 4 else None,
                name="unlabelled" if i == 4 else None,
                dg=f"{60 + i} kJ/mol",
            ),
            check=False,
        )


@pytest.mark.parametrize("scan", [True, False])
def test_scan_and_in_lists_find_the_same_rows(
    database: Database, monkeypatch: pytest.MonkeyPatch, scan: bool
) -> None:
    with database.read() as conn:  # an empty registry: nothing, whichever way
        assert (
            lookup.rows_where_in(conn, [Compound.id, Compound.label], Compound.label, ["K1"]) == []
        )
    _fill(database)
    monkeypatch.setattr(lookup, "SCAN_KEYS_PER_ROW", 0.0 if scan else math.inf)
    monkeypatch.setattr(lookup, "IN_CHUNK", 2)
    with database.read() as conn:
        labels = sorted(
            r[1]
            for r in lookup.rows_where_in(
                conn, [Compound.id, Compound.label], Compound.label, ["K0", "K3", "K9", None, "K5"]
            )
        )
        assert labels == ["K0", "K3", "K5"]
        keyed = lookup.rows_where_in(
            conn,
            [Compound.inchikey, Compound.label],
            Compound.inchikey,
            [
                "LFQSCWFLJHTTHZ-UHFFFAOYSA-N",
                "NOT-A-KEY",
            ],  # ethanol (PubChem CID 702)  # from memory
        )
        assert keyed == [("LFQSCWFLJHTTHZ-UHFFFAOYSA-N", "K0")]
        named = lookup.rows_where_in(
            conn,
            [Compound.id, Compound.name],
            Compound.name,
            ["unlabelled"],
            Compound.label.is_(None),
        )
        assert [r[1] for r in named] == ["unlabelled"]
        assert lookup.rows_where_in(conn, [Compound.id], Compound.id, []) == []
