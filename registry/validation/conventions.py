"""Which rate constant a stored barrier refers to, for the rules that recompute barriers, and
the factor slips that mix them up.

A measurement records its convention (per-site k_AB, exchange k_ex = k_AB + k_BA, observed,
enantiomerization, racemization; :mod:`registry.record.conventions`), its path degeneracy σ,
κ, and for a bimolecular exchange the partner's concentration c. The barrier it reports is

    ΔG‡ = RT·ln(κ·k_B·T / (h·k_eff)),   k_eff = k / (σ·c)   (c in mol/L, order 2 only),

i.e. the Eyring equation of k/(σ·c·κ) (:attr:`RateBasis.divisor`), with k the rate constant of
the recorded convention: from coalescence data either one direction's rate (per-site,
enantiomerization: k_c = πΔν/√2 for equal populations) or the sum of both (exchange,
observed, racemization: 2·k_c). An entry without a convention is read as per-site
(:data:`registry.record.conventions.DEFAULT_CONVENTION`).

A factor f in k moves ΔG‡ by −RT·ln f (RT·ln 2 = 1.73 kJ/mol at 300 K). :data:`FACTOR_SLIPS`
are the mix-ups the literature makes (common practice, no source): each applies to the
conventions where it is possible and is named only when it reproduces the reported number.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from registry.record.conventions import SUMMED
from registry.validation.data import CheckData

Array = NDArray[np.float64]

#: statistical factors tried when an entry records none (2: a C2 rotor, 3: a methyl group)
STATISTICAL_FACTORS = (2, 3)


@dataclass(frozen=True)
class RateBasis:
    """Per row: whether k is the sum of both directions, what divides it, which direction."""

    summed: NDArray[np.bool_]
    #: σ · c (order 2) · κ: the Eyring equation is evaluated for k / divisor
    divisor: Array
    #: 0 not recorded, 1 major-to-minor (leaving the major site), 2 minor-to-major
    direction: NDArray[np.int64]
    #: the recorded convention (None: unspecified) and degeneracy (NaN: not recorded)
    convention: list[str | None]
    degeneracy: Array

    def take(self, mask: NDArray[np.bool_]) -> RateBasis:
        where = np.flatnonzero(mask)
        return RateBasis(
            self.summed[mask],
            self.divisor[mask],
            self.direction[mask],
            [self.convention[i] for i in where.tolist()],
            self.degeneracy[mask],
        )


def rate_basis(data: CheckData, rows: NDArray[np.int64]) -> RateBasis:
    """The recorded basis of the rate constant of ``rows`` (positions in ``data``)."""
    convention = data.text("k_convention")[rows].tolist()
    sigma = data.col("path_degeneracy")[rows]
    kappa = data.col("kappa")[rows]
    order = data.col("reaction_order")[rows]
    conc = data.col("concentration_m")[rows]
    c = np.where((order == 2) & (conc > 0), conc, 1.0)
    divisor = np.nan_to_num(sigma, nan=1.0) * c * np.nan_to_num(kappa, nan=1.0)
    direction = np.array(
        [{"major-to-minor": 1, "minor-to-major": 2}.get(str(d), 0)
         for d in data.text("dg_direction")[rows].tolist()],
        dtype=np.int64,
    )  # fmt: skip
    summed = np.array([c_ in SUMMED for c_ in convention], dtype=bool)
    return RateBasis(summed, divisor, direction, convention, sigma)


def basis_note(basis: RateBasis, i: int) -> str:
    """A few words on a row's basis for a message ('' when the row records nothing: the message
    of such a row stays as it always was)."""
    parts = []
    conv = basis.convention[i]
    if conv:
        parts.append(f"k as {conv}")
    sigma = basis.degeneracy[i]
    if np.isfinite(sigma) and sigma != 1:
        parts.append(f"path degeneracy {int(sigma)}")
    if basis.divisor[i] != 1 and not (np.isfinite(sigma) and basis.divisor[i] == sigma):
        parts.append(f"k divided by {basis.divisor[i]:.4g} (σ·c·κ)")
    return "; ".join(parts)


# ---------------------------------------------------------------- factor slips


@dataclass(frozen=True)
class FactorSlip:
    """k taken ``factor`` times too large (ΔG‡ lower by RT·ln factor) under some conventions."""

    id: str
    factor: float
    #: the conventions it can happen under (None: unspecified, read as per-site)
    conventions: frozenset[str | None]
    text: str


_PER_SITE: frozenset[str | None] = frozenset({None, "per-site"})
FACTOR_SLIPS: tuple[FactorSlip, ...] = (
    FactorSlip("k-exchange-as-per-site", 2.0, _PER_SITE,
               "ΔG‡ computed from k_ex = k_AB + k_BA while the measurement means the per-site "
               "k_AB (record convention=exchange if the barrier is meant for k_ex)"),
    FactorSlip("k-per-site-as-exchange", 0.5, frozenset({"exchange", "observed"}),
               "ΔG‡ computed from the per-site k_AB while the measurement records k_ex "
               "(or an observed rate) = k_AB + k_BA"),
    FactorSlip("racemization-as-enantiomerization", 2.0, frozenset({"enantiomerization"}),
               "ΔG‡ computed from k_rac = 2·k_enant while the measurement means k_enant"),
    FactorSlip("enantiomerization-as-racemization", 0.5, frozenset({"racemization"}),
               "ΔG‡ computed from k_enant = k_rac/2 while the measurement means k_rac"),
)  # fmt: skip

DEGENERACY_IGNORED = "degeneracy-ignored"
STATISTICAL_FACTOR = "statistical-factor"
FACTOR_SLIP_IDS = (*(s.id for s in FACTOR_SLIPS), DEGENERACY_IGNORED, STATISTICAL_FACTOR)


def factor_options(convention: str | None, degeneracy: float) -> list[tuple[str, float, str]]:
    """(slip id, factor on the correct k, words) of every factor slip possible for one row."""
    out = [(s.id, s.factor, s.text) for s in FACTOR_SLIPS if convention in s.conventions]
    if np.isfinite(degeneracy) and degeneracy > 1:
        sigma = float(degeneracy)
        out.append((DEGENERACY_IGNORED, sigma,
                    f"the recorded path degeneracy σ = {sigma:g} not divided out of k"))  # fmt: skip
    else:
        for n in STATISTICAL_FACTORS:
            out.append((STATISTICAL_FACTOR, 1.0 / n,
                        f"k divided by a statistical factor {n} the measurement does not record "
                        f"(record degeneracy={n} if it applies)"))  # fmt: skip
    return out


# ---------------------------------------------------------------- temperature calibration


def calibration_notes(data: CheckData, rows: NDArray[np.int64]) -> list[str]:
    """For a finding's message: how the temperature of each row was calibrated (and σ(T))."""
    names = data.text("t_calibration")[rows].tolist()
    sigmas = data.col("t_calibration_err_k")[rows].tolist()
    out = []
    for name, sigma in zip(names, sigmas, strict=True):
        if name is None:
            out.append("")  # nothing recorded: the message stays as it always was
        elif name == "none":
            out.append(f"; the temperature was not calibrated (σ(T) {sigma:g} K assumed)")
        else:
            out.append(f"; temperature calibrated by {name} (σ(T) {sigma:g} K)")
    return out


def default_t_sigma(data: CheckData, rows: NDArray[np.int64], stated: Array) -> Array:
    """σ(T) of ``rows``: as stated, else the recorded calibration's (NaN: neither)."""
    return np.where(np.isfinite(stated), stated, data.col("t_calibration_err_k")[rows])
