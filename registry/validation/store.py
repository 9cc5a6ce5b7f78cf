"""Findings in the ``validation_finding`` table: reconcile a run with the last one, accept one,
and keep each measurement's status in step with its findings.

A run replaces, for the measurements it checked, every stored finding that is no longer
produced (resolved, or recomputed because its inputs or the rule version changed) and inserts
the ones that are new; a finding whose (measurement, rule, version, inputs_hash) is unchanged
stays as it was, with its first date and its acceptance. Writes use executemany.

**The status rule** (:func:`sync_status`, in the same transaction as the run or the
acceptance): a measurement with an open error finding — severity ``error``, not accepted,
:data:`registry.record.fields.OPEN_ERROR_SQL` — has status ``flagged``; when none is open any
more (resolved by an edit or a re-check, or accepted) it returns to the status it had before
it was flagged (``draft`` when the history does not say). Each change is a ``flag`` /
``unflag`` revision in the history whose ``before``/``after`` hold the status. Retracted
measurements keep their status. An edit cannot set ``flagged``, nor leave it while an error
finding is open (:mod:`registry.admin.edits`).
"""

from __future__ import annotations

import re
from collections.abc import Callable, Sequence
from datetime import UTC, datetime
from typing import Any

from registry.errors import NotFoundError, UsageError
from registry.record.fields import OPEN_ERROR_SQL
from registry.storage import audit
from registry.storage.connection import Connection, utc
from registry.validation.base import SEVERITY_RANK, Finding

_SLIP_RE = re.compile(r"\[([a-z0-9-]+)\](?=;|$)")

Key = tuple[int, str, int, str | None]


def _key(mid: int, rule: str, version: int, inputs_hash: str | None) -> Key:
    return (int(mid), rule, int(version), inputs_hash)


def _select_stored(conn: Connection, measurement_ids: Sequence[int] | None) -> list[dict[str, Any]]:
    """Stored findings of ``measurement_ids`` (None: all), in (measurement, id) order."""
    sql = "SELECT * FROM validation_finding WHERE 1 = 1"
    if measurement_ids is None:
        rows = conn.records(sql)
    else:
        rows = conn.records_where_in(sql, "measurement_id", measurement_ids)
    rows.sort(key=lambda r: (r["measurement_id"], r["id"]))
    return rows


def finding_from_row(row: Any, new: bool = False) -> Finding:
    cause = row["likely_cause"]
    return Finding(
        measurement_id=row["measurement_id"],
        rule_id=row["rule_id"],
        rule_version=row["rule_version"],
        severity=row["severity"],
        message=row["message"],
        reported=row["reported"],
        recomputed=row["recomputed"],
        difference=row["difference"],
        unit=row["unit"],
        likely_cause=cause,
        slips=tuple(_SLIP_RE.findall(cause)) if cause else (),
        id=row["id"],
        inputs_hash=row["inputs_hash"],
        found_at=utc(row["found_at"]),
        new=new,
        accepted_by=row["accepted_by"],
        accepted_at=utc(row["accepted_at"]),
        accept_reason=row["accept_reason"],
    )


def reconcile(
    conn: Connection,
    measurement_ids: Sequence[int] | None,
    findings: Sequence[Finding],
    now: datetime,
    legacy_hashes: Callable[[Finding], list[str]] | None = None,
) -> tuple[list[Finding], int, int]:
    """Store this run's findings for ``measurement_ids`` (None: all); return them, #new, #removed.

    ``legacy_hashes`` gives, for a finding, the hashes older versions of the checker stored
    for the same inputs; a stored finding with one of them is kept (date and acceptance) and
    its hash brought up to date.
    """
    stored = {row["id"]: row for row in _select_stored(conn, measurement_ids)}
    existing: dict[Key, int] = {}
    stale: list[int] = []
    for fid, row in stored.items():
        key = _key(row["measurement_id"], row["rule_id"], row["rule_version"], row["inputs_hash"])
        if key in existing:
            stale.append(fid)  # a duplicate left by an interrupted run
        else:
            existing[key] = fid
    produced: set[Key] = set()
    fresh: list[Finding] = []
    for f in findings:
        key = _key(f.measurement_id, f.rule_id, f.rule_version, f.inputs_hash)
        if key in produced:
            continue
        produced.add(key)
        if key not in existing:
            fresh.append(f)
    if fresh and legacy_hashes is not None:
        fresh = _keep_legacy(conn, stored, existing, produced, fresh, legacy_hashes)
    rows = [_row(f, now) for f in fresh]
    stale += [fid for key, fid in existing.items() if key not in produced]
    if stale:
        conn.execute_many(
            "DELETE FROM validation_finding WHERE id = :fid", [{"fid": i} for i in stale]
        )
    new_ids = conn.insert_many("validation_finding", rows, new_ids=True)
    for fid in stale:
        del stored[fid]
    unset = {"accepted_by": None, "accepted_at": None, "accept_reason": None}
    stored.update((fid, {**r, **unset, "id": fid}) for fid, r in zip(new_ids, rows, strict=True))
    added = set(new_ids)
    result = [finding_from_row(r, new=fid in added) for fid, r in stored.items()]
    result.sort(key=lambda f: (f.measurement_id, SEVERITY_RANK.get(f.severity, 9), f.rule_id))
    return result, len(rows), len(stale)


def _row(f: Finding, now: datetime) -> dict[str, Any]:
    return {
        "measurement_id": f.measurement_id,
        "rule_id": f.rule_id,
        "rule_version": f.rule_version,
        "severity": f.severity,
        "message": f.message,
        "reported": f.reported,
        "recomputed": f.recomputed,
        "difference": f.difference,
        "unit": f.unit,
        "likely_cause": f.likely_cause,
        "inputs_hash": f.inputs_hash,
        "found_at": now,
    }


def _keep_legacy(
    conn: Connection,
    stored: dict[int, dict[str, Any]],
    existing: dict[Key, int],
    produced: set[Key],
    fresh: list[Finding],
    legacy_hashes: Callable[[Finding], list[str]],
) -> list[Finding]:
    """Stored findings whose hash is a legacy form of a new finding's: re-stamp, keep them.

    Only stored findings this run does not produce are candidates, and only for the same
    measurement, rule and rule version; each is claimed once. Returns the findings still new.
    """
    unmatched = {key[:3] for key in existing if key not in produced}
    still_new: list[Finding] = []
    updates: list[dict[str, Any]] = []
    for f in fresh:
        if (f.measurement_id, f.rule_id, f.rule_version) not in unmatched:
            still_new.append(f)
            continue
        for old_hash in legacy_hashes(f):
            old_key = _key(f.measurement_id, f.rule_id, f.rule_version, old_hash)
            if old_key in existing and old_key not in produced:
                fid = existing.pop(old_key)
                new_key = _key(f.measurement_id, f.rule_id, f.rule_version, f.inputs_hash)
                existing[new_key] = fid
                updates.append({"fid": fid, "inputs_hash": f.inputs_hash})
                stored[fid]["inputs_hash"] = f.inputs_hash
                break
        else:
            still_new.append(f)
    if updates:
        conn.execute_many(
            "UPDATE validation_finding SET inputs_hash = :inputs_hash WHERE id = :fid", updates
        )
    return still_new


def accept(conn: Connection, finding_id: int, reason: str, actor: str) -> Finding:
    """Mark a finding accepted with the reason, and record who did it in the history."""
    if not reason or not reason.strip():
        raise UsageError("accepting a finding needs a reason")
    select = "SELECT * FROM validation_finding WHERE id = :id"
    row = conn.record(select, {"id": finding_id})
    if row is None:
        raise NotFoundError(
            f"no finding with id {finding_id}; run 'fluxledger check' to see the current ones"
        )
    now = datetime.now(UTC)
    conn.update(
        "validation_finding",
        {"accepted_by": actor, "accepted_at": now, "accept_reason": reason.strip()},
        id=finding_id,
    )
    audit.record(
        conn,
        entity="measurement",
        entity_id=row["measurement_id"],
        action="accept-finding",
        actor=actor,
        before={"finding": finding_id, "accepted_by": row["accepted_by"]},
        after={
            "finding": finding_id,
            "rule": row["rule_id"],
            "rule_version": row["rule_version"],
            "severity": row["severity"],
            "message": row["message"],
            "inputs_hash": row["inputs_hash"],
        },
        reason=reason.strip(),
    )
    if row["severity"] == "error" and row["accepted_by"] is None:
        sync_status(conn, [row["measurement_id"]], actor, reason=f"finding {finding_id} accepted")
    fresh = conn.record(select, {"id": finding_id})
    return finding_from_row(fresh)


#: how a check run appears in the history (one revision per ``fluxledger check``)
RUN_ENTITY, RUN_ACTION = "validation", "check"


def last_run(conn: Connection) -> datetime | None:
    """When the previous recorded check run happened (None if never)."""
    at = conn.scalar(
        "SELECT at FROM revision WHERE entity = :entity AND action = :action "
        "ORDER BY id DESC LIMIT 1",
        {"entity": RUN_ENTITY, "action": RUN_ACTION},
    )
    return utc(at)


def record_check_run(
    conn: Connection,
    actor: str,
    ids: Sequence[int] | None,
    counts: dict[str, int],
    rules: dict[str, int] | None = None,
) -> None:
    """One history entry per check run: who ran it, on what, and what it found.

    ``rules`` (rule id → version) is given for a run with the registry's own settings: from it
    ``verify`` knows which rules the stored findings come from, and derives them again.
    """
    scope = "all" if ids is None else (list(ids) if len(ids) <= 20 else f"{len(ids)} measurements")
    after: dict[str, Any] = {"scope": scope, "counts": counts}
    if rules is not None:
        after["rules"] = rules
    audit.record(conn, entity=RUN_ENTITY, entity_id=0, action=RUN_ACTION, actor=actor, after=after)


# ---------------------------------------------------------------- status follows the findings

#: history actions of the status rule
FLAG_ACTION, UNFLAG_ACTION = "flag", "unflag"

#: non-retracted measurements whose status contradicts their findings (``m``: measurement)
_OUT_OF_STEP = (
    "SELECT m.id, m.status FROM measurement m WHERE m.status != 'retracted' AND ("
    f"(m.status = 'flagged' AND NOT {OPEN_ERROR_SQL}) OR "
    f"(m.status != 'flagged' AND {OPEN_ERROR_SQL}))"
)


def out_of_step(conn: Connection, measurement_ids: Sequence[int] | None = None) -> list[Any]:
    """(id, status) of the measurements (None: all) whose status contradicts their findings."""
    if measurement_ids is None:
        return conn.rows(_OUT_OF_STEP)
    return conn.rows_where_in(_OUT_OF_STEP, "m.id", measurement_ids)


def sync_status(
    conn: Connection,
    measurement_ids: Sequence[int] | None,
    actor: str,
    *,
    reason: str | None = None,
) -> list[dict[str, Any]]:
    """Apply the status rule (module docstring) to these measurements (None: all); returns the
    changes as ``{"id", "before", "after"}``, each also recorded in the history."""
    wrong = out_of_step(conn, measurement_ids)
    if not wrong:
        return []
    to_flag = [int(mid) for mid, status in wrong if status != "flagged"]
    to_unflag = [int(mid) for mid, status in wrong if status == "flagged"]
    open_errors = _open_errors(conn, to_flag)
    previous = _status_before_flag(conn, to_unflag)
    now = datetime.now(UTC)
    changes: list[dict[str, Any]] = []
    revisions: list[dict[str, Any]] = []
    for mid, status in wrong:
        mid = int(mid)
        if status != "flagged":
            after = "flagged"
            named = ", ".join(f"{fid} [{rule}]" for fid, rule in open_errors.get(mid, []))
            why = reason or f"error finding {named} open"
            action = FLAG_ACTION
        else:
            after = previous.get(mid, "draft")
            why = reason or "no error finding open any more"
            action = UNFLAG_ACTION
        changes.append({"id": mid, "before": status, "after": after})
        revisions.append({"entity": "measurement", "entity_id": mid, "action": action,
                          "before": {"status": status}, "after": {"status": after},
                          "reason": why})  # fmt: skip
    conn.execute_many(
        "UPDATE measurement SET status = :status, updated_at = :at WHERE id = :mid",
        [{"status": c["after"], "at": now, "mid": c["id"]} for c in changes],
    )
    audit.record_many(conn, revisions, actor)
    return changes


def open_after_edit(
    conn: Connection, measurement_id: int, findings: Sequence[Finding]
) -> list[Finding]:
    """The error ``findings`` (a run of the rules on what ``conn`` sees, an uncommitted edit
    included) that no stored acceptance covers: they would keep the measurement flagged."""
    accepted = {
        _key(r["measurement_id"], r["rule_id"], r["rule_version"], r["inputs_hash"])
        for r in _select_stored(conn, [measurement_id])
        if r["accepted_by"]
    }
    return [
        f
        for f in findings
        if f.severity == "error"
        and f.measurement_id == measurement_id
        and _key(f.measurement_id, f.rule_id, f.rule_version, f.inputs_hash) not in accepted
    ]


def _open_errors(conn: Connection, measurement_ids: list[int]) -> dict[int, list[tuple[int, str]]]:
    """(finding id, rule) of each measurement's open error findings."""
    out: dict[int, list[tuple[int, str]]] = {}
    found = conn.rows_where_in(
        "SELECT measurement_id, id, rule_id FROM validation_finding "
        "WHERE severity = 'error' AND accepted_by IS NULL",
        "measurement_id",
        measurement_ids,
    )
    for mid, fid, rule in sorted(found, key=lambda r: (r[0], r[1])):
        out.setdefault(int(mid), []).append((int(fid), rule))
    return out


def _status_before_flag(conn: Connection, measurement_ids: list[int]) -> dict[int, str]:
    """The status each measurement had before it was last flagged, from the history."""
    import json

    out: dict[int, str] = {}
    found = conn.rows_where_in(
        "SELECT entity_id, id, before_json FROM revision "
        "WHERE entity = 'measurement' AND action = :flag",
        "entity_id",
        measurement_ids,
        {"flag": FLAG_ACTION},
    )
    for mid, _rid, before in sorted(found, key=lambda r: (r[0], r[1])):  # the last one wins
        status = (json.loads(before) if before else {}).get("status")
        if status and status not in ("flagged", "retracted"):
            out[int(mid)] = status
    return out
