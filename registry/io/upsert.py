"""Insert-or-update for repeated imports: match each row, merge it three ways, write the result.

:func:`plan_upsert` only reads (a dry run shows its plan; the real import plans again under the
write lock): it matches the rows (:mod:`.matching`), compares what the file says with what the
registry holds and what the file said before (:mod:`.merge`, :mod:`.lineage`) and works out the
stored columns the merge leaves — the whole entry normalized again, as ``edit`` does.
:func:`apply_changes` writes them, one revision per measurement with its before and after.

Beyond the values: a changed process kind, sites or nucleus moves the measurement to that
process of its compound; a compound the file names differently (another label or structure)
moves it to that compound; a corrected compound name renames the compound; rate points are
replaced when the file's changed; extra attributes change one by one.
"""

from __future__ import annotations

import json
from collections import defaultdict
from collections.abc import Sequence
from dataclasses import dataclass, field
from datetime import UTC, datetime
from typing import Any

from registry.admin.reread import same_value
from registry.errors import RowProblem
from registry.io import fieldtexts, lineage, matching, merge
from registry.io.cells import RATE_COLUMNS
from registry.io.conflicts import row_name
from registry.io.fieldtexts import EXTRA, RATES, Texts
from registry.io.merge import MeasurementMerge, MergeOptions
from registry.io.results import Prepared
from registry.record.entry import NormalizedEntry, normalize_entry
from registry.storage import audit
from registry.storage.connection import Connection
from registry.storage.writer import (
    known_process_kinds,
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


@dataclass
class UpsertPlan:
    """What an import would do with each of its entries."""

    new: list[int]  # indexes of entries to insert
    matched: dict[int, int]  # entry index → measurement id
    matched_by: dict[int, str]  # entry index → uid | label | key
    merges: list[MeasurementMerge]  # matched measurements where file and registry differ
    changes: list[Change]
    unchanged: list[tuple[int, int]]  # (index, measurement id): nothing to write
    ambiguous: list[tuple[int, list[int]]]  # (index, candidate ids)
    problems: list[RowProblem]  # two rows claiming one measurement; merges that do not add up
    presence: Presence  # the fields each entry's sheet has, and their texts
    own_snapshots: dict[int, str] = field(default_factory=dict)  # id → its file's last snapshot

    @property
    def held(self) -> list[MeasurementMerge]:
        """Measurements with an unresolved conflict: nothing is written for them."""
        return [m for m in self.merges if m.held]


def plan_upsert(conn: Connection, prep: Prepared, options: MergeOptions) -> UpsertPlan:
    """Sort entries into new, changed, unchanged and held, reading only."""
    found = matching.find_matches(conn, prep.entries, prep.structures, prep.uids)
    problems = _claimed_twice(prep, found)
    bad = {i for i, _ in found.ambiguous} | {_index_of(prep, p) for p in problems}
    new = [i for i, mid in enumerate(found.ids) if mid is None and i not in bad]
    pairs = [(i, mid) for i, mid in enumerate(found.ids) if mid is not None and i not in bad]
    presence = Presence(prep, options.empty_clears)
    plan = UpsertPlan(
        new, dict(pairs), {i: found.how[i] or "" for i, _ in pairs}, [], [], [],
        found.ambiguous, problems, presence,
    )  # fmt: skip
    states = stored_state(conn, [mid for _, mid in pairs])
    sheets = {mid: prep.read.sources[prep.kept[i]].sheet for i, mid in pairs}
    snaps = lineage.newest_snapshots(conn, sheets, prep.read.file)
    texts = {i: presence.file_texts(i) for i, _ in pairs}
    same = {i: _same_compound(prep, found, i, states[mid]) for i, mid in pairs}
    differing = [(i, mid) for i, mid in pairs if _differs(texts[i], states[mid], same[i], options)]
    logs = lineage.field_logs(conn, [mid for _, mid in differing])
    kinds = known_process_kinds(conn)
    for i, mid in pairs:
        snap = snaps.get(mid)
        if snap is not None and _own(snap, prep.read.file, sheets[mid]):
            plan.own_snapshots[mid] = snap.fields_json
        if mid not in logs:
            plan.unchanged.append((i, mid))
            continue
        mm = merge.decide(
            i, mid, plan.matched_by[i], file=texts[i],
            registry=fieldtexts.stored_texts(states[mid]),
            base=snap.texts() if snap is not None else None, log=logs[mid],
            same_compound=same[i], options=options,
        )  # fmt: skip
        if mm.fields:
            plan.merges.append(mm)
        change = None
        if mm.applied():
            change = _change(conn, prep, mm, states[mid], same=same[i], kinds=kinds)
        if isinstance(change, list):
            plan.problems.extend(change)
        elif change is not None:
            change.where = _where(prep, i)
            plan.changes.append(change)
        elif not mm.held:
            plan.unchanged.append((i, mid))
    return plan


def _index_of(prep: Prepared, problem: RowProblem) -> int:
    for i, k in enumerate(prep.kept):
        src = prep.read.sources[k]
        if (src.sheet, src.row) == (problem.sheet, problem.row):
            return i
    return -1


def _claimed_twice(prep: Prepared, found: matching.Matches) -> list[RowProblem]:
    """Later rows that match a stored measurement an earlier row of the file matched already."""
    first: dict[int, int] = {}
    out = []
    for i, mid in enumerate(found.ids):
        if mid is None:
            continue
        if mid not in first:
            first[mid] = i
            continue
        src = prep.read.sources[prep.kept[i]]
        earlier = prep.read.sources[prep.kept[first[mid]]]
        out.append(
            RowProblem(
                prep.read.file, src.sheet, src.row, None, None,
                f"duplicate of {row_name(earlier, src.sheet)}: both rows are measurement {mid} "
                f"(matched by {found.how[first[mid]]} and by {found.how[i]}); one measurement, "
                "one row",
            )
        )  # fmt: skip
    return out


def _own(snap: lineage.Snapshot, file_name: str, sheet: str | None) -> bool:
    return snap.file_name == file_name and (sheet in snap.sheets if sheet else not snap.sheets)


def _where(prep: Prepared, index: int) -> str:
    src = prep.read.sources[prep.kept[index]]
    sheet = f", sheet {src.sheet!r}" if src.sheet else ""
    return f"{prep.read.file}{sheet}, row {src.row}"


class Presence:
    """The fields each entry's sheet speaks for, and the texts it gives them.

    An empty cell says nothing (it is left out) unless ``empty_clears``: then it says "empty".
    """

    def __init__(self, prep: Prepared, empty_clears: bool = False) -> None:
        self.prep = prep
        self.empty_clears = empty_clears
        self._by_plan: dict[int, frozenset[str]] = {}

    def fields(self, index: int) -> frozenset[str]:
        src = self.prep.read.sources[self.prep.kept[index]]
        names = self._by_plan.get(id(src.plan))
        if names is None:
            names = self._by_plan[id(src.plan)] = fieldtexts.present_fields(src.plan)
        if self.prep.entries[index].rates and RATES not in names:
            names = names | {RATES}  # rate points from a rates sheet of the same file
        return names

    def file_texts(self, index: int) -> Texts:
        """What the file says for the fields it has (None for an empty cell that clears)."""
        extra = self.prep.read.inputs[self.prep.kept[index]].extra
        texts = fieldtexts.entry_texts(self.prep.entries[index], extra)
        return {
            name: texts.get(name)
            for name in sorted(self.fields(index))
            if self.empty_clears or texts.get(name) is not None
        }


def _same_compound(
    prep: Prepared, found: matching.Matches, index: int, state: dict[str, Any]
) -> bool:
    """Whether the file's row names the compound the measurement is stored under."""
    if found.compound_ids[index] == state["measurement"]["compound_id"]:
        return True
    entry, stored = prep.entries[index].compound, state["compound"] or {}
    name_only = not entry.get("label") and prep.structures[index] is None
    return (
        found.compound_ids[index] is None
        and name_only
        and not stored.get("label")
        and not stored.get("smiles_input")
    )


def _differs(file: Texts, state: dict[str, Any], same: bool, options: MergeOptions) -> bool:
    """A cheap first look: does the file say anything the registry does not hold?"""
    if not same:
        return True
    registry = fieldtexts.stored_texts(state)
    return any(
        text != registry.get(name)
        for name, text in file.items()
        if (text is not None or options.empty_clears) and name not in ("compound", "smiles")
    )


def stored_state(conn: Connection, ids: Sequence[int]) -> dict[int, dict[str, Any]]:
    """Each measurement's row with its compound, process, coalescence rows and rate points."""
    state: dict[int, dict[str, Any]] = {}
    for row in conn.records_where_in("SELECT * FROM measurement WHERE 1 = 1", "id", ids):
        state[row["id"]] = {"measurement": row, "coalescence": [], "rates": []}
    for table, key in (("coalescence", "coalescence"), ("rate_point", "rates")):
        rows = conn.records_where_in(f"SELECT * FROM {table} WHERE 1 = 1", "measurement_id", state)
        for row in sorted(rows, key=lambda r: r["id"]):
            state[row["measurement_id"]][key].append(row)
    compounds = {
        r["id"]: r
        for r in conn.records_where_in(
            "SELECT id, label, name, smiles_input, inchikey FROM compound WHERE 1 = 1",
            "id",
            {s["measurement"]["compound_id"] for s in state.values()},
        )
    }
    processes = {
        r["id"]: r
        for r in conn.records_where_in(
            "SELECT id, kind, sites, nucleus FROM process WHERE 1 = 1",
            "id",
            {s["measurement"]["process_id"] for s in state.values()},
        )
    }
    for s in state.values():
        s["compound"] = compounds.get(s["measurement"]["compound_id"])
        s["process"] = processes.get(s["measurement"]["process_id"])
    return state


def _change(
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
        change.rates = entry.rates
        change.before["rates"] = [[r["t_text"], r["k_text"]] for r in state["rates"]]
        change.after["rates"] = [[r["t_text"], r["k_text"]] for r in entry.rates]
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
