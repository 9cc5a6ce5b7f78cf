"""Observe frequencies of NMR nuclei relative to ¹H in the same magnet.

A spectrometer is named by its ¹H frequency ("a 400 MHz instrument"); a ¹³C signal on it is observed
near 100.6 MHz, so a ¹³C shift difference in ppm becomes Hz at that frequency, not at 400 MHz.
"""

from __future__ import annotations

#: the IUPAC Ξ scale divided by 100 % (R. K. Harris et al., Pure Appl. Chem. 73, 1795 (2001),
#: Table 1; from memory)
FREQUENCY_RATIO_TO_1H: dict[str, float] = {
    "1H": 1.0,
    "2H": 0.15350609,
    "7Li": 0.38863797,
    "11B": 0.32083974,
    "13C": 0.25145020,
    "15N": 0.10136767,
    "19F": 0.94094011,
    "29Si": 0.19867187,
    "31P": 0.40480742,
}


def observe_frequency_mhz(proton_mhz: float, nucleus: str) -> float | None:
    """The observe frequency of ``nucleus`` on a magnet named by its ¹H frequency (None if unknown)."""
    ratio = FREQUENCY_RATIO_TO_1H.get(nucleus or "1H")
    return None if ratio is None else proton_mhz * ratio
