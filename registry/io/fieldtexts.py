"""What each side says about one measurement, field by field, as the texts a user wrote.

A re-import compares three accounts of every field (see :mod:`.merge`): what the file says now
(:func:`entry_texts`, from the normalized row), what the registry holds (:func:`stored_texts`),
and what the file said when it was last imported (an ``import_snapshot`` row, written by
:mod:`.snapshots` from :func:`entry_texts`). The revision history gives a fourth: every text a
field has held (:func:`revision_texts`, read by :mod:`.lineage`).

Fields are named as the fields table names them (``dg``, ``solvent``, ``compound`` …; see
:mod:`registry.record.fields`), plus ``rates`` (the rate points as ``k @ T; k @ T``) and
``extra: <name>`` for each extra attribute. Texts are compared as written: ``14.6 kcal/mol`` and
``61.1 kJ/mol`` are different texts (someone changed what is reported), empty is ``None``.
"""

from __future__ import annotations

import json
from collections.abc import Mapping, Sequence
from typing import Any

from registry.io.cells import format_rate_list
from registry.io.headers import EXTRA_PREFIX
from registry.io.mapping import SheetPlan
from registry.record import fields
from registry.record.entry import NormalizedEntry

Texts = dict[str, str | None]

#: the fields of one entry, in the fields table's order
ENTRY_FIELDS: tuple[fields.Field, ...] = tuple(f for f in fields.FIELDS if f.entry)
ENTRY_NAMES = frozenset(f.name for f in ENTRY_FIELDS)
#: the fields that say which compound a measurement is of (compared as one, see .merge)
COMPOUND_FIELDS = ("compound", "smiles", "name")
RATES = "rates"
#: the prefix of an extra attribute's field name
EXTRA = "extra: "
#: which column of the revision/part a field's text is in, per table
_COLUMN = {f.name: f.text_column for f in ENTRY_FIELDS}


def clean(value: Any) -> str | None:
    """A stored or read text as compared: stripped, empty → None."""
    if value is None:
        return None
    text = str(value).strip()
    return text or None


def rate_text(rates: Sequence[Mapping[str, Any]] | Sequence[Sequence[str]]) -> str | None:
    """Rate points (dicts with t_text/k_text, or [t, k] pairs) as one text, ``k @ T; k @ T``."""
    pairs = [(r["t_text"], r["k_text"]) if isinstance(r, Mapping) else (r[0], r[1]) for r in rates]
    return format_rate_list(pairs) if pairs else None


def extra_key(header: str) -> str:
    """The attribute name an extra column's header gives (as :mod:`.entries` reads it)."""
    if header.lower().startswith(EXTRA_PREFIX):
        return header[len(EXTRA_PREFIX) :].strip()
    return header


def present_fields(plan: SheetPlan) -> frozenset[str]:
    """The fields a sheet speaks for: its recognised columns and its mapping-file defaults.

    A field without a column (or whose header was not recognised) is not the file's to change.
    """
    names = {c.field for c in plan.columns if c.role == "value" and c.field in ENTRY_NAMES}
    names |= {name for name in plan.defaults if name in ENTRY_NAMES}
    if any(c.role == "value" and c.field in ("rates", "k") for c in plan.columns):
        names.add(RATES)
    names |= {EXTRA + extra_key(c.header) for c in plan.extra_columns()}
    return frozenset(names)


def entry_texts(entry: NormalizedEntry, extra: Mapping[str, Any] | None) -> Texts:
    """What a file's row says, per field (every field; the caller keeps the present ones)."""
    parts: dict[str, Mapping[str, Any]] = {
        "measurement": entry.measurement,
        "coalescence": entry.coalescence or {},
        "compound": entry.compound,
        "process": entry.process or {},
    }
    out: Texts = {f.name: clean(parts[f.table].get(_COLUMN[f.name] or "")) for f in ENTRY_FIELDS}
    out[RATES] = rate_text(entry.rates)
    for key, value in (extra or {}).items():
        out[EXTRA + key] = clean(value)
    return out


def stored_texts(state: Mapping[str, Any]) -> Texts:
    """What the registry holds for one measurement, per field.

    ``state``: the measurement row, its compound and process rows (or None), its coalescence
    rows and rate points (see :func:`registry.io.upsert.stored_state`).
    """
    m = state["measurement"]
    coalescence = state["coalescence"]
    parts: dict[str, Mapping[str, Any]] = {
        "measurement": m,
        "coalescence": coalescence[0] if len(coalescence) == 1 else {},
        "compound": state["compound"] or {},
        "process": state["process"] or {},
    }
    out: Texts = {f.name: clean(parts[f.table].get(_COLUMN[f.name] or "")) for f in ENTRY_FIELDS}
    out[RATES] = rate_text(state["rates"])
    extra = json.loads(m["extra_json"]) if m.get("extra_json") else {}
    for key, value in extra.items():
        out[EXTRA + key] = clean(value)
    return out


def revision_texts(body: Mapping[str, Any] | None, *, creation: bool = False) -> Texts:
    """The field texts one side (before or after) of a revision names.

    Revisions come in the shapes their writers gave them: measurement columns at the top, a
    ``coalescence`` dict (changed columns; None when removed) or list of rows, ``process`` and
    ``compound`` dicts, ``rates`` as [T, k] pairs, ``extra`` as a dict. A creation (``add``,
    ``import``) names every measurement field, leaving out the empty ones.
    """
    out: Texts = {}
    if not isinstance(body, Mapping):
        return out
    for f in ENTRY_FIELDS:
        column = _COLUMN[f.name]
        if f.table == "measurement" and column:
            if column in body:
                out[f.name] = clean(body[column])
            elif creation:
                out[f.name] = None
    if "coalescence" in body or creation:
        co = body.get("coalescence")
        whole = creation or co is None or isinstance(co, list)  # a list holds whole rows
        if isinstance(co, list):
            co = co[0] if len(co) == 1 else {}
        for f in ENTRY_FIELDS:
            if f.table == "coalescence" and (whole or _COLUMN[f.name] in co):
                out[f.name] = clean((co or {}).get(_COLUMN[f.name] or ""))
    for table in ("process", "compound"):
        part = body.get(table)
        if isinstance(part, Mapping):
            for f in ENTRY_FIELDS:
                if f.table == table and (_COLUMN[f.name] in part or creation):
                    out[f.name] = clean(part.get(_COLUMN[f.name] or ""))
    if isinstance(body.get("rates"), list):
        out[RATES] = rate_text(body["rates"])
    elif creation:
        out[RATES] = None
    if isinstance(body.get("extra"), Mapping):
        for key, value in body["extra"].items():
            out[EXTRA + key] = clean(value)
    return out
