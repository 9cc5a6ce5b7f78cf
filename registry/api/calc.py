"""Kinetics at the bench, no database: ΔG‡ from coalescence, Eyring fits, rates, half-lives,
VT-NMR plans, and rate constants from 2D exchange (EXSY), saturation/inversion transfer and
racemization/equilibration time courses. One function per ``fluxledger calc`` command.

Quantities are texts with units (``'-12 °C'``, ``'0.045 ppm'``, ``'21 kcal/mol'``) or plain
numbers in the canonical units (K, Hz, MHz, kJ/mol, J/(mol·K), s). Each function returns a
frozen record; its ``to_dict()`` is the JSON the command prints. Errors name the argument
(``tc: cannot read '0 K': must be > 0``). The kinetics engine (numpy) and the unit registry
(pint) are loaded when a function runs, never at import; scipy is not needed except by the
non-linear fits (EXSY over several mixing times, inversion transfer), which load
``scipy.optimize`` when they run.

Rate constants are those of one molecule unless a key says otherwise: ``k_per_s`` of EXSY is
k(A→B), of transfer k(observed site → partner), of a time course k_enant (racemization) or
k(P→Q) of the followed isomer; ``k_convention`` names it, and k_ex, k_rac and k_obs are given
beside it under their own names.
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from registry.kinetics.calc_coalescence import CoalescenceCalc, UnequalCoalescenceCalc
    from registry.kinetics.calc_exsy import ExsyCalc, VolumesInput
    from registry.kinetics.calc_eyring import EyringCalc, PointInput
    from registry.kinetics.calc_planning import HalfLifeCalc, PlanCalc, RateCalc
    from registry.kinetics.calc_timecourse import TimeCourseCalc
    from registry.kinetics.calc_transfer import InversionCalc, SaturationCalc

#: a quantity: a text with its unit, or a number in the canonical unit
Quantity = str | float | int


def calc_coalescence(
    *,
    tc: Quantity,
    dnu: Quantity,
    field: Quantity | None = None,
    tc_err: Quantity | None = None,
    dnu_err: Quantity | None = None,
    j: Quantity | None = None,
    j_err: Quantity | None = None,
    ratio: Quantity | None = None,
    ratio_err: Quantity | None = None,
    kappa: float = 1.0,
    nucleus: str | None = None,
) -> CoalescenceCalc | UnequalCoalescenceCalc:
    """ΔG‡ at the coalescence temperature ``tc`` of two signals ``dnu`` apart.

    Two equal sites (Gutowsky–Holm); with ``j`` a coupled AB pair (Kurland–Rubin–Wise); with
    ``ratio`` (major:minor, ``'3'`` or ``'75:25'``) unequal populations (Shanan-Atidi–Bar-Eli,
    both directions). ``dnu`` in ppm needs ``field`` (the ¹H frequency, MHz) and is converted
    at the observe frequency of ``nucleus`` (``'13C'``: 0.2515 × the ¹H frequency; default
    ¹H). Without a Tc uncertainty ±2 K is assumed and said in ``notes``.
    """
    from registry.kinetics.calc_coalescence import calc_coalescence as run

    return run(
        tc=tc,
        dnu=dnu,
        field=field,
        tc_err=tc_err,
        dnu_err=dnu_err,
        j=j,
        j_err=j_err,
        ratio=ratio,
        ratio_err=ratio_err,
        kappa=kappa,
        nucleus=nucleus,
    )


def calc_eyring(
    points: Iterable[PointInput] | None = None,
    *,
    file: str | None = None,
    sheet: str | None = None,
    t: Quantity | Sequence[Quantity] | None = None,
    kappa: float = 1.0,
) -> EyringCalc:
    """Eyring (ΔH‡, ΔS‡, their correlation, ΔG‡ at ``t`` and at T*) and Arrhenius fits.

    ``points`` are texts ``'T, k'`` / ``'T; k; σk'`` (K and s⁻¹ when no unit is written) or
    tuples of numbers (T in K, k and σk in s⁻¹); ``file`` is a CSV/TSV or spreadsheet with T
    and k columns and units in the headers (pandas is loaded only for a file).
    """
    from registry.kinetics.calc_eyring import calc_eyring as run

    return run(points, file=file, sheet=sheet, t=t, kappa=kappa)


def calc_rate(
    *,
    t: Quantity | Sequence[Quantity] | None = None,
    dg: Quantity | None = None,
    dh: Quantity | None = None,
    ds: Quantity | None = None,
    pair: bool = False,
    kappa: float = 1.0,
) -> RateCalc:
    """Rate constant and half-life at each temperature ``t`` (default 25 °C) from a barrier:
    ``dg``, or ``dh`` with ``ds``. ``pair``: half-life of an excess of one of two equal forms."""
    from registry.kinetics.calc_planning import calc_rate as run

    return run(t=t, dg=dg, dh=dh, ds=ds, pair=pair, kappa=kappa)


def calc_halflife(
    *,
    target: Quantity,
    dg: Quantity | None = None,
    dh: Quantity | None = None,
    ds: Quantity | None = None,
    pair: bool = False,
    solvent_bp: Quantity | None = None,
    solvent_mp: Quantity | None = None,
    kappa: float = 1.0,
) -> HalfLifeCalc:
    """The temperature at which the half-life is ``target``, with the cautions it calls for
    (above the solvent's boiling point only a pressure-rated sealed tube; cold needs cryogens)."""
    from registry.kinetics.calc_planning import calc_halflife as run

    return run(
        target=target,
        dg=dg,
        dh=dh,
        ds=ds,
        pair=pair,
        solvent_bp=solvent_bp,
        solvent_mp=solvent_mp,
        kappa=kappa,
    )


def calc_plan(
    *,
    dnu: Quantity,
    field: Quantity | Sequence[Quantity] | None = None,
    dg: Quantity | None = None,
    dh: Quantity | None = None,
    ds: Quantity | None = None,
    j: Quantity | None = None,
    t: Quantity = "25 °C",
    solvent_bp: Quantity | None = None,
    solvent_mp: Quantity | None = None,
    kappa: float = 1.0,
    nucleus: str | None = None,
) -> PlanCalc:
    """A VT-NMR coalescence plan: predicted Tc per spectrometer ``field`` (¹H MHz; ppm Δν:
    default 60–800 MHz, converted at the observe frequency of ``nucleus``), the exchange
    regime, half-life and LaPlante class at ``t``, and cautions."""
    from registry.kinetics.calc_planning import calc_plan as run

    return run(
        dnu=dnu,
        field=field,
        dg=dg,
        dh=dh,
        ds=ds,
        j=j,
        t=t,
        solvent_bp=solvent_bp,
        solvent_mp=solvent_mp,
        kappa=kappa,
        nucleus=nucleus,
    )


def calc_exsy(
    *,
    mixing: Quantity | Sequence[Quantity],
    volumes: VolumesInput | Sequence[VolumesInput],
    populations: Quantity | Sequence[float] | None = None,
    volume_err: Quantity | None = None,
    sites: str | Sequence[str] | None = None,
    temperature: Quantity | None = None,
    kappa: float = 1.0,
) -> ExsyCalc:
    """Rate constants between n sites from 2D exchange peak volumes.

    ``volumes`` per mixing time: ``'I_AA,I_AB;I_BA,I_BB'`` (rows ``;``, values ``,``; row =
    site observed, column = site of origin) or rows of numbers. One mixing time: the two-site
    closed form or the general matrix method (Perrin & Dwyer 1990); several: one least-squares
    fit of all volumes. A mixing time of 0 is the reference spectrum (gives M0 and the T1s).
    ``populations`` (``'0.7,0.3'``), else from the column sums; ``volume_err``: σ of every
    volume, propagated to every k. Two sites: ``k_per_s`` is k(A→B), k_ex = k_AB + k_BA.
    """
    from registry.kinetics.calc_exsy import calc_exsy as run

    return run(
        mixing=mixing,
        volumes=volumes,
        populations=populations,
        volume_err=volume_err,
        sites=sites,
        temperature=temperature,
        kappa=kappa,
    )


def calc_transfer(
    *,
    ratio: Quantity | None = None,
    t1: Quantity | None = None,
    t1_intrinsic: Quantity | None = None,
    ratio_err: Quantity | None = None,
    t1_err: Quantity | None = None,
    file: str | None = None,
    sheet: str | None = None,
    inverted: str | None = None,
    intensity_err: Quantity | None = None,
    temperature: Quantity | None = None,
    kappa: float = 1.0,
) -> SaturationCalc | InversionCalc:
    """k(observed site → partner) by saturation transfer (Forsén–Hoffman) or inversion transfer.

    Saturation: ``ratio`` = M_ss/M0 of the observed site with the partner saturated, and
    either ``t1`` (T1 of the observed site measured with the partner saturated: k = (1 − r)/T1)
    or ``t1_intrinsic`` (k = (1 − r)/(r·T1)). Inversion: ``file`` with a time column and the
    inverted site's and the partner's intensities (``inverted`` names the inverted column).
    """
    from registry.kinetics.calc_transfer import calc_transfer as run

    return run(
        ratio=ratio,
        t1=t1,
        t1_intrinsic=t1_intrinsic,
        ratio_err=ratio_err,
        t1_err=t1_err,
        file=file,
        sheet=sheet,
        inverted=inverted,
        intensity_err=intensity_err,
        temperature=temperature,
        kappa=kappa,
    )


def calc_timecourse(
    file: str,
    *,
    sheet: str | None = None,
    quantity: str | None = None,
    temperature: Quantity | None = None,
    x_eq: Quantity | None = None,
    kappa: float = 1.0,
) -> TimeCourseCalc:
    """First-order fit of a racemization (ee) or equilibration (fraction) time course.

    ``file``: a time column with its unit (``t (min)``) and an ``ee`` or ``fraction`` column
    (``%`` in the header, or fractions). ``k_per_s`` is one molecule's rate constant —
    k_enant = k_rac/2 for ee, k(P→Q) = (1 − x_eq)·k_obs for the followed isomer P — and the
    one ΔG‡ (at ``temperature``) belongs to.
    """
    from registry.kinetics.calc_timecourse import calc_timecourse as run

    return run(
        file, sheet=sheet, quantity=quantity, temperature=temperature, x_eq=x_eq, kappa=kappa
    )
