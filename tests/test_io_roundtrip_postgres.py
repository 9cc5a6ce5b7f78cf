"""The re-import rules on PostgreSQL give what they give on SQLite (same files, same edits)."""

from __future__ import annotations

from pathlib import Path
from typing import Any

import pytest
from test_io_export import _canonical
from test_io_roundtrip import ROWS, changed, sheet

from registry import api
from registry.api import export_measurements, import_table

pytest_plugins = ("conftest_pg",)


def _story(database: Any, tmp_path: Path, tag: str) -> list[dict[str, Any]]:
    """Import, correct in the registry, re-import old and corrected sheets, export, re-import."""
    folder = tmp_path / tag
    folder.mkdir()
    out = []

    def run(path: Path, **options: Any) -> None:
        r = import_table(database, path, actor="kofi", **options)
        out.append(
            {
                "counts": (r["added"], r["updated"], r["unchanged"], r["rejected"], r["held"]),
                "matched_by": r["matched_by"],
                "fields": sorted(
                    (kind, x["measurement_id"], x["field"], x["registry"], x["file"], x["why"])
                    for kind in ("updates", "kept", "conflicts")
                    for x in r[kind]
                ),
            }
        )

    first = sheet(folder, "group.xlsx", ROWS)
    run(first)
    api.edit_measurement(database, 1, {"dg": "20.5 kcal/mol"}, actor="ingrid")
    api.edit_measurement(database, 3, {"status": "reviewed"}, actor="ingrid")
    run(first)
    run(sheet(folder, "group.xlsx", changed(ROWS, m1_solvent="CDCl3", m1_dg=19.5, m3_ref="x")))
    run(folder / "group.xlsx", prefer="file")
    export_measurements(database, folder / "export.csv")
    run(folder / "export.csv")
    return out


@pytest.mark.postgres
def test_reimport_rules_match_sqlite(pg_url: str, tmp_path: Path) -> None:
    stories = {}
    registries = {}
    for backend, db in (("sqlite", str(tmp_path / "r.sqlite")), ("postgresql", pg_url)):
        api.init_registry(db)
        registries[backend] = api.open_registry(db)
        stories[backend] = _story(registries[backend], tmp_path, backend)
    try:
        assert stories["sqlite"] == stories["postgresql"]
        counts = [step["counts"] for step in stories["postgresql"]]
        assert counts == [
            (3, 0, 0, 0, []),  # new
            (0, 0, 3, 0, []),  # the corrections kept
            (0, 0, 1, 0, [1, 3]),  # conflict on 1, reviewed 3: both held
            (0, 2, 1, 0, []),  # decided for the file
            (0, 0, 3, 0, []),  # its own export changes nothing
        ]
        pg, lite = registries["postgresql"], registries["sqlite"]
        assert _canonical(pg, uid=False) == _canonical(lite, uid=False)
    finally:
        for database in registries.values():
            database.close()
