"""ΔG‡ at coalescence recomputed from stored Tc, Δν, J and populations, for whole columns.

The formula follows the data: Gutowsky–Holm k_c = πΔν/√2 for two equally populated uncoupled
sites (H. S. Gutowsky, C. H. Holm, J. Chem. Phys. 25, 1228 (1956)); π√(Δν² + 6J²)/√2 for a
coupled AB pair (R. J. Kurland, M. B. Rubin, W. B. Wise, J. Chem. Phys. 40, 2426 (1964));
Shanan-Atidi and Bar-Eli (J. Phys. Chem. 74, 961 (1970)) for unequal populations, where the
two directions have different barriers. The Eyring equation turns k_c into ΔG‡. The rate and
barrier functions are those of :mod:`registry.kinetics`; this module only lets a caller swap
one ingredient at a time (the temperature, Δν, J, the k_c factor, ln vs log10) so that the
slips in :mod:`.slips` are the same computation with one thing done wrong.

The rate that enters the Eyring equation is the one the measurement records
(:mod:`.conventions`): one direction's k (per-site, enantiomerization, or unspecified) or the
sum of both (exchange, observed, racemization), divided by σ·c·κ. With unequal populations a
recorded direction (major-to-minor: leaving the major site) picks that direction's barrier;
without one the check takes whichever direction is nearer the reported value.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np
from numpy.typing import NDArray

from registry import kinetics

Array = NDArray[np.float64]


@dataclass(frozen=True)
class CoalescenceInputs:
    """The coalescence data of the rows being checked (NaN where a value is missing)."""

    tc_k: Array
    dnu_hz: Array
    j_hz: Array  # 0 where no J is stored
    ratio: Array  # NaN or 1 for equal populations
    field_mhz: Array
    dg_t_k: Array  # NaN unless a temperature for ΔG‡ was stated
    reported_kj_mol: Array
    summed: NDArray[np.bool_]  # k is k_AB + k_BA (exchange, observed, racemization)
    divisor: Array  # σ·c·κ: the Eyring equation takes k / divisor
    direction: NDArray[np.int64]  # 0 not recorded, 1 major-to-minor, 2 minor-to-major
    convention: NDArray[np.object_]  # the recorded convention (None: unspecified)
    degeneracy: Array  # the recorded path degeneracy (NaN: not recorded)

    @property
    def unequal(self) -> NDArray[np.bool_]:
        with np.errstate(invalid="ignore"):
            return np.nan_to_num(self.ratio, nan=1.0) > 1.0 + 1e-9

    @property
    def coupled(self) -> NDArray[np.bool_]:
        return ~self.unequal & (np.abs(self.j_hz) > 0)

    def take(self, mask: NDArray[np.bool_]) -> CoalescenceInputs:
        return CoalescenceInputs(**{k: v[mask] for k, v in self.__dict__.items()})

    def with_(self, **changes: Array) -> CoalescenceInputs:
        return replace(self, **changes)


@dataclass(frozen=True)
class Recomputed:
    """Rate constants and ΔG‡ for leaving each site (equal for equal populations)."""

    k1_per_s: Array  # leaving the major (or either) site, as it enters the Eyring equation
    k2_per_s: Array  # leaving the minor site
    dg1_kj_mol: Array
    dg2_kj_mol: Array
    direction: NDArray[np.int64]  # the recorded direction (0: none)

    def take(self, mask: NDArray[np.bool_]) -> Recomputed:
        return Recomputed(*(v[mask] for v in self.__dict__.values()))

    def with_barriers(self, dg1: Array, dg2: Array) -> Recomputed:
        return Recomputed(self.k1_per_s, self.k2_per_s, dg1, dg2, self.direction)

    def nearest(self, reported: Array) -> tuple[Array, NDArray[np.bool_]]:
        """Per row, the recorded direction's barrier, else whichever is closer to the reported
        one (True where that is leaving the major site, or either of equal ones)."""
        first = ~(np.abs(reported - self.dg2_kj_mol) < np.abs(reported - self.dg1_kj_mol))
        first = np.where(self.direction == 1, True, np.where(self.direction == 2, False, first))
        return np.where(first, self.dg1_kj_mol, self.dg2_kj_mol), first


def rates(inp: CoalescenceInputs) -> tuple[Array, Array]:
    """k_c leaving each site, by the formula that fits each row's data."""
    n = inp.tc_k.size
    k1 = np.full(n, np.nan)
    k2 = np.full(n, np.nan)
    unequal = inp.unequal
    equal = ~unequal
    if equal.any():
        k = np.atleast_1d(
            kinetics.coalescence_rate(inp.dnu_hz[equal], inp.j_hz[equal], invalid="nan")
        )
        k1[equal] = k
        k2[equal] = k
    if unequal.any():
        res = kinetics.unequal_population_barriers(
            inp.tc_k[unequal], inp.dnu_hz[unequal], inp.ratio[unequal], invalid="nan"
        )
        k1[unequal] = np.atleast_1d(res.k_ab_per_s)
        k2[unequal] = np.atleast_1d(res.k_ba_per_s)
    return k1, k2


def on_basis(inp: CoalescenceInputs, k1: Array, k2: Array) -> tuple[Array, Array]:
    """Each direction's rate as the measurement's convention has it, over σ·c·κ."""
    total = k1 + k2
    k1 = np.where(inp.summed, total, k1) / inp.divisor
    k2 = np.where(inp.summed, total, k2) / inp.divisor
    return k1, k2


def recompute(
    inp: CoalescenceInputs,
    *,
    t_eyring_k: Array | None = None,
    kc_scale: float = 1.0,
    log10: bool = False,
    rates_per_s: tuple[Array, Array] | None = None,
) -> Recomputed:
    """ΔG‡ from the coalescence data; the keywords reproduce a slip (see :mod:`.slips`).

    ``rates_per_s`` are the rates as they enter the Eyring equation (convention and σ·c·κ
    applied) when the caller has them already (a slip that changes only the temperature or
    the k_c factor), so they are not computed again.
    """
    k1, k2 = on_basis(inp, *rates(inp)) if rates_per_s is None else rates_per_s
    k1 = k1 * kc_scale
    k2 = k2 * kc_scale
    t = inp.tc_k if t_eyring_k is None else t_eyring_k
    # both directions in one call (one pass of the input checks instead of two)
    with np.errstate(invalid="ignore", divide="ignore"):
        both = kinetics.eyring_barrier(
            np.concatenate([k1, k2]), np.concatenate([t, t]), invalid="nan"
        )
    dg = np.atleast_1d(both).astype(float)
    dg1, dg2 = dg[: k1.size], dg[k1.size :]
    if log10:
        dg1 = dg1 / np.log(10.0)
        dg2 = dg2 / np.log(10.0)
    return Recomputed(k1, k2, dg1, dg2, inp.direction)


def stack(inputs: list[CoalescenceInputs]) -> CoalescenceInputs:
    """Several versions of the same rows as one (to recompute them in one pass)."""
    return CoalescenceInputs(
        **{k: np.concatenate([getattr(i, k) for i in inputs]) for k in inputs[0].__dict__}
    )


def uncertainty(inp: CoalescenceInputs, tc_err_k: Array, dnu_err_hz: Array) -> tuple[Array, Array]:
    """Propagated standard uncertainty of ΔG‡ leaving each site (0 where none is stated)."""
    n = inp.tc_k.size
    e1 = np.zeros(n)
    e2 = np.zeros(n)
    tce = np.nan_to_num(tc_err_k, nan=0.0)
    dne = np.nan_to_num(dnu_err_hz, nan=0.0)
    unequal = inp.unequal
    equal = ~unequal
    if equal.any():
        res = kinetics.coalescence_barrier(
            inp.tc_k[equal],
            inp.dnu_hz[equal],
            inp.j_hz[equal],
            tce[equal],
            dne[equal],
            invalid="nan",
        )
        e1[equal] = np.atleast_1d(res.dg_err_kj_mol)
        e2[equal] = e1[equal]
    if unequal.any():
        res2 = kinetics.unequal_population_barriers(
            inp.tc_k[unequal],
            inp.dnu_hz[unequal],
            inp.ratio[unequal],
            tce[unequal],
            dne[unequal],
            invalid="nan",
        )
        e1[unequal] = np.atleast_1d(res2.dg_ab_err_kj_mol)
        e2[unequal] = np.atleast_1d(res2.dg_ba_err_kj_mol)
    return np.nan_to_num(e1, nan=0.0), np.nan_to_num(e2, nan=0.0)
