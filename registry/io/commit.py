"""Write stage: one transaction for the whole import — batch row, new rows, updates, rate points.

:func:`write_import` runs inside :meth:`~registry.storage.database.Database.write`: the import
batch row, new measurements (:func:`registry.storage.writer.write_entries`), updates of matching
ones (:mod:`.upsert`), rate points for measurements already stored (:mod:`.rates`) and the
batch's counts. The matching is done again under the write lock, so what another writer added
since the file was read is seen. A problem found only here (an entry matching two stored
measurements, a rate row whose label is unknown) rolls everything back unless bad rows are
skipped. The transaction may be retried after a lock timeout, so nothing here has effects
outside the database.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from datetime import UTC, datetime
from pathlib import Path
from typing import Any

from registry.errors import ImportRowError, RowProblem
from registry.io import rates, upsert
from registry.io.results import Prepared
from registry.storage.connection import Connection
from registry.storage.writer import solvent_index, write_entries

#: the counts an import batch row keeps
_COUNTS = ("rows_total", "rows_added", "rows_updated", "rows_unchanged", "rows_rejected")


@dataclass
class ImportOptions:
    """What the caller decided about one import (see :func:`registry.io.importer.import_table`)."""

    path: Path
    actor: str
    skip_bad: bool
    started: datetime = field(default_factory=lambda: datetime.now(UTC))


@dataclass
class Outcome:
    """What the write transaction did."""

    batch_id: int
    added_ids: list[int]
    updated_ids: list[int]
    unchanged_ids: list[int]
    compounds_added: int
    late_problems: list[RowProblem]
    counts: dict[str, int]


def compare_flags(prep: Prepared) -> dict[str, bool]:
    """Which optional parts of a stored measurement the file decides (see :mod:`.upsert`)."""
    plans = prep.read.plans
    return {
        "compare_status": any("status" in plan.value_columns() for plan in plans),
        "compare_extra": any(plan.extra_columns() for plan in plans),
    }


def extras_of(prep: Prepared) -> list[dict[str, Any] | None]:
    """The extra attributes of each prepared entry (None when it has none)."""
    return [prep.read.inputs[i].extra or None for i in prep.kept]


def write_import(conn: Connection, prep: Prepared, options: ImportOptions) -> Outcome:
    """The whole import in the caller's write transaction (see the module docstring)."""
    read = prep.read
    batch_id = conn.insert(
        "import_batch",
        {
            "file_name": options.path.name,
            "sha256": read.sha256,
            "sheet": ", ".join(p.sheet for p in read.plans if p.sheet) or None,
            "actor": options.actor,
            "started_at": options.started,
            "finished_at": None,
            "status": "running",
            **dict.fromkeys(_COUNTS, 0),  # the columns have no server default
        },
        returning="id",
    )
    extras = extras_of(prep)
    plan = upsert.plan_upsert(conn, prep.entries, prep.structures, extras, **compare_flags(prep))
    late = _ambiguous_problems(prep, plan.ambiguous)
    rate_plan, rate_problems = rates.plan_rate_rows(conn, read)
    late.extend(rate_problems)
    problems = prep.problems()
    if late and not options.skip_bad:
        raise ImportRowError(sorted(problems + late, key=lambda p: (p.sheet or "", p.row or 0)))
    result = None
    if plan.new:
        result = write_entries(
            conn,
            [prep.entries[i] for i in plan.new],
            [prep.structures[i] for i in plan.new],
            actor=options.actor,
            batch_id=batch_id,
            extras=[extras[i] for i in plan.new],
            source_rows=[read.sources[prep.kept[i]].row for i in plan.new],
        )
    upsert.apply_changes(
        conn,
        plan.changes,
        actor=options.actor,
        batch_id=batch_id,
        solvent_ids=solvent_index(conn),
        entries=prep.entries,
    )
    rates_changed = rates.apply_rate_plan(conn, rate_plan, options.actor, batch_id)
    rejected_rows = {(p.sheet, p.row) for p in problems + late}
    counts = {
        "rows_total": rows_read(prep),
        "rows_added": len(plan.new),
        "rows_updated": len(plan.changes) + rates_changed,
        "rows_unchanged": len(plan.unchanged) + len(rate_plan) - rates_changed,
        "rows_rejected": len(rejected_rows),
    }
    status = "partial" if rejected_rows else "done"
    conn.update(
        "import_batch",
        {"finished_at": datetime.now(UTC), "status": status, **counts},
        id=batch_id,
    )
    return Outcome(
        batch_id=batch_id,
        added_ids=result.measurement_ids if result else [],
        updated_ids=[c.measurement_id for c in plan.changes],
        unchanged_ids=[mid for _, mid in plan.unchanged],
        compounds_added=result.compounds_added if result else 0,
        late_problems=late,
        counts=counts,
    )


def rows_read(prep: Prepared) -> int:
    """Data rows read from the file: entries, good rate rows and bad rate rows."""
    read = prep.read
    return len(read.inputs) + len(read.rate_rows) + len(read.bad_rate_rows)


def _ambiguous_problems(prep: Prepared, ambiguous: list[tuple[int, list[int]]]) -> list[RowProblem]:
    out = []
    for i, ids in ambiguous:
        src = prep.read.sources[prep.kept[i]]
        out.append(
            RowProblem(
                prep.read.file, src.sheet, src.row, None, None,
                f"matches {len(ids)} measurements already in the registry "
                f"(ids {', '.join(map(str, ids))}); give it a label to tell them apart",
            )
        )  # fmt: skip
    return out
