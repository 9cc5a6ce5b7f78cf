"""Write stage of a merge: the stored columns a merged row leaves, and writing them.

:func:`build_change` (reading only) works out what the three-way merge of one matched
measurement (:mod:`.merge`) leaves stored: the whole entry is normalized again from the
registry's texts with the file's applied fields over them — as ``edit`` does — and compared with
the stored row. Beyond the values: a changed process kind, sites or nucleus moves the
measurement to that process of its compound; a compound the file names differently (another
label or structure) moves it to that compound; a corrected compound name renames the compound;
rate points are replaced when the file's changed; extra attributes change one by one.
:func:`apply_changes` writes it all, one revision per measurement with its before and after
and a reason naming the file, sheet and row (and the user's choice when ``prefer`` decided).
"""

from __future__ import annotations

import json
from collections.abc import Sequence
from dataclasses import dataclass, field
from datetime import UTC, datetime
from typing import Any

from registry.admin.reread import same_value
from registry.errors import RowProblem
from registry.io import fieldtexts, merge
from registry.io.fieldtexts import EXTRA, RATES
from registry.io.merge import MeasurementMerge
from registry.io.results import Prepared
from registry.record.entry import NormalizedEntry, normalize_entry
from registry.storage import audit
from registry.storage.connection import Connection
from registry.storage.writer import (
    carry_fit_records,
    history_rates,
    resolve_compounds,
    resolve_processes,
    solvent_index,
)


@dataclass
class Change:
    """What an import writes to one matched measurement."""

    merge: MeasurementMerge
    compound_id: int
    merged: NormalizedEntry  # the measurement as the merge leaves it
    values: dict[str, Any] = field(default_factory=dict)  # measurement columns to set
    before: dict[str, Any] = field(default_factory=dict)
    after: dict[str, Any] = field(default_factory=dict)
    coalescence: tuple[str, int | None, dict[str, Any] | None] | None = None  # (op, row id, row)
    new_process: bool = False
    move: bool = False  # to the compound the file names
    rename: str | None = None  # the compound's corrected name
    rates: list[dict[str, Any]] | None = None
    extra_json: str | None = None
    new_extra: bool = False
    where: str = ""  # file, sheet and row, for the history's reason

    @property
    def measurement_id(self) -> int:
        return self.merge.measurement_id

    @property
    def index(self) -> int:
        return self.merge.index


def build_change(
    conn: Connection,
    prep: Prepared,
    mm: MeasurementMerge,
    state: dict[str, Any],
    *,
    same: bool,
    kinds: tuple[str, ...],
) -> Change | list[RowProblem]:
    """The stored columns the merge leaves (or why the merged entry does not add up)."""
    from registry.io.prepare import problem_at

    i = mm.index
    src = prep.read.sources[prep.kept[i]]
    inp = merge.merged_input(state, prep.read.inputs[prep.kept[i]], mm)
    merged, problems = normalize_entry(inp, kinds)
    if merged is None:
        return [
            RowProblem(
                p.file, p.sheet, p.row, p.column, p.text,
                f"with the registry's other values this row does not add up: {p.reason}",
            )
            for p in (problem_at(prep.read.file, src, q) for q in problems)
        ]  # fmt: skip
    m = state["measurement"]
    change = Change(mm, m["compound_id"], merged)
    for column, new in merged.measurement.items():
        if _changed(m.get(column), new):
            change.values[column] = new
            change.before[column], change.after[column] = m.get(column), new
    if "solvent_text" in change.values:
        key = merged.solvent_key
        change.values["solvent_id"] = solvent_index(conn).get(key) if key else None
    _coalescence_change(change, state)
    applied = {fm.field for fm in mm.applied()}
    old_process = _process_body(state["process"])
    if old_process != merged.process:
        change.new_process = True
        change.before["process"], change.after["process"] = old_process, merged.process
    entry = prep.entries[i]
    stored_compound = state["compound"] or {}
    if not same and applied & set(fieldtexts.COMPOUND_FIELDS):
        change.move = True
        keys = ("label", "name", "smiles_input")
        change.before["compound"] = {k: stored_compound.get(k) for k in keys}
        change.after["compound"] = {k: entry.compound.get(k) for k in keys}
    elif same and "name" in applied:
        change.rename = entry.compound.get("name")
        change.before["compound"] = {"name": stored_compound.get("name")}
        change.after["compound"] = {"name": change.rename}
    if RATES in applied:
        change.rates = carry_fit_records(state["rates"], entry.rates)
        change.before["rates"] = history_rates(state["rates"])
        change.after["rates"] = history_rates(change.rates)
    _extra_change(change, mm, m)
    return change


def _changed(old: Any, new: Any) -> bool:
    if isinstance(old, float) or isinstance(new, float):
        return not same_value(old, new)
    return old != new


def _process_body(row: dict[str, Any] | None) -> dict[str, Any] | None:
    return None if row is None else {k: row[k] for k in ("kind", "sites", "nucleus")}


def _coalescence_change(change: Change, state: dict[str, Any]) -> None:
    """Insert, update or delete the one coalescence row as the merged entry has it."""
    rows = state["coalescence"]
    if len(rows) > 1:
        return  # several observations: only ``edit`` (one at a time) or a new entry change them
    old = {k: v for k, v in rows[0].items() if k not in ("id", "measurement_id")} if rows else None
    new = change.merged.coalescence
    if old is None and new is None:
        return
    if old is not None and new is not None:
        keys = [k for k, v in new.items() if _changed(old.get(k), v)]
        if not keys:
            return
        change.coalescence = ("update", rows[0]["id"], {k: new[k] for k in keys})
        change.before["coalescence"] = {k: old.get(k) for k in keys}
        change.after["coalescence"] = {k: new[k] for k in keys}
        return
    change.coalescence = ("insert", None, new) if old is None else ("delete", rows[0]["id"], None)
    change.before["coalescence"], change.after["coalescence"] = old, new


def _extra_change(change: Change, mm: MeasurementMerge, m: dict[str, Any]) -> None:
    extra = json.loads(m["extra_json"]) if m.get("extra_json") else {}
    before, after = {}, {}
    for fm in mm.applied():
        if not fm.field.startswith(EXTRA):
            continue
        key = fm.field[len(EXTRA) :]
        before[key], after[key] = extra.get(key), fm.file
        if fm.file is None:
            extra.pop(key, None)
        else:
            extra[key] = fm.file
    if after:
        change.new_extra = True
        change.extra_json = extra_text(extra)
        change.before["extra"], change.after["extra"] = before, after


def extra_text(extra: dict[str, Any] | None) -> str | None:
    """The stored form of extra attributes (same as the writer's)."""
    return json.dumps(extra, ensure_ascii=False, default=str) if extra else None


def apply_changes(
    conn: Connection,
    prep: Prepared,
    changes: Sequence[Change],
    *,
    actor: str,
    batch_id: int | None,
) -> None:
    """Write the planned changes and one revision (before/after) per measurement."""
    from registry.io.upsert import replace_rate_points  # (upsert plans with this module)

    now = datetime.now(UTC)
    for ch in changes:
        values = dict(ch.values)
        cid = ch.compound_id
        if ch.move:
            i = ch.index
            (cid,), _ = resolve_compounds(conn, [prep.entries[i]], [prep.structures[i]], now)
            values["compound_id"] = cid
        if ch.move or ch.new_process:
            values["process_id"] = resolve_processes(conn, [ch.merged], [cid])[0]
        if ch.rename is not None:
            conn.update("compound", {"name": ch.rename}, id=cid)
        if ch.new_extra:
            values["extra_json"] = ch.extra_json
        values["updated_at"] = now
        conn.update("measurement", values, id=ch.measurement_id)
        _write_coalescence(conn, ch)
        if ch.rates is not None:
            replace_rate_points(conn, ch.measurement_id, ch.rates)
    audit.record_many(
        conn,
        (
            {
                "entity": "measurement",
                "entity_id": ch.measurement_id,
                "action": "import-update",
                "before": ch.before,
                "after": ch.after,
                "reason": reason(ch),
                "batch_id": batch_id,
            }
            for ch in changes
        ),
        actor,
    )


def reason(ch: Change) -> str:
    """The history's reason for an import's change: where from, and any choice the user made."""
    text = f"re-import of {ch.where}"
    chosen = [fm.field for fm in ch.merge.applied() if fm.resolved == "file"]
    if ch.merge.reviewed and chosen:
        text += (
            f"; a reviewed measurement, changed ({', '.join(chosen)}) because the importing "
            "user chose the file's values (prefer file)"
        )
    elif chosen:
        text += f"; conflicts ({', '.join(chosen)}) decided for the file (prefer file)"
    return text


def _write_coalescence(conn: Connection, ch: Change) -> None:
    if ch.coalescence is None:
        return
    op, row_id, row = ch.coalescence
    if op == "insert" and row is not None:
        conn.insert("coalescence", {**row, "measurement_id": ch.measurement_id})
    elif op == "update" and row is not None and row_id is not None:
        conn.update("coalescence", row, id=row_id)
    elif op == "delete":
        conn.execute("DELETE FROM coalescence WHERE id = :id", {"id": row_id})
