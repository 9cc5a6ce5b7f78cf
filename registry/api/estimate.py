"""A barrier estimate for a compound not yet measured, and the experiment it suggests.

The neighbours and their weighted barrier are :mod:`registry.search.estimate`; from the estimate
this adds the planning answer :func:`registry.api.calc_plan` gives for a known barrier —
predicted coalescence temperature per field (with Δν), whether it lies in the solvent's liquid
range (with the usual cautions), the atropisomer class and the half-life at 37 °C.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

from registry.errors import UsageError

if TYPE_CHECKING:
    from registry.kinetics.calc_planning import PlanCalc
    from registry.kinetics.planning import AtropisomerClass
    from registry.kinetics.quantities import Duration
    from registry.search.estimate import Estimate
    from registry.storage.database import Database


@dataclass(frozen=True)
class BarrierEstimate:
    """The estimate, its LaPlante class at 37 °C, and the VT-NMR plan when Δν was given."""

    estimate: Estimate
    atropisomer: AtropisomerClass | None
    half_life_37c: Duration | None
    plan: PlanCalc | None
    solvent: str | None
    notes: tuple[str, ...]

    def to_dict(self) -> dict[str, Any]:
        out = self.estimate.to_dict()
        a = self.atropisomer
        out.update(
            {
                "atropisomer_class": None if a is None else a.stability_class,
                "half_life_37C_s": None if a is None else a.half_life_37c_s,
                "atropisomer_text": None if a is None else a.description,
                "solvent": self.solvent,
                "plan": None if self.plan is None else self.plan.to_dict(),
                "notes": [*out["notes"], *self.notes],
            }
        )
        return out


def estimate_barrier(
    database: Database,
    smiles: str,
    *,
    process: str | None = None,
    motif: str | None = None,
    neighbours: int = 5,
    min_similarity: float = 0.3,
    include_flagged: bool = False,
    dnu: str | float | None = None,
    field: str | float | Sequence[str | float] | None = None,
    nucleus: str | None = None,
    solvent: str | None = None,
) -> BarrierEstimate:
    """Estimate ΔG‡ of ``smiles`` from the registry's nearest measured compounds (of
    ``process``; among those matching the motif ``motif`` when given), and plan from it.

    With ``dnu`` (Hz, or ppm at each ``field``) the plan predicts the coalescence temperature at
    each field; with ``solvent`` (any spelling the registry reads) it checks the solvent's
    liquid range and adds the cautions. The class and half-life at 37 °C come with any estimate.
    """
    from registry.search.estimate import estimate

    motif_ids = _motif_compounds(database, motif) if motif else None
    found = estimate(
        database, smiles, process=process, motif_ids=motif_ids, neighbours=neighbours,
        min_similarity=min_similarity, include_flagged=include_flagged,
    )  # fmt: skip
    bp_mp, solvent_name = _solvent(database, solvent) if solvent else ((None, None), None)
    if found.dg_kj_mol is None:
        return BarrierEstimate(found, None, None, None, solvent_name, ())
    from registry.kinetics.calc_planning import calc_plan
    from registry.kinetics.planning import atropisomer_class
    from registry.kinetics.quantities import duration

    atropisomer = atropisomer_class(found.dg_kj_mol)
    plan = None
    notes: tuple[str, ...] = ()
    if dnu is not None:
        plan = calc_plan(
            dnu=dnu, field=field, dg=found.dg_kj_mol, nucleus=nucleus,
            solvent_bp=bp_mp[0], solvent_mp=bp_mp[1],
        )  # fmt: skip
    else:
        notes = ("give dnu (the slow-exchange separation) for the coalescence temperature",)
    half_life = duration(atropisomer.half_life_37c_s)
    return BarrierEstimate(found, atropisomer, half_life, plan, solvent_name, notes)


def _motif_compounds(database: Database, motif: str) -> list[int]:
    from registry.search import get_motif, motif_matches

    name = get_motif(motif, database).name
    return motif_matches(database, [name])[name]


def _solvent(database: Database, text: str) -> tuple[tuple[float | None, float | None], str]:
    """(bp, mp) in K of the solvent the registry reads ``text`` as, and its name."""
    from registry.admin.vocabulary import list_solvents, read_term

    reading = read_term(database, "solvent", text)
    name = reading.get("reads_as")
    if name is None:
        hint = ", ".join(reading.get("suggestions") or [])
        raise UsageError(
            f"solvent {text!r}: not a solvent the registry knows"
            + (f" (did you mean {hint}?)" if hint else "")
        )
    row = next(s for s in list_solvents(database) if s["name"] == name)
    bp, mp = row.get("bp_k"), row.get("mp_k")
    return (None if bp is None else f"{bp} K", None if mp is None else f"{mp} K"), name
