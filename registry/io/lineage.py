"""What the registry remembers of a measurement's past: a file's last word, and every change since.

Two sources, both read only for the measurements a re-import would change:

* the newest ``import_snapshot`` of each measurement — what a file said about it when it was last
  imported, preferring the snapshot of the same file name and sheet (:func:`newest_snapshots`);
* the revision history — every text each field has held, who set the current one and when, and
  whether anyone changed it by hand (``edit``, a review, a retraction, added rate points) rather
  than by an import (:func:`field_logs`).
"""

from __future__ import annotations

import json
from collections import defaultdict
from collections.abc import Iterable, Mapping
from dataclasses import dataclass, field
from datetime import datetime
from typing import Any

from registry.io.fieldtexts import Texts, revision_texts
from registry.storage.connection import Connection, utc

#: revisions that record what a file (or the first entry) said, not a change made by hand
IMPORT_ACTIONS = frozenset({"add", "import", "import-update", "import-rates"})
#: revisions that create a measurement (their ``after`` names every field)
CREATIONS = frozenset({"add", "import"})


@dataclass(frozen=True)
class Snapshot:
    """What one import's file said about one measurement."""

    batch_id: int
    file_name: str | None
    sheets: tuple[str, ...]
    fields_json: str

    def texts(self) -> Texts:
        data = json.loads(self.fields_json)
        return data if isinstance(data, dict) else {}


def newest_snapshots(
    conn: Connection, sheets: Mapping[int, str | None], file_name: str
) -> dict[int, Snapshot]:
    """Each measurement's newest snapshot, one of the same file and sheet when there is one.

    ``sheets`` maps each measurement id to the sheet the file now gives it on (None for a CSV).
    """
    found: dict[int, list[tuple[int, Snapshot]]] = defaultdict(list)
    for mid, sid, batch_id, text, name, sheet in conn.rows_where_in(
        "SELECT s.measurement_id, s.id, s.batch_id, s.fields_json, b.file_name, b.sheet "
        "FROM import_snapshot s JOIN import_batch b ON b.id = s.batch_id WHERE 1 = 1",
        "s.measurement_id",
        sheets,
    ):
        parts = tuple(sheet.split(", ")) if sheet else ()
        found[mid].append((sid, Snapshot(batch_id, name, parts, text)))
    out: dict[int, Snapshot] = {}
    for mid, snaps in found.items():
        sheet = sheets[mid]

        def same(s: Snapshot, sheet: str | None = sheet) -> bool:
            return s.file_name == file_name and (sheet in s.sheets if sheet else not s.sheets)

        own = [(sid, s) for sid, s in snaps if same(s)]
        out[mid] = max(own or snaps, key=lambda pair: pair[0])[1]
    return out


@dataclass(frozen=True)
class Setter:
    """The revision that set a field's current text."""

    actor: str
    at: datetime | None
    action: str
    revision: int


@dataclass
class FieldLog:
    """One measurement's history, per field."""

    past: dict[str, set[str | None]] = field(default_factory=lambda: defaultdict(set))
    last: dict[str, Setter] = field(default_factory=dict)
    by_hand: set[str] = field(default_factory=set)


def field_logs(conn: Connection, ids: Iterable[int]) -> dict[int, FieldLog]:
    """The field history of each measurement (empty logs for those without revisions)."""
    wanted = list(ids)
    logs: dict[int, FieldLog] = {mid: FieldLog() for mid in wanted}
    rows = conn.rows_where_in(
        "SELECT entity_id, id, action, actor, at, before_json, after_json FROM revision "
        "WHERE entity = 'measurement'",
        "entity_id",
        wanted,
    )
    for mid, rid, action, actor, at, before_json, after_json in sorted(rows, key=lambda r: r[1]):
        _add(logs[mid], rid, action, actor, utc(at), _json(before_json), _json(after_json))
    return logs


def _json(text: str | None) -> Any:
    return json.loads(text) if text else None


def _add(
    log: FieldLog,
    rid: int,
    action: str,
    actor: str,
    at: datetime | None,
    before: Any,
    after: Any,
) -> None:
    creation = before is None and action in CREATIONS
    old = revision_texts(before)
    new = revision_texts(after, creation=creation)
    for name, text in old.items():
        log.past[name].add(text)
    for name, text in new.items():
        log.past[name].add(text)
        if creation or name not in old or old[name] != text:
            log.last[name] = Setter(actor, at, action, rid)
            if action not in IMPORT_ACTIONS:
                log.by_hand.add(name)
