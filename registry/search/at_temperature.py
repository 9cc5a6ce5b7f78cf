"""ΔG‡ at one chosen temperature, so that barriers measured at different temperatures compare.

A reported ΔG‡ belongs to the temperature it was measured at; two of them quoted 60 K apart
differ by 60 K·ΔS‡ even for the same process (ΔG‡ = ΔH‡ − TΔS‡, Eyring 1935). Where a
measurement stores ΔH‡ and ΔS‡, its ΔG‡ at any T is ΔH‡ − T·ΔS‡; where it does not, only a
ΔG‡ quoted at that temperature (within :data:`SAME_T_K`) is known there, and nothing else is
assumed. The listing columns this adds (SQL text with the parameter ``:at_t``, the same on
SQLite and PostgreSQL; :func:`finish` completes each row in Python):

* ``dg_at_kj_mol`` — ΔG‡ at ``at_t_k``; ``dg_at_from`` — ``dh-ds`` or ``reported``;
* ``dg_at_err_kj_mol`` — σ = √(σ_H² + T²σ_S² − 2T·r·σ_H·σ_S) with r the stored correlation of
  ΔH‡ and ΔS‡ (``dh_ds_corr``); without r it is not available (None): ΔH‡ and ΔS‡ from one
  Eyring fit are strongly positively correlated (r ≈ +0.99 is usual), so leaving r out would
  overstate σ many times over, and a guessed r would be invented;
* ``extrapolated`` — ``yes`` when T lies outside the measured range (T_min…T_max, else the
  rate points' range) by more than :data:`EXTRAPOLATION_SLACK_K`, ``no`` inside, ``unknown``
  when no range is stored.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from typing import Any

from registry.kinetics.constants import STANDARD_TEMPERATURE_K

#: the default common temperature: 25 °C
DEFAULT_T_K = STANDARD_TEMPERATURE_K
#: a ΔG‡ quoted this close to the chosen temperature counts as quoted at it (rounding of
#: 298 vs 298.15 K; common practice, no source)
SAME_T_K = 1.0
#: a temperature this far outside the measured range still counts as inside it (the range's
#: own rounding; common practice, no source)
EXTRAPOLATION_SLACK_K = 1.0

_FROM_DH_DS = "m.dh_kj_mol IS NOT NULL AND m.ds_j_mol_k IS NOT NULL"

#: ΔG‡ at :at_t (kJ/mol), over ``measurement m``
DG_AT_SQL = (
    f"(CASE WHEN {_FROM_DH_DS} THEN m.dh_kj_mol - :at_t * m.ds_j_mol_k / 1000.0 "
    f"WHEN m.dg_t_k IS NOT NULL AND abs(m.dg_t_k - :at_t) <= {SAME_T_K} THEN m.dg_kj_mol END)"
)

#: the columns a listing gains with a common temperature (finished by :func:`finish`)
AT_COLUMNS: dict[str, str] = {
    "dg_at_kj_mol": DG_AT_SQL,
    "at_t_k": "(:at_t + 0.0)",
    "dg_at_from": (
        f"(CASE WHEN {_FROM_DH_DS} THEN 'dh-ds' "
        f"WHEN m.dg_t_k IS NOT NULL AND abs(m.dg_t_k - :at_t) <= {SAME_T_K} THEN 'reported' END)"
    ),
    # T²σ_S² + σ_H² − 2T·r·σ_H·σ_S in (kJ/mol)², when every part is stored
    "_dg_at_var": (
        f"(CASE WHEN {_FROM_DH_DS} AND m.dh_err_kj_mol IS NOT NULL "
        "AND m.ds_err_j_mol_k IS NOT NULL AND m.dh_ds_corr IS NOT NULL THEN "
        "m.dh_err_kj_mol * m.dh_err_kj_mol "
        "+ (:at_t * m.ds_err_j_mol_k / 1000.0) * (:at_t * m.ds_err_j_mol_k / 1000.0) "
        "- 2.0 * :at_t * m.dh_ds_corr * m.dh_err_kj_mol * m.ds_err_j_mol_k / 1000.0 "
        "WHEN m.dg_t_k IS NOT NULL AND abs(m.dg_t_k - :at_t) <= "
        f"{SAME_T_K} THEN m.dg_err_kj_mol * m.dg_err_kj_mol END)"
    ),
    "_range_lo": (
        "(CASE WHEN m.t_min_k IS NOT NULL AND m.t_max_k IS NOT NULL THEN m.t_min_k "
        "ELSE (SELECT min(r.t_k) FROM rate_point r WHERE r.measurement_id = m.id) END)"
    ),
    "_range_hi": (
        "(CASE WHEN m.t_min_k IS NOT NULL AND m.t_max_k IS NOT NULL THEN m.t_max_k "
        "ELSE (SELECT max(r.t_k) FROM rate_point r WHERE r.measurement_id = m.id) END)"
    ),
}

#: what each finished row carries, in order
SHOWN = ("dg_at_kj_mol", "dg_at_err_kj_mol", "at_t_k", "dg_at_from", "extrapolated")


def finish_row(row: dict[str, Any]) -> dict[str, Any]:
    """Turn the helper columns of one row into σ and the extrapolation mark (see module)."""
    var = row.pop("_dg_at_var", None)
    lo, hi = row.pop("_range_lo", None), row.pop("_range_hi", None)
    row["dg_at_err_kj_mol"] = math.sqrt(max(var, 0.0)) if var is not None else None
    row["extrapolated"] = extrapolated(row.get("at_t_k"), lo, hi, row.get("dg_at_from"))
    return row


def extrapolated(
    t_k: float | None, lo: float | None, hi: float | None, source: str | None
) -> str | None:
    """``yes``/``no``/``unknown`` for ΔG‡ from ΔH‡ − TΔS‡ at ``t_k``; None for a reported ΔG‡
    (quoted at that temperature: nothing is extrapolated) or when there is no value."""
    if source != "dh-ds" or t_k is None:
        return None
    if lo is None or hi is None:
        return "unknown"
    outside = t_k < lo - EXTRAPOLATION_SLACK_K or t_k > hi + EXTRAPOLATION_SLACK_K
    return "yes" if outside else "no"


def finish(rows: list[dict[str, Any]]) -> list[dict[str, Any]]:
    return [finish_row(r) for r in rows]


def finish_tuples(
    columns: Sequence[str], table: list[tuple[Any, ...]]
) -> tuple[tuple[str, ...], list[tuple[Any, ...]]]:
    """:func:`finish_row` for rows kept as tuples (a search's table)."""
    names = list(columns)
    finished = [finish_row(dict(zip(names, t, strict=True))) for t in table]
    kept = [c for c in names if not c.startswith("_")]
    out = tuple(dict.fromkeys([*kept, "dg_at_err_kj_mol", "extrapolated"]))
    return out, [tuple(r.get(c) for c in out) for r in finished]


def dg_at(
    dh_kj_mol: float | None,
    ds_j_mol_k: float | None,
    t_k: float,
    *,
    dh_err: float | None = None,
    ds_err: float | None = None,
    corr: float | None = None,
) -> tuple[float | None, float | None]:
    """ΔG‡(T) = ΔH‡ − T·ΔS‡ and its σ (None without the correlation; see the module)."""
    if dh_kj_mol is None or ds_j_mol_k is None:
        return None, None
    value = dh_kj_mol - t_k * ds_j_mol_k / 1000.0
    if dh_err is None or ds_err is None or corr is None:
        return value, None
    ts = t_k * ds_err / 1000.0
    return value, math.sqrt(max(dh_err**2 + ts**2 - 2.0 * corr * dh_err * ts, 0.0))
