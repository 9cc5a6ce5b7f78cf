"""Pairs of a computed and a measured barrier of the same compound and process, at one temperature.

A computed ΔG‡ and a measured one compare only at the same temperature. Each side is brought to
the chosen temperature where it can be (:mod:`registry.search.at_temperature`: ΔH‡ − TΔS‡, or a
ΔG‡ quoted at that temperature); where one side cannot, the two still compare at the
temperature both were quoted at (within 1 K). Anything else is a pair that could not be aligned:
listed, with why, and left out of the statistics. Several measured values of one compound and
process count as their median. Measured values that are flagged (an error finding nobody
accepted) are left out unless asked for, as in every aggregate.
"""

from __future__ import annotations

import statistics
from dataclasses import dataclass
from typing import Any

from registry.search.at_temperature import AT_COLUMNS, SAME_T_K, finish_row
from registry.storage.database import Database

#: the columns read for each measurement (``measurement m``, ``compound c``, ``process p``)
_COLUMNS = {
    "id": "m.id", "compound_id": "m.compound_id", "compound": "c.label", "name": "c.name",
    "process": "p.kind", "method": "m.method", "dg_kj_mol": "m.dg_kj_mol",
    "dg_t_k": "m.dg_t_k", "reaction_order": "m.reaction_order",
    "theory_level": "m.theory_level", "theory_method": "m.theory_method",
    "theory_basis": "m.theory_basis", "theory_solvation": "m.theory_solvation",
    "standard_state": "m.standard_state",
}  # fmt: skip


@dataclass(frozen=True)
class Pair:
    """One computed barrier and the measured barrier(s) it is compared with."""

    computed_id: int
    measured_ids: tuple[int, ...]
    compound: str
    process: str | None
    level: str
    t_k: float | None  # the temperature both are compared at (None: not aligned)
    computed_kj_mol: float | None
    measured_kj_mol: float | None
    why_not: str | None = None  # why the pair could not be aligned

    @property
    def error_kj_mol(self) -> float | None:
        """computed − measured (kJ/mol) at ``t_k``."""
        if self.computed_kj_mol is None or self.measured_kj_mol is None:
            return None
        return self.computed_kj_mol - self.measured_kj_mol

    def to_dict(self) -> dict[str, Any]:
        return {
            "computed_id": self.computed_id, "measured_ids": list(self.measured_ids),
            "compound": self.compound, "process": self.process, "level": self.level,
            "T_K": self.t_k, "computed_kj_mol": self.computed_kj_mol,
            "measured_kj_mol": self.measured_kj_mol, "error_kj_mol": self.error_kj_mol,
            "not_aligned": self.why_not,
        }  # fmt: skip


def level_of(row: dict[str, Any]) -> str:
    """The level of theory a computed row names: as written, else its parts, else unspecified."""
    if row.get("theory_level"):
        return str(row["theory_level"])
    parts = "/".join(p for p in (row.get("theory_method"), row.get("theory_basis")) if p)
    if row.get("theory_solvation"):
        parts = f"{parts}, {row['theory_solvation']}" if parts else str(row["theory_solvation"])
    return parts or "level of theory not recorded"


def read_rows(database: Database, t_k: float, include_flagged: bool) -> list[dict[str, Any]]:
    """Every barrier not retracted, with ΔG‡ at ``t_k`` where it is known (finished rows)."""
    from registry.record.fields import OPEN_ERROR_SQL

    select = {**_COLUMNS, **AT_COLUMNS, "flagged": f"CASE WHEN {OPEN_ERROR_SQL} THEN 1 ELSE 0 END"}
    sql = (
        f"SELECT {', '.join(f'{v} AS {k}' for k, v in select.items())} FROM measurement m "
        "JOIN compound c ON c.id = m.compound_id LEFT OUTER JOIN process p ON p.id = m.process_id "
        "WHERE m.status <> 'retracted' AND (m.dg_kj_mol IS NOT NULL OR m.dh_kj_mol IS NOT NULL) "
        "ORDER BY m.id"
    )
    with database.read() as conn:
        rows = [finish_row(r) for r in conn.records(sql, {"at_t": t_k})]
    return [r for r in rows if r["method"] == "computed" or include_flagged or not r["flagged"]]


def make_pairs(rows: list[dict[str, Any]], t_k: float) -> tuple[list[Pair], int]:
    """Each computed row paired with the measured rows of its compound and process; and how
    many computed rows had no measured partner at all."""
    measured: dict[tuple[int, str | None], list[dict[str, Any]]] = {}
    for r in rows:
        if r["method"] != "computed":
            measured.setdefault((r["compound_id"], r["process"]), []).append(r)
    pairs, alone = [], 0
    for r in rows:
        if r["method"] != "computed":
            continue
        partners = measured.get((r["compound_id"], r["process"]))
        if not partners:
            alone += 1
            continue
        pairs.append(_aligned(r, partners, t_k))
    return pairs, alone


def _aligned(comp: dict[str, Any], partners: list[dict[str, Any]], t_k: float) -> Pair:
    """The pair at ``t_k`` if both sides are known there, else at the temperature both were
    quoted at, else not aligned (with why)."""
    name = comp["compound"] or comp["name"] or f"compound {comp['compound_id']}"
    base = dict(computed_id=comp["id"], compound=name, process=comp["process"],
                level=level_of(comp))  # fmt: skip
    at_t = [p for p in partners if p["dg_at_kj_mol"] is not None]
    if comp["dg_at_kj_mol"] is not None and at_t:
        return Pair(measured_ids=tuple(p["id"] for p in at_t), t_k=t_k,
                    computed_kj_mol=comp["dg_at_kj_mol"],
                    measured_kj_mol=statistics.median(p["dg_at_kj_mol"] for p in at_t),
                    **base)  # fmt: skip
    t_c = comp["dg_t_k"]
    same = [p for p in partners if t_c is not None and p["dg_t_k"] is not None
            and abs(p["dg_t_k"] - t_c) <= SAME_T_K and p["dg_kj_mol"] is not None]  # fmt: skip
    if same and comp["dg_kj_mol"] is not None:
        return Pair(measured_ids=tuple(p["id"] for p in same), t_k=t_c,
                    computed_kj_mol=comp["dg_kj_mol"],
                    measured_kj_mol=statistics.median(p["dg_kj_mol"] for p in same),
                    **base)  # fmt: skip
    temps = sorted({round(p["dg_t_k"]) for p in partners if p["dg_t_k"] is not None})
    quoted = ", ".join(f"{t} K" for t in temps) or "an unknown temperature"
    own = f"{t_c:.0f} K" if t_c is not None else "an unknown temperature"
    why = (f"computed at {own}, measured at {quoted}; without ΔH‡ and ΔS‡ on both sides they "
           f"cannot be brought to {t_k:.2f} K")  # fmt: skip
    return Pair(measured_ids=tuple(p["id"] for p in partners), t_k=None, computed_kj_mol=None,
                measured_kj_mol=None, why_not=why, **base)  # fmt: skip
