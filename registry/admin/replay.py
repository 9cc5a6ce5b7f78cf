"""The history replayed: the state each measurement's revisions say it is in now.

Every writer appends a revision holding what it changed (:mod:`registry.storage.audit`). The
creating ``add``/``import`` revision holds the whole entry (:func:`registry.storage.writer.
snapshot`: every column that is not empty, the process, the coalescence observation, the rate
points); ``edit``, ``status``, ``retract``, ``flag``/``unflag``, ``import-update``,
``import-rates`` and ``rate-points`` hold the columns they changed, before and after. Folding
the ``after`` values in revision order gives the state the history accounts for;
:func:`state_problems` compares it with the stored rows, and :func:`read_history` compares each
revision's ``before`` with the state the revisions before it leave (a change made by hand and
overwritten later by fluxledger shows there).

Tracked: the columns an entry fills (:data:`COLUMNS`: texts, canonical values, uncertainties,
label, method, solvent text, reference, status), the process (kind, sites, nucleus), the
coalescence row and the rate points (their texts and fit records; ``verify`` re-reads the
floats from the texts).
Not tracked: the compound (shared by measurements and matched by structure, so one entry's
snapshot does not say which row it ends up on), the solvent link (the vocabulary's reading of
the solvent text), extra attributes, timestamps and uids.

A creating revision without the whole entry (registries written by other tools or the earliest
versions hold a summary) accounts only for the fields it names; those measurements are counted,
not blamed. Values compare equal across SQLite and PostgreSQL: floats to 1e-9 relative (JSON
and both databases keep doubles exactly; the tolerance is that of ``edit``), and an empty text
is no text.
"""

from __future__ import annotations

import json
from collections.abc import Iterator, Sequence
from dataclasses import dataclass, field
from functools import lru_cache
from typing import Any

from registry.admin.reread import same_value
from registry.record import fields
from registry.record.rawdata import RAW_COLUMNS
from registry.storage.connection import Connection

#: the actions that create a measurement (its first revision)
CREATING = ("add", "import")


def _stored_columns(table: str) -> tuple[str, ...]:
    """The text, value and error columns of a table's stored fields (the fields table)."""
    return tuple(
        c
        for f in fields.stored_values(table)
        for c in (f.text_column, f.value_column, f.error_column)
        if c
    )


#: the measurement columns an entry fills (those of :func:`registry.record.entry.normalize_entry`)
COLUMNS: tuple[str, ...] = (
    *_stored_columns("measurement"),
    "label",
    "method",
    "solvent_text",
    "reference",
    "status",
    *RAW_COLUMNS,  # the raw data of EXSY, transfer and courses (texts and their JSON)
)
#: the columns of a coalescence row an entry fills
COALESCENCE_COLUMNS: tuple[str, ...] = (
    *_stored_columns("coalescence"),
    "population_ratio",
    "population_text",
    "field_mhz",
    "field_text",
)
PROCESS_KEYS = ("kind", "sites", "nucleus")
_COLUMN_SET = frozenset(COLUMNS)
_PLAIN = _COLUMN_SET | {"process", "rates"}  # keys whose after value replaces the state's
#: keys every snapshot of a whole entry has (method and status are never empty)
_WHOLE_ENTRY = frozenset({"compound", "method", "status"})
#: actions that leave the findings as they were (an acceptance, the status rule following it)
_FINDINGS_KEPT = ("accept-finding", "flag", "unflag")


@dataclass(slots=True)
class Replayed:
    """One measurement as its revisions leave it."""

    created: int | None  # the creating revision (None: none seen)
    values: dict[str, Any]  # tracked key → value (absent: empty)
    known: set[str] | None  # keys the history accounts for (None: every one)
    setby: dict[str, int] = field(default_factory=dict)  # key → last revision that set it
    summary: bool = False  # created by a revision that holds less than the whole entry

    def knows(self, key: str) -> bool:
        return self.known is None or key in self.known

    def revision_of(self, key: str) -> int | None:
        return self.setby.get(key, self.created)

    def learn(self, key: str, value: Any, revision: int) -> None:
        self.values[key] = value
        self.setby[key] = revision
        if self.known is not None:
            self.known.add(key)

    def forget(self, key: str) -> None:
        if self.known is None:
            self.known = set(_PLAIN | {"coalescence"})
        self.known.discard(key)


@dataclass
class History:
    """What one pass over the revisions (oldest first) gathered for ``verify``."""

    revisions: int = 0
    measurements: dict[int, Replayed] = field(default_factory=dict)
    #: a revision's ``before`` that the state before it does not give
    problems: list[str] = field(default_factory=list)
    #: finding id → (revision, actor, measurement id, after, reason) of its last acceptance
    acceptances: dict[int, tuple[int, str, int, dict[str, Any], str | None]] = field(
        default_factory=dict
    )
    #: (revision, after) of every recorded check of the whole registry
    check_runs: list[tuple[int, dict[str, Any]]] = field(default_factory=list)
    #: measurement id → the last revision that may have changed its findings
    touched: dict[int, int] = field(default_factory=dict)
    #: revisions that may change any measurement's findings (vocabulary, compound moves)
    widening: list[int] = field(default_factory=list)


def read_history(conn: Connection) -> History:
    """One pass over every revision, oldest first (see the module docstring)."""
    history = History()
    rows = conn.rows(
        "SELECT id, entity, entity_id, action, actor, before_json, after_json, reason "
        "FROM revision ORDER BY id"
    )
    history.revisions = len(rows)
    states, touched = history.measurements, history.touched
    for rid, entity, entity_id, action, actor, before_json, after_json, reason in rows:
        if entity != "measurement":
            _other(history, rid, entity, action, after_json)
            continue
        mid = int(entity_id)
        if action in CREATING:
            states[mid] = _created(rid, json.loads(after_json) if after_json else None)
            touched[mid] = rid
            continue
        after = _parsed(after_json)
        if action == "accept-finding":
            states.setdefault(mid, Replayed(None, {}, set()))
            if isinstance(after, dict) and after.get("finding") is not None:
                history.acceptances[int(after["finding"])] = (rid, actor, mid, after, reason)
            continue
        state = states.get(mid)
        if state is None:
            state = states[mid] = Replayed(None, {}, set())
        _fold(history, rid, mid, state, _parsed(before_json), after)
        if action not in _FINDINGS_KEPT:
            touched[mid] = rid
            if isinstance(after, dict) and "compound" in after:
                history.widening.append(rid)  # a moved measurement leaves its compound's group
    return history


@lru_cache(maxsize=4096)
def _parsed(text: str | None) -> Any:
    """A revision's small ``before``/``after`` (many are alike: ``{"status": "flagged"}``);
    read only, never changed in place, so one parse serves them all."""
    return json.loads(text) if text else None


def _other(history: History, rid: int, entity: str, action: str, after_json: str | None) -> None:
    """Revisions of other things that matter here: check runs, vocabulary changes."""
    if entity == "validation" and action == "check" and after_json:
        after = json.loads(after_json)
        if isinstance(after, dict):
            history.check_runs.append((rid, after))
    elif entity in ("solvent", "vocab_alias"):
        history.widening.append(rid)


def _fold(history: History, rid: int, mid: int, state: Replayed, before: Any, after: Any) -> None:
    if isinstance(before, dict):
        history.problems += _before_problems(mid, rid, state, before)
    if not isinstance(after, dict):
        return
    for key, value in after.items():
        if key in _PLAIN:
            state.learn(key, value, rid)
        elif key == "coalescence":
            _fold_coalescence(state, rid, before, value)


def _created(rid: int, after: Any) -> Replayed:
    if isinstance(after, dict) and after.keys() >= _WHOLE_ENTRY:
        return Replayed(rid, after, None)
    body = after if isinstance(after, dict) else {}
    known = {k for k in body if k in _PLAIN or k == "coalescence"}
    return Replayed(rid, dict(body), known, summary=True)


def _fold_coalescence(state: Replayed, rid: int, before: Any, value: Any) -> None:
    """A whole row (created, or the older list form), none (removed), or the columns that
    moved (``before`` a dict too): merged into the row the history knows, if it knows one."""
    old = before.get("coalescence") if isinstance(before, dict) else None
    if isinstance(value, list):
        if len(value) > 1:
            state.forget("coalescence")
            return
        value = value[0] if value else None
    elif isinstance(value, dict) and isinstance(old, dict):
        row = state.values.get("coalescence")
        if not (state.knows("coalescence") and isinstance(row, dict)):
            state.forget("coalescence")
            return
        value = {**row, **value}
    state.learn("coalescence", value, rid)


def _before_problems(mid: int, rid: int, state: Replayed, before: dict[str, Any]) -> list[str]:
    out = []
    for key, old in before.items():
        if key == "coalescence":
            out += _coalescence_before(mid, rid, state, old)
        elif key in _PLAIN and state.knows(key) and not same(state.values.get(key), old):
            out.append(_found(mid, rid, key, old, state.values.get(key), state.revision_of(key)))
    return out


def _coalescence_before(mid: int, rid: int, state: Replayed, old: Any) -> list[str]:
    if not state.knows("coalescence"):
        return []
    row = state.values.get("coalescence")
    if isinstance(old, list):
        if len(old) > 1:
            return []
        old = old[0] if old else None
    where = state.revision_of("coalescence")
    if old is None or row is None:
        if (old is None) == (row is None):
            return []
        return [
            f"measurement {mid}: revision {rid} found {_row_text(old)} where its history had "
            f"{_row_text(row)} ({_revision(where)}): changed without a revision in between"
        ]
    return [
        _found(mid, rid, f"coalescence {key}", value, row.get(key), where)
        for key, value in old.items()
        if key in COALESCENCE_COLUMNS and not same(row.get(key), value)
    ]


def _found(mid: int, rid: int, what: str, found: Any, had: Any, where: int | None) -> str:
    return (
        f"measurement {mid}: revision {rid} found {what} {shown(found)} where its history had "
        f"{shown(had)} ({_revision(where)}): changed without a revision in between"
    )


# ---------------------------------------------------------------- the stored rows against it


def state_problems(conn: Connection, history: History) -> list[str]:
    """Stored measurements whose tracked state is not the one their history leaves."""
    states = history.measurements
    if not states:
        return []
    processes = {r[0]: r[1:] for r in conn.rows("SELECT id, kind, sites, nucleus FROM process")}
    picked = ", ".join(COALESCENCE_COLUMNS)
    coalescence = _by_measurement(
        conn.rows(f"SELECT measurement_id, {picked} FROM coalescence ORDER BY id")
    )
    rates = _by_measurement(
        [
            row if row[3] else row[:3]  # the fit record is third where there is one
            for row in conn.rows(
                "SELECT measurement_id, t_text, k_text, fit_json FROM rate_point ORDER BY id"
            )
        ]
    )
    problems: list[str] = []
    picked = ", ".join(COLUMNS)
    sql = f"SELECT id, process_id, {picked} FROM measurement ORDER BY id"
    for mid, pid, *row in conn.rows(sql):
        state = states.get(mid)
        if state is None:
            continue  # no revision names it: reported as not created by the history
        problems += _column_problems(mid, state, row)
        if state.knows("process"):
            stored = processes.get(pid)
            now = None if stored is None else dict(zip(PROCESS_KEYS, stored, strict=True))
            if not same(now, state.values.get("process")):
                problems.append(_ends(mid, "process", now, state.values.get("process"), state))
        if state.knows("coalescence"):
            problems += _coalescence_problems(mid, state, coalescence.get(mid, []))
        if state.knows("rates"):
            problems += _rate_problems(mid, state, rates.get(mid, []))
    return problems


def _by_measurement(rows: Sequence[tuple[Any, ...]]) -> dict[int, list[tuple[Any, ...]]]:
    out: dict[int, list[tuple[Any, ...]]] = {}
    for mid, *rest in rows:
        out.setdefault(mid, []).append(tuple(rest))
    return out


def _column_problems(mid: int, state: Replayed, row: Sequence[Any]) -> Iterator[str]:
    values = state.values
    expected = [values.get(c) for c in COLUMNS]
    if expected == list(row) and state.known is None:
        return  # the common case, decided in one comparison
    for column, now, then in zip(COLUMNS, row, expected, strict=True):
        if state.knows(column) and not same(now, then):
            yield _ends(mid, column, now, then, state, column)


def _coalescence_problems(mid: int, state: Replayed, rows: list[tuple[Any, ...]]) -> list[str]:
    then = state.values.get("coalescence")
    want = 0 if then is None else 1
    if want == len(rows) == 1 and rows[0] == tuple(then.get(c) for c in COALESCENCE_COLUMNS):
        return []  # the common case, decided in one comparison
    if len(rows) != want:
        how = "added" if len(rows) > want else "removed"
        return [
            f"measurement {mid}: {_rows(len(rows))}, but its history ends with {_rows(want)} "
            f"({_revision(state.revision_of('coalescence'))}): {how} without a revision"
        ]
    if then is None:
        return []
    now = dict(zip(COALESCENCE_COLUMNS, rows[0], strict=True))
    return [
        _ends(mid, f"coalescence {c}", now[c], then.get(c), state, "coalescence")
        for c in COALESCENCE_COLUMNS
        if not same(now[c], then.get(c))
    ]


def _rate_problems(mid: int, state: Replayed, rows: list[tuple[Any, ...]]) -> list[str]:
    then = [tuple(p) for p in state.values.get("rates") or []]
    where = _revision(state.revision_of("rates"))
    if len(rows) != len(then):
        how = "added" if len(rows) > len(then) else "removed"
        return [
            f"measurement {mid}: {_points(len(rows))}, but its history ends with "
            f"{_points(len(then))} ({where}): {how} without a revision"
        ]
    for i, (now, was) in enumerate(zip(rows, then, strict=True), start=1):
        if same(now[:2], was[:2]) and not same(now[2:], was[2:]):
            return [
                f"measurement {mid}: the fit record of rate point {i} {_point(now)} is not the "
                f"one its history ends with ({where}): changed without a revision"
            ]
        if not same(now, was):
            return [
                f"measurement {mid}: rate point {i} is {_point(now)} but its history ends at "
                f"{_point(was)} ({where}): changed without a revision"
            ]
    return []


def _ends(mid: int, what: str, now: Any, then: Any, state: Replayed, key: str = "") -> str:
    where = _revision(state.revision_of(key or what))
    return (
        f"measurement {mid}: {what} is {shown(now)} but its history ends at {shown(then)} "
        f"({where}): changed without a revision"
    )


# ---------------------------------------------------------------- comparing and showing


def blank(value: Any) -> bool:
    """No value: None, an empty text or an empty list (the history leaves empty ones out)."""
    return value is None or (isinstance(value, (str, list, tuple)) and not value)


def same(a: Any, b: Any) -> bool:
    """Equal as stored values: numbers to 1e-9 relative, texts exactly, empty ones alike."""
    if a == b:
        return True
    if blank(a) or blank(b):
        return blank(a) and blank(b)
    if _number(a) and _number(b):
        return same_value(float(a), float(b))
    if isinstance(a, dict) and isinstance(b, dict):
        return all(same(a.get(k), b.get(k)) for k in a.keys() | b.keys())
    if isinstance(a, (list, tuple)) and isinstance(b, (list, tuple)):
        return len(a) == len(b) and all(same(x, y) for x, y in zip(a, b, strict=True))
    return False


def _number(value: Any) -> bool:
    return isinstance(value, (int, float)) and not isinstance(value, bool)


def shown(value: Any) -> str:
    """A stored value as a message shows it."""
    if blank(value):
        return "(none)"
    if isinstance(value, float):
        return f"{value:.10g}"
    if isinstance(value, dict) and set(value) <= set(PROCESS_KEYS):
        parts = [value.get("kind") or "?", value.get("nucleus") or ""]
        sites = value.get("sites")
        return " ".join(p for p in parts if p) + (f" (sites {sites!r})" if sites else "")
    return repr(value) if isinstance(value, str) else str(value)


def _row_text(row: Any) -> str:
    if row is None:
        return "no coalescence row"
    return f"a coalescence row (Tc {shown(row.get('tc_text'))}, Δν {shown(row.get('dnu_text'))})"


def _point(point: Sequence[Any]) -> str:
    """(T text, k text), the fit record only named (it runs to a kilobyte)."""
    record = ", with a fit record" if len(point) > 2 else ""
    return f"({', '.join(shown(p) for p in point[:2])}{record})"


def plural(n: int, word: str) -> str:
    """``1 measurement``, ``3 measurements``."""
    return f"{n} {word}{'s' * (n != 1)}"


def _rows(n: int) -> str:
    return "no coalescence row" if n == 0 else plural(n, "coalescence row")


def _points(n: int) -> str:
    return "no rate points" if n == 0 else plural(n, "rate point")


def _revision(rid: int | None) -> str:
    return "no revision" if rid is None else f"revision {rid}"
