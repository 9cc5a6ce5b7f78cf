"""The cautions a planning result carries when it points at an uncomfortable temperature.

VT-NMR above a solvent's boiling point needs a pressure-rated sealed tube; cryogens and high
temperatures can hurt people. fluxledger only reminds: the facility's safety rules and local
regulations decide. Thresholds are conventions (common practice, no source).
"""

from __future__ import annotations

from collections.abc import Iterable

import numpy as np

from registry.kinetics.constants import ZERO_CELSIUS_K

#: below this a VT unit usually cools with liquid-nitrogen boil-off (−40 °C)
CRYOGEN_BELOW_K = ZERO_CELSIUS_K - 40.0
#: above this hot surfaces and hot solvent vapour are a burn hazard (+80 °C)
HOT_ABOVE_K = ZERO_CELSIUS_K + 80.0
#: the range most VT-NMR probes are rated for (−150 °C … +150 °C)
PROBE_MIN_K = ZERO_CELSIUS_K - 150.0
PROBE_MAX_K = ZERO_CELSIUS_K + 150.0

DEFER = (
    "Follow your facility's safety rules and local regulations; these notes do not replace them."
)


def _c(t_k: float) -> str:
    return f"{t_k - ZERO_CELSIUS_K:.0f} °C"


def safety_notes(
    temperatures_k: Iterable[float] | float,
    *,
    solvent_bp_k: float | None = None,
    solvent_mp_k: float | None = None,
) -> list[str]:
    """Caution lines for running a sample at these temperatures; empty when none apply."""
    temps = np.atleast_1d(np.asarray(temperatures_k, dtype=float))
    temps = temps[np.isfinite(temps)]
    if temps.size == 0:
        return []
    hi, lo = float(temps.max()), float(temps.min())
    notes: list[str] = []
    if solvent_bp_k is not None and hi > solvent_bp_k:
        notes.append(
            f"{_c(hi)} is above the solvent's boiling point ({_c(solvent_bp_k)}): the sample "
            "builds pressure; use only a pressure-rated sealed NMR tube within its rating, or "
            "choose a higher-boiling solvent."
        )
    elif solvent_bp_k is None and hi > ZERO_CELSIUS_K + 40.0:
        notes.append(
            f"Up to {_c(hi)}: check the solvent's boiling point (give the solvent bp for "
            "a specific caution); above it only a pressure-rated sealed NMR tube is safe."
        )
    if solvent_mp_k is not None and lo < solvent_mp_k:
        notes.append(
            f"{_c(lo)} is below the solvent's melting point ({_c(solvent_mp_k)}): the sample "
            "will freeze; choose a lower-melting solvent."
        )
    if hi > HOT_ABOVE_K:
        notes.append(
            f"High temperature ({_c(hi)}): hot probes, tubes and solvent vapour can burn; let "
            "the sample cool before handling."
        )
    if lo < CRYOGEN_BELOW_K:
        notes.append(
            f"Low temperature ({_c(lo)}) needs cryogenic cooling: liquid nitrogen causes cold "
            "burns and can displace oxygen in a closed room."
        )
    if hi > PROBE_MAX_K or lo < PROBE_MIN_K:
        notes.append(
            "Outside the range most VT-NMR probes are rated for (about −150 °C to +150 °C): "
            "check your probe's rating with the facility staff."
        )
    if notes:
        notes.append(DEFER)
    return notes
