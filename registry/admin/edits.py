"""Edits without loss: change a measurement's values, or retract it.

A measurement is never deleted. An edit re-reads the changed texts with
:mod:`registry.record.units` (any notation the ``add`` command accepts) and re-normalizes the
whole entry through :func:`registry.record.entry.normalize_entry`, so derived values follow (a
new spectrometer frequency changes a Δν reported in ppm; a new Tc moves the temperature ΔG‡
refers to when none was given). Every change appends a revision with the columns before and
after (:mod:`registry.storage.audit`); the read, the check and the write happen in one write
transaction, so two people editing the same measurement at once cannot lose each other's change.
Which fields can be edited, and where each is stored, is :mod:`registry.record.fields`.

The status follows the findings (:mod:`registry.validation.store`): ``flagged`` is set and
cleared by the checks, so an edit cannot set it, and cannot change the status of a measurement
while one of its error findings is open — the error names the finding. (A retracted one can be
restored to draft or reviewed; the check that follows every edit flags it again if need be.)
An edit that changes values is checked again at once, which may flag the measurement or
return it to its status.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from dataclasses import field as dc_field
from datetime import UTC, datetime
from typing import Any

from registry.admin.reread import reread, same_value, shift_mhz
from registry.errors import NotFoundError, OpenFindingError, UnitError, UsageError
from registry.record import fields, vocab
from registry.record.entry import EntryError, EntryInput, NormalizedEntry, normalize_entry
from registry.storage import audit
from registry.storage.connection import Connection
from registry.storage.database import Database, current_user
from registry.storage.writer import known_process_kinds, resolve_processes, solvent_index

_COALESCENCE_FIELDS = tuple(f.name for f in fields.FIELDS if f.table == "coalescence")
_PROCESS_FIELDS = tuple(f.name for f in fields.FIELDS if f.table == "process")
_EDITABLE = tuple(f.name for f in fields.EDITABLE)


def canonical_field(name: str) -> str:
    """The entry field a user means by ``name`` (``dg``, ``t-min``, ``MHz`` …), or a UsageError."""
    key = name.strip().lower().replace("-", "_").replace(" ", "_")
    key = fields.EDIT_ALIASES.get(key, key)
    if key not in _EDITABLE:
        raise UsageError(f"cannot edit {name!r}; editable fields: {', '.join(_EDITABLE)}")
    return key


def parse_assignments(assignments: list[str]) -> dict[str, str | None]:
    """``["dg=14.5 kcal/mol", "reference="]`` → ``{"dg": "14.5 kcal/mol", "reference": None}``."""
    changes: dict[str, str | None] = {}
    for item in assignments:
        if "=" not in item:
            raise UsageError(f'{item!r}: write FIELD=VALUE, e.g. dg="14.5 kcal/mol"')
        name, value = item.split("=", 1)
        key = canonical_field(name)
        if key in changes:
            raise UsageError(f"{name}: given twice")
        changes[key] = value.strip() or None
    if not changes:
        raise UsageError("nothing to change; give at least one FIELD=VALUE")
    return changes


def stored_input(
    m: dict[str, Any],
    compound: dict[str, Any],
    process: dict[str, Any] | None,
    coalescence: dict[str, Any] | None,
) -> EntryInput:
    """The entry as its texts were stored, with the header units bare numbers must have had."""
    inp = EntryInput(
        method=m["method"],
        label=m["label"],
        compound=compound.get("label") or (None if compound.get("name") else f"#{m['id']}"),
        name=compound.get("name"),
        solvent=m["solvent_text"],
        reference=m["reference"],
        status=m["status"],
    )
    if process is not None:
        inp.process, inp.sites, inp.nucleus = process["kind"], process["sites"], process["nucleus"]
    for f in _RECORDED_TEXT_FIELDS:  # convention, degeneracy, order, direction, calibration
        value = m.get(f.text_column or "")
        setattr(inp, f.name, None if value is None else str(value))
    mhz = m["field_mhz"]
    for f in fields.stored_values("measurement"):
        _set_stored(inp, f, m[f.text_column], m[f.value_column], mhz)
    if coalescence is not None:
        mhz = coalescence["field_mhz"] or mhz
        for f in fields.stored_values("coalescence"):
            nucleus = process["nucleus"] if process else None
            at = shift_mhz(mhz, nucleus) if f.name == "dnu" else mhz
            _set_stored(inp, f, coalescence[f.text_column], coalescence[f.value_column], at)
        inp.population = coalescence["population_text"]
        if _legacy_fraction(coalescence):
            inp.units["population"] = "fraction"  # read so when it was stored
    return inp


#: measurement text fields beyond those :func:`stored_input` sets by name
_RECORDED_TEXT_FIELDS = tuple(
    f for f in fields.FIELDS
    if f.table == "measurement" and not f.is_value and f.entry
    and f.name not in ("label", "method", "solvent", "reference", "status")
)  # fmt: skip


def _legacy_fraction(coalescence: dict[str, Any]) -> bool:
    """A bare population number below 1 stored before such texts were refused as ambiguous was
    read as one site's fraction; it keeps that reading (so an edit of another field works)."""
    text = coalescence.get("population_text")
    if text is None:
        return False
    from registry.record.populations import legacy_population_ratio

    old = legacy_population_ratio(text)
    return old is not None and same_value(old, coalescence.get("population_ratio"))


def _set_stored(
    inp: EntryInput, f: fields.Field, text: str | None, value: float | None, mhz: Any
) -> None:
    if text is None:
        return
    setattr(inp, f.name, text)
    _parsed, unit = reread(text, fields.quantity_of(f.name), value, field=f.name, mhz=mhz)
    if unit:
        inp.units[f.name] = unit


def _coalescence_body(row: dict[str, Any] | None) -> dict[str, Any] | None:
    if row is None:
        return None
    return {k: v for k, v in row.items() if k not in ("id", "measurement_id")}


def _differs(old: Any, new: Any) -> bool:
    if isinstance(old, float) or isinstance(new, float):
        return not same_value(old, new)
    return old != new


def _process_body(row: dict[str, Any] | None) -> dict[str, Any] | None:
    return None if row is None else {k: row[k] for k in ("kind", "sites", "nucleus")}


@dataclass
class _Stored:
    """One measurement as it is stored: its row, compound, process and coalescence rows."""

    m: dict[str, Any]
    compound: dict[str, Any]
    process: dict[str, Any] | None
    coalescence: list[dict[str, Any]]


@dataclass
class _Change:
    """What an edit writes: measurement columns, and before/after for the history."""

    updates: dict[str, Any] = dc_field(default_factory=dict)
    before: dict[str, Any] = dc_field(default_factory=dict)
    after: dict[str, Any] = dc_field(default_factory=dict)


def edit_measurement(
    database: Database,
    measurement_id: int,
    changes: Mapping[str, str | None],
    *,
    actor: str | None = None,
    reason: str | None = None,
) -> dict[str, Any]:
    """Change fields of one measurement (texts in any notation); returns what changed.

    ``changes`` maps editable fields (:data:`registry.record.fields.EDITABLE`) to new texts;
    ``None`` clears a field. Raises :class:`UnitError`/:class:`EntryError` when the edited
    entry does not normalize, in which case nothing is written.
    """
    wanted = {canonical_field(k): v for k, v in changes.items()}
    if not wanted:
        raise UsageError("nothing to change; give at least one FIELD=VALUE")
    status = _wanted_status(wanted)
    who = actor or current_user()

    def work(conn: Connection) -> dict[str, Any]:
        stored = _load(conn, measurement_id, wanted)
        asks_status = status is not None and stored.m["status"] not in (status, "retracted")
        if asks_status and set(wanted) == {"status"}:
            _refuse_while_open(conn, measurement_id, status)  # (the check follows a restore)
            # a measurement entered without a check has no stored findings to go by: the
            # rules judge its values here, so a status is never granted and then taken back
            _refuse_if_values_fail(conn, measurement_id, status, edited=False)
        normalized = _renormalized(conn, stored, wanted)
        change = _measurement_change(conn, stored, normalized, wanted)
        if len(stored.coalescence) <= 1:
            _coalescence_change(conn, stored, normalized.coalescence, change)
        if not change.after and not change.before:
            return {"id": measurement_id, "changed": False, "before": {}, "after": {}}
        change.updates["updated_at"] = datetime.now(UTC)
        conn.update("measurement", change.updates, id=measurement_id)
        if asks_status and set(wanted) != {"status"}:
            _refuse_if_values_fail(conn, measurement_id, status, edited=True)
        action = "status" if set(change.after) == {"status"} else "edit"
        audit.record(
            conn, entity="measurement", entity_id=measurement_id, action=action, actor=who,
            before=change.before, after=change.after, reason=reason,
        )  # fmt: skip
        return {
            "id": measurement_id,
            "changed": True,
            "action": action,
            "revision": conn.scalar("SELECT max(id) FROM revision"),
            "before": change.before,
            "after": change.after,
        }

    result = database.write(work)
    if result["changed"]:
        checked: dict[str, Any] = {}
        result["findings"] = revalidate(database, measurement_id, actor=who, report=checked)
        # the status the check set (flagged, or back): {"before", "after"}, or None
        changes = checked.get("status_changes") or ()
        result["status_change"] = (
            {"before": changes[0]["before"], "after": changes[0]["after"]} if changes else None
        )
    return result


def _wanted_status(wanted: Mapping[str, str | None]) -> str | None:
    """The status an edit asks for (None: it does not touch the status), checked."""
    if "status" not in wanted:
        return None
    text = wanted["status"]
    status = None if text is None else vocab.status_name(text)
    if status is None or status == "retracted":
        raise UsageError(
            "status: a measurement is retracted, with a reason the history keeps, "
            "not edited to 'retracted'"
        )
    if status == "flagged":
        raise UsageError(
            "status: 'flagged' is set by the checks while an error finding is open, and "
            "cleared when none is; edit the status to draft or reviewed"
        )
    return status


def _refuse_while_open(conn: Connection, measurement_id: int, status: str) -> None:
    """An open error finding keeps the status at ``flagged``: name it and refuse the edit."""
    found = conn.rows(
        "SELECT id, rule_id, message FROM validation_finding WHERE measurement_id = :id "
        "AND severity = 'error' AND accepted_by IS NULL ORDER BY id",
        {"id": measurement_id},
    )
    if found:
        raise OpenFindingError(measurement_id, status, [(int(i), r, m) for i, r, m in found])


def _refuse_if_values_fail(
    conn: Connection, measurement_id: int, status: str, *, edited: bool
) -> None:
    """A status asked for is judged on the values it would stand on — the corrected ones when
    the edit also corrects values: the rules run inside the edit's transaction, and an error
    they find (and nobody accepted) refuses the whole edit (nothing is written)."""
    from registry.validation import errors_left_open

    found = errors_left_open(conn, measurement_id)
    if found:
        raise OpenFindingError(
            measurement_id, status, [(None, f.rule_id, f.message) for f in found], edited=edited
        )


def _load(conn: Connection, measurement_id: int, wanted: Mapping[str, Any]) -> _Stored:
    of = {"id": measurement_id}
    m = conn.record("SELECT * FROM measurement WHERE id = :id", of)
    if m is None:
        raise NotFoundError(f"no measurement with id {measurement_id}")
    compound = conn.record(
        "SELECT label, name FROM compound WHERE id = :id", {"id": m["compound_id"]}
    )
    process = None
    if m["process_id"]:
        process = conn.record(
            "SELECT id, kind, sites, nucleus FROM process WHERE id = :id", {"id": m["process_id"]}
        )
    coalescence = conn.records(
        "SELECT * FROM coalescence WHERE measurement_id = :id ORDER BY id", of
    )
    if len(coalescence) > 1 and any(f in wanted for f in _COALESCENCE_FIELDS):
        raise UsageError(
            f"measurement {measurement_id} has {len(coalescence)} coalescence observations; "
            "Tc, Δν, J and populations can only be edited where there is one"
        )
    return _Stored(m, compound or {}, process, coalescence)


def _renormalized(
    conn: Connection, stored: _Stored, wanted: Mapping[str, str | None]
) -> NormalizedEntry:
    """The stored entry with the changes applied, normalized again as ``add`` would."""
    single = stored.coalescence[0] if len(stored.coalescence) == 1 else None
    inp = stored_input(stored.m, stored.compound, stored.process, single)
    for name, text in wanted.items():
        setattr(inp, name, text)
        inp.units.pop(name, None)
    if "field" in wanted:
        inp.units["field"] = "MHz"  # as in 'add': a bare spectrometer frequency is in MHz
    normalized, problems = normalize_entry(inp, known_process_kinds(conn))
    if normalized is None:
        if len(problems) == 1:
            raise UnitError(problems[0].field, problems[0].text, problems[0].reason)
        raise EntryError(problems)
    return normalized


def _measurement_change(
    conn: Connection, stored: _Stored, normalized: NormalizedEntry, wanted: Mapping[str, Any]
) -> _Change:
    """The measurement columns (and process) that differ after the edit."""
    m, change = stored.m, _Change()
    for column, new in normalized.measurement.items():
        if _differs(m[column], new):
            change.updates[column] = new
            change.before[column], change.after[column] = m[column], new
    if "solvent_text" in change.updates:
        key = normalized.solvent_key
        change.updates["solvent_id"] = solvent_index(conn).get(key) if key else None
    if any(f in wanted for f in _PROCESS_FIELDS):
        new_pid = resolve_processes(conn, [normalized], [m["compound_id"]])[0]
        if new_pid != m["process_id"]:
            change.updates["process_id"] = new_pid
            change.before["process"] = _process_body(stored.process)
            change.after["process"] = normalized.process
    return change


def _coalescence_change(
    conn: Connection, stored: _Stored, new_c: dict[str, Any] | None, change: _Change
) -> None:
    """Write the coalescence row as the edit leaves it; note what moved in ``change``."""
    coal = stored.coalescence[0] if stored.coalescence else None
    old_c = _coalescence_body(coal)
    moved = old_c is not None and new_c is not None
    if (old_c is None) == (new_c is None) and not (
        moved and any(_differs(old_c.get(k), v) for k, v in new_c.items())  # type: ignore[union-attr]
    ):
        return
    if coal is not None and new_c is not None:
        conn.update("coalescence", new_c, id=coal["id"])
    elif new_c is not None:
        conn.insert("coalescence", {**new_c, "measurement_id": stored.m["id"]})
    elif coal is not None:
        conn.execute("DELETE FROM coalescence WHERE id = :id", {"id": coal["id"]})
    if old_c is not None and new_c is not None:
        keys = [k for k, v in new_c.items() if _differs(old_c.get(k), v)]
        old_c, new_c = {k: old_c.get(k) for k in keys}, {k: new_c[k] for k in keys}
    change.before["coalescence"], change.after["coalescence"] = old_c, new_c


def retract_measurement(
    database: Database, measurement_id: int, reason: str, *, actor: str | None = None
) -> dict[str, Any]:
    """Hide a measurement from default queries; it stays stored, with who, when and why."""
    if not reason or not reason.strip():
        raise UsageError("give a reason for the retraction")
    who = actor or current_user()

    def work(conn: Connection) -> dict[str, Any]:
        status = conn.scalar(
            "SELECT status FROM measurement WHERE id = :id", {"id": measurement_id}
        )
        if status is None:
            raise NotFoundError(f"no measurement with id {measurement_id}")
        if status == "retracted":
            raise UsageError(f"measurement {measurement_id} is already retracted")
        conn.update(
            "measurement", {"status": "retracted", "updated_at": datetime.now(UTC)},
            id=measurement_id,
        )  # fmt: skip
        audit.record(
            conn,
            entity="measurement",
            entity_id=measurement_id,
            action="retract",
            actor=who,
            before={"status": status},
            after={"status": "retracted"},
            reason=reason.strip(),
        )
        revision = conn.scalar("SELECT max(id) FROM revision")
        return {
            "id": measurement_id,
            "status": "retracted",
            "previous_status": status,
            "reason": reason.strip(),
            "revision": revision,
        }

    return database.write(work)


def revalidate(
    database: Database,
    measurement_id: int,
    *,
    actor: str | None = None,
    report: dict[str, Any] | None = None,
) -> list[dict[str, Any]] | None:
    """Re-run the validation rules for one edited measurement; its open findings (None: no rules).

    A status the check changes (flagged, or back) is recorded under ``actor``, the editor, and
    put in ``report["status_changes"]`` when ``report`` is given. Looked up at run time so that
    an edit still works in a build without the validation package.
    """
    try:
        from registry import validation
    except ImportError:  # pragma: no cover - the package always exists
        return None
    check = getattr(validation, "check_measurements", None)
    if check is None:
        return None
    checked = check(database, [measurement_id], actor=actor)
    if report is not None:
        report["status_changes"] = list(getattr(checked, "status_changes", ()))
    findings = getattr(checked, "findings", checked) or []
    out = []
    for f in findings:
        body = f.as_dict() if hasattr(f, "as_dict") else dict(f)
        if not body.get("accepted_by"):
            out.append(body)
    return out
