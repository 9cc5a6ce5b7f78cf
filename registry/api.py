"""The library API: one function per user action, each taking an explicit database handle.

The CLI and a notebook call the same functions; they return data (dicts, lists of dicts),
never printed text. Write actions run in one transaction each (all or nothing).
"""

from __future__ import annotations

import json
from collections.abc import Iterator, Sequence
from contextlib import contextmanager
from pathlib import Path
from typing import TYPE_CHECKING, Any

from sqlalchemy import Connection, func, insert, select

from registry.errors import DatabaseError, NotFoundError, UnitError
from registry.storage import audit, migrate
from registry.storage.database import Database, current_user, open_database, redacted_url
from registry.storage.models import (
    CoalescenceObservation,
    Compound,
    ImportBatch,
    Measurement,
    Process,
    RatePoint,
    Revision,
    Solvent,
    ValidationFinding,
)

if TYPE_CHECKING:  # imported lazily at run time: units (pint) and RDKit are slow to load
    from registry.record.chem import Structure
    from registry.record.entry import EntryInput, NormalizedEntry
    from registry.storage.writer import WriteResult
    from registry.validation import CheckReport


def init_registry(db: str) -> dict[str, Any]:
    """Create a registry (or bring an existing one to the current schema) and say what it holds."""
    from sqlalchemy.exc import OperationalError

    database = open_database(db, must_exist=False)
    try:
        migrate.upgrade(database)
    except OperationalError as exc:  # server unreachable, database missing, no permission
        reason = str(exc.orig or exc).strip().splitlines()[0]
        raise DatabaseError(
            f"cannot create a registry at {redacted_url(database)}: {reason}"
        ) from exc
    return registry_info(database)


def open_registry(db: str) -> Database:
    """Open an existing registry and refuse one whose schema is not the current one."""
    database = open_database(db, must_exist=True)
    try:
        current = migrate.current_revision(database)
    except Exception as exc:
        reason = str(getattr(exc, "orig", None) or exc).strip().splitlines()[0]
        raise DatabaseError(
            f"{redacted_url(database)} is not a readable registry: {reason}"
        ) from exc
    head = migrate.head_revision()
    if current is None:
        raise DatabaseError(
            f"{redacted_url(database)} has no fluxledger schema; run 'fluxledger init'"
        )
    if current != head:
        raise DatabaseError(
            f"the registry's schema is at {current}, this fluxledger needs {head}; "
            "run 'fluxledger db upgrade' (it takes a backup first)"
        )
    return database


def registry_info(database: Database) -> dict[str, Any]:
    """Which database, its schema version, and how many rows each main table holds."""
    counts: dict[str, int] = {}
    with database.read() as conn:
        for name, model in (
            ("compounds", Compound),
            ("processes", Process),
            ("measurements", Measurement),
            ("coalescence_observations", CoalescenceObservation),
            ("rate_points", RatePoint),
            ("solvents", Solvent),
            ("import_batches", ImportBatch),
            ("findings", ValidationFinding),
            ("revisions", Revision),
        ):
            counts[name] = conn.execute(select(func.count()).select_from(model)).scalar_one()
        retracted = conn.execute(
            select(func.count()).select_from(Measurement).where(Measurement.status == "retracted")
        ).scalar_one()
    return {
        "database": redacted_url(database),
        "backend": "sqlite" if database.is_sqlite else database.engine.dialect.name,
        "schema_version": migrate.current_revision(database),
        "schema_head": migrate.head_revision(),
        "counts": counts,
        "retracted_measurements": retracted,
        "warnings": list(database.warnings),
    }


def actor_name(actor: str | None) -> str:
    return actor or current_user()


def structure_for(smiles: str | None) -> Structure | None:
    from registry.record.chem import read_structure

    return read_structure(smiles) if smiles else None


def add_measurement(
    database: Database, entry: EntryInput, *, actor: str | None = None, check: bool = True
) -> int:
    """Add one measurement (and its compound/process if new), check it; returns its id.

    The write is one transaction of its own. The validation rules then run on the new row, so
    its findings are stored (``get_measurement(...)["findings"]``) — at once, or, inside
    :func:`deferred_checks`, once for all the rows added there when the block ends (the check
    of a single row costs far more than its write). ``check=False`` skips the check.
    """
    from registry.storage.writer import cached_process_kinds, known_process_kinds, write_entries

    kinds = cached_process_kinds(database.engine)
    if kinds is None:
        with database.read() as conn:
            kinds = known_process_kinds(conn)
    normalized = _normalized(entry, kinds)
    structure = structure_for(normalized.compound.get("smiles_input"))
    who = actor_name(actor)

    def work(conn: Connection) -> WriteResult:
        # the kinds were read before the lock; if someone added one since, normalize again
        current = known_process_kinds(conn)
        ready = normalized if current == kinds else _normalized(entry, current)
        return write_entries(conn, [ready], [structure], actor=who, extras=[entry.extra or None])

    result = database.write(work)
    if check and database.deferred_checks is not None:
        database.deferred_checks.extend(result.measurement_ids)
    elif check:
        from registry.validation import check_measurements  # pandas: import only when checking

        check_measurements(database, result.measurement_ids, actor=who)
    return result.measurement_ids[0]


class DeferredChecks:
    """What a :func:`deferred_checks` block added, and the report of its one check."""

    def __init__(self) -> None:
        self.ids: list[int] = []
        self.report: CheckReport | None = None


@contextmanager
def deferred_checks(database: Database, *, actor: str | None = None) -> Iterator[DeferredChecks]:
    """Check the measurements added in this block once, when it ends, instead of after each add.

    For a script that adds rows one by one: each add still commits on its own (a crash keeps
    every row added so far), and the rules run over all of them in one vectorized pass on the
    way out — also when the block ends with an error, so no committed row stays unchecked.
    """
    if database.deferred_checks is not None:  # nested: the outer block checks everything
        yield DeferredChecks()
        return
    block = DeferredChecks()
    database.deferred_checks = block.ids
    try:
        yield block
    finally:
        database.deferred_checks = None
        if block.ids:
            from registry.validation import check_measurements

            block.report = check_measurements(database, block.ids, actor=actor_name(actor))


def _normalized(entry: EntryInput, kinds: tuple[str, ...]) -> NormalizedEntry:
    """The entry normalized, or the error a user sees (one problem: its field and text)."""
    from registry.record.entry import EntryError, normalize_entry

    normalized, problems = normalize_entry(entry, kinds)
    if normalized is None:
        if len(problems) == 1:
            first = problems[0]
            raise UnitError(first.field, first.text, first.reason)
        raise EntryError(problems)
    return normalized


LIST_COLUMNS = {
    "id": Measurement.id,
    "label": Measurement.label,
    "compound": Compound.label,
    "compound_name": Compound.name,
    "smiles": Compound.smiles_canonical,
    "process": Process.kind,
    "nucleus": Process.nucleus,
    "method": Measurement.method,
    "solvent": Measurement.solvent_text,
    "field_mhz": Measurement.field_mhz,
    "dg_kj_mol": Measurement.dg_kj_mol,
    "dg_err_kj_mol": Measurement.dg_err_kj_mol,
    "dg_t_k": Measurement.dg_t_k,
    "dh_kj_mol": Measurement.dh_kj_mol,
    "ds_j_mol_k": Measurement.ds_j_mol_k,
    "status": Measurement.status,
    "reference": Measurement.reference,
}


def measurement_query(columns: dict[str, Any] | None = None) -> Any:
    """The joined select behind listings (measurement + compound + process)."""
    cols = columns or LIST_COLUMNS
    return (
        select(*(c.label(name) for name, c in cols.items()))
        .select_from(Measurement)
        .join(Compound, Compound.id == Measurement.compound_id)
        .outerjoin(Process, Process.id == Measurement.process_id)
    )


def list_measurements(
    database: Database,
    *,
    compound: str | None = None,
    method: str | None = None,
    solvent: str | None = None,
    process: str | None = None,
    status: str | None = None,
    dg_min_kj_mol: float | None = None,
    dg_max_kj_mol: float | None = None,
    include_retracted: bool = False,
    ids: Sequence[int] | None = None,
    limit: int | None = None,
) -> list[dict[str, Any]]:
    """Measurements with their compound, filtered; retracted ones only when asked for."""
    from registry.record import vocab

    query = measurement_query()
    if compound:
        like = f"%{compound}%"
        query = query.where(Compound.label.ilike(like) | Compound.name.ilike(like))
    if method:
        query = query.where(Measurement.method == vocab.method_name(method))
    if solvent:
        query = query.where(Measurement.solvent_text.ilike(f"%{solvent}%"))
    if process:
        query = query.where(Process.kind == vocab.process_kind_name(process))
    if status:
        query = query.where(Measurement.status == vocab.status_name(status))
    elif not include_retracted:
        query = query.where(Measurement.status != "retracted")
    if dg_min_kj_mol is not None:
        query = query.where(Measurement.dg_kj_mol >= dg_min_kj_mol)
    if dg_max_kj_mol is not None:
        query = query.where(Measurement.dg_kj_mol <= dg_max_kj_mol)
    if ids is not None:
        query = query.where(Measurement.id.in_(list(ids)))
    query = query.order_by(Measurement.id)
    if limit:
        query = query.limit(limit)
    with database.read() as conn:
        return [dict(r) for r in conn.execute(query).mappings()]


def _row(conn: Connection, model: Any, where: Any) -> dict[str, Any] | None:
    row = conn.execute(select(model.__table__).where(where)).mappings().first()
    return dict(row) if row else None


def get_measurement(database: Database, measurement_id: int) -> dict[str, Any]:
    """Everything stored about one measurement: values, compound, process, data, findings."""
    with database.read() as conn:
        m = _row(conn, Measurement, Measurement.id == measurement_id)
        if m is None:
            raise NotFoundError(f"no measurement with id {measurement_id}")
        compound = _row(conn, Compound, Compound.id == m["compound_id"]) or {}
        for key in ("mol_binary", "pattern_fp"):
            compound.pop(key, None)
        process = _row(conn, Process, Process.id == m["process_id"]) if m["process_id"] else None
        solvent = _row(conn, Solvent, Solvent.id == m["solvent_id"]) if m["solvent_id"] else None
        coalescence = [
            dict(r)
            for r in conn.execute(
                select(CoalescenceObservation.__table__).where(
                    CoalescenceObservation.measurement_id == measurement_id
                )
            ).mappings()
        ]
        rates = [
            dict(r)
            for r in conn.execute(
                select(RatePoint.__table__)
                .where(RatePoint.measurement_id == measurement_id)
                .order_by(RatePoint.t_k)
            ).mappings()
        ]
        findings = [
            dict(r)
            for r in conn.execute(
                select(ValidationFinding.__table__)
                .where(ValidationFinding.measurement_id == measurement_id)
                .order_by(ValidationFinding.id)
            ).mappings()
        ]
        revisions = conn.execute(
            select(func.count())
            .select_from(Revision)
            .where(Revision.entity == "measurement", Revision.entity_id == measurement_id)
        ).scalar_one()
    extra = json.loads(m.pop("extra_json") or "null")
    return {
        **m,
        "extra": extra,
        "compound": compound,
        "process": process,
        "solvent": solvent,
        "coalescence": coalescence,
        "rate_points": rates,
        "findings": findings,
        "revision_count": revisions,
    }


def add_rate_points(
    database: Database,
    measurement_id: int,
    points: Sequence[dict[str, Any]],
    *,
    actor: str | None = None,
    replace: bool = False,
) -> int:
    """Attach rate points (dicts with t_k, t_text, k_per_s, k_text, optional errors) to a measurement."""
    if not points:
        return 0
    rows = []
    for p in points:
        if not (p.get("k_per_s") and p["k_per_s"] > 0 and p.get("t_k") and p["t_k"] > 0):
            raise UnitError("rate point", str(p.get("k_text") or p), "k and T must be positive")
        rows.append(
            {
                "measurement_id": measurement_id,
                "t_k": float(p["t_k"]),
                "t_err_k": p.get("t_err_k"),
                "t_text": p.get("t_text") or f"{p['t_k']:g} K",
                "k_per_s": float(p["k_per_s"]),
                "k_err_per_s": p.get("k_err_per_s"),
                "k_text": p.get("k_text") or f"{p['k_per_s']:.6g} s-1",
            }
        )
    who = actor_name(actor)

    def work(conn: Connection) -> int:
        exists = conn.execute(
            select(Measurement.id).where(Measurement.id == measurement_id)
        ).scalar()
        if exists is None:
            raise NotFoundError(f"no measurement with id {measurement_id}")
        before = [
            [r.t_text, r.k_text]
            for r in conn.execute(
                select(RatePoint.t_text, RatePoint.k_text).where(
                    RatePoint.measurement_id == measurement_id
                )
            )
        ]
        if replace:
            conn.execute(
                RatePoint.__table__.delete().where(RatePoint.measurement_id == measurement_id)
            )
        conn.execute(insert(RatePoint), rows)
        after = ([] if replace else before) + [[r["t_text"], r["k_text"]] for r in rows]
        audit.record(
            conn,
            entity="measurement",
            entity_id=measurement_id,
            action="rate-points",
            actor=who,
            before={"rates": before},
            after={"rates": after},
        )
        return len(rows)

    return database.write(work)


def default_db_path() -> Path:
    return Path.cwd() / "fluxledger.sqlite"
