"""Conventions and ΔG‡ at a common temperature on PostgreSQL: the same SQL, the same answers
as on SQLite. Check values: ΔG‡(T) = ΔH‡ − T·ΔS‡ (Eyring 1935), computed here."""

from __future__ import annotations

from collections.abc import Iterator
from pathlib import Path

import pytest

from registry import api
from registry.record.entry import EntryInput
from registry.storage import database as store

pytest_plugins = ("conftest_pg",)
pytestmark = pytest.mark.postgres


@pytest.fixture(params=["sqlite", "postgresql"])
def both(request: pytest.FixtureRequest, tmp_path: Path) -> Iterator[store.Database]:
    if request.param == "sqlite":
        location = str(tmp_path / "r.sqlite")
    else:
        location = request.getfixturevalue("pg_url")
    database = store.create_registry(location)
    yield database
    database.close()


def _add(database: store.Database, **texts: str) -> int:
    base = {"method": "lineshape", "process": "bond-rotation", "nucleus": "1H",
            "solvent": "toluene-d8"}  # fmt: skip
    return api.add_measurement(database, EntryInput(**{**base, **texts}), actor="t")  # type: ignore[arg-type]


def test_common_temperature_and_conventions_on_both(both: store.Database) -> None:
    a = _add(both, compound="PG-A", smiles="CN(C)C(=O)c1ccccc1", dh="62 ± 1 kJ/mol",
             ds="-10 ± 3 J/(mol K)", dh_ds_corr="0.99", t_min="280 K", t_max="320 K",
             convention="k_ex", calibration="methanol")  # fmt: skip
    b = _add(both, compound="PG-B", smiles="CCN(CC)C(=O)c1ccccc1", dh="75 kJ/mol",
             ds="10 J/(mol K)", rates=[("340 K", "20 s-1"), ("360 K", "90 s-1")])  # fmt: skip
    rows = {r["id"]: r for r in api.list_measurements(both, at="298.15 K", sort="-barrier")}
    assert list(rows) == [b, a]
    assert rows[a]["dg_at_kj_mol"] == pytest.approx(62.0 + 298.15 * 0.010)
    assert rows[b]["dg_at_kj_mol"] == pytest.approx(75.0 - 298.15 * 0.010)
    assert (rows[a]["extrapolated"], rows[b]["extrapolated"]) == ("no", "yes")  # b: 340–360 K
    assert rows[a]["k_convention"] == "exchange"
    found = api.find(both, smarts="C(=O)N", at="25 °C", barrier="<= 65 kJ/mol")
    assert [r["id"] for r in found.rows] == [a]
    assert api.get_measurement(both, a)["t_calibration_err_k"] == pytest.approx(0.5)
    assert api.verify(both)["ok"]
