"""Keeping a shared registry safe: backups, restores, a full verification, schema upgrades.

Backups use SQLite's online backup API (``sqlite3.Connection.backup``) in a single step, which
copies one consistent snapshot while other people keep writing (under WAL, readers and the
backup never block writers). A backup is written to a temporary file, checked, and only then
renamed into place, so a half-written backup never carries the final name. A restore copies a
verified backup *into* the registry through the same API, inside one SQLite transaction: other
processes that have the registry open wait for it and then see the restored content, never a mix.
"""

from __future__ import annotations

import contextlib
import io
import math
import os
import sqlite3
import time
from collections.abc import Iterator
from datetime import UTC, datetime
from functools import lru_cache
from pathlib import Path
from typing import Any

from sqlalchemy import select, text

from registry.admin.edits import (
    COALESCENCE_VALUES,
    MEASUREMENT_VALUES,
    UNIT_CANDIDATES,
    same_value,
    shift_mhz,
)
from registry.errors import DatabaseError, UnitError, UsageError
from registry.record.entry import parse_population_ratio
from registry.record.units import parse_value
from registry.storage import audit, migrate
from registry.storage.database import BUSY_TIMEOUT_MS, Database, open_database, redacted_url
from registry.storage.models import CoalescenceObservation, Measurement, Process, RatePoint

#: how many problems of one check are listed (the count is always complete)
MAX_LISTED = 50

_ERROR_COLUMN = {
    "dg": "dg_err_kj_mol",
    "dh": "dh_err_kj_mol",
    "ds": "ds_err_j_mol_k",
    "ea": "ea_err_kj_mol",
    "log10_a": "log10_a_err",
    "tc": "tc_err_k",
    "dnu": "dnu_err_hz",
}


def _stamp() -> str:
    return datetime.now(UTC).strftime("%Y%m%dT%H%M%SZ")


def _sqlite_path(database: Database, action: str) -> Path:
    if not database.is_sqlite or database.path is None:
        raise DatabaseError(
            f"{action} works on SQLite registry files; for {redacted_url(database)} use the "
            "server's own tools (pg_dump / pg_restore)"
        )
    return database.path


def _connect(path: Path, *, readonly: bool = False) -> sqlite3.Connection:
    """A plain sqlite3 connection (autocommit) that waits for locks like the registry's own."""
    if readonly:
        uri = f"file:{path.as_posix()}?mode=ro"
        conn = sqlite3.connect(uri, uri=True, timeout=BUSY_TIMEOUT_MS / 1000)
    else:
        conn = sqlite3.connect(str(path), timeout=BUSY_TIMEOUT_MS / 1000)
    conn.isolation_level = None
    return conn


def _fsync(path: Path) -> None:
    fd = os.open(path, os.O_RDONLY)
    try:
        os.fsync(fd)
    finally:
        os.close(fd)


def _copy_snapshot(source: sqlite3.Connection, dest_path: Path) -> int:
    """Copy one consistent snapshot of ``source`` into a new self-contained file; returns pages."""
    dest = _connect(dest_path)
    try:
        source.backup(dest, pages=-1)  # one step: one snapshot, never restarted by writers
        dest.execute("PRAGMA journal_mode = DELETE")  # a single file, no -wal to carry along
        pages = dest.execute("PRAGMA page_count").fetchone()[0]
        problems = _integrity(dest)
    finally:
        dest.close()
    if problems:
        raise DatabaseError(f"the copy in {dest_path} failed its integrity check: {problems[0]}")
    _fsync(dest_path)
    return int(pages)


def _integrity(conn: sqlite3.Connection) -> list[str]:
    rows = [r[0] for r in conn.execute("PRAGMA integrity_check")]
    return [] if rows == ["ok"] else rows


@contextlib.contextmanager
def _temporary(path: Path) -> Iterator[Path]:
    """A temporary file beside ``path`` (same file system, so a rename is atomic); removed on exit."""
    tmp = path.with_name(f".{path.name}.{os.getpid()}.{time.monotonic_ns()}.tmp")
    try:
        yield tmp
    finally:
        for leftover in (tmp, Path(f"{tmp}-journal"), Path(f"{tmp}-wal"), Path(f"{tmp}-shm")):
            with contextlib.suppress(FileNotFoundError):
                leftover.unlink()


def backup_target(dest: str | Path, registry_path: Path, label: str = "backup") -> Path:
    """Where a backup goes: ``dest`` itself, or a time-stamped file when ``dest`` is a folder."""
    target = Path(dest).expanduser()
    if target.is_dir():
        target = target / f"{registry_path.stem}.{label}-{_stamp()}.sqlite"
    return target.resolve()


def backup(database: Database, dest: str | Path, *, overwrite: bool = False) -> dict[str, Any]:
    """Copy the registry to ``dest`` (a file, or a folder for a time-stamped name) while in use."""
    path = _sqlite_path(database, "backup")
    target = backup_target(dest, path)
    if target == path.resolve():
        raise UsageError("the backup must go to another file than the registry itself")
    if not target.parent.is_dir():
        raise UsageError(f"folder {target.parent} does not exist")
    if target.exists() and not overwrite:
        raise UsageError(f"{target} exists; choose another name or add --force to replace it")
    started = time.perf_counter()
    source = _connect(path)
    try:
        with _temporary(target) as tmp:
            pages = _copy_snapshot(source, tmp)
            os.replace(tmp, target)
    finally:
        source.close()
    _fsync_dir(target.parent)
    counts = _counts(target)
    return {
        "backup": str(target),
        "bytes": target.stat().st_size,
        "pages": pages,
        "seconds": round(time.perf_counter() - started, 3),
        **counts,
    }


def _fsync_dir(folder: Path) -> None:
    with contextlib.suppress(OSError):  # not every platform can fsync a directory
        _fsync(folder)


def _counts(path: Path) -> dict[str, Any]:
    conn = _connect(path, readonly=True)
    try:
        schema = conn.execute("SELECT version_num FROM alembic_version").fetchone()
        measurements = conn.execute("SELECT count(*) FROM measurement").fetchone()[0]
        revisions = conn.execute("SELECT count(*) FROM revision").fetchone()[0]
    except sqlite3.DatabaseError as exc:
        raise DatabaseError(f"{path} is not a fluxledger registry: {exc}") from exc
    finally:
        conn.close()
    return {
        "schema_version": schema[0] if schema else None,
        "measurements": measurements,
        "revisions": revisions,
    }


def restore(db: str, source: str | Path, *, force: bool = False) -> dict[str, Any]:
    """Replace the registry's content with a verified copy of ``source`` (a backup file).

    The source is copied to a temporary file and verified first (integrity, foreign keys, schema,
    hash chain, values); nothing is touched when that finds a problem. An existing registry is
    only replaced with ``force``, and then a safety backup of it is taken first.
    """
    src = Path(source).expanduser().resolve()
    if not src.is_file():
        raise UsageError(f"no backup file at {src}")
    target_db = open_database(db, must_exist=False)
    try:
        target = _sqlite_path(target_db, "restore")
        if src == target.resolve():
            raise UsageError("the backup to restore is the registry itself")
        exists = target.exists() and target.stat().st_size > 0
        if exists and not force:
            raise UsageError(
                f"{target} exists; add --force to replace its content "
                "(a safety backup of the current content is taken first)"
            )
        with _temporary(target) as tmp:
            try:
                source_conn = _connect(src, readonly=True)
                try:
                    _copy_snapshot(source_conn, tmp)
                finally:
                    source_conn.close()
            except sqlite3.DatabaseError as exc:
                raise DatabaseError(f"{src} is not a readable SQLite file: {exc}") from exc
            report = verify_file(tmp, allow_older_schema=True)
            if not report["ok"]:
                bad = [f"{c['check']}: {p}" for c in report["checks"] for p in c["problems"]]
                listed = "\n  ".join(bad[:20])
                raise DatabaseError(f"{src} failed verification; nothing was restored\n  {listed}")
            safety = None
            if exists:
                safety = backup(target_db, backup_target(target.parent, target, "before-restore"))[
                    "backup"
                ]
                copy = _connect(tmp, readonly=True)
                live = _connect(target)
                try:
                    copy.backup(live, pages=-1)  # one transaction on the live registry
                    live.execute("PRAGMA journal_mode = WAL")
                finally:
                    live.close()
                    copy.close()
            else:
                os.replace(tmp, target)
                _fsync_dir(target.parent)
    finally:
        target_db.dispose()
    return {
        "restored": str(target),
        "source": str(src),
        "safety_backup": safety,
        "schema_head": migrate.head_revision(),
        **_counts(target),
    }


def verify_file(path: Path, *, allow_older_schema: bool = False) -> dict[str, Any]:
    """:func:`verify` on a registry file that is opened for this check only."""
    database = open_database(str(path), must_exist=True)
    try:
        return verify(database, allow_older_schema=allow_older_schema)
    finally:
        database.dispose()


def _check(name: str, problems: list[str], detail: str = "") -> dict[str, Any]:
    return {
        "check": name,
        "ok": not problems,
        "problem_count": len(problems),
        "problems": problems[:MAX_LISTED],
        "detail": detail,
    }


def verify(database: Database, *, allow_older_schema: bool = False) -> dict[str, Any]:
    """Every check a shared registry should pass; ``ok`` is False when any finds a problem.

    integrity (SQLite ``PRAGMA integrity_check``), foreign keys (``PRAGMA foreign_key_check``),
    schema (at the migration head, tables as the models say), history (the revision hash chain
    is intact) and values (each ``*_text`` read again gives the stored canonical float).
    """
    checks: list[dict[str, Any]] = []
    if database.is_sqlite:
        with database.read() as conn:
            integrity = [r[0] for r in conn.exec_driver_sql("PRAGMA integrity_check")]
            fk_rows = conn.exec_driver_sql("PRAGMA foreign_key_check").fetchall()
        checks.append(_check("integrity", [] if integrity == ["ok"] else integrity))
        checks.append(
            _check(
                "foreign keys",
                [
                    f"table {table} row {rowid}: refers to a missing row of {parent}"
                    for table, rowid, parent, _fk in fk_rows
                ],
            )
        )
    checks.append(_schema_check(database, allow_older_schema))
    if not checks[-1]["ok"] and checks[-1].get("fatal"):
        return _report(database, checks)
    with database.read() as conn:
        chain = audit.verify_chain(conn)
        revisions = conn.execute(text("SELECT count(*) FROM revision")).scalar_one()
    checks.append(_check("history", chain, f"{revisions} revisions, hash chain"))
    problems, count = value_problems(database)
    checks.append(_check("values", problems, f"{count} reported values read again"))
    return _report(database, checks)


def _report(database: Database, checks: list[dict[str, Any]]) -> dict[str, Any]:
    for c in checks:
        c.pop("fatal", None)
    return {
        "database": redacted_url(database),
        "ok": all(c["ok"] for c in checks),
        "checks": checks,
    }


def _schema_check(database: Database, allow_older: bool) -> dict[str, Any]:
    try:
        current = migrate.current_revision(database)
    except Exception as exc:
        result = _check("schema", [f"cannot read the schema version: {exc}"])
        result["fatal"] = True
        return result
    head = migrate.head_revision()
    known = known_revisions()
    if current is None:
        result = _check("schema", ["no fluxledger schema (not a registry, or never initialised)"])
        result["fatal"] = True
        return result
    if current not in known:
        result = _check(
            "schema", [f"schema {current} is unknown to this fluxledger (made by a newer one?)"]
        )
        result["fatal"] = True
        return result
    if current != head:
        if allow_older:
            return _check(
                "schema", [], f"at {current}; 'fluxledger db upgrade' brings it to {head}"
            )
        result = _check(
            "schema", [f"schema at {current}, head is {head}: run 'fluxledger db upgrade'"]
        )
        result["fatal"] = True
        return result
    try:
        _quiet_check(database)
    except Exception as exc:  # alembic's AutogenerateDiffsDetected names each difference
        return _check("schema", [f"the tables differ from the models: {exc}"])
    return _check("schema", [], f"at head {head}; tables match the models")


def _quiet_check(database: Database) -> None:
    """:func:`registry.storage.migrate.check` without Alembic's "No new upgrade operations" on stdout."""
    from alembic import command

    cfg = migrate.alembic_config(database)
    cfg.stdout = io.StringIO()
    with database.engine.begin() as conn:
        cfg.attributes["connection"] = conn
        command.check(cfg)


def known_revisions() -> list[str]:
    """Every migration revision, oldest first."""
    from alembic.script import ScriptDirectory

    script = ScriptDirectory.from_config(migrate.alembic_config())
    return [r.revision for r in reversed(list(script.walk_revisions()))]


_NO_UNIT = "no unit"


@lru_cache(maxsize=200_000)
def _parse_cached(
    text_value: str, quantity: str, mhz: float | None, default_unit: str | None
) -> tuple[float, float | None] | str | None:
    """(value, error) of a text; ``_NO_UNIT`` for a bare number without a default; None if unreadable.

    Keyed on the text, not on the stored value, so the many rows that share a text are read once.
    """
    try:
        parsed = parse_value(text_value, quantity, default_unit=default_unit, spectrometer_mhz=mhz)
    except UnitError as exc:
        return _NO_UNIT if "no unit given" in exc.reason else None
    return parsed.value, parsed.error


def _reread_cached(
    text_value: str, quantity: str, stored: float | None, mhz: float | None
) -> tuple[float, float | None] | None:
    """As :func:`registry.admin.edits.reread`, with the parses cached."""
    read = _parse_cached(text_value, quantity, mhz, None)
    if read != _NO_UNIT:
        return read if isinstance(read, tuple) else None
    for unit in UNIT_CANDIDATES[quantity]:
        candidate = _parse_cached(text_value, quantity, mhz, unit)
        if isinstance(candidate, tuple) and (stored is None or same_value(candidate[0], stored)):
            return candidate
    return None


def _value_problem(
    where: str,
    column: str,
    text_value: str | None,
    stored: float | None,
    quantity: str,
    *,
    stored_err: float | None = None,
    err_column: str | None = None,
    mhz: float | None = None,
) -> str | None:
    if text_value is None:
        if stored is not None:
            return f"{where}: {column} has a value ({stored:g}) but no reported text"
        return None
    read = _reread_cached(text_value, quantity, stored, mhz)
    if read is None:
        return (
            f"{where}: {column} {text_value!r} does not read as the stored value "
            f"{'(none)' if stored is None else f'{stored:.6g}'}"
        )
    value, err = read
    if not same_value(value, stored):
        return f"{where}: {column} {text_value!r} reads as {value:.6g}, stored {stored}"
    if err_column is not None and not same_value(err, stored_err):
        return f"{where}: {column} {text_value!r} has uncertainty {err}, stored {err_column} {stored_err}"
    return None


def _check_values(
    where: str,
    row: Any,
    columns: dict[str, tuple[str, str, str]],
    problems: list[str],
    *,
    skip: tuple[str, ...] = (),
    dnu_mhz: float | None = None,
) -> int:
    """Re-read each reported text of ``row`` against its stored float; returns how many were read."""
    read = 0
    for name, (text_col, value_col, quantity) in columns.items():
        if name in skip:
            continue
        err_col = _ERROR_COLUMN.get(name)
        read += row[text_col] is not None
        problem = _value_problem(
            where,
            text_col,
            row[text_col],
            row[value_col],
            quantity,
            stored_err=row[err_col] if err_col else None,
            err_column=err_col,
            mhz=dnu_mhz if name == "dnu" else None,
        )
        if problem:
            problems.append(problem)
    return read


def value_problems(database: Database) -> tuple[list[str], int]:
    """Every stored canonical float that its reported text does not give; and how many were read.

    Bare numbers (imported under a unit-bearing column header that is not kept) count as
    consistent when one of the usual units of the quantity gives the stored value.
    """
    problems: list[str] = []
    count = 0
    m_cols = [Measurement.id, Measurement.field_mhz]
    for text_col, value_col, _q in MEASUREMENT_VALUES.values():
        m_cols += [getattr(Measurement, text_col), getattr(Measurement, value_col)]
    m_cols += [getattr(Measurement, c) for c in _ERROR_COLUMN.values() if hasattr(Measurement, c)]
    with database.read() as conn:
        for row in conn.execute(select(*m_cols).order_by(Measurement.id)).mappings():
            # ΔG‡ at Tc without a reported temperature is derived from the coalescence row
            skip = ("dg_t",) if row["dg_t_text"] is None else ()
            count += _check_values(
                f"measurement {row['id']}", row, MEASUREMENT_VALUES, problems, skip=skip
            )
        c_query = (
            select(
                CoalescenceObservation.__table__,
                Measurement.field_mhz.label("m_mhz"),
                Process.nucleus.label("nucleus"),
            )
            .join(Measurement, Measurement.id == CoalescenceObservation.measurement_id)
            .outerjoin(Process, Process.id == Measurement.process_id)
        )
        for row in conn.execute(c_query.order_by(CoalescenceObservation.id)).mappings():
            where = f"measurement {row['measurement_id']} coalescence {row['id']}"
            mhz = shift_mhz(row["field_mhz"] or row["m_mhz"], row["nucleus"])  # for Δν in ppm
            count += _check_values(where, row, COALESCENCE_VALUES, problems, dnu_mhz=mhz)
            count += row["field_text"] is not None
            problem = _value_problem(
                where, "field_text", row["field_text"], row["field_mhz"], "field"
            )
            if problem:
                problems.append(problem)
            if row["population_text"] is not None:
                count += 1
                try:
                    ratio = parse_population_ratio(row["population_text"])
                except UnitError:
                    ratio = math.nan
                if not same_value(ratio, row["population_ratio"]):
                    problems.append(
                        f"{where}: population_text {row['population_text']!r} reads as ratio "
                        f"{ratio:.6g}, stored {row['population_ratio']}"
                    )
        r_query = select(
            RatePoint.id,
            RatePoint.measurement_id,
            RatePoint.t_text,
            RatePoint.t_k,
            RatePoint.t_err_k,
            RatePoint.k_text,
            RatePoint.k_per_s,
            RatePoint.k_err_per_s,
        ).order_by(RatePoint.id)
        for row in conn.execute(r_query).mappings():
            where = f"measurement {row['measurement_id']} rate point {row['id']}"
            count += 2
            for problem in (
                _value_problem(
                    where,
                    "t_text",
                    row["t_text"],
                    row["t_k"],
                    "temperature",
                    stored_err=row["t_err_k"],
                    err_column="t_err_k",
                ),
                _value_problem(
                    where,
                    "k_text",
                    row["k_text"],
                    row["k_per_s"],
                    "rate",
                    stored_err=row["k_err_per_s"],
                    err_column="k_err_per_s",
                ),
            ):
                if problem:
                    problems.append(problem)
    return problems, count


def schema_state(db: str) -> dict[str, Any]:
    """The schema version of a registry, the head this fluxledger knows, and what is pending."""
    database = open_database(db, must_exist=True)
    try:
        current = migrate.current_revision(database)
    finally:
        database.dispose()
    known = known_revisions()
    head = migrate.head_revision()
    pending = known[known.index(current) + 1 :] if current in known else []
    if current is None:
        pending = known
    return {
        "database": redacted_url(database),
        "current": current,
        "head": head,
        "pending": pending,
        "known": current is None or current in known,
    }


def upgrade(
    db: str, *, backup_dir: str | Path | None = None, no_backup: bool = False
) -> dict[str, Any]:
    """Bring the schema to the head, taking a backup first; a no-op when already there."""
    database = open_database(db, must_exist=True)
    try:
        before = migrate.current_revision(database)
        head = migrate.head_revision()
        known = known_revisions()
        if before is None:
            raise DatabaseError(
                f"{redacted_url(database)} has no fluxledger schema; create one with 'fluxledger init'"
            )
        if before not in known:
            raise DatabaseError(
                f"the registry's schema {before} is unknown to this fluxledger (made by a newer "
                "version?); upgrade fluxledger instead"
            )
        result: dict[str, Any] = {
            "database": redacted_url(database),
            "from": before,
            "to": head,
            "applied": known[known.index(before) + 1 :],
            "backup": None,
        }
        if before == head:
            return result
        if not no_backup:
            if not database.is_sqlite:
                raise UsageError(
                    "back the server database up with its own tools (pg_dump) first, then run "
                    "'fluxledger db upgrade --no-backup'"
                )
            path = _sqlite_path(database, "backup")
            folder = Path(backup_dir).expanduser() if backup_dir else path.parent
            target = backup_target(folder, path, f"before-upgrade-{before}")
            result["backup"] = backup(database, target)["backup"]
        migrate.upgrade(database)
        result["to"] = migrate.current_revision(database)
        return result
    finally:
        database.dispose()
