"""Figures, tables and the HTML report read a PostgreSQL registry with the same SQL as SQLite.

Invented demo measurements on real structures (N,N-dimethylformamide, N,N-dimethylacetamide).
"""

from __future__ import annotations

import math
from pathlib import Path

import pytest
from scipy import constants as codata

from registry import api
from registry.errors import NotFoundError
from registry.record.entry import EntryInput
from registry.reports import gather
from registry.reports.table_file import export_table

pytest_plugins = ("conftest_pg",)
pytestmark = pytest.mark.postgres

TEMPS_K = (283.0, 293.0, 303.0, 313.0)


def eyring_k(t_k: float) -> float:
    """k = (k_B·T/h)·exp(−ΔG‡/RT) with ΔH‡ 60 kJ/mol and ΔS‡ 0 (Eyring 1935); CODATA."""
    return codata.k * t_k / codata.h * math.exp(-60000.0 / (codata.R * t_k))


@pytest.fixture
def pg_registry(pg_url: str):  # type: ignore[no-untyped-def]
    api.init_registry(pg_url)
    database = api.open_registry(pg_url)
    ids = {
        "rates": api.add_measurement(
            database,
            EntryInput(method="lineshape", compound="DEMO-PG1", smiles="CC(=O)N(C)C",
                       process="bond-rotation", solvent="toluene-d8", dg="60 kJ/mol",
                       rates=[(f"{t:g} K", f"{eyring_k(t):.10g} s-1") for t in TEMPS_K]),
            check=False,
        ),
        "coalescence": api.add_measurement(
            database,
            EntryInput(method="coalescence", compound="DEMO-PG2", name="dimethylformamide",
                       smiles="CN(C)C=O", process="bond-rotation", solvent="CDCl3",
                       field="400 MHz", tc="45 °C", dnu="0.2 ppm", dg="66.0 ± 0.4 kJ/mol"),
            check=False,
        ),
    }  # fmt: skip
    yield database, ids
    database.close()


def test_figures_on_postgresql(pg_registry, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    database, ids = pg_registry
    eyring = api.plot_eyring(database, measurement_id=ids["rates"], out=tmp_path / "e.svg")
    assert eyring.summary.dh_kj_mol == pytest.approx(60.0, abs=1e-5)
    with pytest.raises(NotFoundError):
        gather.rate_series(database, 999)
    by_name = api.plot_coalescence(
        database, out=tmp_path / "c.svg", barrier=66.0, dnu=0.2, compound="FORMAMIDE"
    )  # ILIKE on the server: the name matches whatever its case
    assert [o["measurement_id"] for o in by_name.observed] == [ids["coalescence"]]
    own = api.plot_coalescence(database, out=tmp_path / "m.svg", measurement_id=ids["coalescence"])
    assert own.solvent is not None and own.solvent["name"] == "chloroform-d"
    overview = api.plot_overview(database, out=tmp_path / "o.svg", by="kind")
    assert overview.groups == (
        {"group": "bond-rotation", "n": 2, "min_kj_mol": 60.0, "max_kj_mol": 66.0, "flagged": 0},
    )
    # once checked, 66.0 kJ/mol is flagged: Tc 318.15 K and Δν 0.2 ppm × 400 MHz = 80 Hz give
    # 64.39 kJ/mol (Gutowsky–Holm k_c = πΔν/√2, Eyring, CODATA; computed beside the test)
    api.check(database)
    checked = api.plot_overview(database, out=tmp_path / "o.svg", by="kind")
    assert checked.groups == (
        {"group": "bond-rotation", "n": 1, "min_kj_mol": 60.0, "max_kj_mol": 60.0, "flagged": 0},
    )
    assert checked.left_out_flagged == 1


def test_report_and_tables_on_postgresql(pg_registry, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    database, ids = pg_registry
    rows = gather.measurements_for_report(database)
    assert [r["id"] for r in rows] == sorted(ids.values())
    by_id = {r["id"]: r for r in rows}
    assert [p["t_k"] for p in by_id[ids["rates"]]["rate_points"]] == list(TEMPS_K)
    assert by_id[ids["coalescence"]]["coalescence"][0]["tc_k"] == pytest.approx(318.15)
    result = api.build_report(database, tmp_path / "site", plots=False)
    assert result.measurements == 2 and result.compound_pages == 2
    table = export_table(database, tmp_path / "t.md", barrier_min="63 kJ/mol")
    assert table["measurements"] == 1
    assert "DEMO-PG2" in (tmp_path / "t.md").read_text(encoding="utf-8")
