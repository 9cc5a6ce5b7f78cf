"""Insert-or-update for repeated imports: match each row, merge it three ways, plan the writes.

:func:`plan_upsert` only reads (a dry run shows its plan; the real import plans again under the
write lock): it matches the rows (:mod:`.matching`), compares what the file says with what the
registry holds and what the file said before (:mod:`.merge`, :mod:`.lineage`), and has
:mod:`.changes` work out the stored columns each merge leaves. :func:`merge_rate_plan` does the
same for rate points a rates sheet gives measurements already stored. Two rows of one file that
match one stored measurement are a problem of the later row.
"""

from __future__ import annotations

from collections import defaultdict
from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import Any

from registry.errors import RowProblem
from registry.io import fieldtexts, lineage, matching, merge
from registry.io.cells import RATE_COLUMNS
from registry.io.changes import Change, build_change
from registry.io.conflicts import row_name
from registry.io.fieldtexts import RATES, Texts
from registry.io.merge import MeasurementMerge, MergeOptions
from registry.io.results import Prepared
from registry.storage.connection import Connection
from registry.storage.writer import known_process_kinds


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
        src = prep.read.sources[prep.kept[i]]
        mm.sheet, mm.row = src.sheet, src.row
        if mm.fields:
            plan.merges.append(mm)
        change = None
        if mm.applied():
            change = build_change(conn, prep, mm, states[mid], same=same[i], kinds=kinds)
        if isinstance(change, list):
            plan.problems.extend(change)
        elif change is not None:
            change.where = _where(prep, i)
            plan.changes.append(change)
        elif not mm.held:
            plan.unchanged.append((i, mid))
    return plan


def merge_rate_plan(
    conn: Connection,
    prep: Prepared,
    rate_plan: dict[int, list[dict[str, Any]]],
    options: MergeOptions,
) -> tuple[dict[int, list[dict[str, Any]]], list[MeasurementMerge], list[dict[str, Any]]]:
    """Rate points a rates sheet gives measurements already stored, merged three ways as the
    field ``rates`` (so that points added by hand are not replaced by an old sheet).

    Returns the points to write (``rate_plan`` without the kept and held ones), the merges for
    the report, and the snapshots to keep (``measurement_id``, ``source_row``, ``fields_json``).
    """
    from registry.io.snapshots import to_json

    if not rate_plan:
        return rate_plan, [], []
    source = {id(rr.parsed): rr for rr in prep.read.rate_rows}
    first = {mid: source[id(points[0])] for mid, points in rate_plan.items()}
    states = stored_state(conn, list(rate_plan))
    snaps = lineage.newest_snapshots(conn, {m: rr.sheet for m, rr in first.items()}, prep.read.file)
    said = {mid: {RATES: fieldtexts.rate_text(points)} for mid, points in rate_plan.items()}
    differing = [m for m in rate_plan if said[m][RATES] != fieldtexts.rate_text(states[m]["rates"])]
    logs = lineage.field_logs(conn, differing)
    out, merges, snapshots = {}, [], []
    for mid, points in rate_plan.items():
        snap = snaps.get(mid)
        own = snap.fields_json if snap and _own(snap, prep.read.file, first[mid].sheet) else None
        mm = MeasurementMerge(-1, mid, "label")
        if mid in logs:
            mm = merge.decide(
                -1, mid, "label", file=said[mid], registry=fieldtexts.stored_texts(states[mid]),
                base=snap.texts() if snap is not None else None, log=logs[mid],
                same_compound=True, options=options,
            )  # fmt: skip
            mm.sheet, mm.row = first[mid].sheet, first[mid].row
            merges += [mm] if mm.fields else []
        if mm.held:
            continue
        if mid not in logs or mm.applied():
            out[mid] = points
        if to_json(said[mid]) != own:
            snapshots.append(
                {
                    "measurement_id": mid,
                    "source_row": first[mid].row,
                    "fields_json": to_json(said[mid]),
                }
            )
    return out, merges, snapshots


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
        self._texts: dict[int, Texts] = {}  # the plan and the snapshots ask for the same rows

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
        if index in self._texts:
            return self._texts[index]
        extra = self.prep.read.inputs[self.prep.kept[index]].extra
        texts = fieldtexts.entry_texts(self.prep.entries[index], extra)
        said = self._texts[index] = {
            name: texts.get(name)
            for name in sorted(self.fields(index))
            if self.empty_clears or texts.get(name) is not None
        }
        return said


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


def replace_rate_points(
    conn: Connection, measurement_id: int, rates: Sequence[dict[str, Any]]
) -> None:
    """Replace a measurement's rate points (inside the caller's transaction)."""
    conn.execute("DELETE FROM rate_point WHERE measurement_id = :id", {"id": measurement_id})
    conn.insert_many(
        "rate_point",
        [
            {**{k: r.get(k) for k in (*RATE_COLUMNS, "fit_json")}, "measurement_id": measurement_id}
            for r in rates
        ],
    )


def stored_rates(conn: Connection, ids: Sequence[int]) -> dict[int, list[dict[str, Any]]]:
    """Rate points of measurements, as dicts of the rate columns (and the fit record a
    line-shape fit left), in insertion order."""
    out: dict[int, list[dict[str, Any]]] = defaultdict(list)
    rows = conn.records_where_in("SELECT * FROM rate_point WHERE 1 = 1", "measurement_id", ids)
    for row in sorted(rows, key=lambda r: r["id"]):
        out[row["measurement_id"]].append({k: row[k] for k in (*RATE_COLUMNS, "fit_json")})
    return out


def same_rates(old: Sequence[dict[str, Any]], new: Sequence[dict[str, Any]]) -> bool:
    return [{k: r.get(k) for k in RATE_COLUMNS} for r in old] == [
        {k: r.get(k) for k in RATE_COLUMNS} for r in new
    ]
