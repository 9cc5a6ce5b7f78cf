"""Insert-or-update next to :func:`registry.storage.writer.write_entries`, for repeated imports.

A measurement is "the same" when compound, process, solvent, method, reference and label
match. Importing a file twice therefore adds nothing, and importing a corrected version
updates the matching measurements in place, each change recorded in the revision history with
its before and after. :func:`find_matches` only reads, so a dry run can show what would happen.

What a file decides for a matched measurement: every value column and the coalescence data;
the extra attributes when the sheet has extra columns; the rate points when the file gives
rate points for it (a sheet without rates never deletes rates added later); the status only
when the sheet has a status column (a re-import does not undo a review).
"""

from __future__ import annotations

import json
from collections import defaultdict
from collections.abc import Sequence
from dataclasses import dataclass, field
from datetime import UTC, datetime
from typing import Any

from registry.io.cells import RATE_COLUMNS
from registry.record import vocab
from registry.record.chem import Structure
from registry.record.entry import NormalizedEntry
from registry.storage import audit
from registry.storage.connection import Connection
from registry.storage.writer import solvent_index

MatchKey = tuple[Any, ...]


@dataclass
class Change:
    """What an import would change in one existing measurement."""

    index: int  # position of the entry in the import
    measurement_id: int
    before: dict[str, Any]
    after: dict[str, Any]
    measurement_values: dict[str, Any] = field(default_factory=dict)
    coalescence: dict[str, Any] | None = None
    replace_coalescence: bool = False
    rates: list[dict[str, Any]] | None = None
    extra_json: str | None = None
    replace_extra: bool = False


@dataclass
class UpsertPlan:
    new: list[int]  # indexes of entries to insert
    changes: list[Change]
    unchanged: list[tuple[int, int]]  # (index, measurement id)
    ambiguous: list[tuple[int, list[int]]]  # (index, candidate ids)


def _solvent_part(solvent_id: int | None, text: str | None) -> Any:
    if solvent_id is not None:
        return ("id", solvent_id)
    return ("text", vocab.solvent_key(text) if text else "")


def extra_text(extra: dict[str, Any] | None) -> str | None:
    """The stored form of extra attributes (same as the writer's)."""
    return json.dumps(extra, ensure_ascii=False, default=str) if extra else None


def find_matches(
    conn: Connection,
    entries: Sequence[NormalizedEntry],
    structures: Sequence[Structure | None],
) -> tuple[list[int | None], list[tuple[int, list[int]]]]:
    """The existing measurement id each entry matches (None when new), and ambiguous entries."""
    compound_ids = _compound_ids(conn, entries, structures)
    known = {c for c in compound_ids if c is not None}
    processes: dict[tuple[int, str, str, str], int] = {}
    for pid, cid, kind, sites, nucleus in conn.rows_where_in(
        "SELECT id, compound_id, kind, sites, nucleus FROM process WHERE 1 = 1",
        "compound_id",
        known,
    ):
        processes[(cid, kind, sites, nucleus)] = pid
    existing: dict[MatchKey, list[int]] = defaultdict(list)
    for mid, cid, pid, method, solvent_id, solvent_text, reference, label in conn.rows_where_in(
        "SELECT id, compound_id, process_id, method, solvent_id, solvent_text, reference, label "
        "FROM measurement WHERE 1 = 1",
        "compound_id",
        known,
    ):
        key = (
            cid, pid, method, _solvent_part(solvent_id, solvent_text), reference or "", label or ""
        )  # fmt: skip
        existing[key].append(mid)
    solvents = solvent_index(conn)
    matches: list[int | None] = []
    ambiguous: list[tuple[int, list[int]]] = []
    for i, (e, cid) in enumerate(zip(entries, compound_ids, strict=True)):
        pid = None
        if cid is not None and e.process is not None:
            pid = processes.get((cid, e.process["kind"], e.process["sites"], e.process["nucleus"]))
        if cid is None or (e.process is not None and pid is None):
            matches.append(None)
            continue
        m = e.measurement
        sid = solvents.get(e.solvent_key) if e.solvent_key else None
        key = (
            cid, pid, m["method"], _solvent_part(sid, m["solvent_text"]), m["reference"] or "",
            m["label"] or "",
        )  # fmt: skip
        ids = existing.get(key, [])
        if len(ids) > 1:
            ambiguous.append((i, sorted(ids)))
            matches.append(None)
        else:
            matches.append(ids[0] if ids else None)
    return matches, ambiguous


def _compound_ids(
    conn: Connection,
    entries: Sequence[NormalizedEntry],
    structures: Sequence[Structure | None],
) -> list[int | None]:
    """The registered compound of each entry (by InChIKey, then label, then a bare name)."""
    keys = {s.inchikey for s in structures if s is not None and s.inchikey}
    labels = {e.compound["label"] for e in entries if e.compound.get("label")}
    names = {
        e.compound["name"]
        for e, s in zip(entries, structures, strict=True)
        if e.compound.get("name") and not e.compound.get("label") and s is None
    }
    select = "SELECT id, {0} FROM compound WHERE 1 = 1"
    by_key = {
        key: cid for cid, key in conn.rows_where_in(select.format("inchikey"), "inchikey", keys)
    }
    by_label = {
        lab: cid for cid, lab in conn.rows_where_in(select.format("label"), "label", labels)
    }
    by_name: dict[str, int] = {}
    for cid, name in sorted(
        conn.rows_where_in(
            "SELECT id, name FROM compound WHERE label IS NULL AND inchikey IS NULL", "name", names
        )
    ):
        by_name.setdefault(name, cid)
    out: list[int | None] = []
    for e, s in zip(entries, structures, strict=True):
        cid = None
        if s is not None and s.inchikey:
            cid = by_key.get(s.inchikey)
        if cid is None and e.compound.get("label"):
            cid = by_label.get(e.compound["label"])
        if cid is None and e.compound.get("name") and not e.compound.get("label") and s is None:
            cid = by_name.get(e.compound["name"])
        out.append(cid)
    return out


def plan_upsert(
    conn: Connection,
    entries: Sequence[NormalizedEntry],
    structures: Sequence[Structure | None],
    extras: Sequence[dict[str, Any] | None],
    *,
    compare_status: bool,
    compare_extra: bool,
) -> UpsertPlan:
    """Sort entries into new, changed and unchanged, reading only."""
    matches, ambiguous = find_matches(conn, entries, structures)
    ambiguous_idx = {i for i, _ in ambiguous}
    matched = [(i, mid) for i, mid in enumerate(matches) if mid is not None]
    new = [i for i, mid in enumerate(matches) if mid is None and i not in ambiguous_idx]
    stored = _stored_state(conn, [mid for _, mid in matched])
    changes: list[Change] = []
    unchanged: list[tuple[int, int]] = []
    for i, mid in matched:
        change = _compare(
            i,
            mid,
            entries[i],
            extras[i],
            stored[mid],
            compare_status=compare_status,
            compare_extra=compare_extra,
        )
        if change is None:
            unchanged.append((i, mid))
        else:
            changes.append(change)
    return UpsertPlan(new, changes, unchanged, ambiguous)


def _stored_state(conn: Connection, ids: Sequence[int]) -> dict[int, dict[str, Any]]:
    """Each measurement's row with its coalescence rows and rate points (in insertion order)."""
    state: dict[int, dict[str, Any]] = {}
    for row in conn.records_where_in("SELECT * FROM measurement WHERE 1 = 1", "id", ids):
        state[row["id"]] = {"measurement": row, "coalescence": [], "rates": []}
    for table, key in (("coalescence", "coalescence"), ("rate_point", "rates")):
        rows = conn.records_where_in(f"SELECT * FROM {table} WHERE 1 = 1", "measurement_id", state)
        for row in sorted(rows, key=lambda r: r["id"]):
            state[row["measurement_id"]][key].append(row)
    return state


def _compare(
    index: int,
    mid: int,
    entry: NormalizedEntry,
    extra: dict[str, Any] | None,
    stored: dict[str, Any],
    *,
    compare_status: bool,
    compare_extra: bool,
) -> Change | None:
    before: dict[str, Any] = {}
    after: dict[str, Any] = {}
    values: dict[str, Any] = {}
    old = stored["measurement"]
    for key, value in entry.measurement.items():
        if key == "status" and not compare_status:
            continue
        if old.get(key) != value:
            before[key], after[key] = old.get(key), value
            values[key] = value
    change = Change(index, mid, before, after, values)
    old_co = [
        {k: v for k, v in row.items() if k not in ("id", "measurement_id")}
        for row in stored["coalescence"]
    ]
    new_co = [entry.coalescence] if entry.coalescence else []
    if old_co != new_co:
        before["coalescence"] = old_co
        after["coalescence"] = new_co
        change.replace_coalescence = True
        change.coalescence = entry.coalescence
    if entry.rates:
        old_rates = [{k: r[k] for k in RATE_COLUMNS} for r in stored["rates"]]
        new_rates = [{k: r.get(k) for k in RATE_COLUMNS} for r in entry.rates]
        if old_rates != new_rates:
            before["rates"] = [[r["t_text"], r["k_text"]] for r in old_rates]
            after["rates"] = [[r["t_text"], r["k_text"]] for r in new_rates]
            change.rates = entry.rates
    if compare_extra:
        new_extra = extra_text(extra)
        old_extra_obj = json.loads(old["extra_json"]) if old.get("extra_json") else None
        if (old_extra_obj or None) != (extra or None):
            before["extra"] = old_extra_obj
            after["extra"] = extra or None
            change.extra_json = new_extra
            change.replace_extra = True
    if not before:
        return None
    return change


def apply_changes(
    conn: Connection,
    changes: Sequence[Change],
    *,
    actor: str,
    batch_id: int | None,
    solvent_ids: dict[str, int],
    entries: Sequence[NormalizedEntry],
) -> None:
    """Write the planned changes and one revision (before/after) per measurement."""
    now = datetime.now(UTC)
    for ch in changes:
        values = dict(ch.measurement_values)
        if "solvent_text" in values:
            key = entries[ch.index].solvent_key
            values["solvent_id"] = solvent_ids.get(key) if key else None
        if ch.replace_extra:
            values["extra_json"] = ch.extra_json
        values["updated_at"] = now
        conn.update("measurement", values, id=ch.measurement_id)
        if ch.replace_coalescence:
            conn.execute(
                "DELETE FROM coalescence WHERE measurement_id = :id", {"id": ch.measurement_id}
            )
            if ch.coalescence:
                conn.insert("coalescence", {**ch.coalescence, "measurement_id": ch.measurement_id})
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
                "reason": "corrected values in a re-imported file",
                "batch_id": batch_id,
            }
            for ch in changes
        ),
        actor,
    )


def replace_rate_points(
    conn: Connection, measurement_id: int, rates: Sequence[dict[str, Any]]
) -> None:
    """Replace a measurement's rate points (inside the caller's transaction)."""
    conn.execute("DELETE FROM rate_point WHERE measurement_id = :id", {"id": measurement_id})
    conn.insert_many(
        "rate_point",
        [{**{k: r.get(k) for k in RATE_COLUMNS}, "measurement_id": measurement_id} for r in rates],
    )


def stored_rates(conn: Connection, ids: Sequence[int]) -> dict[int, list[dict[str, Any]]]:
    """Rate points of measurements, as dicts of the rate columns, in insertion order."""
    out: dict[int, list[dict[str, Any]]] = defaultdict(list)
    rows = conn.records_where_in("SELECT * FROM rate_point WHERE 1 = 1", "measurement_id", ids)
    for row in sorted(rows, key=lambda r: r["id"]):
        out[row["measurement_id"]].append({k: row[k] for k in RATE_COLUMNS})
    return out


def same_rates(old: Sequence[dict[str, Any]], new: Sequence[dict[str, Any]]) -> bool:
    return [{k: r.get(k) for k in RATE_COLUMNS} for r in old] == [
        {k: r.get(k) for k in RATE_COLUMNS} for r in new
    ]
