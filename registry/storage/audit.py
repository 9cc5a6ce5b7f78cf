"""The append-only history: who changed what, when, before and after, chained by hash.

Each revision's hash covers its own fields and the previous revision's hash, so editing or
deleting a past revision breaks the chain at that point, which :func:`verify_chain` reports.
Writers append inside their own write transaction, which SQLite serializes (BEGIN IMMEDIATE) and
PostgreSQL serializes with a transaction-scoped advisory lock.
"""

from __future__ import annotations

import hashlib
import json
from collections.abc import Iterable, Mapping
from datetime import UTC, datetime
from typing import Any

from registry.storage.connection import Connection, utc

GENESIS = "0" * 64


def _canonical(value: Any) -> str:
    return json.dumps(value, sort_keys=True, ensure_ascii=False, default=str, separators=(",", ":"))


def revision_hash(prev_hash: str, fields: Mapping[str, Any]) -> str:
    """sha256 over the previous hash and this revision's fields in a canonical JSON form."""
    body = {
        k: fields.get(k)
        for k in (
            "entity",
            "entity_id",
            "action",
            "actor",
            "at",
            "before_json",
            "after_json",
            "reason",
            "batch_id",
        )
    }
    if isinstance(body["at"], datetime):
        body["at"] = (
            body["at"].astimezone(UTC).replace(tzinfo=None).isoformat(timespec="microseconds")
        )
    return hashlib.sha256((prev_hash + _canonical(body)).encode("utf-8")).hexdigest()


def last_hash(conn: Connection) -> str:
    """The newest revision's hash (GENESIS for an empty history).

    The write transaction this runs in is the only writer (SQLite's ``BEGIN IMMEDIATE``, the
    advisory lock on PostgreSQL), so the chain cannot fork.
    """
    return conn.scalar("SELECT hash FROM revision ORDER BY id DESC LIMIT 1") or GENESIS


def to_json(value: Mapping[str, Any] | None) -> str | None:
    return None if value is None else _canonical(dict(value))


def record_many(conn: Connection, changes: Iterable[Mapping[str, Any]], actor: str) -> int:
    """Append revisions; each change has entity, entity_id, action, before, after (+reason, batch_id)."""
    prev = last_hash(conn)
    at = datetime.now(UTC)
    rows = []
    for change in changes:
        row = {
            "entity": change["entity"],
            "entity_id": int(change["entity_id"]),
            "action": change["action"],
            "actor": actor,
            "at": at,
            "before_json": to_json(change.get("before")),
            "after_json": to_json(change.get("after")),
            "reason": change.get("reason"),
            "batch_id": change.get("batch_id"),
        }
        row["prev_hash"] = prev
        row["hash"] = prev = revision_hash(prev, row)
        rows.append(row)
    if len(rows) == 1:
        conn.insert("revision", rows[0])
    else:
        conn.insert_many("revision", rows)
    return len(rows)


def record(
    conn: Connection,
    *,
    entity: str,
    entity_id: int,
    action: str,
    actor: str,
    before: Mapping[str, Any] | None = None,
    after: Mapping[str, Any] | None = None,
    reason: str | None = None,
    batch_id: int | None = None,
) -> None:
    """Append one revision (see :func:`record_many`)."""
    record_many(
        conn,
        [
            {
                "entity": entity,
                "entity_id": entity_id,
                "action": action,
                "before": before,
                "after": after,
                "reason": reason,
                "batch_id": batch_id,
            }
        ],
        actor,
    )


def verify_chain(conn: Connection) -> list[str]:
    """Problems in the hash chain (empty when intact), naming the first broken revision ids."""
    problems: list[str] = []
    prev = GENESIS
    for fields in conn.records(
        "SELECT id, entity, entity_id, action, actor, at, before_json, after_json, reason, "
        "batch_id, prev_hash, hash FROM revision ORDER BY id"
    ):
        fields["at"] = utc(fields["at"])
        if fields["prev_hash"] != prev:
            problems.append(
                f"revision {fields['id']}: previous-hash link broken (a revision before it was changed or removed)"
            )
        elif revision_hash(prev, fields) != fields["hash"]:
            problems.append(
                f"revision {fields['id']}: content does not match its hash (edited after the fact)"
            )
        prev = fields["hash"]
        if len(problems) >= 20:
            break
    return problems
