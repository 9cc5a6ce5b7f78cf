"""What one import's file said about each measurement it added or matched (``import_snapshot``).

A later import of the same file and sheet compares against this (see :mod:`.merge`): a field
whose text is what the file said last time has not been changed in the file, so a different
text in the registry is a correction made there and is kept. One row per measurement and
import, with the texts of the fields the file has columns for as JSON (an empty cell is left
out, as it said nothing, unless the import was told that empty cells clear: then ``null``). A snapshot identical to the newest one of the same file and sheet is not written again,
so re-importing an unchanged sheet adds nothing. No snapshot is written for a measurement held
back by a conflict (the file's news would otherwise look old next time), nor for rejected rows.
"""

from __future__ import annotations

import json
from collections.abc import Collection, Sequence
from typing import Any

from registry.io.fieldtexts import Texts
from registry.io.results import Prepared
from registry.io.upsert import UpsertPlan
from registry.storage.connection import Connection


def to_json(texts: Texts) -> str:
    """The stored form: sorted keys, so equal texts give equal JSON."""
    return json.dumps(texts, sort_keys=True, ensure_ascii=False, separators=(",", ":"))


def write_snapshots(
    conn: Connection,
    prep: Prepared,
    plan: UpsertPlan,
    added_ids: Sequence[int],
    batch_id: int,
    skip: Collection[int] = (),
    more: Sequence[dict[str, Any]] = (),
) -> int:
    """Snapshots of the entries added (``added_ids`` in the order of ``plan.new``) and matched;
    ``skip``: entry indexes whose rows were rejected; ``more``: snapshots of measurements a
    rates sheet gave points (see :func:`registry.io.upsert.merge_rate_plan`). Returns how many
    were written."""
    held = {m.measurement_id for m in plan.held}
    rows: list[dict[str, Any]] = []

    def add(index: int, mid: int) -> None:
        text = to_json(plan.presence.file_texts(index))
        if plan.own_snapshots.get(mid) != text:
            row = prep.read.sources[prep.kept[index]].row
            rows.append(
                {
                    "measurement_id": mid,
                    "batch_id": batch_id,
                    "source_row": row,
                    "fields_json": text,
                }
            )

    for index, mid in zip(plan.new, added_ids, strict=True):
        add(index, mid)
    for index, mid in plan.matched.items():
        if mid not in held and index not in skip:
            add(index, mid)
    rows.extend({**row, "batch_id": batch_id} for row in more)
    conn.insert_many("import_snapshot", rows)
    return len(rows)
