"""Computed barriers: the level of theory a value comes from, and the standard state it refers to.

A computed ΔG‡ is only comparable with a measured one when one knows how it was computed — the
electronic-structure method, the basis set, the solvation model and how conformers were treated
— and at which temperature and standard state it was evaluated. A free-energy barrier of a
unimolecular step does not depend on the standard state, but one computed for a bimolecular
exchange does: the usual 1 atm (gas phase) to 1 M (solution) correction at 298.15 K is
RT ln(24.46) ≈ 7.9 kJ/mol (ideal gas molar volume at 1 atm and 298.15 K, 24.465 L/mol; CODATA R).
The texts are stored as written (free text is what a methods section says); only the standard
state is read into one of a few names.
"""

from __future__ import annotations

import re

from registry.errors import UnitError

#: the standard states a computed barrier may refer to
STANDARD_STATES = ("1 M", "1 atm", "1 bar")

_SPELLINGS = {
    "1m": "1 M", "1moll": "1 M", "1moll1": "1 M", "1moldm3": "1 M", "1moldm": "1 M",
    "1molperl": "1 M", "solution": "1 M", "1molar": "1 M",
    "1atm": "1 atm", "gas": "1 atm", "gasphase": "1 atm", "1atmosphere": "1 atm",
    "1bar": "1 bar", "1e5pa": "1 bar", "100kpa": "1 bar",
}  # fmt: skip


def read_standard_state(text: str, field: str = "standard_state") -> str:
    """``1 M``, ``1 mol/L``, ``1 mol dm-3``, ``1 atm``, ``gas phase``, ``1 bar`` → its name."""
    key = re.sub(r"[^0-9a-z]", "", text.strip().lower().replace("⁻", "-"))
    found = _SPELLINGS.get(key)
    if found is None:
        raise UnitError(field, text, f"a standard state is one of {', '.join(STANDARD_STATES)}")
    return found


#: the measurement columns that say how a value was computed (part of its identity)
THEORY_COLUMNS = ("theory_level", "theory_method", "theory_basis", "theory_solvation")


def theory_key(measurement: dict[str, object]) -> str:
    """What tells two computed values of one compound apart: their level of theory ("" for a
    measured value), so that one compound's barrier at two levels is two measurements."""
    parts = (str(measurement.get(c) or "").strip().casefold() for c in THEORY_COLUMNS)
    return "|".join(parts).strip("|")
