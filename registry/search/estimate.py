"""A first estimate of a new compound's barrier from its nearest measured neighbours.

Similarity is the Tanimoto coefficient of Morgan fingerprints (radius 2, 2048 bits; Rogers &
Hahn, J. Chem. Inf. Model. 2010) — the one :mod:`.similarity` uses for ``find --similar``, so
the neighbours an estimate names are the compounds such a search returns. Each neighbour's
barrier is the median of its measured ΔG‡ values (clean ones: a flagged value is left out, as in
every aggregate; computed barriers are not measurements); the estimate is their mean weighted by
similarity cubed, so that a close analogue counts far more than a distant one, and its spread
is the weighted standard deviation of the neighbours' barriers around it. It is a planning
number: a structural neighbour's barrier, not a prediction with a model behind it.
"""

from __future__ import annotations

import math
import statistics
from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import Any

from registry.errors import UsageError
from registry.storage.database import Database

#: how strongly similarity weights a neighbour (w = similarity ** WEIGHT_POWER)
WEIGHT_POWER = 3
#: a nearest neighbour less similar than this makes the estimate "rough"
CLOSE_SIMILARITY = 0.5


@dataclass(frozen=True)
class Neighbour:
    """One measured compound near the query, with the barrier it contributes."""

    compound_id: int
    compound: str
    smiles: str | None
    similarity: float
    dg_kj_mol: float
    measurements: int
    temperatures_k: tuple[float, ...]
    methods: tuple[str, ...]
    processes: tuple[str, ...]

    def to_dict(self) -> dict[str, Any]:
        return {
            "compound_id": self.compound_id,
            "compound": self.compound,
            "smiles": self.smiles,
            "similarity": self.similarity,
            "dg_kj_mol": self.dg_kj_mol,
            "measurements": self.measurements,
            "temperatures_K": list(self.temperatures_k),
            "methods": list(self.methods),
            "processes": list(self.processes),
        }


@dataclass(frozen=True)
class Estimate:
    """The neighbours and the barrier they suggest (None when there are none)."""

    smiles: str
    neighbours: tuple[Neighbour, ...]
    dg_kj_mol: float | None
    spread_kj_mol: float | None
    already_measured: tuple[int, ...] = ()
    notes: tuple[str, ...] = field(default=())

    def to_dict(self) -> dict[str, Any]:
        return {
            "smiles": self.smiles,
            "dg_kj_mol": self.dg_kj_mol,
            "spread_kj_mol": self.spread_kj_mol,
            "similarity": f"Tanimoto, Morgan radius 2, 2048 bits; weights similarity^{WEIGHT_POWER}",
            "neighbours": [n.to_dict() for n in self.neighbours],
            "already_measured": list(self.already_measured),
            "notes": list(self.notes),
        }


def estimate(
    database: Database,
    smiles: str,
    *,
    process: str | None = None,
    motif_ids: Sequence[int] | None = None,
    neighbours: int = 5,
    min_similarity: float = 0.3,
    include_flagged: bool = False,
    exclude_ids: Sequence[int] = (),
) -> Estimate:
    """The ``neighbours`` most similar measured compounds (of ``process``, and among
    ``motif_ids`` when given) and their similarity-weighted barrier.

    ``exclude_ids`` are compounds left out (a leave-one-out benchmark leaves out the compound
    itself); a compound with the query's own structure is never a neighbour, and is named."""
    from registry.record.chem import read_structure
    from registry.search.engine import find
    from registry.search.filters import make_filters

    if neighbours < 1:
        raise UsageError(f"neighbours {neighbours}: give a whole number from 1")
    if not 0.0 < min_similarity <= 1.0:
        raise UsageError(f"min_similarity {min_similarity}: give a number in (0, 1]")
    own_key = read_structure(smiles).inchikey
    filters = make_filters(process=process, flagged=None if include_flagged else False)
    found = find(database, similar=smiles, min_similarity=min_similarity, filters=filters)
    wanted = None if motif_ids is None else set(motif_ids)
    skip = set(exclude_ids)
    by_compound: dict[int, list[dict[str, Any]]] = {}
    for row in found.rows:
        usable = row["dg_kj_mol"] is not None and row["method"] != "computed"
        cid = row["compound_id"]
        if usable and cid not in skip and (wanted is None or cid in wanted):
            by_compound.setdefault(cid, []).append(row)
    same = _same_structure(database, list(by_compound), own_key)
    chosen = sorted(
        (_neighbour(rows) for cid, rows in by_compound.items() if cid not in same),
        key=lambda n: (-n.similarity, n.compound_id),
    )[:neighbours]
    already = tuple(sorted(r["id"] for cid in same for r in by_compound[cid]))
    return _weighted(smiles, chosen, already, min_similarity, process)


def _neighbour(rows: list[dict[str, Any]]) -> Neighbour:
    first = rows[0]
    return Neighbour(
        compound_id=int(first["compound_id"]),
        compound=first["compound"] or first["compound_name"] or f"compound {first['compound_id']}",
        smiles=first["smiles"],
        similarity=float(first["similarity"]),
        dg_kj_mol=float(statistics.median(r["dg_kj_mol"] for r in rows)),
        measurements=len(rows),
        temperatures_k=tuple(sorted({float(r["dg_t_k"]) for r in rows if r["dg_t_k"]})),
        methods=tuple(sorted({r["method"] for r in rows if r["method"]})),
        processes=tuple(sorted({r["process"] for r in rows if r["process"]})),
    )


def _same_structure(database: Database, ids: list[int], inchikey: str | None) -> set[int]:
    """The compounds among ``ids`` with the query's own structure (same InChIKey)."""
    if not ids or not inchikey:
        return set()
    with database.read() as conn:
        rows = conn.rows_where_in(
            "SELECT id, inchikey FROM compound WHERE 1 = 1", "id", ids, {}
        )  # fmt: skip
    return {int(cid) for cid, key in rows if key == inchikey}


def _weighted(
    smiles: str,
    chosen: list[Neighbour],
    already: tuple[int, ...],
    min_similarity: float,
    process: str | None,
) -> Estimate:
    notes: list[str] = []
    if already:
        ids = ", ".join(str(i) for i in already)
        notes.append(f"this structure is already measured (measurement {ids}); left out here")
    if not chosen:
        where = f" of process {process}" if process else ""
        notes.append(
            f"no measured compound{where} is at least {min_similarity:g} similar: no estimate"
        )
        return Estimate(smiles, (), None, None, already, tuple(notes))
    weights = [n.similarity**WEIGHT_POWER for n in chosen]
    total = sum(weights)
    mean = sum(w * n.dg_kj_mol for w, n in zip(weights, chosen, strict=True)) / total
    spread = None
    if len(chosen) > 1:
        var = sum(w * (n.dg_kj_mol - mean) ** 2 for w, n in zip(weights, chosen, strict=True))
        spread = math.sqrt(var / total)
    else:
        notes.append("one neighbour only: no spread")
    if chosen[0].similarity < CLOSE_SIMILARITY:
        notes.append(
            f"the nearest neighbour is only {chosen[0].similarity:.2f} similar: a rough estimate"
        )
    temps = sorted({t for n in chosen for t in n.temperatures_k})
    if temps and temps[-1] - temps[0] > 40:
        notes.append(
            f"the neighbours' ΔG‡ were measured between {temps[0]:.0f} and {temps[-1]:.0f} K; "
            "a barrier with a large ΔS‡ moves with temperature"
        )
    return Estimate(smiles, tuple(chosen), mean, spread, already, tuple(notes))
