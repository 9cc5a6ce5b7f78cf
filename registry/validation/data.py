"""Load what the rules need, as numpy columns: one query per table, whatever the number of rows.

:class:`CheckData` holds one row per measurement checked (measurement, compound, process and
solvent columns, plus the coalescence observation the reported ΔG‡ refers to), the rate points
as a long table (:class:`RatePoints`), and the measurements a repeat may be compared with. The
same object serves a check of one added row and of a whole registry, so the same rule code
decides both, and gives the same findings and hashes.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field
from functools import cached_property
from typing import Any

import numpy as np
from numpy.typing import NDArray

from registry.storage.connection import Connection
from registry.validation import digest
from registry.validation.columns import (
    Floats,
    Ints,
    columns_of,
    group_extremes,
    group_sums,
    positions_in,
    take,
    to_floats,
)

_MEASUREMENT_COLUMNS = {
    "id": "m.id",
    "compound_id": "m.compound_id",
    "process_id": "m.process_id",
    "method": "m.method",
    "solvent_id": "m.solvent_id",
    "solvent_text": "m.solvent_text",
    # a computed value's level of theory: one compound's barrier at two levels is no repeat
    "theory_level": "m.theory_level",
    "theory_method": "m.theory_method",
    "theory_basis": "m.theory_basis",
    "theory_solvation": "m.theory_solvation",
    "field_mhz": "m.field_mhz",
    "t_min_k": "m.t_min_k",
    "t_min_text": "m.t_min_text",
    "t_max_k": "m.t_max_k",
    "t_max_text": "m.t_max_text",
    "dg_kj_mol": "m.dg_kj_mol",
    "dg_err_kj_mol": "m.dg_err_kj_mol",
    "dg_text": "m.dg_text",
    "dg_t_k": "m.dg_t_k",
    "dg_t_text": "m.dg_t_text",
    "dh_kj_mol": "m.dh_kj_mol",
    "dh_err_kj_mol": "m.dh_err_kj_mol",
    "dh_text": "m.dh_text",
    "ds_j_mol_k": "m.ds_j_mol_k",
    "ds_err_j_mol_k": "m.ds_err_j_mol_k",
    "ds_text": "m.ds_text",
    "ea_kj_mol": "m.ea_kj_mol",
    "ea_err_kj_mol": "m.ea_err_kj_mol",
    "ea_text": "m.ea_text",
    "solvent_name": "s.name",
    "mp_k": "s.mp_k",
    "bp_k": "s.bp_k",
    "compound_label": "c.label",
    "structure_ok": "c.structure_ok",
    "structure_problem": "c.structure_problem",
    "nucleus": "p.nucleus",
    # what the measurement records about its rate constant and temperatures (migration 0005)
    "k_convention": "m.k_convention",
    "path_degeneracy": "m.path_degeneracy",
    "kappa": "m.kappa",
    "reaction_order": "m.reaction_order",
    "concentration_m": "m.concentration_m",
    "dg_direction": "m.dg_direction",
    "t_calibration": "m.t_calibration",
    "t_calibration_err_k": "m.t_calibration_err_k",
    "dh_ds_corr": "m.dh_ds_corr",
}

_MEASUREMENT_SQL = (
    f"SELECT {', '.join(_MEASUREMENT_COLUMNS.values())} FROM measurement m "
    "JOIN compound c ON c.id = m.compound_id "
    "LEFT OUTER JOIN process p ON p.id = m.process_id "
    "LEFT OUTER JOIN solvent s ON s.id = m.solvent_id WHERE m.status != 'retracted'"
)

_COALESCENCE_COLUMNS = {
    "co_id": "co.id",
    "id": "co.measurement_id",
    "tc_k": "co.tc_k",
    "tc_err_k": "co.tc_err_k",
    "tc_text": "co.tc_text",
    "dnu_hz": "co.dnu_hz",
    "dnu_err_hz": "co.dnu_err_hz",
    "dnu_text": "co.dnu_text",
    "j_hz": "co.j_hz",
    "population_ratio": "co.population_ratio",
    "co_field_mhz": "co.field_mhz",
}

_COALESCENCE_SQL = (
    f"SELECT {', '.join(_COALESCENCE_COLUMNS.values())} FROM coalescence co WHERE 1 = 1"
)

_RATE_COLUMNS = ("point_id", "id", "t_k", "k_per_s", "k_err_per_s")
_RATE_SQL = "SELECT id, measurement_id, t_k, k_per_s, k_err_per_s FROM rate_point WHERE 1 = 1"

_FLOAT_COLUMNS = {
    "field_mhz", "t_min_k", "t_max_k", "dg_kj_mol", "dg_err_kj_mol", "dg_t_k", "dh_kj_mol",
    "dh_err_kj_mol", "ds_j_mol_k", "ds_err_j_mol_k", "ea_kj_mol", "ea_err_kj_mol", "mp_k",
    "bp_k", "tc_k", "tc_err_k", "dnu_hz", "dnu_err_hz", "j_hz", "population_ratio",
    "co_field_mhz", "t_k", "k_per_s", "k_err_per_s", "path_degeneracy", "kappa",
    "reaction_order", "concentration_m", "t_calibration_err_k", "dh_ds_corr",
}  # fmt: skip

#: the columns whose values make up a measurement's inputs hash, in hashing order, and how
#: each is hashed (see :mod:`.digest`)
HASHED_COLUMNS: dict[str, str] = {
    "method": "text",
    "solvent_text": "text",
    "field_mhz": "float",
    "t_min_k": "float",
    "t_max_k": "float",
    "dg_kj_mol": "float",
    "dg_err_kj_mol": "float",
    "dg_text": "text",
    "dg_t_k": "float",
    "dh_kj_mol": "float",
    "dh_err_kj_mol": "float",
    "dh_text": "text",
    "ds_j_mol_k": "float",
    "ds_err_j_mol_k": "float",
    "ea_kj_mol": "float",
    "ea_err_kj_mol": "float",
    "ea_text": "text",
    "mp_k": "float",
    "bp_k": "float",
    "structure_ok": "flag",
    "structure_problem": "text",
    "nucleus": "text",
    "tc_k": "float",
    "tc_err_k": "float",
    "tc_text": "text",
    "dnu_hz": "float",
    "dnu_err_hz": "float",
    "j_hz": "float",
    "population_ratio": "float",
    "co_field_mhz": "float",
    "co_count": "integer",
    "rate_count": "float",
    "rate_sum_t": "float",
    "rate_sum_lnk": "float",
    "rate_sum_err": "float",
}

#: columns added later (migration 0005), hashed after :data:`HASHED_COLUMNS` only for a
#: measurement that records any of them: every stored finding of a measurement that records
#: none keeps its hash (existing rows record none)
RECORDED_HASHED: dict[str, str] = {
    "k_convention": "text",
    "path_degeneracy": "float",
    "kappa": "float",
    "reaction_order": "float",
    "concentration_m": "float",
    "dg_direction": "text",
    "t_calibration": "text",
    "t_calibration_err_k": "float",
    "dh_ds_corr": "float",
}

#: what a repeated measurement is matched and compared on
PEER_COLUMNS = (
    "id",
    "compound_id",
    "process_id",
    "method",
    "solvent_id",
    "solvent_text",
    "theory_level",
    "theory_method",
    "theory_basis",
    "theory_solvation",
    "dg_kj_mol",
    "dg_err_kj_mol",
    "dg_t_k",
    "dh_kj_mol",
    "ds_j_mol_k",
    "t_min_k",
    "t_max_k",
)
#: live measurements of a compound that has another live one (only those can be repeats)
_PEER_SQL = (
    f"SELECT {', '.join(f'm.{c}' for c in PEER_COLUMNS)} FROM measurement m "
    "WHERE m.status != 'retracted' AND EXISTS (SELECT 1 FROM measurement o "
    "WHERE o.compound_id = m.compound_id AND o.id != m.id AND o.status != 'retracted')"
)


@dataclass(frozen=True)
class RatePoints:
    """The rate points of the checked measurements, grouped by measurement, in stored order."""

    #: row of :class:`CheckData` each point belongs to (ascending)
    pos: Ints
    t_k: Floats
    k_per_s: Floats
    k_err_per_s: Floats
    #: how many rows the :class:`CheckData` has (the number of groups)
    rows: int

    def __len__(self) -> int:
        return int(self.pos.size)

    @cached_property
    def t_sum_count(self) -> tuple[Floats, Ints]:
        return group_sums(self.pos, self.t_k, self.rows)

    @cached_property
    def t_extremes(self) -> tuple[Floats, Floats]:
        """Lowest and highest temperature of each measurement's points (NaN: no points)."""
        return group_extremes(self.pos, self.t_k, self.rows)

    @cached_property
    def count(self) -> Ints:
        """Number of points of each measurement."""
        return np.bincount(self.pos, minlength=self.rows).astype(np.int64)


@dataclass
class CheckData:
    """Every checked measurement as one row; numeric columns float64 (NaN = missing), the
    others object arrays (None = missing). Columns are read-only."""

    ids: Ints
    columns: dict[str, NDArray[Any]]
    rates: RatePoints
    #: the measurements a repeat could be compared with (same compounds, live), sorted by id:
    #: :data:`PEER_COLUMNS`; for a whole-registry check these are the checked rows themselves
    peers: dict[str, NDArray[Any]]
    _hash_cache: dict[int, str] = field(default_factory=dict, repr=False)

    def __len__(self) -> int:
        return int(self.ids.size)

    def col(self, name: str) -> Floats:
        """A numeric column as floats (NaN for missing)."""
        values = self.columns[name]
        return values if values.dtype == np.float64 else _as_floats(values)

    def text(self, name: str) -> NDArray[np.object_]:
        """A column as objects (None for missing)."""
        return self.columns[name]

    def positions(self, ids: Sequence[int] | Ints) -> Ints:
        """Row of each measurement id (-1 where it is not among the checked)."""
        return positions_in(self.ids, np.asarray(ids, dtype=np.int64))

    def digests(
        self, positions: Sequence[int], variant: frozenset[str] = frozenset()
    ) -> dict[int, str]:
        """A digest of everything the rules read about each measurement at ``positions``.

        ``variant`` names legacy forms of the digest (see :data:`LEGACY_VARIANTS`); the
        default is the form every check computes now.
        """
        if variant:
            return dict(zip(positions, _row_digests(self, list(positions), variant), strict=True))
        todo = sorted({int(p) for p in positions} - self._hash_cache.keys())
        if todo:
            self._hash_cache.update(zip(todo, _row_digests(self, todo, variant), strict=True))
        return {int(p): self._hash_cache[int(p)] for p in positions}


def _as_floats(values: NDArray[Any]) -> Floats:
    return to_floats(values.tolist())


#: Digests older checks stored for some rows, which the current form does not reproduce.
#: The checker used to build a data frame per run, whose column types depended on the batch:
#: when no checked row had coalescence data, Tc's text column held NaN floats instead of
#: missing texts ("tc-text-float"); when every checked row had rate points, their count was an
#: integer column instead of floats ("rate-count-int"). A one-row check of a measurement
#: without coalescence data (what ``add`` did) therefore stored another digest than a check of
#: the whole registry. A stored finding whose digest matches a legacy form of the current
#: inputs is the same finding: :func:`registry.validation.store.reconcile` keeps it.
LEGACY_VARIANTS: tuple[frozenset[str], ...] = (
    frozenset({"tc-text-float"}),
    frozenset({"rate-count-int"}),
    frozenset({"tc-text-float", "rate-count-int"}),
)


def _row_digests(data: CheckData, rows: list[int], variant: frozenset[str]) -> list[str]:
    """The digests of ``rows``: every hashed column hashed at once by kind (one pass over all
    texts, one over all floats), then folded per row in column order."""
    at = np.asarray(rows, dtype=np.int64)
    n = at.size
    names = list(HASHED_COLUMNS)
    kinds = dict(HASHED_COLUMNS)
    if "rate-count-int" in variant:
        kinds["rate_count"] = "integer"
    by_kind: dict[str, list[str]] = {}
    for name in names:
        by_kind.setdefault(kinds[name], []).append(name)
    hashed: dict[str, digest.U64] = {}
    floats = by_kind.get("float", [])
    if floats:
        block = digest.hash_floats(np.concatenate([data.columns[c][at] for c in floats]))
        hashed.update((c, block[k * n : (k + 1) * n]) for k, c in enumerate(floats))
    texts = by_kind.get("text", [])
    if texts:
        values = [v for c in texts for v in data.columns[c][at].tolist()]
        block = digest.hash_texts(values)
        hashed.update((c, block[k * n : (k + 1) * n]) for k, c in enumerate(texts))
        if "tc-text-float" in variant:
            tc = data.columns["tc_text"][at].tolist()
            missing = np.array([digest.is_missing(v) for v in tc], dtype=bool)
            hashed["tc_text"] = np.where(
                missing, digest.hash_floats(np.full(n, np.nan)), hashed["tc_text"]
            )
    for c in by_kind.get("integer", []):
        hashed[c] = digest.hash_integers(data.columns[c][at].astype(np.int64))
    for c in by_kind.get("flag", []):
        hashed[c] = digest.hash_flags(data.columns[c][at].tolist())
    base = digest.combine([hashed[c] for c in names], n)
    return [f"{h:016x}" for h in _with_recorded(data, at, base).tolist()]


def _with_recorded(data: CheckData, at: Ints, base: digest.U64) -> digest.U64:
    """The digests of rows that record a convention, calibration … (:data:`RECORDED_HASHED`)
    folded with those columns; the others unchanged."""
    texts = [c for c, kind in RECORDED_HASHED.items() if kind == "text"]
    floats = [c for c, kind in RECORDED_HASHED.items() if kind == "float"]
    present = np.zeros(at.size, dtype=bool)
    for c in floats:
        present |= ~np.isnan(data.columns[c][at])
    for c in texts:
        present |= np.array([v is not None for v in data.columns[c][at].tolist()], dtype=bool)
    if not present.any():
        return base
    n = at.size
    parts: dict[str, digest.U64] = {}
    block = digest.hash_floats(np.concatenate([data.columns[c][at] for c in floats]))
    parts.update((c, block[k * n : (k + 1) * n]) for k, c in enumerate(floats))
    values = [v for c in texts for v in data.columns[c][at].tolist()]
    block = digest.hash_texts(values)
    parts.update((c, block[k * n : (k + 1) * n]) for k, c in enumerate(texts))
    recorded = digest.combine([parts[c] for c in RECORDED_HASHED], n)
    return np.where(present, digest.combine([base, recorded], n), base)


# ---------------------------------------------------------------- loading


def _fetch(
    conn: Connection, sql: str, keys: Sequence[int] | None, key_column: str
) -> list[tuple[Any, ...]]:
    """All rows of ``sql`` (a query ending in WHERE …), only those with ``key_column`` in
    ``keys`` when given."""
    if keys is None:
        return conn.rows(sql)
    return conn.rows_where_in(sql, key_column, keys)


def load_check_data(conn: Connection, ids: Sequence[int] | None = None) -> CheckData:
    """Read the measurements (all live ones, or those of ``ids``) with their coalescence data,
    rate points and possible repeats."""
    wanted = None if ids is None else sorted({int(i) for i in ids})
    m = columns_of(
        _fetch(conn, _MEASUREMENT_SQL, wanted, "m.id"), list(_MEASUREMENT_COLUMNS), _FLOAT_COLUMNS
    )
    measurement_ids = m["id"].astype(np.int64)
    order = np.argsort(measurement_ids, kind="stable")
    m = take(m, order)
    measurement_ids = measurement_ids[order]
    co = columns_of(
        _fetch(conn, _COALESCENCE_SQL, wanted, "co.measurement_id"),
        list(_COALESCENCE_COLUMNS),
        _FLOAT_COLUMNS,
    )
    _attach_coalescence(m, measurement_ids, co)
    rates = _rate_points(
        columns_of(_fetch(conn, _RATE_SQL, wanted, "measurement_id"), _RATE_COLUMNS,
                   _FLOAT_COLUMNS),
        measurement_ids,
    )  # fmt: skip
    _attach_rate_summary(m, rates)
    if wanted is None:
        peers = {name: m[name] for name in PEER_COLUMNS}
    else:
        peers = _load_peers(conn, m["compound_id"])
    for values in m.values():
        values.flags.writeable = False
    return CheckData(ids=measurement_ids, columns=m, rates=rates, peers=peers)


def _load_peers(conn: Connection, compound_ids: NDArray[Any]) -> dict[str, NDArray[Any]]:
    """The live measurements of these compounds that could be a repeat (their compound has
    another live measurement), by id."""
    wanted = sorted({int(c) for c in compound_ids.tolist() if c is not None})
    floats = {"dg_kj_mol", "dg_err_kj_mol", "dg_t_k", "dh_kj_mol", "ds_j_mol_k", "t_min_k",
              "t_max_k"}  # fmt: skip
    peers = columns_of(_fetch(conn, _PEER_SQL, wanted, "m.compound_id"), PEER_COLUMNS, floats)
    return take(peers, np.argsort(peers["id"].astype(np.int64), kind="stable"))


def _attach_coalescence(m: dict[str, Any], ids: Ints, co: dict[str, Any]) -> None:
    """The coalescence row the reported ΔG‡ refers to: the one whose Tc is nearest ΔG‡'s T
    (ties: the first stored); and how many coalescence rows each measurement has."""
    n = ids.size
    pos = positions_in(ids, co["id"].astype(np.int64))
    mine = np.flatnonzero(pos >= 0)
    pos = pos[mine]
    with np.errstate(invalid="ignore"):
        distance = np.abs(co["tc_k"][mine] - m["dg_t_k"][pos])
    distance = np.where(np.isnan(distance), 0.0, distance)
    co_id = co["co_id"][mine].astype(np.int64)
    order = np.lexsort((co_id, distance, pos))
    first = order[np.r_[True, pos[order][1:] != pos[order][:-1]]] if order.size else order
    chosen_rows, chosen_pos = mine[first], pos[first]
    for name in _COALESCENCE_COLUMNS:
        if name in ("id", "co_id"):
            continue
        values = co[name]
        out = np.full(n, np.nan if values.dtype == np.float64 else None, dtype=values.dtype)
        out[chosen_pos] = values[chosen_rows]
        m[name] = out
    m["co_count"] = np.bincount(pos, minlength=n).astype(np.int64)


def _rate_points(r: dict[str, Any], ids: Ints) -> RatePoints:
    """Rate points of the checked measurements, by measurement and then in stored order."""
    pos = positions_in(ids, r["id"].astype(np.int64))
    keep = np.flatnonzero(pos >= 0)
    point_id = r["point_id"][keep].astype(np.int64)
    order = keep[np.lexsort((point_id, pos[keep]))]
    return RatePoints(
        pos=pos[order],
        t_k=r["t_k"][order],
        k_per_s=r["k_per_s"][order],
        k_err_per_s=r["k_err_per_s"][order],
        rows=ids.size,
    )


def _attach_rate_summary(m: dict[str, Any], rates: RatePoints) -> None:
    """Per-measurement count and sums of the rate points (for the inputs hash)."""
    m["rate_count"] = rates.count.astype(np.float64)
    m["rate_sum_t"] = rates.t_sum_count[0]
    with np.errstate(invalid="ignore", divide="ignore"):
        lnk = np.log(rates.k_per_s)
    m["rate_sum_lnk"] = group_sums(rates.pos, lnk, rates.rows)[0]
    err = np.where(np.isnan(rates.k_err_per_s), 0.0, rates.k_err_per_s)
    m["rate_sum_err"] = group_sums(rates.pos, err, rates.rows)[0]
