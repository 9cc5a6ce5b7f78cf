"""Import and export on PostgreSQL give what they give on SQLite (same files, same registry)."""

from __future__ import annotations

from pathlib import Path

import pytest
from test_io_export import _canonical
from test_io_import import HEADERS, ROWS, count, write_csv, write_xlsx

from registry import api
from registry.api import export_measurements, import_table
from registry.errors import ImportRowError

pytest_plugins = ("conftest_pg",)


def _files(tmp_path: Path) -> list[Path]:
    """A first file, the same again, a corrected version, a workbook with a rates sheet."""
    first = write_csv(tmp_path / "v1.csv", HEADERS, ROWS)
    corrected = [list(r) for r in ROWS]
    corrected[0][7] = 14.9
    book = write_xlsx(
        tmp_path / "book.xlsx",
        {
            "entries": [
                ["label", "compound", "SMILES", "method", "ΔH‡ (kJ/mol)", "ΔS‡ (e.u.)"],
                ["L1", "B1", "Cc1ccccc1-c1ccccc1C", "DNMR", 70.0, -2.0],
            ],
            "rates": [["label", "T (°C)", "k (s-1)"], ["L1", 80, 25.0], ["L1", 90, 60.0]],
        },
    )
    return [first, first, write_csv(tmp_path / "v2.csv", HEADERS, corrected), book]


@pytest.mark.postgres
def test_imports_and_export_match_sqlite(pg_url: str, tmp_path: Path) -> None:
    reports = {}
    registries = {}
    for backend, db in (("sqlite", str(tmp_path / "r.sqlite")), ("postgresql", pg_url)):
        api.init_registry(db)
        database = registries[backend] = api.open_registry(db)
        reports[backend] = [
            {k: r[k] for k in ("added", "updated", "unchanged", "rejected")}
            for r in (import_table(database, f) for f in _files(tmp_path))
        ]
    try:
        assert (
            reports["sqlite"]
            == reports["postgresql"]
            == [
                {"added": 2, "updated": 0, "unchanged": 0, "rejected": 0},
                {"added": 0, "updated": 0, "unchanged": 2, "rejected": 0},
                {"added": 0, "updated": 1, "unchanged": 1, "rejected": 0},
                {"added": 1, "updated": 0, "unchanged": 0, "rejected": 0},
            ]
        )
        pg = registries["postgresql"]
        assert _canonical(pg, uid=False) == _canonical(registries["sqlite"], uid=False)
        assert count(pg, "import_batch") == 4
        # an export from PostgreSQL imports into an empty SQLite registry unchanged
        out = export_measurements(pg, tmp_path / "from_pg.xlsx")["file"]
        api.init_registry(str(tmp_path / "copy.sqlite"))
        copy = api.open_registry(str(tmp_path / "copy.sqlite"))
        try:
            assert import_table(copy, out)["added"] == 3
            assert _canonical(copy) == _canonical(pg)
        finally:
            copy.close()
        # a bad row writes nothing on PostgreSQL either
        bad = write_csv(tmp_path / "bad.csv", HEADERS, [["Z", "C1CC(", "coalescence"]])
        with pytest.raises(ImportRowError):
            import_table(pg, bad)
        assert count(pg, "import_batch") == 4
    finally:
        for database in registries.values():
            database.close()
