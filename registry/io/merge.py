"""Three-way merge of a re-imported row with the registry, field by field.

For every field the file has a column for (see :func:`registry.io.fieldtexts.present_fields`),
three texts are compared: what the file says now, what the registry holds, and what the file
said when it was last imported (its snapshot, see :mod:`.lineage`):

* the file and the registry agree — nothing to do;
* the file changed, the registry did not — **update** (the file's text is written);
* the registry changed (an edit, a review …), the file did not — **keep** the registry's text;
* the file holds a text the registry had before and has since moved on from (an older export,
  an older copy of the sheet) — **keep**: the file brings no news;
* both changed, differently — a **conflict**: nothing is written for that measurement unless
  the user chose a side (``prefer="file"`` or ``"registry"``).

Without a snapshot (a measurement imported before snapshots were kept, or entered with ``add``)
the revision history decides: a field someone changed by hand is a conflict, any other is
updated. An empty cell is no text at all unless ``empty_clears``; then it clears the field under
the same rules. An import never retracts a measurement or takes a retraction back. A reviewed
measurement is never changed without the user's choice: every change the file brings to it is
a conflict until ``prefer`` decides it, and the history's line says so.

The compound is compared as the file names it (label, else SMILES, else name): when the file's
compound is the registered one, only its name can change; when it is another one, the
measurement moves to it.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from typing import Any

from registry.io.fieldtexts import COMPOUND_FIELDS, ENTRY_NAMES, Texts
from registry.io.lineage import FieldLog, Setter
from registry.record.entry import EntryInput

PREFER = ("file", "registry")

UPDATE, KEEP, CONFLICT = "update", "keep", "conflict"

#: why a field was decided as it was (shown in summaries)
WHY = {
    "file changed": "changed in the file",
    "file changed, no snapshot": (
        "changed in the file (no earlier import of it to compare with; never changed by hand)"
    ),
    "registry changed": "the file has not changed since its last import; the registry's value stands",
    "older value": "the file holds an earlier value the registry has since replaced",
    "both changed": "changed in the file and in the registry since the last import",
    "by hand, no snapshot": (
        "no earlier import to compare with, and the registry's value was changed by hand"
    ),
    "retraction": "an import neither retracts a measurement nor takes a retraction back",
    "reviewed": "the measurement is reviewed; an import changes it only when you choose",
}


@dataclass(frozen=True)
class MergeOptions:
    """What the user decided for the whole import."""

    prefer: str | None = None  # "file" | "registry": who wins a conflict
    empty_clears: bool = False  # an empty cell clears the field (else it says nothing)


@dataclass(frozen=True)
class FieldMerge:
    """One field of one matched measurement where the file and the registry differ."""

    field: str
    decision: str  # update | keep | conflict
    registry: str | None
    file: str | None
    base: str | None  # the file's text at its last import (None: empty, or no snapshot)
    why: str  # a key of WHY
    setter: Setter | None = None  # who set the registry's text, and when
    resolved: str | None = None  # a conflict decided by the user's choice: file | registry

    @property
    def applied(self) -> bool:
        """True when the file's text is written."""
        return self.decision == UPDATE or self.resolved == "file"


@dataclass
class MeasurementMerge:
    """Everything a re-import decided about one matched measurement."""

    index: int  # the entry's position in the import
    measurement_id: int
    matched_by: str  # uid | label | key
    fields: list[FieldMerge] = field(default_factory=list)
    reviewed: bool = False
    sheet: str | None = None  # where the file gives it (for the report)
    row: int | None = None

    @property
    def held(self) -> bool:
        """An unresolved conflict: nothing is written for this measurement."""
        return any(f.decision == CONFLICT and f.resolved is None for f in self.fields)

    def applied(self) -> list[FieldMerge]:
        return [] if self.held else [f for f in self.fields if f.applied]


def decide(
    index: int,
    measurement_id: int,
    matched_by: str,
    *,
    file: Texts,
    registry: Texts,
    base: Texts | None,
    log: FieldLog | None,
    same_compound: bool,
    options: MergeOptions,
) -> MeasurementMerge:
    """Decide every field the file has (``file`` holds only those) against the registry."""
    merge = MeasurementMerge(index, measurement_id, matched_by)
    merge.reviewed = registry.get("status") == "reviewed"
    identity = next((name for name in COMPOUND_FIELDS if file.get(name)), None)
    for name, new in file.items():
        if name in COMPOUND_FIELDS and name != ("name" if same_compound else identity):
            continue  # the same compound: only its name can change; another: the row moves
        if new is None and not options.empty_clears:
            continue
        fm = _field(name, new, registry.get(name), base, log)
        if fm is not None:
            merge.fields.append(_resolved(fm, merge.reviewed, log, options))
    return merge


def _field(
    name: str, new: str | None, reg: str | None, base: Texts | None, log: FieldLog | None
) -> FieldMerge | None:
    """The decision for one field (see the module docstring), or None when they agree."""
    if new == reg:
        return None
    setter = log.last.get(name) if log is not None else None
    known = base is not None and name in base
    old = base.get(name) if base is not None else None

    def made(decision: str, why: str) -> FieldMerge:
        return FieldMerge(name, decision, reg, new, old, why, setter)

    if name == "status" and "retracted" in (new, reg):
        return made(KEEP, "retraction")
    if known and new == old:
        return made(KEEP, "registry changed")
    if known and reg == old:
        return made(UPDATE, "file changed")
    if log is not None and new in log.past.get(name, ()):
        return made(KEEP, "older value")
    if known:
        return made(CONFLICT, "both changed")
    if log is not None and name in log.by_hand:
        return made(CONFLICT, "by hand, no snapshot")
    return made(UPDATE, "file changed, no snapshot")


def _resolved(
    fm: FieldMerge, reviewed: bool, log: FieldLog | None, options: MergeOptions
) -> FieldMerge:
    """A reviewed measurement's updates become conflicts; conflicts take the user's choice."""
    if fm.decision == UPDATE and reviewed:
        review = log.last.get("status") if log is not None else None
        setter = replace(review, action="review") if review is not None else None
        fm = FieldMerge(fm.field, CONFLICT, fm.registry, fm.file, fm.base, "reviewed", setter)
    if fm.decision == CONFLICT and options.prefer in PREFER:
        fm = FieldMerge(
            fm.field, CONFLICT, fm.registry, fm.file, fm.base, fm.why, fm.setter, options.prefer
        )
    return fm


def merged_input(
    state: dict[str, Any], file_input: EntryInput, merge: MeasurementMerge
) -> EntryInput:
    """The stored entry with the file's applied fields written over it, ready to normalize.

    Starting from the registry's texts (:func:`registry.admin.edits.stored_input`, the same
    path ``edit`` takes), each applied field takes the file's text with the unit its header
    gave; the whole entry is then normalized again, so that values derived from several fields
    (Δν in ppm at the spectrometer frequency, the temperature of ΔG‡ at Tc) follow.
    """
    from registry.admin.edits import stored_input

    coalescence = state["coalescence"]
    inp = stored_input(
        state["measurement"],
        state["compound"] or {},
        state["process"],
        coalescence[0] if len(coalescence) == 1 else None,
    )
    for fm in merge.applied():
        if fm.field not in ENTRY_NAMES or fm.field in COMPOUND_FIELDS:
            continue  # rates, extras and the compound are written apart
        setattr(inp, fm.field, getattr(file_input, fm.field))
        unit = file_input.units.get(fm.field)
        if unit:
            inp.units[fm.field] = unit
        else:
            inp.units.pop(fm.field, None)
    return inp
