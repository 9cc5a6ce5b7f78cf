"""Write normalized entries: resolve compounds, processes and solvents, insert, record history.

Works in batches with Core statements (no ORM object per row), so that one entry from ``add``
and a hundred thousand from an import take the same path. Everything runs inside the caller's
write transaction: a failure anywhere leaves nothing behind.
"""

from __future__ import annotations

import json
import weakref
from collections.abc import Sequence
from dataclasses import dataclass
from datetime import UTC, datetime
from typing import Any

from sqlalchemy import Connection, select, text

from registry.errors import FluxledgerError
from registry.record import vocab
from registry.record.chem import Structure
from registry.record.entry import NormalizedEntry
from registry.storage import audit, rawsql
from registry.storage.lookup import rows_where_in
from registry.storage.models import (
    CoalescenceObservation,
    Compound,
    Measurement,
    Process,
    ProcessKind,
    RatePoint,
    Solvent,
)


class DuplicateCompoundError(FluxledgerError):
    """A label that already names another structure, or a structure registered under another label."""

    def __init__(self, message: str) -> None:
        super().__init__(message)
        self.message = message

    def __str__(self) -> str:
        return self.message


@dataclass
class WriteResult:
    measurement_ids: list[int]
    compounds_added: int


_REFERENCE_CACHE: weakref.WeakKeyDictionary[Any, dict[str, Any]] = weakref.WeakKeyDictionary()


def _reference_cache(conn: Connection) -> dict[str, Any]:
    """Per-engine cache of the small reference tables, refreshed when their size changes.

    Every single ``add`` needs the solvent spellings and the process kinds; building the spelling
    index each time cost a quarter of a write.
    """
    sql = (
        "SELECT (SELECT count(*) FROM solvent), (SELECT max(id) FROM solvent), "
        "(SELECT count(*) FROM process_kind)"
    )
    if rawsql.on_sqlite(conn):
        stamp = rawsql.fetch_all(conn, sql)[0]
    else:
        stamp = conn.execute(text(sql)).one()
    cache = _REFERENCE_CACHE.setdefault(conn.engine, {})
    if cache.get("stamp") != tuple(stamp):
        index: dict[str, int] = {}
        for sid, name, formula, aliases in conn.execute(
            select(Solvent.id, Solvent.name, Solvent.formula, Solvent.aliases).order_by(Solvent.id)
        ):
            for spelling in (name, formula, *(aliases or "").split("|")):
                if spelling:
                    index.setdefault(vocab.solvent_key(spelling), sid)
        kinds = tuple(r[0] for r in conn.execute(select(ProcessKind.name)))
        cache.clear()
        cache.update(stamp=tuple(stamp), solvents=index, kinds=kinds)
    return cache


def solvent_index(conn: Connection) -> dict[str, int]:
    """Every spelling key of every solvent → its id."""
    return _reference_cache(conn)["solvents"]


def cached_process_kinds(engine: Any) -> tuple[str, ...] | None:
    """The process kinds last read on ``engine`` (no query), or None before the first read."""
    cache = _REFERENCE_CACHE.get(engine)
    return cache.get("kinds") if cache else None


def known_process_kinds(conn: Connection) -> tuple[str, ...]:
    return _reference_cache(conn)["kinds"]


def _compound_row(
    entry: NormalizedEntry, structure: Structure | None, now: datetime
) -> dict[str, Any]:
    row = {
        "label": entry.compound.get("label"),
        "name": entry.compound.get("name"),
        "smiles_input": entry.compound.get("smiles_input"),
        "smiles_canonical": None,
        "inchi": None,
        "inchikey": None,
        "formula": None,
        "net_charge": None,
        "structure_ok": structure is None or structure.ok,
        "structure_problem": None if structure is None else structure.problem,
        "mol_binary": None,
        "pattern_fp": None,
        "notes": None,
        "created_at": now,
    }
    if structure is not None:
        row.update(
            smiles_canonical=structure.smiles_canonical,
            inchi=structure.inchi,
            inchikey=structure.inchikey,
            formula=structure.formula,
            net_charge=structure.net_charge,
            mol_binary=structure.mol_binary,
            pattern_fp=structure.pattern_fp,
        )
    return row


def resolve_compounds(
    conn: Connection,
    entries: Sequence[NormalizedEntry],
    structures: Sequence[Structure | None],
    now: datetime,
) -> tuple[list[int], int]:
    """Compound id for each entry, inserting the ones not yet registered (matched by InChIKey, then label)."""
    keys = {s.inchikey for s in structures if s is not None and s.inchikey}
    labels = {e.compound.get("label") for e in entries if e.compound.get("label")}
    by_key: dict[str, tuple[int, str | None]] = {}
    by_label: dict[str, tuple[int, str | None]] = {}
    columns = (Compound.id, Compound.inchikey, Compound.label)
    for cid, key, label in rows_where_in(conn, columns, Compound.inchikey, keys):
        by_key[key] = (cid, label)
    for cid, key, label in rows_where_in(conn, columns, Compound.label, labels):
        by_label[label] = (cid, key)
    # a compound known only by name (no structure, no label) is matched by that name
    names = {
        e.compound.get("name")
        for e, st in zip(entries, structures, strict=True)
        if e.compound.get("name")
        and not e.compound.get("label")
        and (st is None or not st.inchikey)
    }
    by_name: dict[str, int] = {}
    for chunk in _chunks(sorted(names), 500):
        for cid, name in conn.execute(
            select(Compound.id, Compound.name)
            .where(Compound.name.in_(chunk), Compound.label.is_(None), Compound.inchikey.is_(None))
            .order_by(Compound.id)
        ):
            by_name.setdefault(name, cid)
    new_rows: list[dict[str, Any]] = []
    pending: dict[str, int] = {}  # key (inchikey or label or name) → index in new_rows
    slots: list[tuple[str, int]] = []  # ("id", id) or ("new", index)
    for entry, structure in zip(entries, structures, strict=True):
        label = entry.compound.get("label")
        key = structure.inchikey if structure is not None else None
        if key and key in by_key:
            cid, existing_label = by_key[key]
            if label and existing_label and label != existing_label:
                raise DuplicateCompoundError(
                    f"compound {label!r}: this structure is already registered as {existing_label!r} "
                    f"(InChIKey {key}); use that label"
                )
            slots.append(("id", cid))
            continue
        if label and label in by_label:
            cid, existing_key = by_label[label]
            if key and existing_key and key != existing_key:
                raise DuplicateCompoundError(
                    f"compound {label!r} already names a different structure (InChIKey {existing_key}); "
                    "choose another label"
                )
            slots.append(("id", cid))
            continue
        name = entry.compound.get("name")
        if not key and not label and name in by_name:
            slots.append(("id", by_name[name]))
            continue
        candidates = [c for c in (key, f"label:{label}" if label else None) if c]
        if not candidates:  # no structure and no label: one new compound per distinct name
            candidates = [f"name:{entry.compound.get('name')}"]
        hit = next((pending[c] for c in candidates if c in pending), None)
        if hit is not None:
            existing = new_rows[hit]
            if label and existing["label"] and label != existing["label"]:
                raise DuplicateCompoundError(
                    f"compound {label!r}: the same structure appears as {existing['label']!r} in this input"
                )
            if key and existing["inchikey"] and key != existing["inchikey"]:
                raise DuplicateCompoundError(
                    f"compound {label!r} names two different structures in this input"
                )
            slots.append(("new", hit))
            continue
        for c in candidates:
            pending[c] = len(new_rows)
        new_rows.append(_compound_row(entry, structure, now))
        slots.append(("new", len(new_rows) - 1))
    new_ids: list[int] = []
    if new_rows:
        new_ids = _insert_returning_ids(conn, Compound, new_rows)
    ids = [value if kind == "id" else new_ids[value] for kind, value in slots]
    return ids, len(new_rows)


def _insert_returning_ids(conn: Connection, model: Any, rows: list[dict[str, Any]]) -> list[int]:
    """Insert rows and return their ids in order (one row: the single-add path)."""
    if len(rows) == 1:
        return [rawsql.insert_one(conn, model.__table__, rows[0], returning="id")]
    return rawsql.insert_many(conn, model.__table__, rows, new_ids=True) or []


def _chunks(items: Sequence[Any], size: int) -> list[Sequence[Any]]:
    return [items[i : i + size] for i in range(0, len(items), size)]


def resolve_processes(
    conn: Connection, entries: Sequence[NormalizedEntry], compound_ids: Sequence[int]
) -> list[int | None]:
    """Process id for each entry (get-or-create on compound, kind, sites, nucleus)."""
    wanted = {
        (cid, e.process["kind"], e.process["sites"], e.process["nucleus"])
        for e, cid in zip(entries, compound_ids, strict=True)
        if e.process is not None
    }
    found: dict[tuple[int, str, str, str], int] = {}
    cids = sorted({w[0] for w in wanted})
    columns = (Process.id, Process.compound_id, Process.kind, Process.sites, Process.nucleus)
    for pid, cid, kind, sites, nucleus in rows_where_in(conn, columns, Process.compound_id, cids):
        found[(cid, kind, sites, nucleus)] = pid
    missing = sorted(w for w in wanted if w not in found)
    if missing:
        rows = [
            {"compound_id": c, "kind": k, "sites": s, "nucleus": n, "description": None}
            for c, k, s, n in missing
        ]
        for key, pid in zip(missing, _insert_returning_ids(conn, Process, rows), strict=True):
            found[key] = pid
    return [
        None
        if e.process is None
        else found[(cid, e.process["kind"], e.process["sites"], e.process["nucleus"])]
        for e, cid in zip(entries, compound_ids, strict=True)
    ]


def write_entries(
    conn: Connection,
    entries: Sequence[NormalizedEntry],
    structures: Sequence[Structure | None],
    *,
    actor: str,
    batch_id: int | None = None,
    extras: Sequence[dict[str, Any] | None] | None = None,
    source_rows: Sequence[int | None] | None = None,
    record_history: bool = True,
) -> WriteResult:
    """Insert entries (new measurements) with their coalescence data and rate points."""
    now = datetime.now(UTC)
    compound_ids, compounds_added = resolve_compounds(conn, entries, structures, now)
    process_ids = resolve_processes(conn, entries, compound_ids)
    solvents = solvent_index(conn)
    rows = []
    for i, (entry, cid, pid) in enumerate(zip(entries, compound_ids, process_ids, strict=True)):
        row = dict(entry.measurement)
        row.update(
            compound_id=cid,
            process_id=pid,
            solvent_id=solvents.get(entry.solvent_key) if entry.solvent_key else None,
            entered_by=actor,
            entered_at=now,
            updated_at=None,
            batch_id=batch_id,
            source_row=source_rows[i] if source_rows else None,
            extra_json=json.dumps(extras[i], ensure_ascii=False, default=str)
            if extras and extras[i]
            else None,
        )
        rows.append(row)
    ids = _insert_returning_ids(conn, Measurement, rows)
    coalescence_rows = [
        {**e.coalescence, "measurement_id": mid}
        for e, mid in zip(entries, ids, strict=True)
        if e.coalescence
    ]
    if len(coalescence_rows) == 1:
        rawsql.insert_one(conn, CoalescenceObservation.__table__, coalescence_rows[0])
    else:
        rawsql.insert_many(conn, CoalescenceObservation.__table__, coalescence_rows)
    rate_rows = [
        {**r, "measurement_id": mid} for e, mid in zip(entries, ids, strict=True) for r in e.rates
    ]
    rawsql.insert_many(conn, RatePoint.__table__, rate_rows)
    if record_history:
        audit.record_many(
            conn,
            (
                {
                    "entity": "measurement",
                    "entity_id": mid,
                    "action": "import" if batch_id else "add",
                    "before": None,
                    "after": snapshot(e),
                    "batch_id": batch_id,
                }
                for e, mid in zip(entries, ids, strict=True)
            ),
            actor,
        )
    return WriteResult(ids, compounds_added)


def snapshot(entry: NormalizedEntry) -> dict[str, Any]:
    """What the history keeps of an entry: the reported texts and normalized values."""
    body: dict[str, Any] = {k: v for k, v in entry.measurement.items() if v is not None}
    body["compound"] = {k: v for k, v in entry.compound.items() if v}
    if entry.process:
        body["process"] = entry.process
    if entry.coalescence:
        body["coalescence"] = {k: v for k, v in entry.coalescence.items() if v is not None}
    if entry.rates:
        body["rates"] = [[r["t_text"], r["k_text"]] for r in entry.rates]
    return body
