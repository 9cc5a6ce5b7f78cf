"""The history: who changed what and when, each revision summarised in one line."""

from __future__ import annotations

import json
from datetime import datetime
from typing import Any

from registry.errors import NotFoundError
from registry.record import fields
from registry.storage.connection import utc
from registry.storage.database import Database

_VALUE_COLUMNS_OF_TEXT = fields.value_columns_of_text()


def history(
    database: Database, measurement_id: int | None = None, *, limit: int | None = 50
) -> list[dict[str, Any]]:
    """Revisions, oldest first: all of one measurement's (its findings' too), or the latest ``limit``."""
    sql = "SELECT * FROM revision"
    params: dict[str, Any] = {}
    with database.read() as conn:
        if measurement_id is not None:
            params["id"] = measurement_id
            if conn.scalar("SELECT id FROM measurement WHERE id = :id", params) is None:
                raise NotFoundError(f"no measurement with id {measurement_id}")
            sql += (
                " WHERE (entity = 'measurement' AND entity_id = :id) OR (entity = 'finding' "
                "AND entity_id IN (SELECT id FROM validation_finding WHERE measurement_id = :id))"
            )
        sql += " ORDER BY id DESC" + (f" LIMIT {int(limit)}" if limit else "")
        rows = conn.records(sql, params)
    rows.reverse()
    return [_history_entry(r) for r in rows]


def _history_entry(row: dict[str, Any]) -> dict[str, Any]:
    before = json.loads(row["before_json"]) if row["before_json"] else None
    after = json.loads(row["after_json"]) if row["after_json"] else None
    at: datetime | None = utc(row["at"])
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


def _short_rates(value: Any) -> str:
    """Rate points as ``k @ T; …``, a line-shape fit record only counted (each runs to a
    kilobyte; ``show`` and the JSON give them whole)."""
    if not isinstance(value, list):
        return _short(value)
    if not value:
        return "[]"
    texts = "; ".join(f"{p[1]} @ {p[0]}" for p in value if isinstance(p, list) and len(p) >= 2)
    fitted = sum(1 for p in value if isinstance(p, list) and len(p) > 2)
    return texts + (f" ({fitted} with fit records)" if fitted else "")


def summarize(action: str, before: Any, after: Any) -> str:
    """One line saying what a revision changed: texts as reported, values only when no text moved."""
    if action in _VOCABULARY_ACTIONS:
        return _vocabulary_change(action, before, after)
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
    short = _short_rates if "rates" in keys else _short
    shown = [
        f"{key}: {short(old.get(key))} → {short(new.get(key))}"
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


_VOCABULARY_ACTIONS = ("add-alias", "remove-alias", "add-solvent")


def _vocabulary_change(action: str, before: Any, after: Any) -> str:
    """``add-alias: method 'VT-NMR (Tc)' → coalescence``; ``add-solvent: decalin (mp …)``."""
    body = before if action == "remove-alias" else after
    if not isinstance(body, dict):
        return action
    if action == "add-solvent":
        line = (
            f"{action}: {body.get('name')} (mp {_short(body.get('mp_k'))} K, "
            f"bp {_short(body.get('bp_k'))} K; source: {body.get('source')})"
        )
    else:
        line = f"{action}: {body.get('kind')} {body.get('alias')!r} → {body.get('target')}"
    moved = (after or {}).get("measurements_linked") or (after or {}).get("measurements_unlinked")
    if moved:
        verb = "unlinked" if action == "remove-alias" else "linked"
        line += f"; {verb} measurement(s) {', '.join(str(i) for i in moved)}"
    return line
