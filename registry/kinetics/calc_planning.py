"""Planning at the bench from an expected barrier: rates and half-lives, the temperature for a
half-life, and a VT-NMR coalescence plan per field — with the cautions the temperatures call for.

The workflows behind ``fluxledger calc rate|halflife|plan`` and :func:`registry.api.calc_rate`,
:func:`~registry.api.calc_halflife`, :func:`~registry.api.calc_plan`. The barrier is ΔG‡
(``dg``) or ΔH‡ with ΔS‡ (``dh``, ``ds``), as texts with units or canonical numbers.
Running a sample above the solvent's boiling point needs a pressure-rated sealed tube, and
cryogens and heat can hurt: the records carry those cautions (:mod:`.safety`), which defer to
the facility's rules and local regulations.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

from registry.errors import UnitError, UsageError
from registry.kinetics.quantities import (
    Duration,
    Energy,
    QuantityInput,
    Temperature,
    duration,
    energy,
    read_barrier,
    read_field_mhz,
    read_observe_mhz,
    read_optional,
    read_quantity,
    temperature,
)


@dataclass(frozen=True)
class RateRow:
    """k, ΔG‡ and the half-life at one temperature."""

    t: Temperature
    dg_kj_mol: float
    k_per_s: float
    half_life: Duration


@dataclass(frozen=True)
class RateCalc:
    """Rate constants and half-lives at the temperatures asked for."""

    pair: bool
    kappa: float
    rows: tuple[RateRow, ...]

    def to_dict(self) -> dict[str, Any]:
        rows = [
            {
                "T_K": r.t.k,
                "dg_kj_mol": r.dg_kj_mol,
                "k_per_s": r.k_per_s,
                "half_life_s": r.half_life.seconds,
            }
            for r in self.rows
        ]
        return {"pair": self.pair, "kappa": self.kappa, "rows": rows}


def _temperatures(t: QuantityInput | Sequence[QuantityInput] | None, default: str) -> list[float]:
    items = [t] if isinstance(t, (str, int, float)) else list(t or [default])
    return [read_quantity(x, "temperature", "t")[0] for x in items]


def calc_rate(
    *,
    t: QuantityInput | Sequence[QuantityInput] | None = None,
    dg: QuantityInput | None = None,
    dh: QuantityInput | None = None,
    ds: QuantityInput | None = None,
    pair: bool = False,
    kappa: float = 1.0,
) -> RateCalc:
    """k (Eyring) and t½ at each temperature of ``t`` (default 25 °C).

    ``pair``: the half-life of the excess of one of two equally stable forms, ln2/(2k).
    """
    import numpy as np

    from registry.kinetics.eyring import eyring_barrier
    from registry.kinetics.planning import half_life, rate_at

    barrier = read_barrier(dg, dh, ds)
    temps = np.array(_temperatures(t, "25 °C"))
    k = np.atleast_1d(
        rate_at(
            temps,
            barrier["dg_kj_mol"],
            dh_kj_mol=barrier["dh_kj_mol"],
            ds_j_mol_k=barrier["ds_j_mol_k"],
            kappa=kappa,
        )
    )
    halves = np.atleast_1d(half_life(k, pair=pair))
    dgs = np.atleast_1d(eyring_barrier(k, temps, kappa))
    rows = tuple(
        RateRow(temperature(float(tk)), float(g), float(kk), duration(float(h)))
        for tk, g, kk, h in zip(temps, dgs, k, halves, strict=True)
    )
    return RateCalc(pair=pair, kappa=kappa, rows=rows)


@dataclass(frozen=True)
class HalfLifeCalc:
    """The temperature at which the half-life reaches the target, and the cautions there."""

    half_life: Duration
    t: Temperature
    k_per_s: float
    pair: bool
    cautions: tuple[str, ...]

    def to_dict(self) -> dict[str, Any]:
        return {
            "half_life_s": self.half_life.seconds,
            "T_K": self.t.k,
            "k_per_s": self.k_per_s,
            "pair": self.pair,
            "cautions": list(self.cautions),
        }


def calc_halflife(
    *,
    target: QuantityInput,
    dg: QuantityInput | None = None,
    dh: QuantityInput | None = None,
    ds: QuantityInput | None = None,
    pair: bool = False,
    solvent_bp: QuantityInput | None = None,
    solvent_mp: QuantityInput | None = None,
    kappa: float = 1.0,
) -> HalfLifeCalc:
    """The temperature at which t½ = ``target`` (a time, e.g. ``'10 min'``), to plan a run."""
    from registry.kinetics.planning import rate_at, temperature_for_half_life
    from registry.kinetics.safety import safety_notes

    barrier = read_barrier(dg, dh, ds)
    t_half, _ = read_quantity(target, "time", "target")
    if not t_half > 0:
        raise UnitError("target", str(target), "a half-life must be > 0")
    t_k = float(temperature_for_half_life(t_half, **barrier, kappa=kappa, pair=pair))
    if not math.isfinite(t_k):
        raise UsageError("no positive temperature gives that half-life for this barrier (ΔH‡ ≤ 0?)")
    k = float(rate_at(t_k, **barrier, kappa=kappa))
    bp = read_optional(solvent_bp, "temperature", "solvent_bp")
    mp = read_optional(solvent_mp, "temperature", "solvent_mp")
    cautions = safety_notes(t_k, solvent_bp_k=bp, solvent_mp_k=mp)
    return HalfLifeCalc(duration(t_half), temperature(t_k), k, pair, tuple(cautions))


@dataclass(frozen=True)
class FieldRow:
    """The predicted coalescence at one spectrometer field."""

    field_mhz: float | None
    dnu_hz: float
    k_c_per_s: float
    tc: Temperature
    regime_at_t: str
    k_over_k_c_at_t: float
    flags: tuple[str, ...]


@dataclass(frozen=True)
class PlanCalc:
    """A VT-NMR coalescence plan: Tc per field, and what the sample does at ``t``."""

    t: Temperature
    dg_at_t: Energy
    k_at_t_per_s: float
    half_life_at_t: Duration
    fields: tuple[FieldRow, ...]
    atropisomer_class: int
    dg_37c_kj_mol: float
    half_life_37c: Duration
    atropisomer_text: str
    cautions: tuple[str, ...]
    nucleus: str = "1H"

    def to_dict(self) -> dict[str, Any]:
        return {
            "nucleus": self.nucleus,
            "T_K": self.t.k,
            "dg_at_T_kj_mol": self.dg_at_t.kj_mol,
            "k_at_T_per_s": self.k_at_t_per_s,
            "half_life_at_T_s": self.half_life_at_t.seconds,
            "fields": [
                {
                    "field_MHz": f.field_mhz,
                    "dnu_hz": f.dnu_hz,
                    "k_c_per_s": f.k_c_per_s,
                    "tc_K": f.tc.k,
                    "regime_at_T": f.regime_at_t,
                    "k_over_k_c_at_T": f.k_over_k_c_at_t,
                    "flags": list(f.flags),
                }
                for f in self.fields
            ],
            "atropisomer_class": self.atropisomer_class,
            "dg_37C_kj_mol": self.dg_37c_kj_mol,
            "half_life_37C_s": self.half_life_37c.seconds,
            "atropisomer_text": self.atropisomer_text,
            "cautions": list(self.cautions),
        }


def calc_plan(
    *,
    dnu: QuantityInput,
    field: QuantityInput | Sequence[QuantityInput] | None = None,
    dg: QuantityInput | None = None,
    dh: QuantityInput | None = None,
    ds: QuantityInput | None = None,
    j: QuantityInput | None = None,
    t: QuantityInput = "25 °C",
    solvent_bp: QuantityInput | None = None,
    solvent_mp: QuantityInput | None = None,
    kappa: float = 1.0,
    nucleus: str | None = None,
) -> PlanCalc:
    """Predicted Tc per field, the exchange regime at ``t``, half-life and LaPlante class.

    ``dnu`` in ppm is taken at each of ``field`` (¹H frequencies, default 60–800 MHz), at the
    observe frequency of ``nucleus`` there (default ¹H); in Hz it belongs to one field.
    """
    from registry.kinetics.experiment import plan_coalescence
    from registry.record.units import clean_text

    barrier = read_barrier(dg, dh, ds)
    fields_in = [field] if isinstance(field, (str, int, float)) else list(field or [])
    fields = [read_field_mhz(m) for m in fields_in]
    observed, ratio = read_observe_mhz(1.0, nucleus, dnu)
    kw: dict[str, float | None] = {"dnu_ppm": None, "dnu_hz": None}
    if isinstance(dnu, str) and clean_text(dnu).lower().endswith("ppm"):
        kw["dnu_ppm"] = read_quantity(dnu, "shift", "dnu", spectrometer_mhz=1.0)[0]
    else:
        kw["dnu_hz"] = read_quantity(dnu, "shift", "dnu")[0]
    res = plan_coalescence(
        **kw,
        fields_mhz=fields,  # type: ignore[arg-type]
        **barrier,
        j_hz=read_optional(j, "frequency", "j", default_unit="Hz") or 0.0,
        t_k=read_quantity(t, "temperature", "t")[0],
        solvent_bp_k=read_optional(solvent_bp, "temperature", "solvent_bp"),
        solvent_mp_k=read_optional(solvent_mp, "temperature", "solvent_mp"),
        kappa=kappa,
        observe_ratio=ratio or 1.0,
    )
    atrop = res.atropisomer
    return PlanCalc(
        t=temperature(res.t_k),
        dg_at_t=energy(res.dg_at_t_kj_mol),
        k_at_t_per_s=res.k_at_t_per_s,
        half_life_at_t=duration(res.half_life_at_t_s),
        fields=tuple(
            FieldRow(
                f.field_mhz,
                f.dnu_hz,
                f.k_c_per_s,
                temperature(f.tc_k),
                f.regime_at_t,
                f.k_over_k_c_at_t,
                tuple(f.flags),
            )
            for f in res.fields
        ),
        atropisomer_class=atrop.stability_class,
        dg_37c_kj_mol=atrop.dg_kj_mol,
        half_life_37c=duration(atrop.half_life_37c_s),
        atropisomer_text=atrop.description,
        cautions=tuple(res.cautions),
        nucleus=observed,
    )
