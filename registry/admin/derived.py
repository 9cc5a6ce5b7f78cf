"""Findings and statuses are derived data: what the history and the rules account for.

A finding is what the validation rules give for a measurement; nothing but a check run writes
one, and no revision names each finding (a check run records one revision for the whole run).
So ``verify`` holds the stored findings against what can be derived again, and only where that
is sound:

* **acceptances** — every acceptance is a revision naming the finding, its measurement, rule
  and version, by whom and why; an ``accepted_by`` or reason the last recorded acceptance does
  not give was written by hand;
* **statuses follow findings** — since fluxledger records the rule versions of a check of the
  whole registry (its revision's ``rules``), every writer keeps a measurement ``flagged``
  exactly while an error finding is open (:mod:`registry.validation.store`). After the first
  such check, a status out of step is a problem; before it (registries checked by an older
  fluxledger, which did not keep statuses in step) it is only counted in a note;
* **the stored findings are the rules' findings** — the rules are run in memory with the
  registry's own settings (a view: nothing is written) and compared with what is stored, for
  each measurement nothing has changed since the last recorded check of the whole registry:
  no revision of it or of another measurement of its compound since, no vocabulary change or
  compound move since, and the rules at the versions that check recorded. A finding inserted,
  deleted or rewritten by hand there shows. Where the data changed since (an ``add`` without a
  check, an edit whose check was interrupted, a newer fluxledger with other rules), the stored
  findings are legitimately behind and are not compared; the output says so.
"""

from __future__ import annotations

from collections.abc import Iterable
from dataclasses import dataclass, field
from typing import Any

from registry.admin.replay import History, plural, same
from registry.storage.connection import Connection

_OPEN_ERROR = "severity = 'error' AND accepted_by IS NULL"
#: columns of a stored finding the rules give again for the same inputs
_COMPARED = ("severity", "message", "reported", "recomputed", "difference")


@dataclass
class Derived:
    """The problems, notes and a one-line summary of the findings check."""

    problems: list[str] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)
    detail: list[str] = field(default_factory=list)


def acceptance_problems(conn: Connection, history: History) -> list[str]:
    """Accepted findings whose acceptance the history does not record as it is stored."""
    out: list[str] = []
    for fid, mid, who, reason, rule, version in conn.rows(
        "SELECT id, measurement_id, accepted_by, accept_reason, rule_id, rule_version "
        "FROM validation_finding WHERE accepted_by IS NOT NULL ORDER BY id"
    ):
        recorded = history.acceptances.get(fid)
        if recorded is None or recorded[1] != who:
            out.append(
                f"finding {fid} of measurement {mid} is accepted by {who!r} without a recorded "
                "acceptance"
            )
            continue
        rid, _actor, of, body, why = recorded
        if (of, body.get("rule"), body.get("rule_version")) not in ((mid, rule, version),):
            out.append(
                f"finding {fid} of measurement {mid} ({rule}, version {version}) is accepted, but "
                f"revision {rid} accepted {body.get('rule')}, version "
                f"{body.get('rule_version')}, of measurement {of}: changed without a revision"
            )
        elif not same(reason, why):
            out.append(
                f"finding {fid} of measurement {mid}: accept_reason is {reason!r} but revision "
                f"{rid} recorded {why!r}: changed without a revision"
            )
    return out


def findings_check(conn: Connection, history: History) -> Derived:
    """Statuses against the findings, and the stored findings against the rules."""
    result = Derived()
    marked = [rid for rid, after in history.check_runs if "rules" in after]
    _statuses(conn, marked[0] if marked else None, result)
    _against_rules(conn, history, result)
    return result


# ---------------------------------------------------------------- statuses follow findings


def _statuses(conn: Connection, since: int | None, result: Derived) -> None:
    from registry.validation.store import out_of_step

    wrong = out_of_step(conn)
    result.detail.append("statuses follow the findings")
    if not wrong:
        return
    open_errors: dict[int, list[tuple[int, str]]] = {}
    for mid, fid, rule in conn.rows_where_in(
        f"SELECT measurement_id, id, rule_id FROM validation_finding WHERE {_OPEN_ERROR}",
        "measurement_id",
        [int(m) for m, _ in wrong],
    ):
        open_errors.setdefault(int(mid), []).append((int(fid), rule))
    cases = [(int(mid), status, sorted(open_errors.get(int(mid), []))) for mid, status in wrong]
    cases.sort()
    if since is not None:
        result.problems += [_out_of_step(*case) for case in cases]
        return
    mid, status, errors = cases[0]
    state = f"{status} with error finding {_named(errors)} open" if errors else "flagged"
    result.notes.append(
        f"{len(cases)} measurement(s) whose status does not follow the findings (the first: "
        f"measurement {mid}, {state}); no check of the whole registry by a fluxledger that "
        "keeps statuses in step is recorded, so this is not taken for a change by hand; "
        "'fluxledger check' puts them in step"
    )


def _named(errors: list[tuple[int, str]]) -> str:
    return ", ".join(f"{fid} [{rule}]" for fid, rule in errors)


def _out_of_step(mid: int, status: str, open_errors: list[tuple[int, str]]) -> str:
    rerun = "or an edit stopped before its check: 'fluxledger check' puts it in step"
    if status == "flagged":
        return (
            f"measurement {mid}: status is 'flagged' but no error finding is open: one was "
            f"removed or accepted without fluxledger ({rerun})"
        )
    return (
        f"measurement {mid}: status is {status!r} while error finding {_named(open_errors)} is "
        "open: "
        f"changed without a revision ({rerun})"
    )


# ---------------------------------------------------------------- stored findings vs the rules


def _against_rules(conn: Connection, history: History, result: Derived) -> None:
    from registry.validation import RULES

    runs = [(rid, after) for rid, after in history.check_runs if "rules" in after]
    if not runs:
        result.detail.append(
            "stored findings not derived again: no check of the whole registry has recorded "
            "its rules yet"
        )
        return
    since, after = runs[-1]
    if after["rules"] != {r.id: r.version for r in RULES}:
        result.notes.append(
            f"the last check of the whole registry (revision {since}) ran other rule versions "
            "than this fluxledger's, so the stored findings are not derived again; "
            "'fluxledger check' brings them up to date"
        )
        return
    later = [rid for rid in history.widening if rid > since]
    if later:
        result.notes.append(
            f"the vocabulary or a compound changed (revision {later[0]}) since the last check "
            f"of the whole registry (revision {since}): the stored findings are not derived "
            "again; run 'fluxledger check', then verify"
        )
        return
    clean = _unchanged_since(conn, history, since)
    result.detail.append(
        f"findings of {plural(len(clean), 'measurement')} derived again (unchanged since the "
        f"check of revision {since})"
    )
    if clean:
        result.problems += _compare(conn, clean, since)


def _unchanged_since(conn: Connection, history: History, since: int) -> set[int]:
    """Measurements created before revision ``since`` that no revision touched after it, nor
    another measurement of their compound (the rules compare repeats within a compound)."""
    rows = conn.rows("SELECT id, compound_id FROM measurement")
    states = history.measurements
    dirty = {mid for mid, rid in history.touched.items() if rid > since}
    dirty_compounds = {cid for mid, cid in rows if mid in dirty}
    return {
        mid
        for mid, cid in rows
        if mid not in dirty
        and cid not in dirty_compounds
        and mid in states
        and (states[mid].created or since) < since
    }


def _compare(conn: Connection, clean: set[int], since: int) -> list[str]:
    from registry.validation import CheckConfig
    from registry.validation.data import load_check_data
    from registry.validation.engine import run_rules

    derived: dict[tuple[int, str, int, str | None], Any] = {}
    for f in run_rules(load_check_data(conn), CheckConfig()):
        if f.measurement_id in clean:
            derived.setdefault((f.measurement_id, f.rule_id, f.rule_version, f.inputs_hash), f)
    stored: dict[tuple[int, str, int, str | None], dict[str, Any]] = {}
    out: list[str] = []
    for row in conn.records(
        "SELECT id, measurement_id, rule_id, rule_version, inputs_hash, "
        f"{', '.join(_COMPARED)} FROM validation_finding ORDER BY id"
    ):
        if row["measurement_id"] not in clean:
            continue
        key = (row["measurement_id"], row["rule_id"], row["rule_version"], row["inputs_hash"])
        if key in stored or key not in derived:
            out.append(
                f"finding {row['id']} of measurement {row['measurement_id']} ({row['rule_id']}: "
                f"{row['message']!r}) is stored, but the rules do not give it for the measurement "
                f"unchanged since the check of revision {since}: written without fluxledger"
            )
            continue
        stored[key] = row
        out += _differences(row, derived[key])
    for key, f in derived.items():
        if key not in stored:
            out.append(
                f"measurement {key[0]}: the rules give {f.rule_id} ({f.message!r}) but no such "
                f"finding is stored, though nothing changed since the check of revision {since}: "
                "deleted without fluxledger"
            )
    return sorted(out, key=_by_measurement)


def _differences(row: dict[str, Any], finding: Any) -> Iterable[str]:
    for column in _COMPARED:
        if not same(row[column], getattr(finding, column)):
            yield (
                f"finding {row['id']} of measurement {row['measurement_id']}: {column} is "
                f"{row[column]!r} but the rules give {getattr(finding, column)!r} for the same "
                "inputs: changed without fluxledger"
            )


def _by_measurement(problem: str) -> tuple[int, str]:
    words = problem.split()
    number = words[1] if words[0] == "measurement" else words[4]
    return int(number.rstrip(":")), problem
