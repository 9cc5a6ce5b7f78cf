"""Rate constants recomputed from a measurement's stored raw data, by registry.kinetics.

One implementation: the EXSY volumes go through :func:`registry.kinetics.calc_exsy.calc_exsy`
(closed form, matrix method or the fit of several mixing times, as ``calc exsy`` chooses), a
saturation-transfer ratio and T1 through :func:`registry.kinetics.transfer.saturation_transfer`,
courses through :func:`registry.kinetics.timecourse.fit_racemization`,
:func:`~registry.kinetics.timecourse.fit_equilibration` and
:func:`registry.kinetics.transfer.fit_inversion_transfer`. Nothing is re-derived here; this
module only turns the stored JSON back into their arguments and names the rate constants
(:class:`Rates`) the barrier rule compares and the slips vary.
"""

from __future__ import annotations

import json
from dataclasses import dataclass, field
from typing import Any

from registry.errors import FluxledgerError

#: what each kind of raw data is called in a message
KIND_TITLES = {
    "exsy": "the EXSY volumes",
    "saturation": "the saturation-transfer ratio and T1",
    "ee": "the ee time course",
    "fraction": "the fraction time course",
    "inversion": "the inversion-transfer course",
}


@dataclass(frozen=True)
class Rates:
    """The rate constants one measurement's raw data gives (s⁻¹, σ or None).

    ``one``: the per-molecule rate constants a per-site barrier may refer to (two sites: k_AB
    and k_BA; n sites: every k_ij; an ee course: k_enant); ``summed``: k_AB + k_BA (k_ex,
    k_obs, k_rac), None where the data give none (saturation transfer: k_BA is unknown).
    """

    kind: str
    one: tuple[tuple[str, float, float | None], ...]  # (words, k, σk)
    summed: tuple[float, float | None] | None
    detail: str  # how it was computed, for the message
    populations: tuple[float, ...] | None = None  # the stored ones (EXSY)
    notes: tuple[str, ...] = field(default_factory=tuple)


class NotRecomputed(FluxledgerError):
    """The stored raw data could not be recomputed (the reason is the computation's)."""


def kind_of(row: dict[str, Any]) -> str | None:
    """exsy, saturation, ee, fraction, inversion, or None for a row without raw data."""
    if row.get("volumes_json"):
        return "exsy"
    if row.get("ss_ratio") is not None and row.get("t1_s") is not None:
        return "saturation"
    if row.get("course_json"):
        return str(json.loads(row["course_json"])["quantity"])
    return None


def recompute(row: dict[str, Any], *, time_scale: float = 1.0, **variant: Any) -> Rates:
    """The rate constants of one stored row; ``time_scale`` multiplies every stored time (a
    time-unit slip), ``variant`` changes one input (``equal_populations``, ``t1_kind``)."""
    from registry.kinetics.checks import KineticsInputError

    kind = kind_of(row)
    try:
        if kind == "exsy":
            return _exsy(row, time_scale, bool(variant.get("equal_populations")))
        if kind == "saturation":
            return _saturation(row, time_scale, variant.get("t1_kind") or row.get("t1_kind"))
        if kind in ("ee", "fraction", "inversion"):
            return _course(row, kind, time_scale)
    except (KineticsInputError, FluxledgerError, ValueError, ArithmeticError) as exc:
        raise NotRecomputed(str(exc)) from exc
    raise NotRecomputed("no raw data")


def _exsy(row: dict[str, Any], scale: float, equal: bool) -> Rates:
    from registry.kinetics.calc_exsy import calc_exsy

    taus = [t * scale for t in json.loads(row["mixing_json"])]
    mats = json.loads(row["volumes_json"])
    stored = json.loads(row["populations_json"]) if row.get("populations_json") else None
    pops = [1.0 / len(mats[0])] * len(mats[0]) if equal else stored
    names = row.get("site_names")
    err = row.get("volume_err")
    res = calc_exsy(
        mixing=taus, volumes=mats, populations=pops,
        volume_err=None if err is None or err != err else err,
        sites=names.split(",") if names else None,
    )  # fmt: skip
    one = tuple((f"k({r.source}→{r.target})", r.k_per_s, r.k_err_per_s) for r in res.rates)
    summed = None
    if res.k_exchange_per_s is not None:
        summed = (res.k_exchange_per_s, res.k_exchange_err_per_s)
    return Rates("exsy", one, summed, res.method, None if stored is None else tuple(stored),
                 res.notes)  # fmt: skip


def _saturation(row: dict[str, Any], scale: float, t1_kind: str | None) -> Rates:
    from registry.kinetics.transfer import saturation_transfer

    err = row.get("t1_err_s")
    r_err = row.get("ss_ratio_err")
    res = saturation_transfer(
        row["ss_ratio"], row["t1_s"] * scale, t1_kind=t1_kind or "apparent",  # type: ignore[arg-type]
        ratio_err=None if r_err is None or r_err != r_err else r_err,
        t1_err_s=None if err is None or err != err else err * scale,
    )  # fmt: skip
    return Rates("saturation", (("k(observed→partner)", res.k_per_s, res.k_err_per_s),), None,
                 f"Forsén–Hoffman with T1 {t1_kind or 'apparent'}")  # fmt: skip


def _course(row: dict[str, Any], kind: str, scale: float) -> Rates:
    from registry.kinetics.timecourse import fit_equilibration, fit_racemization
    from registry.kinetics.transfer import fit_inversion_transfer

    course = json.loads(row["course_json"])
    t = [v * scale for v in course["t_s"]]
    ys = course["values"]
    if kind == "ee":
        res = fit_racemization(t, ys[0])
        one = (("k_enant", res.k_per_s, res.k_err_per_s),)
        return Rates(kind, one, (res.k_obs_per_s, res.k_obs_err_per_s),
                     "first-order fit of ee(t): k_rac = 2·k_enant", notes=res.notes)  # fmt: skip
    if kind == "fraction":
        x_eq = row.get("x_eq")
        res = fit_equilibration(t, ys[0], x_eq=None if x_eq is None or x_eq != x_eq else x_eq)
        one = (("k(P→Q)", res.k_per_s, res.k_err_per_s),
               ("k(Q→P)", res.k_reverse_per_s, res.k_reverse_err_per_s))  # fmt: skip
        return Rates(kind, one, (res.k_obs_per_s, res.k_obs_err_per_s),
                     "first-order fit toward equilibrium", notes=res.notes)  # fmt: skip
    inv = fit_inversion_transfer(t, ys[0], ys[1])
    one = (("k(inverted→partner)", inv.k_per_s, inv.k_err_per_s),
           ("k(partner→inverted)", inv.k_reverse_per_s, inv.k_reverse_err_per_s))  # fmt: skip
    summed_err = None
    if inv.k_err_per_s is not None and inv.k_reverse_err_per_s is not None:
        summed_err = (inv.k_err_per_s**2 + inv.k_reverse_err_per_s**2) ** 0.5
    return Rates(kind, one, (inv.k_per_s + inv.k_reverse_per_s, summed_err),
                 "two-site fit of the inversion-transfer course", notes=inv.notes)  # fmt: skip
