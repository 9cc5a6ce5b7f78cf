"""Import a spreadsheet: map headers, read and check every row, then write it all in one go.

The orchestrator over the stages (STYLE.md §11), each in its own module:

1. read sheets and plan their columns — :mod:`.sheets` (over :mod:`.readers`, :mod:`.mapping`);
2. build one :class:`~registry.record.entry.EntryInput` per row — :mod:`.entries`, :mod:`.rates`;
3. normalize values and parse structures (a process pool for big files) — :mod:`.prepare`,
   :mod:`.parallel`; screen compound conflicts and duplicates — :mod:`.conflicts`;
4. match existing measurements (:mod:`.matching`: uid, label, natural key) and merge each
   matched one three ways with the registry — :mod:`.upsert`, :mod:`.merge`, :mod:`.lineage`;
5. write everything in one transaction — :mod:`.commit`, with a snapshot of what the file said
   (:mod:`.snapshots`); report — :mod:`.report`.

*Every* problem is collected with its file, sheet, row, column and text before the database is
touched. Without ``skip_bad`` any problem raises :class:`~registry.errors.ImportRowError` and
nothing is written; any failure or Ctrl-C before the commit leaves the registry as it was. With
``skip_bad`` the rows with problems are left out (and written to a side CSV with the reason)
and the rest is imported, still in one transaction; the side CSV's path is checked
(:func:`registry.outputs.check_target`) before anything is read, so a bad one costs nothing.

A re-import never silently undoes work done in the registry (see :mod:`.merge`): a measurement
whose fields were changed both in the file and in the registry is held back — nothing written
for it, the rest of the file is — unless ``prefer`` ("file" or "registry") decides; an empty
cell clears a value only with ``empty_clears``.
"""

from __future__ import annotations

from pathlib import Path
from typing import Any

from registry.errors import ImportRowError, UsageError
from registry.io import commit, prepare, rates, report, upsert
from registry.io.merge import PREFER, MergeOptions
from registry.io.results import Progress
from registry.outputs import OutputError, check_target
from registry.storage.connection import Connection
from registry.storage.database import Database, current_user


def import_table(
    database: Database,
    path: str | Path,
    *,
    sheet: str | None = None,
    mapping: str | Path | None = None,
    dry_run: bool = False,
    skip_bad: bool = False,
    rejects: str | Path | None = None,
    actor: str | None = None,
    progress: Progress | None = None,
    workers: int | None = None,
    prefer: str | None = None,
    empty_clears: bool = False,
) -> dict[str, Any]:
    """Import one file; returns the import report (see :func:`registry.api.import_table`)."""
    if prefer is not None and prefer not in PREFER:
        raise UsageError(f"prefer must be one of {', '.join(PREFER)} (got {prefer!r})")
    merge = MergeOptions(prefer=prefer, empty_clears=empty_clears)
    path = Path(path)
    target = None
    if skip_bad and (rejects or not dry_run):  # before any work, and before the transaction
        target = check_target(
            rejects or report.default_rejects_path(path), what="rejects", protect=database.path,
            inputs=[path, *([mapping] if mapping else [])],
        )  # fmt: skip
    who = actor or current_user()
    prep = prepare.prepare(
        database,
        path,
        sheet=sheet,
        mapping=mapping,
        workers=workers,
        progress=progress,
        stop_early=not skip_bad and not dry_run,
    )
    summary = report.base_report(path, prep, dry_run=dry_run)
    problems = prep.problems()
    header_problem = any(p.row == plan.header_row for p in problems for plan in prep.read.plans)
    if dry_run:
        with database.read() as conn:
            plan = upsert.plan_upsert(conn, prep, merge)
            rate_plan, rate_problems = rates.plan_rate_rows(conn, prep.read)
            rate_plan, rate_merges, _ = upsert.merge_rate_plan(conn, prep, rate_plan, merge)
            plan.merges.extend(rate_merges)
        late = commit.late_problems(prep, plan) + rate_problems
        return report.dry_run_report(summary, prep, plan, rate_plan, late)
    if problems and (not skip_bad or header_problem):
        raise ImportRowError(problems)
    options = commit.ImportOptions(path=path, actor=who, skip_bad=skip_bad, merge=merge)

    def work(conn: Connection) -> commit.Outcome:
        return commit.write_import(conn, prep, options)

    outcome = database.write(work)
    report.written_report(summary, prep, outcome)
    all_problems = problems + outcome.late_problems
    if all_problems and target is not None:
        try:
            report.write_rejects(target, prep.read, all_problems)
            summary["rejects_file"] = str(target)
        except OutputError as exc:  # the import stands: say so, with the rows listed anyway
            summary["rejects_error"] = f"{exc}; the import itself was written"
    touched = outcome.added_ids + outcome.updated_ids
    summary["validation"] = report.validation_report(database, touched, who)
    return summary
