"""A full check of a registry: file integrity, foreign keys, schema, history chain, and every
stored value against the text it was read from."""

from __future__ import annotations

import json
import math
from pathlib import Path
from typing import Any

from registry.admin import derived, replay, tamper
from registry.admin.reread import reread_value, same_value, shift_mhz
from registry.errors import UnitError
from registry.record import fields
from registry.record.conventions import read_calibration
from registry.record.populations import legacy_population_ratio, parse_population_ratio
from registry.record.rawdata import JSON_OF_TEXT, reread_problems
from registry.storage import audit, migrate
from registry.storage.connection import Connection
from registry.storage.database import Database, head_revision, open_database

#: how many problems of one check are listed (the count is always complete)
MAX_LISTED = 50


def verify_file(
    path: Path, *, allow_older_schema: bool = False, anchor: str | None = None
) -> dict[str, Any]:
    """:func:`verify` on a registry file that is opened for this check only."""
    database = open_database(str(path), must_exist=True)
    try:
        return verify(database, allow_older_schema=allow_older_schema, anchor=anchor)
    finally:
        database.close()


def _check(
    name: str, problems: list[str], detail: str = "", notes: list[str] | None = None
) -> dict[str, Any]:
    """One check's result; ``notes`` say what it could not account for without blaming it."""
    result = {
        "check": name,
        "ok": not problems,
        "problem_count": len(problems),
        "problems": problems[:MAX_LISTED],
        "detail": detail,
    }
    if notes:
        result["notes"] = notes
    return result


def _state_check(conn: Connection, past: replay.History) -> dict[str, Any]:
    """Each measurement against the state its replayed history leaves (:mod:`.replay`)."""
    problems = past.problems + replay.state_problems(conn, past)
    replayed = sum(1 for s in past.measurements.values() if s.created is not None)
    detail = f"{replay.plural(replayed, 'measurement')} replayed from the history"
    summaries = sorted(mid for mid, s in past.measurements.items() if s.summary)
    notes = []
    if summaries:
        notes.append(
            f"{len(summaries)} measurement(s) created by a revision that holds a summary, not "
            f"the whole entry (the first: measurement {summaries[0]}): only the fields their "
            "history names are compared"
        )
    return _check("state", problems, detail, notes)


def _findings_check(conn: Connection, past: replay.History) -> dict[str, Any]:
    """Acceptances, statuses and stored findings against what can be derived (:mod:`.derived`)."""
    found = derived.findings_check(conn, past)
    return _check("findings", found.problems, "; ".join(found.detail), found.notes)


def verify(
    database: Database, *, allow_older_schema: bool = False, anchor: str | None = None
) -> dict[str, Any]:
    """Every check a shared registry should pass; ``ok`` is False when any finds a problem.

    integrity (SQLite ``PRAGMA integrity_check``), foreign keys (``PRAGMA foreign_key_check``),
    schema (at the migration head, tables as the models say), history (the revision hash chain
    is intact and, given the ``anchor`` a user kept, still reaches it), accounted (the history
    accounts for every measurement and acceptance), state (each measurement holds what its
    replayed history leaves: :mod:`registry.admin.replay`), findings (statuses follow the
    findings, and the stored findings are the rules' where nothing changed since the last
    check: :mod:`registry.admin.derived`), numbers (every stored number is finite) and values
    (each ``*_text`` read again gives the stored canonical float).
    """
    checks: list[dict[str, Any]] = []
    if database.is_sqlite:
        with database.read() as conn:
            integrity = conn.column("PRAGMA integrity_check")
            fk_rows = conn.rows("PRAGMA foreign_key_check")
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
        revisions = conn.scalar("SELECT count(*) FROM revision")
        head = tamper.anchor(conn)
        detail = f"{revisions} revisions, hash chain, head {head or '(none)'}"
        if anchor is not None:
            chain += tamper.anchor_problems(conn, anchor)
            detail += f", reaches the kept anchor {anchor}"
        checks.append(_check("history", chain, detail))
        past = replay.read_history(conn)
        checks.append(
            _check("accounted", tamper.unaccounted(conn, past), "measurements and acceptances")
        )
        checks.append(_state_check(conn, past))
        checks.append(_findings_check(conn, past))
        checks.append(_check("numbers", tamper.non_finite(conn), "every stored number finite"))
    problems, count = value_problems(database)
    checks.append(_check("values", problems, f"{count} reported values read again"))
    return _report(database, checks)


def _report(database: Database, checks: list[dict[str, Any]]) -> dict[str, Any]:
    for c in checks:
        c.pop("fatal", None)
    return {
        "database": database.name,
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
    head = head_revision()
    known = migrate.known_revisions()
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
        migrate.check(database)
    except Exception as exc:  # alembic's AutogenerateDiffsDetected names each difference
        return _check("schema", [f"the tables differ from the models: {exc}"])
    return _check("schema", [], f"at head {head}; tables match the models")


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
    read = reread_value(text_value, quantity, stored, mhz)
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
    row: dict[str, Any],
    table: str,
    problems: list[str],
    *,
    skip: tuple[str, ...] = (),
    dnu_mhz: float | None = None,
) -> int:
    """Re-read each reported text of ``row`` against its stored float; returns how many were read."""
    read = 0
    for f in fields.stored_values(table):
        if f.name in skip or f.text_column is None or f.value_column is None:
            continue
        read += row[f.text_column] is not None
        problem = _value_problem(
            where,
            f.text_column,
            row[f.text_column],
            row[f.value_column],
            fields.quantity_of(f.name),
            stored_err=row[f.error_column] if f.error_column else None,
            err_column=f.error_column,
            mhz=dnu_mhz if f.name == "dnu" else None,
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
    with database.read() as conn:
        count = _measurement_values(conn, problems)
        count += _coalescence_values(conn, problems)
        count += _rate_values(conn, problems)
    return problems, count


def _columns(table: str) -> list[str]:
    out: list[str] = []
    for f in fields.stored_values(table):
        out += [c for c in (f.text_column, f.value_column, f.error_column) if c]
    return out


def _measurement_values(conn: Connection, problems: list[str]) -> int:
    count = 0
    calibration = ["t_calibration_text", "t_calibration", "t_calibration_err_k"]
    raw = [*JSON_OF_TEXT, *JSON_OF_TEXT.values(), "course_quantity"]
    columns = ", ".join(dict.fromkeys(["id", *_columns("measurement"), *calibration, *raw]))
    for row in conn.records(f"SELECT {columns} FROM measurement ORDER BY id"):
        # ΔG‡ at Tc without a reported temperature is derived from the coalescence row
        skip = ("dg_t",) if row["dg_t_text"] is None else ()
        count += _check_values(f"measurement {row['id']}", row, "measurement", problems, skip=skip)
        count += _calibration_problem(f"measurement {row['id']}", row, problems)
        found, read = reread_problems(f"measurement {row['id']}", row)
        problems += found
        count += read
    return count


def _calibration_problem(where: str, row: dict[str, Any], problems: list[str]) -> int:
    """The calibration text must read as the stored calibration and σ(T); 1 when there is one."""
    text = row["t_calibration_text"]
    if text is None:
        if row["t_calibration"] is not None or row["t_calibration_err_k"] is not None:
            problems.append(f"{where}: a calibration is stored without its text")
        return 0
    try:
        reading = read_calibration(text)
    except UnitError:
        problems.append(f"{where}: t_calibration_text {text!r} does not read as a calibration")
        return 1
    if reading.name != row["t_calibration"] or not same_value(
        reading.sigma_k, row["t_calibration_err_k"]
    ):
        problems.append(
            f"{where}: t_calibration_text {text!r} reads as {reading.name} ± "
            f"{reading.sigma_k:g} K, stored {row['t_calibration']} ± {row['t_calibration_err_k']}"
        )
    return 1


def _coalescence_values(conn: Connection, problems: list[str]) -> int:
    count = 0
    columns = ", ".join(f"co.{c}" for c in _columns("coalescence"))
    sql = (
        f"SELECT co.id, co.measurement_id, {columns}, co.field_text, co.field_mhz, "
        "co.population_text, co.population_ratio, m.field_mhz AS m_mhz, p.nucleus "
        "FROM coalescence co JOIN measurement m ON m.id = co.measurement_id "
        "LEFT OUTER JOIN process p ON p.id = m.process_id ORDER BY co.id"
    )
    for row in conn.records(sql):
        where = f"measurement {row['measurement_id']} coalescence {row['id']}"
        mhz = shift_mhz(row["field_mhz"] or row["m_mhz"], row["nucleus"])  # for Δν in ppm
        count += _check_values(where, row, "coalescence", problems, dnu_mhz=mhz)
        count += row["field_text"] is not None
        problem = _value_problem(where, "field_text", row["field_text"], row["field_mhz"], "field")
        if problem:
            problems.append(problem)
        if row["population_text"] is not None:
            count += 1
            try:
                ratio = parse_population_ratio(row["population_text"])
            except UnitError:  # a bare fraction stored before such texts were refused
                ratio = legacy_population_ratio(row["population_text"]) or math.nan
            if not same_value(ratio, row["population_ratio"]):
                problems.append(
                    f"{where}: population_text {row['population_text']!r} reads as ratio "
                    f"{ratio:.6g}, stored {row['population_ratio']}"
                )
    return count


def _rate_values(conn: Connection, problems: list[str]) -> int:
    count = 0
    columns = ", ".join(_columns("rate_point"))
    sql = f"SELECT id, measurement_id, {columns}, fit_json FROM rate_point ORDER BY id"
    for row in conn.records(sql):
        where = f"measurement {row['measurement_id']} rate point {row['id']}"
        count += _check_values(where, row, "rate_point", problems)
        if row["fit_json"] is not None:
            count += 1
            problem = _fit_record_problem(row["fit_json"])
            if problem:
                problems.append(f"{where}: fit_json {problem}")
    return count


def _fit_record_problem(text: str) -> str | None:
    """A fit record fluxledger wrote is a JSON object in canonical form (sorted keys)."""
    from registry.lineshape.store_link import fit_json

    try:
        record = json.loads(text)
    except ValueError:
        return "is not JSON"
    if not isinstance(record, dict):
        return "is not a JSON object"
    return None if fit_json(record) == text else "is not in the form fluxledger writes"
