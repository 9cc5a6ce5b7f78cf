"""ΔG‡ at the coalescence temperature from what a chemist writes down at the spectrometer.

The workflow behind ``fluxledger calc coalescence`` and :func:`registry.api.calc_coalescence`:
read Tc, Δν (Hz, or ppm at a field), the optional coupling J or population ratio and their
uncertainties; choose the method (Gutowsky–Holm, Kurland–Rubin–Wise, Shanan-Atidi–Bar-Eli,
see :mod:`.coalescence`); say what was assumed. Returns a frozen record whose
:meth:`~CoalescenceCalc.to_dict` is the JSON the command prints.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import Any

from registry.errors import UsageError
from registry.kinetics.quantities import (
    Energy,
    QuantityInput,
    Temperature,
    energy,
    read_field_mhz,
    read_observe_mhz,
    read_optional,
    read_positive,
    read_quantity,
    read_ratio,
    temperature,
)

#: the Tc uncertainty assumed when none is given (common practice, no source)
DEFAULT_TC_ERR_K = 2.0

EQUAL = "equal populations (Gutowsky–Holm)"
COUPLED = "coupled AB (Kurland–Rubin–Wise)"
UNEQUAL = "unequal populations (Shanan-Atidi–Bar-Eli)"


@dataclass(frozen=True)
class CoalescenceCalc:
    """k_c and ΔG‡(Tc) for two equally populated sites (coupled or not)."""

    method: str
    tc: Temperature
    dnu_hz: float
    dnu_err_hz: float | None
    field_mhz: float | None
    j_hz: float
    k_c_per_s: float
    dg: Energy
    dg_err_from_tc_kj_mol: float
    dg_err_from_dnu_kj_mol: float
    dg_err_from_j_kj_mol: float
    notes: tuple[str, ...]
    nucleus: str = "1H"
    observe_mhz: float | None = None  # where a Δν in ppm was converted (the nucleus' own)

    @property
    def coupled(self) -> bool:
        return bool(self.j_hz)

    def to_dict(self) -> dict[str, Any]:
        return {
            "method": self.method,
            "tc_k": self.tc.k,
            "tc_err_k": self.tc.err_k,
            "dnu_hz": self.dnu_hz,
            "dnu_err_hz": self.dnu_err_hz,
            "nucleus": self.nucleus,
            "observe_mhz": self.observe_mhz,
            "j_hz": self.j_hz,
            "k_c_per_s": self.k_c_per_s,
            "dg_kj_mol": self.dg.kj_mol,
            "dg_err_kj_mol": self.dg.err_kj_mol,
            "dg_kcal_mol": self.dg.kcal_mol,
            "dg_err_kcal_mol": self.dg.err_kcal_mol,
            "dg_err_from_tc_kj_mol": self.dg_err_from_tc_kj_mol,
            "dg_err_from_dnu_kj_mol": self.dg_err_from_dnu_kj_mol,
            "dg_err_from_j_kj_mol": self.dg_err_from_j_kj_mol,
            "notes": list(self.notes),
        }


@dataclass(frozen=True)
class UnequalCoalescenceCalc:
    """Both directions of exchange between a major and a minor site at coalescence."""

    method: str
    tc: Temperature
    dnu_hz: float
    dnu_err_hz: float | None
    field_mhz: float | None
    ratio: float
    delta_p: float
    x: float
    k_major_to_minor_per_s: float
    k_minor_to_major_per_s: float
    dg_major_to_minor: Energy
    dg_minor_to_major: Energy
    notes: tuple[str, ...]
    nucleus: str = "1H"
    observe_mhz: float | None = None

    def to_dict(self) -> dict[str, Any]:
        return {
            "method": self.method,
            "tc_k": self.tc.k,
            "tc_err_k": self.tc.err_k,
            "dnu_hz": self.dnu_hz,
            "dnu_err_hz": self.dnu_err_hz,
            "nucleus": self.nucleus,
            "observe_mhz": self.observe_mhz,
            "ratio": self.ratio,
            "delta_p": self.delta_p,
            "x": self.x,
            "k_major_to_minor_per_s": self.k_major_to_minor_per_s,
            "k_minor_to_major_per_s": self.k_minor_to_major_per_s,
            "dg_major_to_minor_kj_mol": self.dg_major_to_minor.kj_mol,
            "dg_major_to_minor_err_kj_mol": self.dg_major_to_minor.err_kj_mol,
            "dg_minor_to_major_kj_mol": self.dg_minor_to_major.kj_mol,
            "dg_minor_to_major_err_kj_mol": self.dg_minor_to_major.err_kj_mol,
            "dg_major_to_minor_kcal_mol": self.dg_major_to_minor.kcal_mol,
            "dg_minor_to_major_kcal_mol": self.dg_minor_to_major.kcal_mol,
            "notes": list(self.notes),
        }


def calc_coalescence(
    *,
    tc: QuantityInput,
    dnu: QuantityInput,
    field: QuantityInput | None = None,
    tc_err: QuantityInput | None = None,
    dnu_err: QuantityInput | None = None,
    j: QuantityInput | None = None,
    j_err: QuantityInput | None = None,
    ratio: QuantityInput | None = None,
    ratio_err: QuantityInput | None = None,
    kappa: float = 1.0,
    nucleus: str | None = None,
) -> CoalescenceCalc | UnequalCoalescenceCalc:
    """ΔG‡ at Tc with its uncertainty from Tc and Δν (and J or the population ratio).

    ``dnu`` in ppm needs ``field`` (the ¹H frequency, MHz) and is converted at the observe
    frequency of ``nucleus`` (default ¹H: a ¹³C Δν in ppm on a 600 MHz magnet is taken at
    150.9 MHz). An uncertainty written with the value
    (``'261 ± 1 K'``) counts when the separate one is not given; with none for Tc, ±2 K is
    assumed and said in ``notes``.
    """
    field_mhz = read_field_mhz(field)
    observed, observe_mhz = read_observe_mhz(field_mhz, nucleus, dnu)
    tc_k, tc_written_err = read_positive(tc, "temperature", "tc")
    dnu_hz, dnu_written_err = read_positive(dnu, "shift", "dnu", spectrometer_mhz=observe_mhz)
    notes: list[str] = []
    tc_e = read_optional(tc_err, "temperature_difference", "tc_err", default_unit="K")
    if tc_e is None:
        tc_e = tc_written_err
    if tc_e is None:
        tc_e = DEFAULT_TC_ERR_K
        notes.append("no Tc uncertainty given: ±2 K assumed (typical for coalescence)")
    dnu_e = read_optional(dnu_err, "shift", "dnu_err", spectrometer_mhz=observe_mhz)
    if dnu_e is None:
        dnu_e = dnu_written_err
    if dnu_e is None:
        notes.append("no Δν uncertainty given: taken as 0")
    if ratio is not None and j is not None:
        raise UsageError("ratio (unequal populations) and j (coupled AB) cannot be combined")
    if ratio is not None:
        r = read_ratio(ratio)
        r_e = (
            None if ratio_err is None else read_quantity(ratio_err, "dimensionless", "ratio_err")[0]
        )
        res = _unequal(tc_k, tc_e, dnu_hz, dnu_e, field_mhz, r, r_e, kappa, notes)
        return replace(res, nucleus=observed, observe_mhz=observe_mhz)
    from registry.kinetics.coalescence import coalescence_barrier

    j_hz = read_optional(j, "frequency", "j", default_unit="Hz")
    j_e = read_optional(j_err, "frequency", "j_err", default_unit="Hz")
    res = coalescence_barrier(tc_k, dnu_hz, j_hz, tc_e, dnu_e, j_err_hz=j_e, kappa=kappa)
    return CoalescenceCalc(
        method=COUPLED if j_hz else EQUAL,
        tc=temperature(res.tc_k, tc_e),
        dnu_hz=float(res.dnu_hz),
        dnu_err_hz=dnu_e,
        field_mhz=field_mhz,
        j_hz=float(res.j_hz),
        k_c_per_s=float(res.k_c_per_s),
        dg=energy(res.dg_kj_mol, res.dg_err_kj_mol),
        dg_err_from_tc_kj_mol=float(res.dg_err_from_tc_kj_mol),
        dg_err_from_dnu_kj_mol=float(res.dg_err_from_dnu_kj_mol),
        dg_err_from_j_kj_mol=float(res.dg_err_from_j_kj_mol),
        notes=tuple(notes),
        nucleus=observed,
        observe_mhz=observe_mhz,
    )


def _unequal(
    tc_k: float,
    tc_e: float,
    dnu_hz: float,
    dnu_e: float | None,
    field_mhz: float | None,
    ratio: float,
    ratio_e: float | None,
    kappa: float,
    notes: list[str],
) -> UnequalCoalescenceCalc:
    from registry.kinetics.coalescence import unequal_population_barriers

    res = unequal_population_barriers(tc_k, dnu_hz, ratio, tc_e, dnu_e, ratio_e, kappa=kappa)
    return UnequalCoalescenceCalc(
        method=UNEQUAL,
        tc=temperature(res.tc_k, tc_e),
        dnu_hz=float(res.dnu_hz),
        dnu_err_hz=dnu_e,
        field_mhz=field_mhz,
        ratio=float(res.ratio),
        delta_p=float(res.delta_p),
        x=float(res.x),
        k_major_to_minor_per_s=float(res.k_ab_per_s),
        k_minor_to_major_per_s=float(res.k_ba_per_s),
        dg_major_to_minor=energy(res.dg_ab_kj_mol, res.dg_ab_err_kj_mol),
        dg_minor_to_major=energy(res.dg_ba_kj_mol, res.dg_ba_err_kj_mol),
        notes=tuple(notes),
    )
