"""Rows the registry would refuse, found before the write: compound conflicts and duplicates.

A compound label names one structure and a structure carries one label, in the file and in the
registry. Two rows of one file that claim one measurement are one too many: the same ``uid``,
the same compound and measurement label, or the same natural key (compound, process, solvent,
method, reference, label and a computed value's level of theory — see :mod:`.matching`); the later row's problem names the earlier.
Each such row becomes a problem naming its sheet, row and column, so that the whole file is
judged before anything is written.
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

from registry.errors import RowProblem
from registry.io.results import ReadResult, RowSource
from registry.record.chem import Structure
from registry.record.entry import NormalizedEntry
from registry.record.theory import theory_key
from registry.storage.connection import Connection


def screen_entries(
    conn: Connection,
    read: ReadResult,
    entries: list[NormalizedEntry],
    structures: list[Structure | None],
    kept: list[int],
    solvents: dict[str, int],
    problems: list[RowProblem],
) -> tuple[list[NormalizedEntry], list[Structure | None], list[int]]:
    """The entries without compound conflicts and duplicates; the others' problems added."""
    conflicts = compound_conflicts(conn, entries, structures)
    seen: dict[tuple[Any, ...], int] = {}
    drop: set[int] = set()
    for j, (ne, st) in enumerate(zip(entries, structures, strict=True)):
        src = read.sources[kept[j]]
        if j in conflicts:
            values = src.plan.value_columns()
            col = values.get("compound") or values.get("smiles")
            problems.append(
                RowProblem(
                    read.file, src.sheet, src.row, col.header if col else "compound",
                    ne.compound.get("label") or ne.compound.get("smiles_input"), conflicts[j],
                )
            )  # fmt: skip
            drop.add(j)
            continue
        uid = read.uids[kept[j]] if read.uids else None
        claims = _claims(ne, st, uid, solvents)
        clash = next(((seen[c], why) for c, why in claims if c in seen), None)
        if clash is not None:
            first = read.sources[kept[clash[0]]]
            problems.append(
                RowProblem(
                    read.file, src.sheet, src.row, None, None,
                    f"duplicate of {row_name(first, src.sheet)}: {clash[1]}",
                )
            )  # fmt: skip
            drop.add(j)
            continue
        for c, _why in claims:
            seen[c] = j
    if not drop:
        return entries, structures, kept
    keep = [j for j in range(len(entries)) if j not in drop]
    return [entries[j] for j in keep], [structures[j] for j in keep], [kept[j] for j in keep]


_SAME_KEY = (
    "same compound, process, solvent, method, reference, label (and level of theory); remove it "
    "or give each measurement its own label"
)


def _claims(
    entry: NormalizedEntry, structure: Structure | None, uid: str | None, solvents: dict[str, int]
) -> list[tuple[tuple[Any, ...], str]]:
    """What a row claims to be, most specific first, each with what a second claim is told."""
    out: list[tuple[tuple[Any, ...], str]] = []
    if uid:
        out.append((("uid", uid), f"both rows carry uid {uid}; one measurement, one row"))
    label = entry.measurement["label"]
    if label:
        out.append(
            (
                ("label", _identity(entry, structure), label),
                f"compound {_compound_name(entry)!r} has one measurement labelled {label!r}; "
                "give each measurement its own label",
            )
        )
    out.append((("key", *match_key(entry, structure, solvents)), _SAME_KEY))
    return out


def row_name(src: RowSource, sheet: str | None) -> str:
    """``row 3`` (``row 3 of sheet 'entries'`` when it is on another sheet than ``sheet``)."""
    if src.sheet and src.sheet != sheet:
        return f"row {src.row} of sheet {src.sheet!r}"
    return f"row {src.row}"


def _compound_name(entry: NormalizedEntry) -> str:
    c = entry.compound
    return c.get("label") or c.get("name") or c.get("smiles_input") or "?"


def _identity(entry: NormalizedEntry, structure: Structure | None) -> str:
    if structure is not None and structure.inchikey:
        return structure.inchikey
    if entry.compound.get("label"):
        return f"label:{entry.compound['label']}"
    return f"name:{entry.compound.get('name')}"


def match_key(
    entry: NormalizedEntry, structure: Structure | None, solvents: dict[str, int]
) -> tuple[Any, ...]:
    """What makes two rows of one file the same measurement."""
    m = entry.measurement
    process = (
        (entry.process["kind"], entry.process["sites"], entry.process["nucleus"])
        if entry.process
        else None
    )
    sid = solvents.get(entry.solvent_key) if entry.solvent_key else None
    solvent = ("id", sid) if sid is not None else ("text", entry.solvent_key or "")
    return (
        _identity(entry, structure),
        process,
        m["method"],
        solvent,
        m["reference"] or "",
        m["label"] or "",
        theory_key(m),
    )


def compound_conflicts(
    conn: Connection, entries: Sequence[NormalizedEntry], structures: Sequence[Structure | None]
) -> dict[int, str]:
    """Entries whose compound label and structure disagree with each other or the registry."""
    select = "SELECT inchikey, label FROM compound WHERE 1 = 1"
    keys = {s.inchikey for s in structures if s is not None and s.inchikey}
    labels = {e.compound["label"] for e in entries if e.compound.get("label")}
    db_key: dict[str, str | None] = dict(conn.rows_where_in(select, "inchikey", keys))
    db_label: dict[str, str | None] = {
        label: key for key, label in conn.rows_where_in(select, "label", labels)
    }
    out: dict[int, str] = {}
    file_key: dict[str, str] = {}
    file_label: dict[str, str] = {}
    for i, (e, s) in enumerate(zip(entries, structures, strict=True)):
        label = e.compound.get("label")
        key = s.inchikey if s is not None else None
        if key and key in db_key and label and db_key[key] and db_key[key] != label:
            out[i] = (
                f"this structure is already registered as compound {db_key[key]!r} "
                f"(InChIKey {key}); use that label"
            )
        elif label and label in db_label and key and db_label[label] and db_label[label] != key:
            out[i] = (
                f"compound {label!r} already names a different structure "
                f"(InChIKey {db_label[label]}); choose another label"
            )
        elif key and label and key in file_key and file_key[key] != label:
            out[i] = f"the same structure is labelled {file_key[key]!r} in an earlier row"
        elif key and label and label in file_label and file_label[label] != key:
            out[i] = f"compound {label!r} names a different structure in an earlier row"
        elif key and label:
            file_key.setdefault(key, label)
            file_label.setdefault(label, key)
    return out
