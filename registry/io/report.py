"""The import report: what was read and mapped, what would or did change, every problem.

The report is a plain dict (the CLI prints it as text or ``--json``; a notebook reads its
keys). Rejected rows go to a side CSV with sheet, row, column, text and reason, followed by the
row's original cells, neutralised against formula evaluation like an export.
"""

from __future__ import annotations

import csv
from collections import Counter, defaultdict
from collections.abc import Sequence
from pathlib import Path
from typing import Any

from registry.errors import RowProblem
from registry.io.cells import neutralise
from registry.io.commit import Outcome, rows_read
from registry.io.merge import CONFLICT, KEEP, UPDATE, WHY, FieldMerge
from registry.io.results import Prepared, ReadResult, problem_record
from registry.io.upsert import UpsertPlan
from registry.outputs import write_atomically
from registry.record.chem import Structure
from registry.record.entry import NormalizedEntry
from registry.storage.database import Database

#: rows and changes a dry run shows
PREVIEW_ROWS = 5


def base_report(path: Path, prep: Prepared, *, dry_run: bool) -> dict[str, Any]:
    """What every report holds: the file, its sheets and their mapping, notes and problems."""
    read = prep.read
    notes = list(read.notes)
    if read.blank_markers:
        notes.append(f"{read.blank_markers} cell(s) such as 'n.d.' or '–' were read as empty")
    return {
        "file": str(path),
        "sha256": read.sha256,
        "sheets": [p.sheet for p in read.plans],
        "mapping": {p.sheet or path.name: p.describe() for p in read.plans},
        "sheet_kinds": {p.sheet or path.name: p.kind for p in read.plans},
        "rows_read": rows_read(prep),
        "notes": notes,
        "problems": [problem_record(p) for p in prep.problems()],
        "dry_run": dry_run,
    }


def dry_run_report(
    report: dict[str, Any],
    prep: Prepared,
    plan: UpsertPlan,
    rate_plan: dict[int, list[dict[str, Any]]],
    late_problems: list[RowProblem],
) -> dict[str, Any]:
    """What an import would do: counts, the first rows as stored, every change, kept value and
    conflict."""
    problems = prep.problems() + late_problems
    previews = zip(prep.entries[:PREVIEW_ROWS], prep.structures[:PREVIEW_ROWS], strict=True)
    report.update(
        would_add=len(plan.new),
        would_update=len(plan.changes),
        unchanged=len(plan.unchanged),
        would_hold=len(plan.held),
        would_reject=len({(p.sheet, p.row) for p in problems}),
        rate_points_for_existing=sum(len(v) for v in rate_plan.values()),
        preview=[_preview(e, s) for e, s in previews],
        changes=[
            {"measurement_id": c.measurement_id, "before": c.before, "after": c.after}
            for c in plan.changes
        ],
        **merge_report(prep, plan),
        problems=[problem_record(p) for p in sorted(problems, key=_order)],
    )
    return report


def _order(p: RowProblem) -> tuple[str, int, str]:
    return (p.sheet or "", p.row or 0, p.column or "")


def merge_report(prep: Prepared, plan: UpsertPlan) -> dict[str, Any]:
    """The three-way merge's outcome, field by field: updates, kept values, conflicts.

    ``updates`` are the file's texts written (``registry`` the text before, ``file`` after);
    ``pending`` the updates of measurements held back by a conflict (written once it is
    decided); ``kept`` the registry's texts left as they are although the file differs;
    ``conflicts`` every field changed on both sides (``resolved``: "file" or "registry" when
    ``prefer`` decided it, else None and the measurement is in ``held``: nothing written).
    ``changed_by``/``changed_at``/``change`` say which revision set the registry's text.
    """
    written = {c.measurement_id for c in plan.changes}
    out: dict[str, list[dict[str, Any]]] = {
        "updates": [], "pending": [], "kept": [], "conflicts": []
    }  # fmt: skip
    for mm in plan.merges:
        where = {"measurement_id": mm.measurement_id, "sheet": mm.sheet, "row": mm.row}
        for fm in mm.fields:
            item = {**where, **_field_record(fm)}
            if fm.decision == CONFLICT:
                out["conflicts"].append(item)
            if fm.decision == UPDATE and mm.held:
                out["pending"].append(item)
            elif fm.applied and not mm.held and mm.measurement_id in written:
                out["updates"].append(item)
            elif fm.decision == KEEP or fm.resolved == "registry":
                out["kept"].append(item)
    counts = Counter(plan.matched_by.values())
    return {
        **out,
        "held": [mm.measurement_id for mm in plan.held],
        "matched_by": {how: counts[how] for how in ("uid", "label", "key") if counts[how]},
    }


def _field_record(fm: FieldMerge) -> dict[str, Any]:
    setter = fm.setter
    return {
        "field": fm.field,
        "registry": fm.registry,
        "file": fm.file,
        "last_import": fm.base,
        "decision": fm.decision,
        "why": WHY[fm.why],
        "resolved": fm.resolved,
        "changed_by": setter.actor if setter else None,
        "changed_at": setter.at.isoformat(timespec="seconds") if setter and setter.at else None,
        "change": setter.action if setter else None,
    }


def written_report(report: dict[str, Any], prep: Prepared, outcome: Outcome) -> dict[str, Any]:
    """What an import did: the batch, counts, the ids of added/updated/unchanged/held rows and
    the merge's details (see :func:`merge_report`)."""
    counts = outcome.counts
    report.update(
        batch_id=outcome.batch_id,
        added=counts["rows_added"],
        updated=counts["rows_updated"],
        unchanged=counts["rows_unchanged"],
        rejected=counts["rows_rejected"] - len(outcome.plan.held),
        compounds_added=outcome.compounds_added,
        snapshots=outcome.snapshots,
        measurement_ids={
            "added": outcome.added_ids,
            "updated": outcome.updated_ids,
            "unchanged": outcome.unchanged_ids,
            "held": [mm.measurement_id for mm in outcome.plan.held],
        },
        **merge_report(prep, outcome.plan),
        problems=[
            problem_record(p) for p in sorted(prep.problems() + outcome.late_problems, key=_order)
        ],
    )
    return report


def _preview(entry: NormalizedEntry, structure: Structure | None) -> dict[str, Any]:
    m = entry.measurement
    co = entry.coalescence or {}
    return {
        "compound": entry.compound.get("label") or entry.compound.get("name"),
        "smiles": structure.smiles_canonical if structure else None,
        "inchikey": structure.inchikey if structure else None,
        "process": entry.process["kind"] if entry.process else None,
        "method": m["method"],
        "solvent": m["solvent_text"],
        "dg_kj_mol": m["dg_kj_mol"],
        "dg_text": m["dg_text"],
        "tc_k": co.get("tc_k"),
        "dnu_hz": co.get("dnu_hz"),
        "field_mhz": m["field_mhz"],
        "rate_points": len(entry.rates),
        "label": m["label"],
    }


def default_rejects_path(path: Path) -> Path:
    """``data.xlsx`` → ``data.rejected.csv`` beside it."""
    return path.with_name(f"{path.stem}.rejected.csv")


def write_rejects(target: Path, read: ReadResult, problems: Sequence[RowProblem]) -> None:
    """The rejected rows with sheet, row, column and reason, plus their original cells; written
    whole or not at all (``target`` was checked before the import)."""
    by_row: dict[tuple[str | None, int], list[RowProblem]] = defaultdict(list)
    for p in problems:
        by_row[(p.sheet, p.row or 0)].append(p)
    sources = {(src.sheet, src.row): src for src in read.sources}
    cells = {key: sources[key].cells for key in by_row if key in sources}
    headers: list[str] = []
    for plan in read.plans:
        headers.extend(c.header for c in plan.columns if c.header not in headers)
    with write_atomically(target, newline="") as fh:
        writer = csv.writer(fh)
        writer.writerow(["sheet", "row", "column", "text", "reason", *headers])
        for (sheet, row), probs in sorted(
            by_row.items(), key=lambda kv: (kv[0][0] or "", kv[0][1])
        ):
            original = cells.get((sheet, row), {})
            writer.writerow(
                [
                    sheet or "",
                    row,
                    " | ".join(p.column or "" for p in probs),
                    " | ".join(p.text or "" for p in probs),
                    " | ".join(p.reason for p in probs),
                    *[
                        neutralise("" if (v := original.get(h)) is None else str(v))
                        for h in headers
                    ],
                ]
            )


def validation_report(
    database: Database, measurement_ids: Sequence[int], actor: str | None = None
) -> dict[str, Any]:
    """Run the validation rules (:func:`registry.validation.check_measurements`) on the new and
    changed measurements; their findings are stored and counted in the import report."""
    if not measurement_ids:
        return {"available": True, "checked": 0, "findings": {}, "list": []}
    try:
        from registry.validation import check_measurements
    except ImportError:  # an installation without the rules: the import still stands
        return {"available": False, "checked": 0, "findings": {}, "list": []}
    report = check_measurements(database, list(measurement_ids), actor=actor)
    counts = {k: v for k, v in report.counts.items() if k in ("error", "warning", "note")}
    return {
        "available": True,
        "checked": report.checked,
        "findings": counts,
        "accepted": report.counts.get("accepted", 0),
        "list": [
            {
                "measurement_id": f.measurement_id,
                "severity": f.severity,
                "rule_id": f.rule_id,
                "message": f.message,
                "likely_cause": f.likely_cause,
            }
            for f in report.findings
            if not f.accepted
        ],
    }
