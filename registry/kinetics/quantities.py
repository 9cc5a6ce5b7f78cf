"""Inputs and outputs of the bench calculations: quantities as text or floats in, values in
the units a chemist reads (kcal/mol next to kJ/mol, °C next to K, e.u.) out.

An input is either a text with its unit (``"-12 °C"``, ``"0.045 ppm"``, ``"21 kcal/mol"``,
``"261 ± 1 K"``), read by :func:`registry.record.units.parse_value`, or a plain number already
in the canonical unit (K, Hz, MHz, kJ/mol, J/(mol·K), s). Errors name the field and the text
(``tc: cannot read '0 K': must be > 0``). Every unit conversion goes through
:mod:`registry.record.units` (pint), which is imported when a function here runs.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from registry.errors import UnitError, UsageError

#: a quantity as given: a text with its unit, or a number in the canonical unit
QuantityInput = str | float | int


def read_quantity(
    value: QuantityInput,
    quantity: str,
    field: str,
    *,
    default_unit: str | None = None,
    spectrometer_mhz: float | None = None,
) -> tuple[float, float | None]:
    """(value, uncertainty or None) in the canonical unit of ``quantity``."""
    if isinstance(value, str):
        from registry.record.units import parse_value

        parsed = parse_value(
            value,
            quantity,
            field=field,
            default_unit=default_unit,
            spectrometer_mhz=spectrometer_mhz,
        )
        return parsed.value, parsed.error
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        raise UnitError(field, repr(value), "expected a number or a text with its unit")
    number = float(value)
    if not math.isfinite(number):
        raise UnitError(field, str(value), "number is not finite")
    return number, None


def read_positive(
    value: QuantityInput, quantity: str, field: str, **kw: object
) -> tuple[float, float | None]:
    """Like :func:`read_quantity` for a value that must be > 0 (a Δν of 0 Hz, a Tc of 0 K)."""
    number, error = read_quantity(value, quantity, field, **kw)  # type: ignore[arg-type]
    if not number > 0:
        raise UnitError(field, str(value), "must be > 0")
    return number, error


def read_optional(
    value: QuantityInput | None, quantity: str, field: str, **kw: object
) -> float | None:
    """The canonical value of an optional input (its uncertainty dropped), None when absent."""
    if value is None:
        return None
    return read_quantity(value, quantity, field, **kw)[0]  # type: ignore[arg-type]


def read_field_mhz(value: QuantityInput | None, field: str = "field") -> float | None:
    """A spectrometer frequency in MHz (MHz when no unit is written); None when absent."""
    if value is None:
        return None
    mhz, _ = read_quantity(value, "field", field, default_unit="MHz")
    if not mhz > 0:
        raise UnitError(field, str(value), "the spectrometer frequency must be > 0 MHz")
    return mhz


def read_observe_mhz(
    field_mhz: float | None, nucleus: str | None, dnu: QuantityInput | None = None
) -> tuple[str, float | None]:
    """(the observed nucleus as stored, the frequency at which its Δν in ppm becomes Hz).

    A spectrometer is named by its ¹H frequency; a ¹³C signal on a 600 MHz magnet is observed
    near 150.9 MHz (:mod:`registry.record.nuclei`), so ppm is converted there, as ``add`` does.
    A nucleus whose frequency ratio is not known cannot take a Δν in ppm (``dnu``).
    """
    if nucleus is None:
        return "1H", field_mhz
    from registry.record.nuclei import observe_frequency_mhz
    from registry.record.vocab import nucleus_name

    name = nucleus_name(str(nucleus))
    if field_mhz is None:
        return name, None
    observe = observe_frequency_mhz(field_mhz, name)
    if observe is None and isinstance(dnu, str) and dnu.strip().lower().endswith("ppm"):
        raise UnitError(
            "dnu", dnu, f"give Δν in Hz: the observe frequency of {name} is not known to fluxledger"
        )
    return name, observe


def read_ratio(value: QuantityInput, field: str = "ratio") -> float:
    """A population ratio major/minor: ``3``, ``'3'``, ``'3:1'`` or ``'75:25'`` (≥ 1)."""
    text = str(value)
    parts = text.split(":") if isinstance(value, str) else [value]
    if len(parts) > 2:
        raise UnitError(field, text, "write the ratio as '3' or '75:25' (major:minor)")
    if isinstance(value, str):
        from registry.record.units import parse_value

        nums = [parse_value(p, "dimensionless", field=field).value for p in parts]
    else:
        nums = [read_quantity(value, "dimensionless", field)[0]]
    if any(not n > 0 for n in nums):
        raise UnitError(field, text, "populations must be > 0")
    ratio = nums[0] / nums[1] if len(nums) == 2 else nums[0]
    if ratio < 1:
        raise UnitError(
            field, text, "the ratio is major/minor and must be ≥ 1 (e.g. '3' or '75:25')"
        )
    return ratio


def read_fraction(value: QuantityInput, field: str) -> tuple[float, float | None]:
    """A ratio or fraction as a plain number (``0.42``) or a percentage (``'42 %'``)."""
    if isinstance(value, str) and value.strip().endswith("%"):
        from registry.record.units import convert

        number, err = read_quantity(value.strip()[:-1], "dimensionless", field)
        scale = convert(1.0, "percent", "")
        return number * scale, None if err is None else err * scale
    return read_quantity(value, "dimensionless", field)


def read_temperature(
    value: QuantityInput | None, field: str = "temperature"
) -> tuple[float, float | None] | None:
    """An optional temperature (K, with the uncertainty written with it), None when absent."""
    if value is None:
        return None
    t = read_quantity(value, "temperature", field)
    if not t[0] > 0:
        raise UnitError(field, str(value), "must be above 0 K")
    return t


def barrier_at(
    k_per_s: float,
    k_err_per_s: float | None,
    t: tuple[float, float | None] | None,
    kappa: float,
    notes: list[str],
) -> Energy | None:
    """ΔG‡ (± σ from σk and σT) of one molecule's rate constant at the temperature read by
    :func:`read_temperature`; None without a temperature, or for k ≤ 0 (said in ``notes``)."""
    if t is None:
        return None
    if not k_per_s > 0:
        if "a rate constant ≤ 0 has no ΔG‡" not in notes:
            notes.append("a rate constant ≤ 0 has no ΔG‡")
        return None
    from registry.kinetics.eyring import barrier_with_error

    dg, err = barrier_with_error(k_per_s, t[0], k_err_per_s=k_err_per_s, t_err_k=t[1], kappa=kappa)
    return energy(dg, err)


def kj_mol(e: Energy | None) -> float | None:
    """An optional energy's value in kJ/mol (for JSON)."""
    return None if e is None else e.kj_mol


def kj_mol_err(e: Energy | None) -> float | None:
    """An optional energy's σ in kJ/mol (for JSON)."""
    return None if e is None else e.err_kj_mol


def optional_temperature(t: tuple[float, float | None] | None) -> Temperature | None:
    """The :class:`Temperature` of a value read by :func:`read_temperature`."""
    return None if t is None else temperature(t[0], t[1])


def read_barrier(
    dg: QuantityInput | None, dh: QuantityInput | None, ds: QuantityInput | None
) -> dict[str, float | None]:
    """ΔG‡ alone, or ΔH‡ with ΔS‡, as keyword arguments for the planning functions."""
    if dg is not None and (dh is not None or ds is not None):
        raise UsageError("give dg, or dh with ds, not both")
    if dg is None and (dh is None or ds is None):
        raise UsageError("give the barrier: dg, or both dh and ds")
    return {
        "dg_kj_mol": read_optional(dg, "energy", "dg"),
        "dh_kj_mol": read_optional(dh, "energy", "dh"),
        "ds_j_mol_k": read_optional(ds, "entropy", "ds"),
    }


# --- values as a chemist reads them -------------------------------------------------------


@dataclass(frozen=True)
class Energy:
    """A molar energy and its standard error in kJ/mol and kcal/mol (error None: not known)."""

    kj_mol: float
    err_kj_mol: float | None
    kcal_mol: float
    err_kcal_mol: float | None


@dataclass(frozen=True)
class Temperature:
    """A temperature in K (with its uncertainty, None: not stated) and in °C."""

    k: float
    err_k: float | None
    celsius: float


@dataclass(frozen=True)
class Entropy:
    """A molar entropy and its standard error in J/(mol·K) and in e.u. (cal mol⁻¹ K⁻¹)."""

    j_mol_k: float
    err_j_mol_k: float | None
    eu: float
    err_eu: float | None


@dataclass(frozen=True)
class Duration:
    """A time in s and in the largest of s, min, h, days, years that keeps it ≥ 1."""

    seconds: float
    value: float
    unit: str


def energy(kj_mol: float, err_kj_mol: float | None = None) -> Energy:
    """``kj_mol`` (± ``err_kj_mol``) with its kcal/mol values (thermochemical calorie)."""
    from registry.record.units import energy_from_kj

    err = None if err_kj_mol is None else float(err_kj_mol)
    return Energy(
        float(kj_mol),
        err,
        energy_from_kj(float(kj_mol), "kcal/mol"),
        None if err is None else energy_from_kj(err, "kcal/mol"),
    )


def temperature(t_k: float, err_k: float | None = None) -> Temperature:
    """``t_k`` in K and °C; NaN stays NaN."""
    from registry.record.units import convert

    t = float(t_k)
    return Temperature(t, err_k, convert(t, "K", "degC") if math.isfinite(t) else math.nan)


def entropy(j_mol_k: float, err_j_mol_k: float | None = None) -> Entropy:
    """``j_mol_k`` (± ``err_j_mol_k``) with its e.u. values."""
    from registry.record.units import convert

    err = None if err_j_mol_k is None else float(err_j_mol_k)
    return Entropy(
        float(j_mol_k),
        err,
        convert(float(j_mol_k), "J/(mol*K)", "cal/(mol*K)"),
        None if err is None else convert(err, "J/(mol*K)", "cal/(mol*K)"),
    )


#: display units of a duration, largest first: (pint unit, label)
_DURATION_UNITS = (("year", "years"), ("day", "days"), ("hour", "h"), ("minute", "min"))


def duration(seconds: float) -> Duration:
    """``seconds`` in the largest unit that keeps the number ≥ 1 (a year is 365.25 days)."""
    from registry.record.units import convert

    s = float(seconds)
    if math.isfinite(s):
        for unit, label in _DURATION_UNITS:
            amount = convert(s, "s", unit)
            if amount >= 1.0:
                return Duration(s, amount, label)
    return Duration(s, s, "s")
