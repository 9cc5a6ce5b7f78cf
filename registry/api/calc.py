"""Kinetics at the bench, no database: ΔG‡ from coalescence, Eyring fits, rates, half-lives,
VT-NMR plans. One function per ``fluxledger calc`` command.

Quantities are texts with units (``'-12 °C'``, ``'0.045 ppm'``, ``'21 kcal/mol'``) or plain
numbers in the canonical units (K, Hz, MHz, kJ/mol, J/(mol·K), s). Each function returns a
frozen record; its ``to_dict()`` is the JSON the command prints. Errors name the argument
(``tc: cannot read '0 K': must be > 0``). The kinetics engine (numpy) and the unit registry
(pint) are loaded when a function runs, never at import; scipy is not needed.
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from registry.kinetics.calc_coalescence import CoalescenceCalc, UnequalCoalescenceCalc
    from registry.kinetics.calc_eyring import EyringCalc, PointInput
    from registry.kinetics.calc_planning import HalfLifeCalc, PlanCalc, RateCalc

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
) -> CoalescenceCalc | UnequalCoalescenceCalc:
    """ΔG‡ at the coalescence temperature ``tc`` of two signals ``dnu`` apart.

    Two equal sites (Gutowsky–Holm); with ``j`` a coupled AB pair (Kurland–Rubin–Wise); with
    ``ratio`` (major:minor, ``'3'`` or ``'75:25'``) unequal populations (Shanan-Atidi–Bar-Eli,
    both directions). ``dnu`` in ppm needs ``field`` (MHz). Without a Tc uncertainty ±2 K is
    assumed and said in ``notes``.
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
) -> PlanCalc:
    """A VT-NMR coalescence plan: predicted Tc per spectrometer ``field`` (ppm Δν: default
    60–800 MHz), the exchange regime, half-life and LaPlante class at ``t``, and cautions."""
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
    )
