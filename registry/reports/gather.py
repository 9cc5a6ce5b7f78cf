"""What the figures, tables and pages need from the registry, read in a few queries.

Reads only; every function takes an open :class:`registry.storage.database.Database` and asks it
for SQL text through one :class:`~registry.storage.connection.Connection` snapshot (the same SQL
on SQLite and PostgreSQL; rows by many ids through ``rows_where_in``). Retracted measurements
are left out of overviews, tables and pages unless asked for, as in listings. Every row says
whether the measurement is flagged (an open error finding,
:data:`registry.record.fields.OPEN_ERROR_SQL`); overviews leave flagged values out unless
asked for.

numpy is imported on first use (a rate series is its arrays), so importing this module costs
nothing beyond the storage layer.
"""

from __future__ import annotations

import math
from collections import Counter, defaultdict
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING, Any

from registry.errors import DatabaseError, NotFoundError, UsageError
from registry.outputs import not_finite
from registry.record.fields import LISTING_COLUMNS
from registry.storage.connection import Connection
from registry.storage.database import Database

if TYPE_CHECKING:
    import numpy as np
    from numpy.typing import NDArray

    from registry.search.filters import Filters

#: the group of compounds that match no motif
NO_MOTIF = "(no motif)"
#: the group of measurements without a process kind
NO_KIND = "(no process kind)"


@dataclass(frozen=True)
class RateSeries:
    """The rate points of one measurement (or file), ready for :func:`registry.kinetics.fit_eyring`."""

    t_k: NDArray[np.float64]
    k_per_s: NDArray[np.float64]
    k_err_per_s: NDArray[np.float64] | None
    title: str
    #: open error findings of the measurement the points belong to: (finding id, rule id)
    open_errors: tuple[tuple[int, str], ...] = ()


def series_from_points(
    t_k: Sequence[float], k_per_s: Sequence[float], k_err: Sequence[float | None], title: str
) -> RateSeries:
    """Arrays for a fit; σ_k kept only when every point has a positive one (a weighted fit needs
    all of them; a partial set would silently weight some points and not others)."""
    import numpy as np

    err = np.array(k_err, dtype=float) if all(e and e > 0 for e in k_err) else None
    return RateSeries(np.array(t_k, dtype=float), np.array(k_per_s, dtype=float), err, title)


def not_finite_points(points: Sequence[Sequence[Any]]) -> str | None:
    """What is wrong when rate points (T, k, σk …) hold a number that is not finite — inf or
    nan, written into the registry behind fluxledger's back — else None."""
    odd = [str(i) for i, p in enumerate(points, start=1) if any(map(not_finite, p))]
    if not odd:
        return None
    return (
        f"rate point(s) {', '.join(odd)} (by temperature) hold a number that is not finite (inf "
        "or nan); no Eyring fit is drawn. 'fluxledger verify' lists such values"
    )


def rate_series(database: Database, measurement_id: int) -> RateSeries:
    """The stored rate points of a measurement, ordered by temperature."""
    of = {"id": measurement_id}
    with database.read() as conn:
        head = conn.first(
            "SELECT m.label, c.label, c.name FROM measurement m "
            "JOIN compound c ON c.id = m.compound_id WHERE m.id = :id",
            of,
        )
        if head is None:
            raise NotFoundError(f"no measurement with id {measurement_id}")
        points = conn.rows(
            "SELECT t_k, k_per_s, k_err_per_s FROM rate_point "
            "WHERE measurement_id = :id ORDER BY t_k, id",
            of,
        )
        errors = open_errors(conn, measurement_id)
    if len(points) < 2:
        raise UsageError(
            f"measurement {measurement_id} has {len(points)} rate point(s); an Eyring plot needs"
            " at least 2"
        )
    odd = not_finite_points(points)
    if odd:
        raise DatabaseError(f"measurement {measurement_id}: {odd}")
    series = series_from_points(
        [p[0] for p in points],
        [p[1] for p in points],
        [p[2] for p in points],
        measurement_title(measurement_id, *head),
    )
    return RateSeries(series.t_k, series.k_per_s, series.k_err_per_s, series.title, errors)


def open_errors(conn: Connection, measurement_id: int) -> tuple[tuple[int, str], ...]:
    """(finding id, rule id) of a measurement's open error findings (it is flagged if any)."""
    rows = conn.rows(
        "SELECT id, rule_id FROM validation_finding WHERE measurement_id = :id "
        "AND severity = 'error' AND accepted_by IS NULL ORDER BY id",
        {"id": measurement_id},
    )
    return tuple((int(i), str(r)) for i, r in rows)


def measurement_title(
    mid: int, m_label: str | None, c_label: str | None, c_name: str | None
) -> str:
    """``DEMO-1 (N,N-dimethylacetamide) [run 2]``: a default figure title, naming the compound
    as the group does; ``measurement 7`` only when the compound has neither label nor name."""
    who = " ".join(x for x in (c_label, f"({c_name})" if c_name else None) if x)
    return (who or f"measurement {mid}") + (f" [{m_label}]" if m_label else "")


def point_label(row: Mapping[str, Any]) -> str:
    """What a point on a figure is called: the compound's label, else its name, else the
    measurement's number."""
    return str(row.get("compound") or row.get("compound_name") or f"#{row['measurement_id']}")


_OBSERVED = (
    "SELECT m.id AS measurement_id, c.label AS compound, c.name AS compound_name, "
    "o.tc_k, o.dnu_hz, o.j_hz, coalesce(o.field_mhz, m.field_mhz) AS field_mhz, "
    "m.dg_kj_mol, m.dg_err_kj_mol, m.solvent_text, "
    f"{LISTING_COLUMNS['flagged']} AS flagged "
    "FROM coalescence o JOIN measurement m ON m.id = o.measurement_id "
    "JOIN compound c ON c.id = m.compound_id "
    "WHERE m.status != :retracted"
)


def observed_coalescence(
    database: Database, *, measurement_id: int | None = None, compound: str | None = None
) -> list[dict[str, Any]]:
    """Coalescence observations (field, Tc, Δν, the measurement's ΔG‡) of a measurement or of
    every measurement of the compounds whose label or name contains ``compound``."""
    if measurement_id is None and not compound:
        return []
    sql = _OBSERVED
    params: dict[str, Any] = {"retracted": "retracted"}
    with database.read() as conn:
        if measurement_id is not None:
            sql += " AND m.id = :id"
            params["id"] = measurement_id
        if compound:
            from registry.search.filters import _contains

            label = _contains("c.label", "compound", conn.dialect)
            name = _contains("c.name", "compound", conn.dialect)
            sql += f" AND ({label} OR {name})"
            params["compound"] = f"%{compound}%"
        rows = conn.records(sql + " ORDER BY m.id, o.id", params)
        if measurement_id is not None and not rows:
            found = conn.scalar("SELECT id FROM measurement WHERE id = :id", {"id": measurement_id})
            if found is None:
                raise NotFoundError(f"no measurement with id {measurement_id}")
    for r in rows:
        field = r["field_mhz"]
        r["dnu_ppm"] = r["dnu_hz"] / field if field else None
        r["label"] = point_label(r)
    return rows


def solvent_range(database: Database, text: str) -> dict[str, Any] | None:
    """The solvent table's liquid range (K) for a solvent as written, or None when unknown."""
    from registry.record import vocab

    key = vocab.solvent_key(text)
    with database.read() as conn:
        rows = conn.rows("SELECT name, formula, aliases, mp_k, bp_k FROM solvent ORDER BY id")
    for name, formula, aliases, mp_k, bp_k in rows:
        spellings = (name, formula, *(aliases or "").split("|"))
        if any(s and vocab.solvent_key(s) == key for s in spellings):
            return {"name": name, "formula": formula, "mp_k": mp_k, "bp_k": bp_k}
    return None


@dataclass(frozen=True)
class BarrierGroups:
    """ΔG‡ values (kJ/mol) per group, largest group first, with which of them are flagged.

    Flagged values are in ``values`` only when they were asked for; ``left_out`` counts the
    flagged values that were not, ``not_finite`` the stored values that are not numbers one
    can draw (inf or nan, written behind fluxledger's back), which are never drawn.
    """

    values: dict[str, list[float]]
    flagged: dict[str, list[bool]]
    left_out: int = 0
    not_finite: int = 0
    #: measurements drawn: each once, unless ``overlap`` (then ``points`` may be more)
    measurements: int = 0
    #: measurements whose compound matches more than one motif
    shared: int = 0
    #: True when a measurement is drawn under every motif its compound matches
    overlap: bool = False

    @property
    def points(self) -> int:
        return sum(len(v) for v in self.values.values())


def _groups(
    pairs: Mapping[str, list[tuple[float, bool]]],
    left_out: int,
    not_finite: int,
    measurements: int,
    shared: int = 0,
    overlap: bool = False,
) -> BarrierGroups:
    """Largest group first, then by name (a stable order: the same data give the same figure)."""
    kept = sorted(((k, v) for k, v in pairs.items() if v), key=lambda kv: (-len(kv[1]), kv[0]))
    return BarrierGroups(
        {k: [value for value, _ in v] for k, v in kept},
        {k: [flag for _, flag in v] for k, v in kept},
        left_out,
        not_finite,
        measurements,
        shared,
        overlap,
    )


def _barriers(
    conn: Connection, key: str, include_retracted: bool, include_flagged: bool
) -> tuple[list[tuple[Any, float, bool]], int, int]:
    """(key, ΔG‡, flagged) in id order, how many flagged values were left out, and how many
    values that are not finite."""
    sql = (
        f"SELECT {key}, m.dg_kj_mol, {LISTING_COLUMNS['flagged']} FROM measurement m "
        "LEFT OUTER JOIN process p ON p.id = m.process_id WHERE m.dg_kj_mol IS NOT NULL"
    )
    if not include_retracted:
        sql += " AND m.status != 'retracted'"
    found = [(k, float(dg), bool(flag)) for k, dg, flag in conn.rows(sql + " ORDER BY m.id")]
    rows = [r for r in found if math.isfinite(r[1])]
    if include_flagged:
        return rows, 0, len(found) - len(rows)
    kept = [r for r in rows if not r[2]]
    return kept, len(rows) - len(kept), len(found) - len(rows)


def barriers_by_kind(
    database: Database, *, include_retracted: bool = False, include_flagged: bool = False
) -> BarrierGroups:
    """ΔG‡ (kJ/mol) of every measurement that has one, grouped by process kind; flagged
    values only with ``include_flagged``."""
    groups: dict[str, list[tuple[float, bool]]] = defaultdict(list)
    with database.read() as conn:
        rows, left_out, odd = _barriers(conn, "p.kind", include_retracted, include_flagged)
    for kind, dg, flag in rows:
        groups[kind or NO_KIND].append((dg, flag))
    return _groups(groups, left_out, odd, len(rows))


def barriers_by_motif(
    database: Database,
    *,
    include_retracted: bool = False,
    include_flagged: bool = False,
    overlap: bool = False,
) -> BarrierGroups | None:
    """ΔG‡ grouped by structural motif when :mod:`registry.search` offers motif matching.

    Returns None when it does not (the caller falls back to process kinds). Each measurement
    is counted once: a compound that matches several motifs goes under the narrowest of them
    (the motif matching the fewest compounds, then by name), so ``biaryl-ortho`` keeps the
    ortho-substituted biaryls and ``biaryl`` the rest. With ``overlap`` it counts under each
    motif it matches (``shared`` says how many measurements are drawn more than once). A
    compound that matches none is in ``(no motif)``. Flagged values only with
    ``include_flagged``.
    """
    try:
        from registry import search
    except ImportError:  # structure search needs RDKit
        return None
    matcher = getattr(search, "motif_matches", None)
    if matcher is None:
        return None
    matches: dict[str, list[int]] = matcher(database)  # {motif name: [compound ids]}
    by_compound: dict[int, list[tuple[float, bool]]] = defaultdict(list)
    with database.read() as conn:
        rows, left_out, odd = _barriers(conn, "m.compound_id", include_retracted, include_flagged)
    for cid, dg, flag in rows:
        by_compound[int(cid)].append((dg, flag))
    owners = _motifs_of(matches, overlap)
    hits = Counter(int(cid) for ids in matches.values() for cid in set(ids))
    groups: dict[str, list[tuple[float, bool]]] = defaultdict(list)
    shared = 0
    for cid, pairs in by_compound.items():
        motifs = owners.get(cid) or [NO_MOTIF]
        shared += len(pairs) if hits[cid] > 1 else 0
        for motif in motifs:
            groups[motif].extend(pairs)
    return _groups(groups, left_out, odd, len(rows), shared, overlap)


def _motifs_of(matches: Mapping[str, Sequence[int]], overlap: bool) -> dict[int, list[str]]:
    """The motif(s) each compound is drawn under: every one it matches with ``overlap``, else
    the narrowest (fewest compounds in the registry match it; ties by name)."""
    order = sorted(matches, key=lambda m: (len(matches[m]), m))
    owners: dict[int, list[str]] = defaultdict(list)
    for motif in order:
        for cid in matches[motif]:
            if overlap or not owners[int(cid)]:
                owners[int(cid)].append(motif)
    return owners


# --- rows of measurements: tables and the HTML report ----------------------------------------

#: columns tables and pages need beyond the listing's
_DETAIL_COLUMNS = {
    "dh_err_kj_mol": "m.dh_err_kj_mol",
    "ds_err_j_mol_k": "m.ds_err_j_mol_k",
    "dg_text": "m.dg_text",
    "dh_text": "m.dh_text",
    "ds_text": "m.ds_text",
    "sites": "p.sites",
    "extra_json": "m.extra_json",
    # the solvent table's name for a linked solvent: tables footnote one name per solvent
    "solvent_name": "(SELECT s.name FROM solvent s WHERE s.id = m.solvent_id)",
}


def measurement_rows(
    database: Database,
    filters: Filters | None = None,
    *,
    include_retracted: bool = False,
    ids: Sequence[int] | None = None,
) -> list[dict[str, Any]]:
    """Listing rows (:data:`registry.record.fields.LISTING_COLUMNS`) plus ΔH‡/ΔS‡ errors, the
    texts as reported and the process's sites, ordered by id.

    ``filters`` are those of a listing (:func:`registry.search.filters.make_filters`); without
    them every measurement (retracted ones only with ``include_retracted``). ``ids`` narrows
    to those measurements.
    """
    from registry.search import filters as filtering

    chosen = filters or filtering.Filters(include_retracted=include_retracted)
    with database.read() as conn:
        rows = filtering.listing_rows(
            conn, chosen, ids=ids, columns={**LISTING_COLUMNS, **_DETAIL_COLUMNS}
        )
    for r in rows:
        r["extra"] = extra_columns(r.pop("extra_json", None))
    return rows


def extra_columns(stored: str | None) -> dict[str, Any]:
    """The group's own columns kept with a measurement (operator, notebook page, comments …:
    the spreadsheet columns fluxledger has no field for, stored as JSON in ``extra_json`` by
    the importer), header → value in the file's order; ``{}`` when none or unreadable."""
    import json

    if not stored:
        return {}
    try:
        found = json.loads(stored)
    except ValueError:
        return {}
    return {str(k): v for k, v in found.items()} if isinstance(found, dict) else {}


def extra_value(m: Mapping[str, Any], column: str) -> Any:
    """The value of one of the group's own columns (matched without regard to case)."""
    extra = m.get("extra") or {}
    if column in extra:
        return extra[column]
    key = column.casefold()
    return next((v for k, v in extra.items() if k.casefold() == key), None)


def registry_title(database: Database) -> str:
    """How pages name the registry: the SQLite file's name (never the folders above it: a
    report travels, and a home folder path says more than it should), or the server's
    database name (no host, user or password)."""
    if database.path is not None:
        return Path(database.path).name
    if database.is_sqlite:
        return "in-memory registry"
    from urllib.parse import urlsplit

    return urlsplit(database.name).path.lstrip("/") or "registry"


def measurements_for_report(
    database: Database, *, include_retracted: bool = False
) -> list[dict[str, Any]]:
    """Measurement rows with their coalescence observations, rate points and findings attached."""
    rows = measurement_rows(database, include_retracted=include_retracted)
    ids = [r["id"] for r in rows]
    with database.read() as conn:
        co = _by_measurement(conn, "coalescence", ids, "id")
        rates = _by_measurement(conn, "rate_point", ids, "t_k, id")
        findings = _by_measurement(conn, "validation_finding", ids, "id")
    for r in rows:
        r["coalescence"] = co.get(r["id"], [])
        r["rate_points"] = rates.get(r["id"], [])
        r["findings"] = findings.get(r["id"], [])
    return rows


def _by_measurement(
    conn: Connection, table: str, ids: Sequence[int], order: str
) -> dict[int, list[dict[str, Any]]]:
    """Rows of ``table`` (a name from this module, never user text) grouped by measurement id."""
    out: dict[int, list[dict[str, Any]]] = defaultdict(list)
    found = conn.records_where_in(f"SELECT * FROM {table} WHERE 1 = 1", "measurement_id", ids)
    keys = [k.strip() for k in order.split(",")]
    found.sort(key=lambda r: tuple(r[k] for k in keys))
    for r in found:
        out[r["measurement_id"]].append(r)
    return out


def compounds(database: Database, *, include_retracted: bool = False) -> list[dict[str, Any]]:
    """Every compound that has at least one (non-retracted) measurement, with its structure."""
    used = "SELECT compound_id FROM measurement"
    if not include_retracted:
        used += " WHERE status != 'retracted'"
    with database.read() as conn:
        return conn.records(f"SELECT * FROM compound WHERE id IN ({used}) ORDER BY id")
