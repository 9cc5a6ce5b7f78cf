"""Measurements: add, show, list, edit, retract, rate points, history."""

from __future__ import annotations

import json
from collections.abc import Iterator, Mapping, Sequence
from contextlib import contextmanager
from typing import TYPE_CHECKING, Any

from registry.api.registry import actor_name
from registry.errors import FluxledgerError, NotFoundError, UnitError, UsageError
from registry.record.ids import as_id, as_ids
from registry.storage.connection import Connection, utc
from registry.storage.database import Database

if TYPE_CHECKING:  # imported lazily at run time: units (pint) and RDKit are slow to load
    from registry.record.entry import EntryInput, NormalizedEntry
    from registry.storage.writer import WriteResult
    from registry.validation import CheckReport


def _entry(entry: EntryInput | Mapping[str, Any]) -> EntryInput:
    from registry.record.entry import EntryInput

    if isinstance(entry, EntryInput):
        return entry
    return EntryInput(**dict(entry))


def add_measurement(
    database: Database,
    entry: EntryInput | Mapping[str, Any],
    *,
    actor: str | None = None,
    check: bool = True,
) -> int:
    """Add one measurement (and its compound/process if new), check it; returns its id.

    ``entry`` is an :class:`EntryInput` or a mapping of its fields (texts as reported, units
    in any usual notation). The write is one transaction of its own. The validation rules then
    run on the new row, so its findings are stored (``get_measurement(...)["findings"]``) — at
    once, or, inside :func:`deferred_checks`, once for all the rows added there when the block
    ends. ``check=False`` skips the check. The status is ``draft`` or ``reviewed``; the check
    sets ``flagged`` itself when it leaves an error finding open, so an entry cannot ask for it.
    """
    from registry.record.chem import structure_for
    from registry.storage.writer import cached_process_kinds, known_process_kinds, write_entries

    entry = _entry(entry)
    kinds = cached_process_kinds(database.key)
    normalized = None
    if kinds is not None:
        try:
            normalized = _normalized(entry, kinds)
        except FluxledgerError:  # perhaps a spelling someone stored since: read the registry's
            normalized = None
    if normalized is None:
        with database.read() as conn:
            kinds = known_process_kinds(conn)
        normalized = _normalized(entry, kinds)
    if normalized.measurement.get("status") == "flagged":
        raise UsageError(
            "status: 'flagged' is set by the checks while an error finding is open; "
            "add the measurement as draft or reviewed"
        )
    structure = structure_for(normalized.compound.get("smiles_input"))
    who = actor_name(actor)

    def work(conn: Connection) -> WriteResult:
        # the kinds were read before the lock; if someone added one since, normalize again
        current = known_process_kinds(conn)
        ready = normalized if current == kinds else _normalized(entry, current)
        return write_entries(conn, [ready], [structure], actor=who, extras=[entry.extra or None])

    result = database.write(work)
    if check and database.deferred_checks is not None:
        database.deferred_checks.extend(result.measurement_ids)
    elif check:
        from registry.validation import check_measurements

        check_measurements(database, result.measurement_ids, actor=who)
    return result.measurement_ids[0]


class DeferredChecks:
    """What a :func:`deferred_checks` block added, and the report of its one check."""

    def __init__(self) -> None:
        self.ids: list[int] = []
        self.report: CheckReport | None = None


@contextmanager
def deferred_checks(database: Database, *, actor: str | None = None) -> Iterator[DeferredChecks]:
    """Check the measurements added in this block once, when it ends, instead of after each add.

    For a script that adds rows one by one: each add still commits on its own (a crash keeps
    every row added so far), and the rules run over all of them in one pass on the way out —
    also when the block ends with an error, so no committed row stays unchecked.
    """
    if database.deferred_checks is not None:  # nested: the outer block checks everything
        yield DeferredChecks()
        return
    block = DeferredChecks()
    database.deferred_checks = block.ids
    try:
        yield block
    finally:
        database.deferred_checks = None
        if block.ids:
            from registry.validation import check_measurements

            block.report = check_measurements(database, block.ids, actor=actor_name(actor))


def _normalized(entry: EntryInput, kinds: tuple[str, ...]) -> NormalizedEntry:
    """The entry normalized, or the error a user sees (one problem: its field and text)."""
    from registry.record.entry import EntryError, normalize_entry

    normalized, problems = normalize_entry(entry, kinds)
    if normalized is None:
        if len(problems) == 1:
            first = problems[0]
            raise UnitError(first.field, first.text, first.reason)
        raise EntryError(problems)
    return normalized


# ---------------------------------------------------------------- reading


class Rows(list):  # type: ignore[type-arg]
    """Listing rows (one dict per measurement) that also convert to a pandas DataFrame."""

    def to_frame(self) -> Any:
        """The rows as a DataFrame, one column per listing column (pandas loads here)."""
        import pandas as pd

        from registry.record.fields import LISTING_COLUMNS

        columns = list(self[0]) if self else list(LISTING_COLUMNS)
        return pd.DataFrame.from_records(list(self), columns=columns)


def list_measurements(
    database: Database,
    *,
    ids: Sequence[int] | None = None,
    limit: int | None = None,
    sort: str | None = None,
    **filters: Any,
) -> Rows:
    """Measurements with their compound, filtered; retracted ones only when asked for.

    The filters are keywords: ``compound`` (label or name contains), ``method``, ``solvent`` (a
    name, an alias, a class such as ``chlorinated``, or a part of the text), ``process``,
    ``status``, ``barrier`` (a range as chemists write it: ``'>= 22 kcal/mol'``,
    ``'80-100 kJ/mol'``), ``barrier_min``/``barrier_max`` (texts with a unit, or floats in
    kJ/mol), ``include_retracted`` and ``flagged`` (True: only measurements with an error
    finding nobody accepted; False: only clean ones; see
    :func:`registry.search.filters.listing_filters`). Every row has ``flagged`` (1 or 0).
    ``at`` (a temperature: ``'298.15 K'``, ``'25 °C'``) adds ΔG‡ at that temperature to every
    row — ΔH‡ − TΔS‡ where both are stored, the reported ΔG‡ where it was quoted there —
    with its σ where the ΔH‡/ΔS‡ correlation is stored and whether it is extrapolated
    beyond the measured range (:mod:`registry.search.at_temperature`); the ``barrier``
    filters and the ``barrier`` sort then use it. ``sort``: ``id`` (default), ``barrier``,
    ``-barrier``, ``temperature``, ``-temperature``, ``compound``, ``solvent``, ``method``.
    The result is a list of dicts; ``.to_frame()`` gives a pandas DataFrame.
    """
    from registry.search.filters import listing_filters

    return _listing(
        database, listing_filters(**filters), None if ids is None else as_ids(ids), limit, sort
    )


def _listing(
    database: Database,
    filters: Any,
    ids: Sequence[int] | None,
    limit: int | None,
    sort: str | None = None,
) -> Rows:
    from registry.search.filters import listing_rows

    with database.read() as conn:
        return Rows(listing_rows(conn, filters, ids=ids, limit=limit, sort=sort))


def get_measurement(database: Database, measurement_id: int) -> dict[str, Any]:
    """Everything stored about one measurement: values, compound, process, data, findings,
    and ``flagged`` (True while an error finding is open: not resolved, not accepted)."""
    from registry.record.fields import LISTING_COLUMNS

    measurement_id = as_id(measurement_id)
    with database.read() as conn:
        m = conn.record("SELECT * FROM measurement WHERE id = :id", {"id": measurement_id})
        if m is None:
            raise NotFoundError(f"no measurement with id {measurement_id}")
        compound = (
            conn.record(
                "SELECT id, label, name, smiles_input, smiles_canonical, inchi, inchikey, "
                "formula, net_charge, structure_ok, structure_problem, notes, created_at "
                "FROM compound WHERE id = :id",
                {"id": m["compound_id"]},
            )
            or {}
        )
        process = solvent = None
        if m["process_id"]:
            process = conn.record("SELECT * FROM process WHERE id = :id", {"id": m["process_id"]})
        if m["solvent_id"]:
            solvent = conn.record("SELECT * FROM solvent WHERE id = :id", {"id": m["solvent_id"]})
        of = {"id": measurement_id}
        coalescence = conn.records(
            "SELECT * FROM coalescence WHERE measurement_id = :id ORDER BY id", of
        )
        rates = conn.records(
            "SELECT * FROM rate_point WHERE measurement_id = :id ORDER BY t_k, id", of
        )
        findings = conn.records(
            "SELECT * FROM validation_finding WHERE measurement_id = :id ORDER BY id", of
        )
        revisions = conn.scalar(
            "SELECT count(*) FROM revision WHERE entity = 'measurement' AND entity_id = :id", of
        )
        flagged = conn.scalar(
            f"SELECT {LISTING_COLUMNS['flagged']} FROM measurement m WHERE m.id = :id", of
        )
    for key in ("entered_at", "updated_at"):
        m[key] = utc(m[key])
    for f in findings:
        f["found_at"], f["accepted_at"] = utc(f["found_at"]), utc(f["accepted_at"])
    if compound:
        compound["created_at"] = utc(compound["created_at"])
    extra = json.loads(m.pop("extra_json") or "null")
    for rate in rates:  # the fit record a line-shape fit left, as an object
        rate["fit"] = json.loads(rate.pop("fit_json") or "null")
    from registry.record.conventions import recorded
    from registry.record.rawdata import raw_summary

    return {
        **m,
        "recorded": recorded(m),
        "raw_data": raw_summary(m),
        "at_298": _at_standard(m, rates),
        "extra": extra,
        "compound": compound,
        "process": process,
        "solvent": solvent,
        "coalescence": coalescence,
        "rate_points": rates,
        "findings": findings,
        "flagged": bool(flagged),
        "revision_count": int(revisions),
    }


def _at_standard(m: dict[str, Any], rates: list[dict[str, Any]]) -> dict[str, Any] | None:
    """ΔG‡ at 298.15 K from ΔH‡ − TΔS‡ (σ where the correlation is stored), None without
    both; ``extrapolated`` as in a listing with a common temperature."""
    from registry.search.at_temperature import DEFAULT_T_K, dg_at, extrapolated

    value, err = dg_at(
        m["dh_kj_mol"], m["ds_j_mol_k"], DEFAULT_T_K,
        dh_err=m["dh_err_kj_mol"], ds_err=m["ds_err_j_mol_k"], corr=m.get("dh_ds_corr"),
    )  # fmt: skip
    if value is None:
        return None
    lo, hi = m["t_min_k"], m["t_max_k"]
    if (lo is None or hi is None) and rates:
        lo, hi = min(r["t_k"] for r in rates), max(r["t_k"] for r in rates)
    return {
        "t_k": DEFAULT_T_K,
        "dg_kj_mol": value,
        "dg_err_kj_mol": err,
        "extrapolated": extrapolated(DEFAULT_T_K, lo, hi, "dh-ds"),
    }


# ---------------------------------------------------------------- changing


def add_rate_points(
    database: Database,
    measurement_id: int,
    points: Sequence[Mapping[str, Any]],
    *,
    actor: str | None = None,
    replace: bool = False,
) -> int:
    """Attach rate points (t_k, t_text, k_per_s, k_text, optional errors) to a measurement.

    A point may carry ``fit_json``, how its rate was obtained (a JSON object's text, as
    :func:`registry.lineshape.store_link.rate_points` writes it); it is kept with the point
    and in the history."""
    measurement_id = as_id(measurement_id)
    if not points:
        return 0
    rows = []
    for p in points:
        if not (p.get("k_per_s") and p["k_per_s"] > 0 and p.get("t_k") and p["t_k"] > 0):
            raise UnitError("rate point", str(p.get("k_text") or p), "k and T must be positive")
        rows.append(
            {
                "measurement_id": measurement_id,
                "t_k": float(p["t_k"]),
                "t_err_k": p.get("t_err_k"),
                "t_text": p.get("t_text") or f"{p['t_k']:g} K",
                "k_per_s": float(p["k_per_s"]),
                "k_err_per_s": p.get("k_err_per_s"),
                "k_text": p.get("k_text") or f"{p['k_per_s']:.6g} s-1",
                "fit_json": _fit_json(p.get("fit_json")),
            }
        )
    who = actor_name(actor)

    def work(conn: Connection) -> int:
        from registry.storage import audit
        from registry.storage.writer import history_rates

        of = {"id": measurement_id}
        if conn.scalar("SELECT id FROM measurement WHERE id = :id", of) is None:
            raise NotFoundError(f"no measurement with id {measurement_id}")
        before = history_rates(
            conn.records(
                "SELECT t_text, k_text, fit_json FROM rate_point WHERE measurement_id = :id "
                "ORDER BY id",
                of,
            )
        )
        if replace:
            conn.execute("DELETE FROM rate_point WHERE measurement_id = :id", of)
        conn.insert_many("rate_point", rows)
        after = ([] if replace else before) + history_rates(rows)
        audit.record(
            conn,
            entity="measurement",
            entity_id=measurement_id,
            action="rate-points",
            actor=who,
            before={"rates": before},
            after={"rates": after},
        )
        return len(rows)

    return database.write(work)


def _fit_json(text: Any) -> str | None:
    """A rate point's fit record: None, or the canonical text of a JSON object."""
    if text is None:
        return None
    from registry.lineshape.store_link import fit_json

    try:
        record = json.loads(text) if isinstance(text, str) else text
    except ValueError as exc:
        raise UsageError(f"rate point fit_json: not JSON ({exc})") from None
    if not isinstance(record, Mapping):
        raise UsageError("rate point fit_json: must be a JSON object")
    return fit_json(record)


def edit_measurement(
    database: Database,
    measurement_id: int,
    changes: Mapping[str, str | None] | Sequence[str],
    *,
    actor: str | None = None,
    reason: str | None = None,
) -> dict[str, Any]:
    """Change fields of one measurement; returns what changed, and its open findings.

    ``changes`` maps fields (``dg``, ``tc``, ``solvent`` …) to new texts in any notation
    (``None`` clears one), or is a list of ``FIELD=VALUE`` texts.
    """
    from registry.admin import edits

    measurement_id = as_id(measurement_id)
    if not isinstance(changes, Mapping):
        changes = edits.parse_assignments(list(changes))
    return edits.edit_measurement(
        database, measurement_id, changes, actor=actor_name(actor), reason=reason
    )


def retract_measurement(
    database: Database, measurement_id: int, reason: str, *, actor: str | None = None
) -> dict[str, Any]:
    """Hide a measurement from default listings; it stays stored, with who, when and why."""
    from registry.admin import edits

    return edits.retract_measurement(
        database, as_id(measurement_id), reason, actor=actor_name(actor)
    )


def history(
    database: Database, measurement_id: int | None = None, *, limit: int | None = 50
) -> list[dict[str, Any]]:
    """Revisions, oldest first: all of one measurement's (its findings' too), or the latest."""
    from registry.admin.history import history as revisions

    return revisions(
        database, None if measurement_id is None else as_id(measurement_id), limit=limit
    )


def summarize_change(action: str, before: Any, after: Any) -> str:
    """One line saying what a revision changed (texts as reported)."""
    from registry.admin.history import summarize

    return summarize(action, before, after)
