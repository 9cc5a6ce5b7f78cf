"""Which stored measurement each row of a file is: by its identifier, its label, its natural key.

In this order (the first that finds one decides):

1. **uid** — the identifier an export writes in its ``uid`` column (see :mod:`.identity`). A
   uid this registry does not know (a file exported from another registry) decides nothing:
   the row is matched as a row without one, and a new measurement keeps that uid.
2. **label** — the group's label of the measurement, unique per compound: a row with compound
   ``HG-A1`` and label ``m1`` is the measurement labelled ``m1`` of ``HG-A1``, whatever its
   solvent, method or reference say (so that correcting one of them updates it).
3. **natural key** — compound, process, solvent, method, reference and label together (and,
   for a computed value, its level of theory: one compound's barrier at two levels is two
   measurements).

Everything here only reads, so a dry run shows what would happen.
"""

from __future__ import annotations

from collections import defaultdict
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

from registry.record import vocab
from registry.record.chem import Structure
from registry.record.entry import NormalizedEntry
from registry.record.theory import THEORY_COLUMNS, theory_key
from registry.storage.connection import Connection
from registry.storage.writer import solvent_index

MatchKey = tuple[Any, ...]


@dataclass
class Matches:
    """Per entry: the stored measurement it is (None: new), how it was found, its compound."""

    ids: list[int | None]
    how: list[str | None]  # "uid", "label", "key"
    compound_ids: list[int | None]  # the entry's compound as registered (None: not yet)
    ambiguous: list[tuple[int, list[int]]]  # (entry index, candidate ids)


def _solvent_part(solvent_id: int | None, text: str | None) -> Any:
    if solvent_id is not None:
        return ("id", solvent_id)
    return ("text", vocab.solvent_key(text) if text else "")


def find_matches(
    conn: Connection,
    entries: Sequence[NormalizedEntry],
    structures: Sequence[Structure | None],
    uids: Sequence[str | None],
) -> Matches:
    """Match every entry (see the module docstring)."""
    by_uid = dict(conn.rows_where_in("SELECT uid, id FROM measurement WHERE 1 = 1", "uid", uids))
    compound_ids = compound_ids_of(conn, entries, structures)
    known = {c for c in compound_ids if c is not None}
    processes: dict[tuple[int, str, str, str], int] = {}
    for pid, cid, kind, sites, nucleus in conn.rows_where_in(
        "SELECT id, compound_id, kind, sites, nucleus FROM process WHERE 1 = 1",
        "compound_id",
        known,
    ):
        processes[(cid, kind, sites, nucleus)] = pid
    by_key: dict[MatchKey, list[int]] = defaultdict(list)
    by_label: dict[tuple[int, str], list[int]] = defaultdict(list)
    for row in conn.records_where_in(
        "SELECT id, compound_id, process_id, method, solvent_id, solvent_text, reference, label, "
        f"{', '.join(THEORY_COLUMNS)} FROM measurement WHERE 1 = 1",
        "compound_id",
        known,
    ):
        mid, cid, label = row["id"], row["compound_id"], row["label"]
        key = (
            cid, row["process_id"], row["method"],
            _solvent_part(row["solvent_id"], row["solvent_text"]), row["reference"] or "",
            label or "", theory_key(row),
        )  # fmt: skip
        by_key[key].append(mid)
        if label:
            by_label[(cid, label)].append(mid)
    solvents = solvent_index(conn)
    out = Matches([], [], compound_ids, [])
    for i, (e, cid, uid) in enumerate(zip(entries, compound_ids, uids, strict=True)):
        if uid is not None and uid in by_uid:
            out.ids.append(by_uid[uid])
            out.how.append("uid")
            continue
        key = None
        if cid is not None:
            pid = None
            if e.process is not None:
                pid = processes.get(
                    (cid, e.process["kind"], e.process["sites"], e.process["nucleus"])
                )
            m = e.measurement
            sid = solvents.get(e.solvent_key) if e.solvent_key else None
            key = (
                cid, pid, m["method"], _solvent_part(sid, m["solvent_text"]), m["reference"] or "",
                m["label"] or "", theory_key(m),
            )  # fmt: skip
            if e.process is not None and pid is None:
                key = None  # a process this compound does not have yet: no stored measurement
        label = e.measurement["label"]
        found, how = [], None
        if cid is not None and label and by_label.get((cid, label)):
            found, how = by_label[(cid, label)], "label"
            if len(found) > 1:  # labels repeated within a compound: the natural key decides
                narrowed = [mid for mid in found if mid in by_key.get(key, ())]
                found = narrowed if len(narrowed) == 1 else found
        elif key is not None:
            found, how = by_key.get(key, []), "key"
        if len(found) > 1:
            out.ambiguous.append((i, sorted(found)))
        out.ids.append(found[0] if len(found) == 1 else None)
        out.how.append(how if len(found) == 1 else None)
    return out


def compound_ids_of(
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
