"""A group's own vocabulary, stored in the registry: aliases, and solvents with their liquid range.

An alias says what a spelling the group writes means (``VT-NMR (Tc)`` is coalescence,
``CDCl3/CS2`` is chloroform-d). It lives in ``vocab_alias``, so everyone who opens the registry
reads sheets and ``add`` entries the same way, and each change is one transaction with one
revision in the history. A solvent is added with its melting and boiling points and their
source (the temperature rules warn outside that range). Solvent spellings link measurements:
when an alias or a solvent is added (or an alias removed), the measurements whose solvent text
it names are linked (or unlinked) in the same transaction, and the caller re-checks them.
"""

from __future__ import annotations

import re
from collections.abc import Sequence
from datetime import UTC, datetime
from typing import Any

from registry.errors import NotFoundError, UnitError, UsageError, VocabularyError
from registry.kinetics.safety import DEFER
from registry.record import vocab
from registry.record.spelling import Reading, fold
from registry.storage import audit
from registry.storage.connection import Connection, utc
from registry.storage.database import Database
from registry.storage.writer import read_reference_tables

_ALIAS_COLUMNS = "id, kind, alias, target, created_by, created_at"


def check_kind(kind: str) -> str:
    """``kind`` as stored (method, process, solvent, nucleus), or a usage error."""
    wanted = (kind or "").strip().lower()
    wanted = {"methods": "method", "processes": "process", "solvents": "solvent"}.get(
        wanted, wanted
    )
    if wanted not in vocab.ALIAS_KINDS:
        raise UsageError(f"unknown kind {kind!r}; one of {', '.join(vocab.ALIAS_KINDS)}")
    return wanted


def list_aliases(database: Database, kind: str | None = None) -> list[dict[str, Any]]:
    """The stored aliases (of one kind), oldest first."""
    sql = f"SELECT {_ALIAS_COLUMNS} FROM vocab_alias"
    params: dict[str, Any] = {}
    if kind is not None:
        sql += " WHERE kind = :kind"
        params["kind"] = check_kind(kind)
    with database.read() as conn:
        rows = conn.records(sql + " ORDER BY id", params)
    for row in rows:
        row["created_at"] = utc(row["created_at"])
    return rows


# ---------------------------------------------------------------- reading a text


def read_term(database: Database, kind: str, text: str) -> dict[str, Any]:
    """How the registry reads ``text`` as a method, process kind, solvent or nucleus."""
    kind = check_kind(kind)
    with database.read() as conn:
        index, vocabulary = read_reference_tables(conn)
        names = _solvent_names(conn) if kind == "solvent" else {}
    return {"kind": kind, **_reading(kind, text, vocabulary, index, names).as_dict()}


def _reading(
    kind: str,
    text: str,
    vocabulary: vocab.Vocabulary,
    index: dict[str, int],
    names: dict[int, str],
) -> Reading:
    if kind == "method":
        return vocab.read_method(text, vocabulary)
    if kind == "process":
        return vocab.read_process_kind(text, vocabulary)
    if kind == "nucleus":
        return vocab.read_nucleus(text, vocabulary)
    key = fold(text)
    if key in index:
        alias = vocabulary.aliases_of("solvent").get(key)
        return Reading(text, names[index[key]], "alias" if alias else "spelling")
    near = vocab.solvent_suggestions(text, _solvent_spellings(index, names))
    return Reading(text, None, "", (), tuple(near))


def _solvent_names(conn: Connection) -> dict[int, str]:
    return dict(conn.rows("SELECT id, name FROM solvent"))


def _solvent_spellings(index: dict[str, int], names: dict[int, str]) -> dict[str, str]:
    """Folded spelling → solvent name, for suggestions from the registry's own table."""
    return {key: names[sid] for key, sid in index.items() if sid in names}


# ---------------------------------------------------------------- aliases


def add_alias(
    database: Database,
    kind: str,
    alias: str,
    target: str,
    *,
    actor: str,
    reason: str | None = None,
) -> dict[str, Any]:
    """Store that ``alias`` means ``target``; returns the alias, what it overrides and the
    measurements it linked (solvents)."""
    kind = check_kind(kind)
    alias = (alias or "").strip()
    if not fold(alias):
        raise VocabularyError(kind, alias, "an alias needs letters or digits")

    def work(conn: Connection) -> dict[str, Any]:
        index, vocabulary = read_reference_tables(conn)
        names = _solvent_names(conn)
        _refuse_duplicate(conn, kind, alias)
        name = _target_name(kind, target, vocabulary, index, names)
        overrides = _current_meaning(kind, alias, name, vocabulary, index, names)
        row = {"kind": kind, "alias": alias, "target": name, "created_by": actor}
        alias_id = int(
            conn.insert("vocab_alias", {**row, "created_at": datetime.now(UTC)}, returning="id")
        )
        linked = []
        if kind == "solvent":
            linked = _link(conn, {fold(alias)}, index[fold(name)])
        after = {"kind": kind, "alias": alias, "target": name}
        if linked:
            after["measurements_linked"] = linked
        audit.record(conn, entity="vocab_alias", entity_id=alias_id, action="add-alias",
                     actor=actor, before=None, after=after, reason=reason)  # fmt: skip
        return {**row, "id": alias_id, "overrides": overrides, "measurements_linked": linked}

    return database.write(work)


def _refuse_duplicate(conn: Connection, kind: str, alias: str) -> None:
    for old, target, by, at in conn.rows(
        "SELECT alias, target, created_by, created_at FROM vocab_alias WHERE kind = :kind",
        {"kind": kind},
    ):
        if fold(old) == fold(alias):
            when = utc(at).strftime("%Y-%m-%d") if at else "?"
            raise VocabularyError(
                kind,
                alias,
                f"an alias {old!r} → {target} exists already (added by {by} on {when}); "
                "remove it first",
            )


def _target_name(
    kind: str,
    target: str,
    vocabulary: vocab.Vocabulary,
    index: dict[str, int],
    names: dict[int, str],
) -> str:
    """The stored name ``target`` reads as, or an error naming the known ones."""
    text = (target or "").strip()
    if kind == "solvent":
        sid = index.get(fold(text))
        if sid is None:
            near = vocab.solvent_suggestions(text, _solvent_spellings(index, names))
            guess = f"; did you mean {' or '.join(near)}?" if near else ""
            raise VocabularyError(
                "solvent",
                text,
                f"no such solvent in the registry{guess} (add it with its melting and boiling "
                "points first)",
            )
        return names[sid]
    try:
        if kind == "method":
            return vocab.method_name(text, "target", vocabulary)
        if kind == "process":
            return vocab.process_kind_name(text, vocabulary, "target")
        return vocab.nucleus_name(text, vocabulary, "target")
    except UnitError as exc:
        raise VocabularyError(f"{kind} target", text, exc.reason) from exc


def _current_meaning(
    kind: str,
    alias: str,
    name: str,
    vocabulary: vocab.Vocabulary,
    index: dict[str, int],
    names: dict[int, str],
) -> str | None:
    """What ``alias`` reads as today: refused when it is a name, or already means ``name``, or
    names a solvent or nucleus; returned (to be overridden) when a built-in reading differs."""
    reading = _reading(kind, alias, vocabulary, index, names)
    if reading.name is None:
        return None
    if reading.name == name:
        raise VocabularyError(
            kind, alias, f"already reads as {name} ({reading.how}); no alias is needed"
        )
    if reading.how == "name" or kind in ("solvent", "nucleus"):
        raise VocabularyError(
            kind, alias, f"already names {reading.name}; an alias cannot make it mean {name}"
        )
    return reading.name


def remove_alias(
    database: Database, kind: str, alias: str, *, actor: str, reason: str | None = None
) -> dict[str, Any]:
    """Delete a stored alias; the history keeps what it was. Measurements linked through a
    solvent alias are unlinked (their text no longer names a solvent)."""
    kind = check_kind(kind)

    def work(conn: Connection) -> dict[str, Any]:
        found = [
            r
            for r in conn.records(
                f"SELECT {_ALIAS_COLUMNS} FROM vocab_alias WHERE kind = :kind", {"kind": kind}
            )
            if fold(r["alias"]) == fold(alias)
        ]
        if not found:
            raise NotFoundError(f"no stored {kind} alias {alias!r} in this registry")
        row = found[0]
        conn.execute("DELETE FROM vocab_alias WHERE id = :id", {"id": row["id"]})
        unlinked = _unlink(conn, fold(row["alias"])) if kind == "solvent" else []
        before = {k: row[k] for k in ("kind", "alias", "target")}
        after = {"measurements_unlinked": unlinked} if unlinked else None
        audit.record(conn, entity="vocab_alias", entity_id=int(row["id"]),
                     action="remove-alias", actor=actor, before=before, after=after,
                     reason=reason)  # fmt: skip
        return {**before, "id": row["id"], "measurements_unlinked": unlinked}

    return database.write(work)


# ---------------------------------------------------------------- linking solvent texts


def _link(conn: Connection, keys: set[str], solvent_id: int) -> list[int]:
    """Link the measurements without a solvent whose solvent text folds to one of ``keys``."""
    ids = [
        int(mid)
        for mid, text in conn.rows(
            "SELECT id, solvent_text FROM measurement "
            "WHERE solvent_id IS NULL AND solvent_text IS NOT NULL ORDER BY id"
        )
        if fold(text) in keys
    ]
    if ids:
        conn.execute_many(
            "UPDATE measurement SET solvent_id = :sid WHERE id = :id",
            [{"sid": solvent_id, "id": mid} for mid in ids],
        )
    return ids


def _unlink(conn: Connection, key: str) -> list[int]:
    """Measurements whose solvent text folds to ``key``: linked as the table now says, or
    unlinked; the ids whose link went away."""
    index, _ = read_reference_tables(conn)
    now = index.get(key)
    changed = [
        (int(mid), now)
        for mid, text, sid in conn.rows(
            "SELECT id, solvent_text, solvent_id FROM measurement "
            "WHERE solvent_id IS NOT NULL AND solvent_text IS NOT NULL ORDER BY id"
        )
        if fold(text) == key and sid != now
    ]
    if changed:
        conn.execute_many(
            "UPDATE measurement SET solvent_id = :sid WHERE id = :id",
            [{"sid": sid, "id": mid} for mid, sid in changed],
        )
    return [mid for mid, sid in changed if sid is None]


# ---------------------------------------------------------------- solvents


def add_solvent(
    database: Database,
    name: str,
    *,
    mp: str | float,
    bp: str | float,
    source: str,
    formula: str = "",
    deuterated: bool | None = None,
    spellings: Sequence[str] = (),
    actor: str,
    reason: str | None = None,
) -> dict[str, Any]:
    """Add a solvent with its melting and boiling points at 1 atm (texts with a unit, or
    kelvin) and where those values come from; links the measurements that name it."""
    name, formula, source = (name or "").strip(), (formula or "").strip(), (source or "").strip()
    if not fold(name):
        raise VocabularyError("solvent", name, "give the solvent's name")
    if not source:
        raise VocabularyError(
            "solvent",
            name,
            "give the source of the melting and boiling points (a handbook and its edition, a "
            "supplier's data sheet, a paper)",
        )
    mp_k, bp_k = _kelvin(mp, "melting point"), _kelvin(bp, "boiling point")
    if not mp_k < bp_k:
        raise VocabularyError(
            "solvent", name, f"the melting point ({mp_k:.2f} K) must be below the boiling "
            f"point ({bp_k:.2f} K)"
        )  # fmt: skip
    keys = _unique_keys([name, formula, *spellings])
    if deuterated is None:
        deuterated = bool(re.search(r"D(?![a-z])", formula) or re.search(r"-d\d+$", name))
    row = {"name": name, "formula": formula, "deuterated": deuterated, "mp_k": mp_k,
           "bp_k": bp_k, "source": source, "aliases": "|".join(keys)}  # fmt: skip

    def work(conn: Connection) -> dict[str, Any]:
        index, _ = read_reference_tables(conn)
        names = _solvent_names(conn)
        for key in keys:
            if key in index:
                raise VocabularyError(
                    "solvent", name, f"the spelling {key!r} already names {names[index[key]]}"
                )
        solvent_id = int(conn.insert("solvent", row, returning="id"))
        linked = _link(conn, set(keys), solvent_id)
        after = {**row, "measurements_linked": linked} if linked else dict(row)
        audit.record(conn, entity="solvent", entity_id=solvent_id, action="add-solvent",
                     actor=actor, before=None, after=after, reason=reason)  # fmt: skip
        return {**row, "id": solvent_id, "measurements_linked": linked}

    done = database.write(work)
    done.update(mp_text=_as_text(mp), bp_text=_as_text(bp), caution=_CAUTION)
    return done


#: what a liquid range is used for, and the usual caution (see registry.kinetics.safety)
_CAUTION = (
    "temperatures outside the liquid range are flagged by the checks; above the boiling point "
    f"only a pressure-rated sealed NMR tube within its rating may be used. {DEFER}"
)


def _as_text(value: str | float) -> str:
    return f"{value:g} K" if isinstance(value, (int, float)) else str(value).strip()


def _kelvin(value: str | float, what: str) -> float:
    """A temperature text with its unit (``-30.4 °C``), or a number in kelvin."""
    from registry.record.units import parse_value

    if isinstance(value, (int, float)):
        text = f"{value} K"
    else:
        text = str(value or "").strip()
        if not text:
            raise VocabularyError("solvent", "", f"give the {what} (e.g. '-30 °C')")
    try:
        kelvin = parse_value(text, "temperature", field=what).value
    except UnitError as exc:
        raise VocabularyError(what, text, exc.reason) from exc
    if not kelvin > 0:
        raise VocabularyError(what, text, "must be above absolute zero")
    return round(kelvin, 2)


def _unique_keys(spellings: Sequence[str]) -> list[str]:
    keys = []
    for spelled in spellings:
        key = fold(spelled)
        if key and key not in keys:
            keys.append(key)
    return keys


def list_solvents(database: Database) -> list[dict[str, Any]]:
    """The solvent table: name, formula, liquid range at 1 atm, its source, and every spelling
    (the table's and the stored aliases)."""
    with database.read() as conn:
        rows = conn.records(
            "SELECT id, name, formula, deuterated, mp_k, bp_k, source, aliases FROM solvent "
            "ORDER BY id"
        )
        stored = conn.rows("SELECT alias, target FROM vocab_alias WHERE kind = 'solvent'")
    extra: dict[str, list[str]] = {}
    for alias, target in stored:
        extra.setdefault(target, []).append(alias)
    for row in rows:
        row["spellings"] = [s for s in (row.pop("aliases") or "").split("|") if s]
        row["stored_aliases"] = extra.get(row["name"], [])
    return rows


def unlinked_solvents(database: Database) -> list[dict[str, Any]]:
    """Solvent texts of live measurements that name no solvent of the registry: each with how
    many measurements use it and the solvents a near spelling names."""
    with database.read() as conn:
        index, _ = read_reference_tables(conn)
        names = _solvent_names(conn)
        rows = conn.rows(
            "SELECT solvent_text, count(*) FROM measurement WHERE solvent_id IS NULL "
            "AND solvent_text IS NOT NULL AND status != 'retracted' GROUP BY solvent_text"
        )
    spellings = _solvent_spellings(index, names)
    out: dict[str, dict[str, Any]] = {}
    for text, count in sorted(rows, key=lambda r: str(r[0]).lower()):
        if not fold(text):
            continue
        entry = out.setdefault(
            fold(text),
            {"text": text, "measurements": 0,
             "suggestions": vocab.solvent_suggestions(text, spellings)},
        )  # fmt: skip
        entry["measurements"] += int(count)
    return sorted(out.values(), key=lambda e: (-e["measurements"], e["text"].lower()))
