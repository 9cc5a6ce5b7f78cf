"""Adding measurements through the library: each add is checked at once, or once per block."""

from __future__ import annotations

import math

import pytest
from scipy import constants as C

from registry import api
from registry.record.entry import EntryInput
from registry.storage import audit
from registry.storage.database import Database


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
