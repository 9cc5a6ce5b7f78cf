"""The value a column takes when a new row does not give one (the models' column defaults).

Written out here so that inserts need neither SQLAlchemy nor the models;
``tests/test_storage.py`` holds this table equal to the defaults in
:mod:`registry.storage.models`.
"""

from __future__ import annotations

from typing import Any

COLUMN_DEFAULTS: dict[str, dict[str, Any]] = {
    "compound": {"structure_ok": True},
    "import_batch": {
        "rows_total": 0,
        "rows_added": 0,
        "rows_updated": 0,
        "rows_unchanged": 0,
        "rows_rejected": 0,
        "status": "done",
    },
    "motif": {"description": ""},
    "process_kind": {"description": ""},
    "solvent": {"formula": "", "deuterated": True, "source": "", "aliases": ""},
    "process": {"sites": "", "nucleus": ""},
    "measurement": {"status": "draft"},
}


def with_defaults(table: str, row: dict[str, Any]) -> dict[str, Any]:
    """``row`` with the defaults of the columns it leaves out."""
    missing = {k: v for k, v in COLUMN_DEFAULTS.get(table, {}).items() if k not in row}
    return {**row, **missing} if missing else row
