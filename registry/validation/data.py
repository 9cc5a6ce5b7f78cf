"""Load what the rules need in bulk, as columns: one query per table, no ORM object per row.

:class:`CheckData` holds one pandas row per measurement (measurement, compound, process and
solvent columns, plus the coalescence observation the reported ΔG‡ refers to) and the rate
points as a long table. It also knows the unit each value was *reported* in, so findings can
speak the user's units (kcal/mol stays kcal/mol, °C stays °C).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field
from functools import cached_property, lru_cache

import numpy as np
import pandas as pd
from numpy.typing import NDArray

from registry.record import units
from registry.storage.connection import Connection

#: the leading number (with an optional "(3)" or "± 0.3" uncertainty) of a value as written
_NUMBER_PREFIX = (
    r"^\s*[-+−–]?(?:\d+(?:[.,]\d*)?|[.,]\d+)(?:[eE][-+]?\d+)?\s*(?:\(\d+\))?\s*"
    r"(?:(?:±|\+/-|\+-|\+/−)\s*(?:\d+(?:[.,]\d*)?|[.,]\d+)(?:[eE][-+]?\d+)?)?\s*"
)
_NUMBER = r"^\s*([-+]?(?:\d+(?:[.,]\d*)?|[.,]\d+)(?:[eE][-+]?\d+)?)"

_MEASUREMENT_COLUMNS = {
    "id": "m.id",
    "compound_id": "m.compound_id",
    "process_id": "m.process_id",
    "method": "m.method",
    "solvent_id": "m.solvent_id",
    "solvent_text": "m.solvent_text",
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
}

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

_FLOAT_COLUMNS = (
    "field_mhz",
    "t_min_k",
    "t_max_k",
    "dg_kj_mol",
    "dg_err_kj_mol",
    "dg_t_k",
    "dh_kj_mol",
    "dh_err_kj_mol",
    "ds_j_mol_k",
    "ds_err_j_mol_k",
    "ea_kj_mol",
    "ea_err_kj_mol",
    "mp_k",
    "bp_k",
    "tc_k",
    "tc_err_k",
    "dnu_hz",
    "dnu_err_hz",
    "j_hz",
    "population_ratio",
    "co_field_mhz",
)

#: the columns whose values make up a measurement's inputs hash
HASHED_COLUMNS = (
    "method",
    "solvent_text",
    "field_mhz",
    "t_min_k",
    "t_max_k",
    "dg_kj_mol",
    "dg_err_kj_mol",
    "dg_text",
    "dg_t_k",
    "dh_kj_mol",
    "dh_err_kj_mol",
    "dh_text",
    "ds_j_mol_k",
    "ds_err_j_mol_k",
    "ea_kj_mol",
    "ea_err_kj_mol",
    "ea_text",
    "mp_k",
    "bp_k",
    "structure_ok",
    "structure_problem",
    "nucleus",
    "tc_k",
    "tc_err_k",
    "tc_text",
    "dnu_hz",
    "dnu_err_hz",
    "j_hz",
    "population_ratio",
    "co_field_mhz",
    "co_count",
    "rate_count",
    "rate_sum_t",
    "rate_sum_lnk",
    "rate_sum_err",
)


@dataclass
class CheckData:
    """Every checked measurement as one row of ``m``; rate points in ``rates``."""

    m: pd.DataFrame
    rates: pd.DataFrame
    #: the measurements a repeat could be compared with (same compounds), all columns of ``m``
    #: that the comparison needs; for a full check this is ``m`` itself
    peers: pd.DataFrame | None = None
    _hash_cache: dict[int, str] = field(default_factory=dict)

    @cached_property
    def ids(self) -> NDArray[np.int64]:
        """Measurement ids in row order (``m`` is not changed after loading)."""
        return self.m["id"].to_numpy(dtype=np.int64)

    def col(self, name: str) -> NDArray[np.float64]:
        """A numeric column as floats (NaN for missing)."""
        return self.m[name].to_numpy(dtype=np.float64, na_value=np.nan)

    def text(self, name: str) -> NDArray[np.object_]:
        return self.m[name].to_numpy(dtype=object, na_value=None)

    def digests(self, positions: Sequence[int]) -> dict[int, str]:
        """A digest of everything the rules read about each measurement at ``positions``.

        ``pandas.util.hash_pandas_object`` hashes each row's values (exact float bits, texts)
        to 64 bits in one vectorized pass; the engine folds it into the finding's sha256.
        """
        todo = sorted({int(p) for p in positions} - self._hash_cache.keys())
        if todo:
            block = self.m[list(HASHED_COLUMNS)].iloc[todo]
            hashed = pd.util.hash_pandas_object(block, index=False).to_numpy()
            for p, h in zip(todo, hashed.tolist(), strict=True):
                self._hash_cache[p] = f"{h:016x}"
        return {int(p): self._hash_cache[int(p)] for p in positions}


def _fetch(conn: Connection, sql: str, ids: Sequence[int] | None, id_column: str) -> list[tuple]:  # type: ignore[type-arg]
    """All rows of ``sql`` (a query ending in WHERE …), only those of ``ids`` when given."""
    if ids is None:
        return conn.rows(sql)
    return conn.rows_where_in(sql, id_column, ids)


def _frame(rows: list, columns: list[str]) -> pd.DataFrame:  # type: ignore[type-arg]
    """Rows → DataFrame column by column (pandas' row-wise path probes each Row object)."""
    if not rows:
        return pd.DataFrame({c: pd.Series(dtype=object) for c in columns})
    return pd.DataFrame(dict(zip(columns, (list(v) for v in zip(*rows, strict=True)), strict=True)))


def covers_most(conn: Connection, ids: Sequence[int]) -> bool:
    """True when ``ids`` are at least half of all measurements (e.g. a first import).

    Reading the whole table in one pass and keeping ``ids`` is then cheaper than selecting
    them in thousands of ``IN (...)`` chunks.
    """
    total = conn.scalar("SELECT count(*) FROM measurement")
    return 2 * len(ids) >= total


def load_check_data(conn: Connection, ids: Sequence[int] | None = None) -> CheckData:
    """Read the measurements (all, or ``ids``) with their coalescence data and rate points."""
    wanted = None if ids is None else sorted({int(i) for i in ids})
    if wanted is not None and covers_most(conn, wanted):
        data = load_check_data(conn, None)
        keep = data.m["id"].isin(wanted)
        if bool(keep.all()):
            return data
        m = data.m[keep].reset_index(drop=True)
        rates = data.rates[data.rates["id"].isin(m["id"])].reset_index(drop=True)
        return CheckData(m=m, rates=rates, peers=data.peers)  # every live measurement
    ids = wanted
    mq = (
        f"SELECT {', '.join(_MEASUREMENT_COLUMNS.values())} FROM measurement m "
        "JOIN compound c ON c.id = m.compound_id "
        "LEFT OUTER JOIN process p ON p.id = m.process_id "
        "LEFT OUTER JOIN solvent s ON s.id = m.solvent_id WHERE m.status != 'retracted'"
    )
    m = _frame(_fetch(conn, mq, ids, "m.id"), list(_MEASUREMENT_COLUMNS))
    cq = f"SELECT {', '.join(_COALESCENCE_COLUMNS.values())} FROM coalescence co WHERE 1 = 1"
    co = _frame(_fetch(conn, cq, ids, "co.measurement_id"), list(_COALESCENCE_COLUMNS))
    rq = "SELECT measurement_id, t_k, k_per_s, k_err_per_s FROM rate_point WHERE 1 = 1"
    rates = _frame(_fetch(conn, rq, ids, "measurement_id"), ["id", "t_k", "k_per_s", "k_err_per_s"])
    m = m.sort_values("id", kind="stable").reset_index(drop=True)
    m = _attach_coalescence(m, co)
    m = _attach_rate_summary(m, rates)
    for name in _FLOAT_COLUMNS:
        m[name] = pd.to_numeric(m[name], errors="coerce").astype(np.float64)
    rates = rates[rates["id"].isin(m["id"])].reset_index(drop=True)
    for name in ("t_k", "k_per_s", "k_err_per_s"):
        rates[name] = pd.to_numeric(rates[name], errors="coerce").astype(np.float64)
    peers = m[list(PEER_COLUMNS)] if ids is None else _load_peers(conn, m)
    return CheckData(m=m, rates=rates, peers=peers)


#: what a repeated measurement is matched and compared on
PEER_COLUMNS = (
    "id",
    "compound_id",
    "process_id",
    "method",
    "solvent_id",
    "solvent_text",
    "dg_kj_mol",
    "dg_err_kj_mol",
    "dg_t_k",
)


def _load_peers(conn: Connection, m: pd.DataFrame) -> pd.DataFrame:
    """Every live measurement of the compounds in ``m`` (to find repeats of a checked one)."""
    query = f"SELECT {', '.join(PEER_COLUMNS)} FROM measurement WHERE status != 'retracted'"
    compound_ids = m["compound_id"].dropna().astype(int).unique().tolist()
    peers = _frame(_fetch(conn, query, compound_ids, "compound_id"), list(PEER_COLUMNS))
    for name in ("dg_kj_mol", "dg_err_kj_mol", "dg_t_k"):
        peers[name] = pd.to_numeric(peers[name], errors="coerce").astype(np.float64)
    return peers


def _attach_coalescence(m: pd.DataFrame, co: pd.DataFrame) -> pd.DataFrame:
    """The coalescence row the reported ΔG‡ refers to: the one whose Tc is nearest ΔG‡'s T."""
    if co.empty:
        for name in _COALESCENCE_COLUMNS:
            if name != "id":
                m[name] = np.nan
        m["co_count"] = 0
        return m
    co = co.merge(m[["id", "dg_t_k"]], on="id", how="inner")
    tc = pd.to_numeric(co["tc_k"], errors="coerce")
    dgt = pd.to_numeric(co["dg_t_k"], errors="coerce")
    co["_dist"] = (tc - dgt).abs().fillna(0.0)
    counts = co.groupby("id").size().rename("co_count")
    chosen = co.sort_values(["id", "_dist", "co_id"]).drop_duplicates("id")
    chosen = chosen.drop(columns=["_dist", "dg_t_k"])
    m = m.merge(chosen, on="id", how="left").merge(counts, on="id", how="left")
    m["co_count"] = m["co_count"].fillna(0).astype(np.int64)
    return m


def _attach_rate_summary(m: pd.DataFrame, rates: pd.DataFrame) -> pd.DataFrame:
    """Per-measurement sums of the rate points (for the inputs hash)."""
    if rates.empty:
        for name in ("rate_count", "rate_sum_t", "rate_sum_lnk", "rate_sum_err"):
            m[name] = 0.0
        return m
    r = rates.assign(
        lnk=np.log(pd.to_numeric(rates["k_per_s"], errors="coerce")),
        err=pd.to_numeric(rates["k_err_per_s"], errors="coerce").fillna(0.0),
    )
    agg = r.groupby("id").agg(
        rate_count=("t_k", "size"),
        rate_sum_t=("t_k", "sum"),
        rate_sum_lnk=("lnk", "sum"),
        rate_sum_err=("err", "sum"),
    )
    m = m.merge(agg, on="id", how="left")
    for name in ("rate_count", "rate_sum_t", "rate_sum_lnk", "rate_sum_err"):
        m[name] = m[name].fillna(0.0)
    return m


# --- the units values were reported in -------------------------------------------------------


def unit_part(texts: pd.Series) -> pd.Series:
    """What follows the number (and its uncertainty) in each text; NaN where there is no text."""
    cleaned = texts.astype(object).where(texts.notna(), None)
    s = pd.Series(cleaned, dtype="object")
    return s.str.replace(_NUMBER_PREFIX, "", regex=True).str.strip()


_KNOWN_LABELS = {
    "energy": (("kJ/mol", "kJ/mol"), ("kcal/mol", "kcal/mol")),
    "entropy": (("J/(mol*K)", "J/(mol·K)"), ("cal/(mol*K)", "cal/(mol·K)")),
}


@lru_cache(maxsize=256)
def _unit_label(unit_text: str, quantity: str) -> tuple[str, float] | None:
    """A display label and the factor from the canonical unit for a written unit, or None."""
    try:
        units.unit_of(unit_text, quantity)
        factor = units.convert(1.0, units.CANONICAL[quantity], unit_text)
    except Exception:
        return None
    for pint_unit, label in _KNOWN_LABELS.get(quantity, ()):
        if abs(factor - units.convert(1.0, units.CANONICAL[quantity], pint_unit)) < 1e-9:
            return label, factor
    return unit_text, factor


@lru_cache(maxsize=1)
def kcal_per_kj() -> float:
    """kcal/mol per kJ/mol (thermochemical calorie, via the unit registry)."""
    return units.convert(1.0, "kJ/mol", "kcal/mol")


def energy_units(texts: pd.Series, values_kj: pd.Series) -> tuple[NDArray, NDArray]:
    """Display label and factor (display = kJ/mol × factor) of each reported energy."""
    return value_units(texts, values_kj, "energy")


def value_units(texts: pd.Series, values: pd.Series, quantity: str) -> tuple[NDArray, NDArray]:
    """Display label and factor (display = canonical × factor) of each reported value.

    A text without a unit (the unit came from a spreadsheet header) is matched by the ratio of
    its number to the stored canonical value (kJ/mol or kcal/mol; J or cal per mol·K).
    """
    n = len(texts)
    known = _KNOWN_LABELS[quantity]
    labels = np.full(n, known[0][1], dtype=object)
    factors = np.ones(n)
    if n == 0:
        return labels, factors
    texts = texts.reset_index(drop=True)
    parts = unit_part(texts)
    for unit_text in parts.dropna().unique():
        if not unit_text:
            continue
        found = _unit_label(str(unit_text), quantity)
        if found is None:
            continue
        mask = (parts == unit_text).to_numpy()
        labels[mask] = found[0]
        factors[mask] = found[1]
    bare = (parts == "").to_numpy()
    if bare.any():
        numbers = pd.to_numeric(
            texts[bare].astype(str).str.extract(_NUMBER)[0].str.replace(",", "."),
            errors="coerce",
        ).to_numpy(dtype=float)
        stored = np.asarray(values, dtype=float)[bare]
        alt = units.convert(1.0, units.CANONICAL[quantity], known[1][0])
        with np.errstate(invalid="ignore", divide="ignore"):
            is_alt = np.abs(numbers / stored - alt) < 1e-3
        idx = np.flatnonzero(bare)[is_alt]
        labels[idx] = known[1][1]
        factors[idx] = alt
    return labels, factors


@lru_cache(maxsize=64)
def _temperature_map(unit_text: str) -> tuple[str, float, float] | None:
    """(label, offset, scale) so that display = offset + scale·K for a written temperature unit."""
    try:
        normal = units.unit_of(unit_text, "temperature")
        zero = units.convert(0.0, "K", normal)
        one = units.convert(1.0, "K", normal)
    except Exception:
        return None
    label = {"degC": "°C", "degF": "°F"}.get(normal, "K")
    return label, zero, one - zero


def temperature_units(texts: pd.Series) -> tuple[NDArray, NDArray, NDArray]:
    """Display label, offset and scale (display = offset + scale·K) of each reported temperature."""
    n = len(texts)
    labels = np.full(n, "K", dtype=object)
    offset = np.zeros(n)
    scale = np.ones(n)
    if n == 0:
        return labels, offset, scale
    parts = unit_part(texts.reset_index(drop=True))
    for unit_text in parts.dropna().unique():
        if not unit_text:
            continue
        found = _temperature_map(str(unit_text))
        if found is None or found[0] == "K":
            continue
        mask = (parts == unit_text).to_numpy()
        labels[mask] = found[0]
        offset[mask] = found[1]
        scale[mask] = found[2]
    return labels, offset, scale


def as_temperature(value_k: float, label: str) -> str:
    """A temperature for a message: '333.2 K' or '60.0 °C (333.2 K)'."""
    if label == "K" or value_k != value_k:
        return f"{value_k:.1f} K"
    shown = units.convert(value_k, "K", {"°C": "degC", "°F": "degF"}[label])
    return f"{shown:.1f} {label} ({value_k:.1f} K)"
