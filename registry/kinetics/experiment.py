"""A VT-NMR coalescence experiment planned from an expected barrier: which field, which
temperatures, and what the sample does at the temperature you have in mind.

Composes :mod:`planning` (Tc for each field, exchange regime, half-life, LaPlante class) and
:mod:`safety` (cautions) into one record the CLI renders.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from registry.errors import UsageError
from registry.kinetics.checks import checked
from registry.kinetics.constants import BODY_TEMPERATURE_K, STANDARD_TEMPERATURE_K
from registry.kinetics.eyring import dg_from_dh_ds
from registry.kinetics.planning import (
    AtropisomerClass,
    atropisomer_class,
    coalescence_temperature,
    exchange_regime,
    half_life,
    rate_at,
)
from registry.kinetics.safety import PROBE_MAX_K, PROBE_MIN_K, safety_notes

#: fields of common spectrometers, MHz (¹H), used when a Δν in ppm comes without a field
COMMON_FIELDS_MHZ: tuple[float, ...] = (60.0, 300.0, 400.0, 500.0, 600.0, 800.0)


@dataclass(frozen=True)
class FieldPlan:
    """What to expect at one spectrometer field."""

    field_mhz: float | None
    dnu_hz: float
    k_c_per_s: float
    tc_k: float
    regime_at_t: str
    k_over_k_c_at_t: float
    flags: tuple[str, ...]


@dataclass(frozen=True)
class ExperimentPlan:
    """Predicted coalescence temperatures per field plus the behaviour at ``t_k``."""

    t_k: float
    dg_at_t_kj_mol: float
    k_at_t_per_s: float
    half_life_at_t_s: float
    fields: tuple[FieldPlan, ...]
    atropisomer: AtropisomerClass
    cautions: tuple[str, ...]


def plan_coalescence(
    *,
    dnu_hz: float | None = None,
    dnu_ppm: float | None = None,
    fields_mhz: Sequence[float] = (),
    dg_kj_mol: float | None = None,
    dh_kj_mol: float | None = None,
    ds_j_mol_k: float | None = None,
    j_hz: float = 0.0,
    t_k: float = STANDARD_TEMPERATURE_K,
    solvent_bp_k: float | None = None,
    solvent_mp_k: float | None = None,
    kappa: float = 1.0,
    observe_ratio: float = 1.0,
) -> ExperimentPlan:
    """Plan from Δν (Hz at one field, or ppm for each of ``fields_mhz``) and a barrier.

    ``fields_mhz`` are ¹H frequencies; a Δν in ppm of another nucleus is converted at its own
    observe frequency, ``observe_ratio`` × the ¹H frequency (0.2515 for ¹³C).
    """
    if (dnu_hz is None) == (dnu_ppm is None):
        raise UsageError("give the shift difference once: in Hz, or in ppm with the field(s)")
    if dnu_ppm is not None:
        fields = [float(f) for f in (fields_mhz or COMMON_FIELDS_MHZ)]
        checked("fields_mhz", fields, what="must be > 0 MHz")
        dnus = [dnu_ppm * f * observe_ratio for f in fields]
        labels: list[float | None] = list(fields)
    else:
        if len(fields_mhz) > 1:
            raise UsageError("a Δν in Hz belongs to one field; give Δν in ppm to compare fields")
        dnus = [float(dnu_hz)]  # type: ignore[arg-type]
        labels = [float(fields_mhz[0]) if fields_mhz else None]
    barrier = {"dh_kj_mol": dh_kj_mol, "ds_j_mol_k": ds_j_mol_k, "kappa": kappa}
    tcs = np.atleast_1d(coalescence_temperature(np.array(dnus), dg_kj_mol, j_hz=j_hz, **barrier))
    k_t = float(rate_at(t_k, dg_kj_mol, **barrier))
    regimes = exchange_regime(np.full(len(dnus), k_t), np.array(dnus), j_hz)
    rows = []
    for i, (label, dnu) in enumerate(zip(labels, dnus, strict=True)):
        tc = float(tcs[i])
        rows.append(
            FieldPlan(
                field_mhz=label,
                dnu_hz=dnu,
                k_c_per_s=float(np.atleast_1d(regimes.k_c_per_s)[i]),
                tc_k=tc,
                regime_at_t=str(np.atleast_1d(regimes.regime)[i]),
                k_over_k_c_at_t=float(np.atleast_1d(regimes.ratio)[i]),
                flags=_flags(tc, solvent_bp_k, solvent_mp_k),
            )
        )

    def dg_at(t: float) -> float:
        if dg_kj_mol is not None:
            return float(dg_kj_mol)
        return float(dg_from_dh_ds(dh_kj_mol, ds_j_mol_k, t))  # type: ignore[arg-type]

    notes = safety_notes([*tcs, t_k], solvent_bp_k=solvent_bp_k, solvent_mp_k=solvent_mp_k)
    return ExperimentPlan(
        t_k=float(t_k),
        dg_at_t_kj_mol=dg_at(t_k),
        k_at_t_per_s=k_t,
        half_life_at_t_s=float(half_life(k_t)),
        fields=tuple(rows),
        atropisomer=atropisomer_class(dg_at(BODY_TEMPERATURE_K), kappa=kappa),
        cautions=tuple(notes),
    )


def _flags(tc_k: float, bp_k: float | None, mp_k: float | None) -> tuple[str, ...]:
    flags = []
    if not np.isfinite(tc_k):
        return ("no coalescence at any temperature",)
    if bp_k is not None and tc_k > bp_k:
        flags.append("above solvent bp: sealed tube")
    if mp_k is not None and tc_k < mp_k:
        flags.append("below solvent mp")
    if tc_k > PROBE_MAX_K or tc_k < PROBE_MIN_K:
        flags.append("outside usual probe range")
    return tuple(flags)
