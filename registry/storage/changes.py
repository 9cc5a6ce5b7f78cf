"""What has changed in a registry since a cache was built: exact, cheap to ask, plain SQL too.

Triggers in the schema (migration 0003) count every update and delete of the rows a cache
depends on in ``change_counter``; new rows are seen by the table's row count and largest id.
A cache stores the :func:`state` it was built from and compares it with the current one: equal
means nothing it shows has changed, whoever wrote (fluxledger or plain SQL). Asking costs one
primary-key read per counter and one ``count(*)``/``max(id)`` per table.
"""

from __future__ import annotations

from dataclasses import dataclass

from registry.storage.connection import Connection


@dataclass(frozen=True)
class TableState:
    rows: int
    max_id: int


@dataclass(frozen=True)
class State:
    """Counters (kind of change → how many) and the size of each table asked about."""

    counters: tuple[tuple[str, int], ...]
    tables: tuple[tuple[str, TableState], ...]

    def counter(self, name: str) -> int:
        return dict(self.counters)[name]

    def table(self, name: str) -> TableState:
        return dict(self.tables)[name]

    def as_json(self) -> dict[str, object]:
        return {
            "counters": dict(self.counters),
            "tables": {t: [s.rows, s.max_id] for t, s in self.tables},
        }


def state(conn: Connection, counters: tuple[str, ...], tables: tuple[str, ...]) -> State:
    """The counters and table sizes a cache depends on, read in the caller's transaction."""
    found = dict(conn.rows("SELECT name, n FROM change_counter"))
    sizes = []
    for table in tables:
        # two subqueries: together in one SELECT, SQLite can use neither its count(*) nor its
        # max(id) shortcut and scans the table (17 ms at 100k rows instead of 0.02 ms)
        rows, max_id = conn.first(
            f"SELECT (SELECT count(*) FROM {table}), (SELECT coalesce(max(id), 0) FROM {table})"
        ) or (0, 0)
        sizes.append((table, TableState(int(rows), int(max_id))))
    return State(tuple((c, int(found.get(c, -1))) for c in counters), tuple(sizes))


def only_appended(before: TableState, now: TableState, appended: int) -> bool:
    """True when the table only grew by ``appended`` rows, all with ids above the old largest
    (``appended`` = rows now found with an id above ``before.max_id``)."""
    return now.rows == before.rows + appended and now.max_id >= before.max_id
