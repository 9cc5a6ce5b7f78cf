"""Write stage: one transaction for the whole import — batch row, new rows, updates, rate points.

:func:`write_import` runs inside :meth:`~registry.storage.database.Database.write`: the import
batch row, new measurements (:func:`registry.storage.writer.write_entries`; a uid the file
brings from another registry is kept), the changes the three-way merge decided for matched ones
(:mod:`.upsert`), the snapshots of what the file said (:mod:`.snapshots`), rate points for
measurements already stored (:mod:`.rates`) and the batch's counts. The matching and merging
are done again under the write lock, so what another writer changed since the file was read is
seen. A problem found only here (an entry matching two stored measurements, two rows that are
one measurement, a merged row that does not add up, a rate row whose label is unknown) rolls
everything back unless bad rows are skipped. Measurements with an unresolved conflict are held
back (nothing written for them, counted as rejected in the batch row, status ``partial``); the
rest of the file is written. The transaction may be retried after a lock timeout, so nothing
here has effects outside the database.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from datetime import UTC, datetime
from pathlib import Path
from typing import Any

from registry.errors import ImportRowError, RowProblem
from registry.io import changes, rates, upsert
from registry.io.merge import MergeOptions
from registry.io.results import Prepared
from registry.io.snapshots import write_snapshots
from registry.storage.connection import Connection
from registry.storage.writer import WriteResult, write_entries

#: the counts an import batch row keeps
_COUNTS = ("rows_total", "rows_added", "rows_updated", "rows_unchanged", "rows_rejected")


@dataclass
class ImportOptions:
    """What the caller decided about one import (see :func:`registry.io.importer.import_table`)."""

    path: Path
    actor: str
    skip_bad: bool
    merge: MergeOptions = field(default_factory=MergeOptions)
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
    plan: upsert.UpsertPlan
    snapshots: int = 0


def extras_of(prep: Prepared) -> list[dict[str, Any] | None]:
    """The extra attributes of each prepared entry (None when it has none)."""
    return [prep.read.inputs[i].extra or None for i in prep.kept]


def late_problems(prep: Prepared, plan: upsert.UpsertPlan) -> list[RowProblem]:
    """Problems found only by matching against the registry (the plan's and ambiguous rows)."""
    return _ambiguous_problems(prep, plan.ambiguous) + plan.problems


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
    plan = upsert.plan_upsert(conn, prep, options.merge)
    late = late_problems(prep, plan)
    rate_plan, rate_problems = rates.plan_rate_rows(conn, read)
    late.extend(rate_problems)
    rate_total = len(rate_plan)
    rate_plan, rate_merges, rate_snapshots = upsert.merge_rate_plan(
        conn, prep, rate_plan, options.merge
    )
    plan.merges.extend(rate_merges)
    problems = prep.problems()
    if late and not options.skip_bad:
        raise ImportRowError(sorted(problems + late, key=lambda p: (p.sheet or "", p.row or 0)))
    added = _write_new(conn, prep, plan, options.actor, batch_id)
    changes.apply_changes(conn, prep, plan.changes, actor=options.actor, batch_id=batch_id)
    late_rows = {(p.sheet, p.row) for p in late}
    skip = {
        i for i in plan.matched if _source_key(prep, i) in late_rows
    }  # rows rejected after matching: no snapshot, so their news is not forgotten
    snapshots = write_snapshots(
        conn, prep, plan, added.measurement_ids if added else [], batch_id, skip, rate_snapshots
    )
    rates_changed = rates.apply_rate_plan(conn, rate_plan, options.actor, batch_id)
    rejected_rows = {(p.sheet, p.row) for p in problems + late}
    held = len(plan.held)
    rates_held = sum(1 for m in rate_merges if m.held)
    counts = {
        "rows_total": rows_read(prep),
        "rows_added": len(plan.new),
        "rows_updated": len(plan.changes) + rates_changed,
        "rows_unchanged": len(plan.unchanged) + rate_total - rates_changed - rates_held,
        "rows_rejected": len(rejected_rows) + held,  # held back by a conflict: not imported
    }
    status = "partial" if rejected_rows or held else "done"
    conn.update(
        "import_batch",
        {"finished_at": datetime.now(UTC), "status": status, **counts},
        id=batch_id,
    )
    return Outcome(
        batch_id=batch_id,
        added_ids=added.measurement_ids if added else [],
        updated_ids=[c.measurement_id for c in plan.changes],
        unchanged_ids=[mid for _, mid in plan.unchanged],
        compounds_added=added.compounds_added if added else 0,
        late_problems=late,
        counts=counts,
        plan=plan,
        snapshots=snapshots,
    )


def _source_key(prep: Prepared, index: int) -> tuple[str | None, int]:
    src = prep.read.sources[prep.kept[index]]
    return src.sheet, src.row


def _write_new(
    conn: Connection, prep: Prepared, plan: upsert.UpsertPlan, actor: str, batch_id: int
) -> WriteResult | None:
    """Insert the new entries; a uid the file brings from another registry is kept."""
    if not plan.new:
        return None
    extras = extras_of(prep)
    result = write_entries(
        conn,
        [prep.entries[i] for i in plan.new],
        [prep.structures[i] for i in plan.new],
        actor=actor,
        batch_id=batch_id,
        extras=[extras[i] for i in plan.new],
        source_rows=[prep.read.sources[prep.kept[i]].row for i in plan.new],
    )
    uids = prep.uids
    kept_uids = [
        {"uid": uids[i], "id": mid}
        for i, mid in zip(plan.new, result.measurement_ids, strict=True)
        if uids[i]
    ]
    if kept_uids:
        conn.execute_many("UPDATE measurement SET uid = :uid WHERE id = :id", kept_uids)
    return result


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
