"""Physical constants for the kinetics engine, taken from :mod:`scipy.constants` (CODATA).

Since the 2019 SI redefinition k_B, h and N_A are exact, so R = k_B·N_A is exact too.
Everything here is a plain float in SI units; molar energies elsewhere in the package are
kJ/mol, so :data:`R_KJ` is what the Eyring functions use.
"""

from __future__ import annotations

import math

from scipy import constants as _codata

#: Boltzmann constant, J/K
BOLTZMANN_J_K: float = _codata.Boltzmann
#: Planck constant, J·s
PLANCK_J_S: float = _codata.Planck
#: Avogadro constant, 1/mol
AVOGADRO_PER_MOL: float = _codata.Avogadro
#: molar gas constant, J/(mol·K)
R_J_MOL_K: float = _codata.R
#: molar gas constant, kJ/(mol·K)
R_KJ_MOL_K: float = _codata.R / 1000.0
#: k_B/h, the Eyring pre-factor per kelvin, 1/(s·K)
KB_OVER_H_PER_S_K: float = _codata.Boltzmann / _codata.Planck
#: ln(k_B/h), used where the Eyring equation is written in logarithms
LN_KB_OVER_H: float = math.log(KB_OVER_H_PER_S_K)
#: ln 2, for first-order half-lives
LN2: float = math.log(2.0)
#: the temperature at which LaPlante et al. (2011) quote atropisomer half-lives: 37 °C in K
BODY_TEMPERATURE_K: float = _codata.zero_Celsius + 37.0
#: the conventional reference temperature for reporting ΔG‡: 25 °C in K
STANDARD_TEMPERATURE_K: float = _codata.zero_Celsius + 25.0
