"""Write normalized entries: resolve compounds, processes and solvents, insert, record history.

Works in batches (one ``executemany`` per table, no object per row), so that one entry from
``add`` and a hundred thousand from an import take the same path. Everything runs inside the caller's
write transaction: a failure anywhere leaves nothing behind.
"""

from __future__ import annotations

import json
import uuid
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from datetime import UTC, datetime
from typing import Any

from registry.errors import FluxledgerError
from registry.record import vocab
from registry.record.chem import Structure
from registry.record.entry import NormalizedEntry
from registry.storage import audit
from registry.storage.connection import Connection


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


_REFERENCE_CACHE: dict[str, dict[str, Any]] = {}


def _reference_cache(conn: Connection) -> dict[str, Any]:
    """The small reference tables (solvent spellings, process kinds, stored aliases), read again
    when they change.

    Every single ``add`` needs them; building the spelling index each time cost a quarter of a
    write. Kept per process, keyed on the ``vocabulary`` change counter (it moves on every
    insert, update and delete of ``solvent``, ``process_kind`` and ``vocab_alias``) and on the
    sizes of those tables (a file restored from a backup may carry another count).
    """
    stamp = conn.first(
        "SELECT (SELECT n FROM change_counter WHERE name = 'vocabulary'), "
        "(SELECT count(*) FROM solvent), (SELECT max(id) FROM solvent), "
        "(SELECT count(*) FROM process_kind), (SELECT count(*) FROM vocab_alias), "
        "(SELECT max(id) FROM vocab_alias)"
    )
    cache = _REFERENCE_CACHE.get(conn.source)
    if cache is None or cache.get("stamp") != stamp:
        index, vocabulary = read_reference_tables(conn)
        cache = _REFERENCE_CACHE[conn.source] = {
            "stamp": stamp,
            "solvents": index,
            "vocabulary": vocabulary,
        }
    return cache


def read_reference_tables(conn: Connection) -> tuple[dict[str, int], vocab.Vocabulary]:
    """Every spelling key of every solvent (stored aliases too) → its id, and the registry's
    vocabulary, read now without the cache (what a transaction that changes them must see)."""
    index: dict[str, int] = {}
    by_name: dict[str, int] = {}
    for sid, name, formula, aliases in conn.rows(
        "SELECT id, name, formula, aliases FROM solvent ORDER BY id"
    ):
        by_name[name] = sid
        for spelling in (name, formula, *(aliases or "").split("|")):
            if spelling:
                index.setdefault(vocab.solvent_key(spelling), sid)
    stored = tuple(
        (str(kind), str(alias), str(target))
        for kind, alias, target in conn.rows(
            "SELECT kind, alias, target FROM vocab_alias ORDER BY id"
        )
    )
    for kind, alias, target in stored:  # a group's own spellings of its solvents
        if kind == "solvent" and target in by_name:
            index.setdefault(vocab.solvent_key(alias), by_name[target])
    kinds = tuple(conn.column("SELECT name FROM process_kind ORDER BY name"))
    return index, vocab.Vocabulary(kinds, stored)


def solvent_index(conn: Connection) -> dict[str, int]:
    """Every spelling key of every solvent (stored aliases too) → its id."""
    return _reference_cache(conn)["solvents"]


def cached_process_kinds(key: str) -> vocab.Vocabulary | None:
    """The vocabulary last read from the registry ``key`` in this process (no query)."""
    cache = _REFERENCE_CACHE.get(key)
    return cache["vocabulary"] if cache else None


def known_process_kinds(conn: Connection) -> vocab.Vocabulary:
    """The registry's :class:`~registry.record.vocab.Vocabulary`: its process kinds and the
    aliases its users stored (what :func:`registry.record.entry.normalize_entry` reads with)."""
    return _reference_cache(conn)["vocabulary"]


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


def _registered(
    conn: Connection, entries: Sequence[NormalizedEntry], structures: Sequence[Structure | None]
) -> tuple[dict[str, tuple[int, str | None]], dict[str, tuple[int, str | None]], dict[str, int]]:
    """Compounds already registered, by InChIKey, by label and (no structure, no label) by name."""
    keys = {s.inchikey for s in structures if s is not None and s.inchikey}
    labels = {e.compound.get("label") for e in entries if e.compound.get("label")}
    by_key: dict[str, tuple[int, str | None]] = {}
    by_label: dict[str, tuple[int, str | None]] = {}
    select = "SELECT id, inchikey, label FROM compound WHERE 1 = 1"
    for cid, key, label in conn.rows_where_in(select, "inchikey", keys):
        by_key[key] = (cid, label)
    for cid, key, label in conn.rows_where_in(select, "label", labels):
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
    for cid, name in sorted(
        conn.rows_where_in(
            "SELECT id, name FROM compound WHERE label IS NULL AND inchikey IS NULL", "name", names
        )
    ):
        by_name.setdefault(name, cid)
    return by_key, by_label, by_name


def resolve_compounds(
    conn: Connection,
    entries: Sequence[NormalizedEntry],
    structures: Sequence[Structure | None],
    now: datetime,
) -> tuple[list[int], int]:
    """Compound id for each entry, inserting the ones not yet registered (matched by InChIKey, then label)."""
    by_key, by_label, by_name = _registered(conn, entries, structures)
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
        new_ids = _insert_returning_ids(conn, "compound", new_rows)
    ids = [value if kind == "id" else new_ids[value] for kind, value in slots]
    return ids, len(new_rows)


def _insert_returning_ids(conn: Connection, table: str, rows: list[dict[str, Any]]) -> list[int]:
    """Insert rows and return their ids in order (one row: the single-add path)."""
    if len(rows) == 1:
        return [conn.insert(table, rows[0], returning="id")]
    return conn.insert_many(table, rows, new_ids=True)


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
    for pid, cid, kind, sites, nucleus in conn.rows_where_in(
        "SELECT id, compound_id, kind, sites, nucleus FROM process WHERE 1 = 1", "compound_id", cids
    ):
        found[(cid, kind, sites, nucleus)] = pid
    missing = sorted(w for w in wanted if w not in found)
    if missing:
        rows = [
            {"compound_id": c, "kind": k, "sites": s, "nucleus": n, "description": None}
            for c, k, s, n in missing
        ]
        for key, pid in zip(missing, _insert_returning_ids(conn, "process", rows), strict=True):
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
            uid=uuid.uuid4().hex,
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
    ids = _insert_returning_ids(conn, "measurement", rows)
    coalescence_rows = [
        {**e.coalescence, "measurement_id": mid}
        for e, mid in zip(entries, ids, strict=True)
        if e.coalescence
    ]
    if len(coalescence_rows) == 1:
        conn.insert("coalescence", coalescence_rows[0])
    else:
        conn.insert_many("coalescence", coalescence_rows)
    rate_rows = [
        {**r, "measurement_id": mid} for e, mid in zip(entries, ids, strict=True) for r in e.rates
    ]
    conn.insert_many("rate_point", rate_rows)
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
        body["rates"] = history_rates(entry.rates)
    return body


def carry_fit_records(
    old: Sequence[Mapping[str, Any]], new: Sequence[Mapping[str, Any]]
) -> list[dict[str, Any]]:
    """New rate points (a sheet's) with the fit record of the old point they repeat word for
    word: correcting one rate in a sheet leaves how the others were fitted on record."""
    records = {(r["t_text"], r["k_text"]): r.get("fit_json") for r in old if r.get("fit_json")}
    return [
        {**r, "fit_json": r.get("fit_json") or records.get((r["t_text"], r["k_text"]))} for r in new
    ]


def history_rates(points: Sequence[Mapping[str, Any]]) -> list[list[str]]:
    """Rate points as a revision keeps them: ``[T text, k text]``, and the fit record's JSON
    text third where the point has one (see :mod:`registry.lineshape.store_link`)."""
    return [
        [p["t_text"], p["k_text"], p["fit_json"]]
        if p.get("fit_json")
        else [p["t_text"], p["k_text"]]
        for p in points
    ]
