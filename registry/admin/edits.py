"""Edits without loss: change a measurement's values, retract it, and read its history.

A measurement is never deleted. An edit re-reads the changed texts with :mod:`registry.record.units`
(any notation the ``add`` command accepts) and re-normalizes the whole entry through
:func:`registry.record.entry.normalize_entry`, so derived values follow (a new spectrometer frequency
changes a Δν reported in ppm; a new Tc moves the temperature ΔG‡ refers to when none was given).
Every change appends a revision with the columns before and after (see :mod:`registry.storage.audit`);
the read, the check and the write happen in one write transaction, so two people editing the
same measurement at once cannot lose each other's change.
"""

from __future__ import annotations

import json
import math
from collections.abc import Mapping
from datetime import UTC, datetime
from typing import Any

from sqlalchemy import Connection, delete, insert, or_, select, update

from registry.errors import NotFoundError, UnitError, UsageError
from registry.record import vocab
from registry.record.entry import EntryError, EntryInput, normalize_entry
from registry.record.units import ParsedValue, parse_value
from registry.storage import audit
from registry.storage.database import Database, current_user
from registry.storage.models import (
    CoalescenceObservation,
    Compound,
    Measurement,
    Process,
    Revision,
    ValidationFinding,
)
from registry.storage.writer import known_process_kinds, resolve_processes, solvent_index

#: fields a user may ``--set``: entry field → what it is (for messages)
EDITABLE: dict[str, str] = {
    "method": "method",
    "label": "measurement label",
    "process": "process kind",
    "sites": "exchanging sites",
    "nucleus": "observed nucleus",
    "solvent": "solvent",
    "field": "spectrometer frequency",
    "t_min": "lowest temperature",
    "t_max": "highest temperature",
    "dg": "ΔG‡",
    "dg_t": "temperature of ΔG‡",
    "dh": "ΔH‡",
    "ds": "ΔS‡",
    "ea": "Ea",
    "log10_a": "log10 A",
    "tc": "Tc",
    "dnu": "Δν",
    "j": "J",
    "population": "population ratio",
    "reference": "reference",
    "status": "status",
}
_ALIASES = {"mhz": "field", "solvent_text": "solvent", "log_a": "log10_a", "delta_nu": "dnu"}

#: value fields stored in the measurement row: entry field → (text column, value column, quantity)
MEASUREMENT_VALUES: dict[str, tuple[str, str, str]] = {
    "field": ("field_text", "field_mhz", "field"),
    "t_min": ("t_min_text", "t_min_k", "temperature"),
    "t_max": ("t_max_text", "t_max_k", "temperature"),
    "dg": ("dg_text", "dg_kj_mol", "energy"),
    "dg_t": ("dg_t_text", "dg_t_k", "temperature"),
    "dh": ("dh_text", "dh_kj_mol", "energy"),
    "ds": ("ds_text", "ds_j_mol_k", "entropy"),
    "ea": ("ea_text", "ea_kj_mol", "energy"),
    "log10_a": ("log10_a_text", "log10_a", "dimensionless"),
}
#: value fields stored in the coalescence row
COALESCENCE_VALUES: dict[str, tuple[str, str, str]] = {
    "tc": ("tc_text", "tc_k", "temperature"),
    "dnu": ("dnu_text", "dnu_hz", "shift"),
    "j": ("j_text", "j_hz", "frequency"),
}
#: text column → the float columns read from it (hidden in summaries when the text is shown)
_VALUE_COLUMNS_OF_TEXT: dict[str, tuple[str, ...]] = {
    "field_text": ("field_mhz",),
    "t_min_text": ("t_min_k",),
    "t_max_text": ("t_max_k",),
    "dg_text": ("dg_kj_mol", "dg_err_kj_mol"),
    "dg_t_text": ("dg_t_k",),
    "dh_text": ("dh_kj_mol", "dh_err_kj_mol"),
    "ds_text": ("ds_j_mol_k", "ds_err_j_mol_k"),
    "ea_text": ("ea_kj_mol", "ea_err_kj_mol"),
    "log10_a_text": ("log10_a", "log10_a_err"),
    "solvent_text": ("solvent_id",),
    "tc_text": ("tc_k", "tc_err_k"),
    "dnu_text": ("dnu_hz", "dnu_err_hz"),
    "j_text": ("j_hz",),
    "population_text": ("population_ratio",),
}
_COALESCENCE_FIELDS = ("tc", "dnu", "j", "population")
_PROCESS_FIELDS = ("process", "sites", "nucleus")

#: units a column header may have given to a bare number, per quantity, tried in this order
UNIT_CANDIDATES: dict[str, tuple[str, ...]] = {
    "energy": ("kJ/mol", "kcal/mol", "J/mol", "cal/mol", "cm-1", "eV"),
    "temperature": ("K", "°C", "°F"),
    "entropy": ("J/(mol*K)", "cal/(mol*K)"),
    "frequency": ("Hz", "kHz"),
    "shift": ("Hz", "ppm"),
    "field": ("MHz",),
    "rate": ("1/s", "1/min", "1/h"),
    "dimensionless": ("",),
}


def same_value(a: float | None, b: float | None) -> bool:
    """Equal floats (to 1e-9 relative, as re-parsing the same text gives) or both missing."""
    if a is None or b is None:
        return a is None and b is None
    return math.isclose(a, b, rel_tol=1e-9, abs_tol=1e-12)


def reread(
    text: str, quantity: str, stored: float | None, *, field: str, mhz: float | None = None
) -> tuple[ParsedValue | None, str | None]:
    """Read a stored text again: (the value, the header unit it must have had, if it had none).

    Imported cells may hold a bare number whose unit came from the column header, which is not
    kept; the header unit is then the one among the usual units of the quantity that gives the
    stored value. ``(None, None)`` when no reading reproduces it.
    """
    try:
        parsed = parse_value(text, quantity, field=field, spectrometer_mhz=mhz)
        return parsed, None
    except UnitError as exc:
        if "no unit given" not in exc.reason:
            return None, None
    for unit in UNIT_CANDIDATES[quantity]:
        try:
            parsed = parse_value(
                text, quantity, field=field, default_unit=unit, spectrometer_mhz=mhz
            )
        except UnitError:
            continue
        if stored is None or same_value(parsed.value, stored):
            return parsed, unit
    return None, None


def shift_mhz(proton_mhz: float | None, nucleus: str | None) -> float | None:
    """The frequency at which a Δν in ppm becomes Hz: the observed nucleus' own (as on entry)."""
    if proton_mhz is None or not nucleus or nucleus == "1H":
        return proton_mhz
    from registry.record.nuclei import observe_frequency_mhz

    return observe_frequency_mhz(proton_mhz, nucleus)


def canonical_field(name: str) -> str:
    """The entry field a user means by ``name`` (``dg``, ``t-min``, ``MHz`` …), or a UsageError."""
    key = name.strip().lower().replace("-", "_").replace(" ", "_")
    key = _ALIASES.get(key, key)
    if key not in EDITABLE:
        raise UsageError(f"cannot edit {name!r}; editable fields: {', '.join(EDITABLE)}")
    return key


def parse_assignments(assignments: list[str]) -> dict[str, str | None]:
    """``["dg=14.5 kcal/mol", "reference="]`` → ``{"dg": "14.5 kcal/mol", "reference": None}``."""
    changes: dict[str, str | None] = {}
    for item in assignments:
        if "=" not in item:
            raise UsageError(f'--set {item!r}: write FIELD=VALUE, e.g. dg="14.5 kcal/mol"')
        name, value = item.split("=", 1)
        key = canonical_field(name)
        if key in changes:
            raise UsageError(f"--set {name}: given twice")
        changes[key] = value.strip() or None
    if not changes:
        raise UsageError("nothing to change; give at least one --set FIELD=VALUE")
    return changes


def _row(conn: Connection, model: Any, where: Any) -> dict[str, Any] | None:
    found = conn.execute(select(model.__table__).where(where)).mappings().first()
    return dict(found) if found else None


def _stored_input(
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
    mhz = m["field_mhz"]
    for name, (text_col, value_col, quantity) in MEASUREMENT_VALUES.items():
        _set_stored(inp, name, m[text_col], m[value_col], quantity, mhz)
    if coalescence is not None:
        mhz = coalescence["field_mhz"] or mhz
        for name, (text_col, value_col, quantity) in COALESCENCE_VALUES.items():
            at = shift_mhz(mhz, process["nucleus"] if process else None) if name == "dnu" else mhz
            _set_stored(inp, name, coalescence[text_col], coalescence[value_col], quantity, at)
        inp.population = coalescence["population_text"]
    return inp


def _set_stored(
    inp: EntryInput, name: str, text: str | None, value: float | None, quantity: str, mhz: Any
) -> None:
    if text is None:
        return
    setattr(inp, name, text)
    _parsed, unit = reread(text, quantity, value, field=name, mhz=mhz)
    if unit:
        inp.units[name] = unit


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


def edit_measurement(
    database: Database,
    measurement_id: int,
    changes: Mapping[str, str | None],
    *,
    actor: str | None = None,
    reason: str | None = None,
) -> dict[str, Any]:
    """Change fields of one measurement (texts in any notation); returns what changed.

    ``changes`` maps entry fields (see :data:`EDITABLE`) to new texts; ``None`` clears a field.
    Raises :class:`UnitError`/:class:`EntryError` when the edited entry does not normalize, in
    which case nothing is written.
    """
    wanted = {canonical_field(k): v for k, v in changes.items()}
    if not wanted:
        raise UsageError("nothing to change; give at least one FIELD=VALUE")
    status = wanted.get("status")
    if "status" in wanted and (status is None or vocab.status_name(status) == "retracted"):
        raise UsageError(
            "to retract a measurement use 'fluxledger retract ID --reason TEXT' (it keeps why)"
        )
    who = actor or current_user()

    def work(conn: Connection) -> dict[str, Any]:
        m = _row(conn, Measurement, Measurement.id == measurement_id)
        if m is None:
            raise NotFoundError(f"no measurement with id {measurement_id}")
        compound = _row(conn, Compound, Compound.id == m["compound_id"]) or {}
        process = _row(conn, Process, Process.id == m["process_id"]) if m["process_id"] else None
        coal_rows = [
            dict(r)
            for r in conn.execute(
                select(CoalescenceObservation.__table__)
                .where(CoalescenceObservation.measurement_id == measurement_id)
                .order_by(CoalescenceObservation.id)
            ).mappings()
        ]
        if len(coal_rows) > 1 and any(f in wanted for f in _COALESCENCE_FIELDS):
            raise UsageError(
                f"measurement {measurement_id} has {len(coal_rows)} coalescence observations; "
                "Tc, Δν, J and populations can only be edited where there is one"
            )
        coal = coal_rows[0] if len(coal_rows) == 1 else None
        inp = _stored_input(m, compound, process, coal)
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

        before: dict[str, Any] = {}
        after: dict[str, Any] = {}
        updates: dict[str, Any] = {}
        for column, new in normalized.measurement.items():
            if _differs(m[column], new):
                updates[column] = new
                before[column], after[column] = m[column], new
        if "solvent_text" in updates:
            updates["solvent_id"] = (
                solvent_index(conn).get(normalized.solvent_key) if normalized.solvent_key else None
            )
        if any(f in wanted for f in _PROCESS_FIELDS):
            new_pid = resolve_processes(conn, [normalized], [m["compound_id"]])[0]
            if new_pid != m["process_id"]:
                updates["process_id"] = new_pid
                before["process"] = _process_body(process)
                after["process"] = normalized.process
        if len(coal_rows) <= 1:
            old_c = _coalescence_body(coal)
            new_c = normalized.coalescence
            if (old_c is None) != (new_c is None) or (
                old_c is not None
                and new_c is not None
                and any(_differs(old_c.get(k), v) for k, v in new_c.items())
            ):
                if coal is not None and new_c is not None:
                    conn.execute(
                        update(CoalescenceObservation)
                        .where(CoalescenceObservation.id == coal["id"])
                        .values(**new_c)
                    )
                elif new_c is not None:
                    conn.execute(
                        insert(CoalescenceObservation), [{**new_c, "measurement_id": m["id"]}]
                    )
                elif coal is not None:
                    conn.execute(
                        delete(CoalescenceObservation).where(
                            CoalescenceObservation.id == coal["id"]
                        )
                    )
                if old_c is not None and new_c is not None:
                    moved = [k for k, v in new_c.items() if _differs(old_c.get(k), v)]
                    old_c = {k: old_c.get(k) for k in moved}
                    new_c = {k: new_c[k] for k in moved}
                before["coalescence"], after["coalescence"] = old_c, new_c
        if not after and not before:
            return {"id": measurement_id, "changed": False, "before": {}, "after": {}}
        now = datetime.now(UTC)
        updates["updated_at"] = now
        conn.execute(update(Measurement).where(Measurement.id == measurement_id).values(**updates))
        action = "status" if set(after) == {"status"} else "edit"
        audit.record(
            conn,
            entity="measurement",
            entity_id=measurement_id,
            action=action,
            actor=who,
            before=before,
            after=after,
            reason=reason,
        )
        revision = conn.execute(select(Revision.id).order_by(Revision.id.desc()).limit(1)).scalar()
        return {
            "id": measurement_id,
            "changed": True,
            "action": action,
            "revision": revision,
            "before": before,
            "after": after,
        }

    result = database.write(work)
    if result["changed"]:
        result["findings"] = revalidate(database, measurement_id)
    return result


def retract_measurement(
    database: Database, measurement_id: int, reason: str, *, actor: str | None = None
) -> dict[str, Any]:
    """Hide a measurement from default queries; it stays stored, with who, when and why."""
    if not reason or not reason.strip():
        raise UsageError("give a reason for the retraction (--reason TEXT)")
    who = actor or current_user()

    def work(conn: Connection) -> dict[str, Any]:
        status = conn.execute(
            select(Measurement.status).where(Measurement.id == measurement_id)
        ).scalar()
        if status is None:
            raise NotFoundError(f"no measurement with id {measurement_id}")
        if status == "retracted":
            raise UsageError(f"measurement {measurement_id} is already retracted")
        conn.execute(
            update(Measurement)
            .where(Measurement.id == measurement_id)
            .values(status="retracted", updated_at=datetime.now(UTC))
        )
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
        revision = conn.execute(select(Revision.id).order_by(Revision.id.desc()).limit(1)).scalar()
        return {
            "id": measurement_id,
            "status": "retracted",
            "previous_status": status,
            "reason": reason.strip(),
            "revision": revision,
        }

    return database.write(work)


def revalidate(database: Database, measurement_id: int) -> list[dict[str, Any]] | None:
    """Re-run the validation rules for one edited measurement; its open findings (None: no rules).

    Looked up at run time so that an edit still works in a build without the validation package.
    """
    try:
        from registry import validation
    except ImportError:  # pragma: no cover - the package always exists
        return None
    check = getattr(validation, "check_measurements", None)
    if check is None:
        return None
    report = check(database, [measurement_id])
    findings = getattr(report, "findings", report) or []
    out = []
    for f in findings:
        body = f.as_dict() if hasattr(f, "as_dict") else dict(f)
        if not body.get("accepted_by"):
            out.append(body)
    return out


def history(
    database: Database, measurement_id: int | None = None, *, limit: int | None = 50
) -> list[dict[str, Any]]:
    """Revisions, oldest first: all of one measurement's (its findings' too), or the latest ``limit``."""
    query = select(Revision.__table__)
    with database.read() as conn:
        if measurement_id is not None:
            exists = conn.execute(
                select(Measurement.id).where(Measurement.id == measurement_id)
            ).scalar()
            if exists is None:
                raise NotFoundError(f"no measurement with id {measurement_id}")
            finding_ids = select(ValidationFinding.id).where(
                ValidationFinding.measurement_id == measurement_id
            )
            query = query.where(
                or_(
                    (Revision.entity == "measurement") & (Revision.entity_id == measurement_id),
                    (Revision.entity == "finding") & Revision.entity_id.in_(finding_ids),
                )
            )
        query = query.order_by(Revision.id.desc())
        if limit:
            query = query.limit(limit)
        rows = [dict(r) for r in conn.execute(query).mappings()]
    rows.reverse()
    return [_history_entry(r) for r in rows]


def _history_entry(row: dict[str, Any]) -> dict[str, Any]:
    before = json.loads(row["before_json"]) if row["before_json"] else None
    after = json.loads(row["after_json"]) if row["after_json"] else None
    at = row["at"]
    if isinstance(at, datetime) and at.tzinfo is None:
        at = at.replace(tzinfo=UTC)
    return {
        "revision": row["id"],
        "at": at,
        "actor": row["actor"],
        "action": row["action"],
        "entity": row["entity"],
        "entity_id": row["entity_id"],
        "reason": row["reason"],
        "batch_id": row["batch_id"],
        "before": before,
        "after": after,
        "summary": summarize(row["action"], before, after),
    }


def _short(value: Any) -> str:
    if value is None:
        return "—"
    if isinstance(value, float):
        return f"{value:.6g}"
    if isinstance(value, dict):
        return ", ".join(f"{k}={_short(v)}" for k, v in value.items() if v not in (None, ""))
    return repr(value) if isinstance(value, str) else str(value)


def summarize(action: str, before: Any, after: Any) -> str:
    """One line saying what a revision changed: texts as reported, values only when no text moved."""
    if before is None and isinstance(after, dict):
        compound = after.get("compound") or {}
        who = compound.get("label") or compound.get("name") or compound.get("smiles_input") or ""
        parts = [f"{action}: {who}".rstrip(": ")]
        for key in ("method", "dg_text", "solvent_text"):
            if after.get(key):
                parts.append(str(after[key]))
        return ", ".join(parts)
    if not isinstance(before, dict) or not isinstance(after, dict):
        return action
    if action == "accept-finding" and "finding" in after:
        rule = f" [{after['rule']}]" if after.get("rule") else ""
        return f"accepted finding {after['finding']}{rule} {after.get('severity') or ''}".rstrip()
    old, new = _flatten(before), _flatten(after)
    keys = sorted({*old, *new})
    hidden = {
        f"{k.rpartition('.')[0]}.{c}".lstrip(".")
        for k in keys
        for c in _VALUE_COLUMNS_OF_TEXT.get(k.rpartition(".")[2], ())
    }
    shown = [
        f"{key}: {_short(old.get(key))} → {_short(new.get(key))}"
        for key in keys
        if key not in hidden  # the float behind a text shown already
    ]
    return "; ".join(shown) or action


def _flatten(body: dict[str, Any]) -> dict[str, Any]:
    """``{"coalescence": {"tc_text": …}}`` → ``{"coalescence.tc_text": …}`` (one level)."""
    flat: dict[str, Any] = {}
    for key, value in body.items():
        if isinstance(value, dict) and key == "coalescence":
            flat.update({f"{key}.{k}": v for k, v in value.items()})
        else:
            flat[key] = value
    return flat
