"""Physical constants for the kinetics engine: the exact SI defining constants.

Since the 2019 redefinition of the SI (SI Brochure, 9th ed., BIPM 2019, Table 1) k_B, h and
N_A are exact, so R = k_B·N_A is exact too and the values below are definitions, not
measurements: CODATA 2018 lists the same numbers (``scipy.constants`` carries them; a test
checks these against it). They are written out rather than imported from scipy because
importing ``scipy.constants`` costs ~0.1 s, more than a whole coalescence calculation.
Everything here is a plain float in SI units; molar energies elsewhere in the package are
kJ/mol, so :data:`R_KJ_MOL_K` is what the Eyring functions use.
"""

from __future__ import annotations

import math

#: Boltzmann constant, J/K (exact)
BOLTZMANN_J_K: float = 1.380649e-23
#: Planck constant, J·s (exact)
PLANCK_J_S: float = 6.62607015e-34
#: Avogadro constant, 1/mol (exact)
AVOGADRO_PER_MOL: float = 6.02214076e23
#: molar gas constant, J/(mol·K): k_B·N_A
R_J_MOL_K: float = BOLTZMANN_J_K * AVOGADRO_PER_MOL
#: molar gas constant, kJ/(mol·K)
R_KJ_MOL_K: float = R_J_MOL_K / 1000.0
#: k_B/h, the Eyring pre-factor per kelvin, 1/(s·K)
KB_OVER_H_PER_S_K: float = BOLTZMANN_J_K / PLANCK_J_S
#: ln(k_B/h), used where the Eyring equation is written in logarithms
LN_KB_OVER_H: float = math.log(KB_OVER_H_PER_S_K)
#: ln 2, for first-order half-lives
LN2: float = math.log(2.0)
#: 0 °C in kelvin (exact by the definition of the Celsius scale)
ZERO_CELSIUS_K: float = 273.15
#: the temperature at which LaPlante et al. (2011) quote atropisomer half-lives: 37 °C in K
BODY_TEMPERATURE_K: float = ZERO_CELSIUS_K + 37.0
#: the conventional reference temperature for reporting ΔG‡: 25 °C in K
STANDARD_TEMPERATURE_K: float = ZERO_CELSIUS_K + 25.0
