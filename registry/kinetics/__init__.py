"""The kinetics engine: barriers from coalescence data, rate constants, Eyring/Arrhenius fits.

Pure functions over floats and numpy arrays (10⁶ entries in one call are fine); no database.
Canonical units throughout: kJ/mol, K, J/(mol·K), Hz, s⁻¹. Text with units is read by
:mod:`registry.record.units` (see :mod:`.rate_table`), never here.

Map:
    constants    the exact SI defining constants (k_B, h, N_A; R = k_B·N_A)
    checks       vectorized input checks and :class:`KineticsInputError`
    distributions  Student-t, normal and χ² numbers for the fits, without scipy
    eyring       k ↔ ΔG‡ at T (Eyring 1935)
    coalescence  k_c and ΔG‡(Tc) with propagated uncertainty: Gutowsky–Holm, coupled AB,
                 unequal populations (Shanan-Atidi and Bar-Eli 1970)
    fits         weighted Eyring and Arrhenius fits with full covariance and warnings
    planning     rate/half-life at T, T for a target, predicted Tc, exchange regime,
                 atropisomer class (LaPlante 2011)
    safety       caution text for hot, cold and above-boiling-point temperatures
    experiment   a VT-NMR plan per spectrometer field (planning + safety)
    rate_table   rate points from CSV/spreadsheets and command-line text (pandas, lazily)
    quantities   reading quantity texts (pint) and values in display units for the workflows
    calc_coalescence, calc_eyring, calc_planning
                 the bench workflows behind ``registry.api.calc_*`` / ``fluxledger calc``

The names below are loaded on first use (PEP 562), so a workflow that needs only
``coalescence`` does not pay for the fits or the planning modules.
"""

from __future__ import annotations

import importlib
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:
    from registry.kinetics.checks import KineticsInputError
    from registry.kinetics.coalescence import (
        CoalescenceBarrier,
        UnequalPopulationBarriers,
        coalescence_barrier,
        coalescence_rate,
        shanan_atidi_x,
        unequal_population_barriers,
    )
    from registry.kinetics.experiment import ExperimentPlan, FieldPlan, plan_coalescence
    from registry.kinetics.eyring import dg_from_dh_ds, eyring_barrier, eyring_rate
    from registry.kinetics.fits import ArrheniusFit, BarrierAt, EyringFit, fit_arrhenius, fit_eyring
    from registry.kinetics.planning import (
        AtropisomerClass,
        ExchangeRegime,
        atropisomer_class,
        coalescence_temperature,
        exchange_regime,
        half_life,
        rate_at,
        temperature_for_half_life,
        temperature_for_rate,
    )
    from registry.kinetics.safety import safety_notes

#: public name → the module that defines it
_HOME: dict[str, str] = {
    "KineticsInputError": "checks",
    "CoalescenceBarrier": "coalescence",
    "UnequalPopulationBarriers": "coalescence",
    "coalescence_barrier": "coalescence",
    "coalescence_rate": "coalescence",
    "shanan_atidi_x": "coalescence",
    "unequal_population_barriers": "coalescence",
    "ExperimentPlan": "experiment",
    "FieldPlan": "experiment",
    "plan_coalescence": "experiment",
    "dg_from_dh_ds": "eyring",
    "eyring_barrier": "eyring",
    "eyring_rate": "eyring",
    "ArrheniusFit": "fits",
    "BarrierAt": "fits",
    "EyringFit": "fits",
    "fit_arrhenius": "fits",
    "fit_eyring": "fits",
    "AtropisomerClass": "planning",
    "ExchangeRegime": "planning",
    "atropisomer_class": "planning",
    "coalescence_temperature": "planning",
    "exchange_regime": "planning",
    "half_life": "planning",
    "rate_at": "planning",
    "temperature_for_half_life": "planning",
    "temperature_for_rate": "planning",
    "safety_notes": "safety",
}


def __getattr__(name: str) -> Any:
    """Import the module that defines ``name`` on first use, then keep the name here."""
    home = _HOME.get(name)
    if home is None:
        raise AttributeError(f"module 'registry.kinetics' has no attribute {name!r}")
    value = getattr(importlib.import_module(f"registry.kinetics.{home}"), name)
    globals()[name] = value
    return value


def __dir__() -> list[str]:
    return sorted([*globals(), *_HOME])


__all__ = [
    "ArrheniusFit",
    "AtropisomerClass",
    "BarrierAt",
    "CoalescenceBarrier",
    "ExchangeRegime",
    "ExperimentPlan",
    "EyringFit",
    "FieldPlan",
    "KineticsInputError",
    "UnequalPopulationBarriers",
    "atropisomer_class",
    "coalescence_barrier",
    "coalescence_rate",
    "coalescence_temperature",
    "dg_from_dh_ds",
    "exchange_regime",
    "eyring_barrier",
    "eyring_rate",
    "fit_arrhenius",
    "fit_eyring",
    "half_life",
    "plan_coalescence",
    "rate_at",
    "safety_notes",
    "shanan_atidi_x",
    "temperature_for_half_life",
    "temperature_for_rate",
    "unequal_population_barriers",
]
