"""Structures as RDKit reads them, and the hash-chained history."""

from __future__ import annotations

import pytest

from registry import api
from registry.errors import StructureError
from registry.record.chem import read_structure
from registry.record.entry import EntryInput
from registry.storage import audit


def test_standard_inchikey_of_a_known_compound() -> None:
    # N,N-dimethylacetamide; InChIKey as listed in PubChem (CID 31374)  # from memory
    s = read_structure("CC(=O)N(C)C")
    assert s.ok
    assert s.inchikey == "FXHOOIRPVKKKFG-UHFFFAOYSA-N"
    assert s.formula == "C4H9NO"
    assert s.net_charge == 0


def test_aromatic_and_kekule_spellings_are_one_compound() -> None:
    assert read_structure("c1ccccc1C").inchikey == read_structure("C1=CC=CC=C1C").inchikey


def test_unsanitizable_structure_is_kept_with_reason() -> None:
    s = read_structure("C[N](C)(C)(C)C")  # five-valent neutral N: parses, cannot be sanitized
    assert not s.ok
    assert "valence" in (s.problem or "")
    assert s.smiles_canonical


@pytest.mark.parametrize("bad", ["C1CC(", "", "Xx"])
def test_unreadable_smiles_is_refused(bad: str) -> None:
    with pytest.raises(StructureError):
        read_structure(bad)


def test_unsanitizable_compound_is_stored_flagged(database) -> None:  # type: ignore[no-untyped-def]
    mid = api.add_measurement(
        database,
        EntryInput(method="computed", smiles="C[N](C)(C)(C)C", compound="ODD-1", dg="80 kJ/mol"),
    )
    record = api.get_measurement(database, mid)
    assert record["compound"]["structure_ok"] is False
    assert "valence" in record["compound"]["structure_problem"]


def test_history_chain_detects_an_edit(database) -> None:  # type: ignore[no-untyped-def]
    for i in range(3):
        api.add_measurement(
            database, EntryInput(method="computed", compound=f"C-{i}", dg=f"{60 + i} kJ/mol")
        )
    with database.read() as conn:
        assert audit.verify_chain(conn) == []
    database.write(lambda conn: conn.execute("UPDATE revision SET actor = 'mallory' WHERE id = 2"))
    with database.read() as conn:
        problems = audit.verify_chain(conn)
    assert problems and problems[0].startswith("revision 2: content does not match its hash")


def test_history_chain_detects_a_deleted_revision(database) -> None:  # type: ignore[no-untyped-def]
    for i in range(3):
        api.add_measurement(
            database, EntryInput(method="computed", compound=f"C-{i}", dg=f"{60 + i} kJ/mol")
        )
    database.write(lambda conn: conn.execute("DELETE FROM revision WHERE id = 2"))
    with database.read() as conn:
        problems = audit.verify_chain(conn)
    assert problems and problems[0].startswith("revision 3: previous-hash link broken")
