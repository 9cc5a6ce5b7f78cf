"""Reading the quantities a figure call is given: floats in canonical units as they are,
texts through the unit registry (loaded only then), rate points as texts or tuples.

Errors name the field (``dnu '30 Hz': … give the field it was measured at (dnu_field …)``),
never a CLI flag.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from typing import Any

from registry.errors import UsageError

#: a rate point given by a caller: ``"T, k"`` / ``"T; k; σk"`` text, or (T/K, k/s⁻¹[, σk/s⁻¹])
RatePointInput = str | Sequence[float | None]


def read_points(
    points: Sequence[RatePointInput],
) -> tuple[list[float], list[float], list[float | None]]:
    """Texts through the rate-point reader (units), tuples as K and s⁻¹; σk for all or none."""
    t: list[float] = []
    k: list[float] = []
    errs: list[float | None] = []
    for i, point in enumerate(points, start=1):
        if isinstance(point, str):
            from registry.kinetics.rate_table import parse_point

            ti, ki, ei = parse_point(point, field=f"points[{i}]")
        else:
            values = list(point)
            if len(values) not in (2, 3):
                raise UsageError(f"points[{i}] {point!r}: give (T in K, k in s⁻¹) or (T, k, σk)")
            ti, ki = float(values[0]), float(values[1])  # type: ignore[arg-type]
            ei = float(values[2]) if len(values) == 3 and values[2] is not None else None
        t.append(ti)
        k.append(ki)
        errs.append(ei)
    if len(t) < 2:
        raise UsageError(f"points: {len(t)} rate point(s); an Eyring plot needs at least 2")
    if any(e is None for e in errs) and not all(e is None for e in errs):
        raise UsageError("points: σk is given for some points but not all; give all or none")
    return t, k, errs


def number(
    value: float | str, quantity: str, name: str, *, default_unit: str | None = None
) -> tuple[float, float | None]:
    """A float (canonical unit) as is; a text read by the unit registry. (value, error)."""
    if isinstance(value, bool):
        raise UsageError(f"{name} {value!r}: give a number or a text with a unit")
    if isinstance(value, (int, float)):
        return float(value), None
    if not isinstance(value, str):
        raise UsageError(f"{name} {value!r}: give a number or a text with a unit")
    from registry.record.units import parse_value

    parsed = parse_value(value, quantity, field=name, default_unit=default_unit)
    return parsed.value, parsed.error


def barrier_and_shift(
    own: Mapping[str, Any],
    barrier: float | str | None,
    dnu: float | str | None,
    dnu_field: float | str | None,
    j: float | str | None,
) -> tuple[float, float | None, float, float]:
    """ΔG‡ (and its error), Δν in ppm and J in Hz: as given, else the measurement's."""
    dg, dg_err = own.get("dg_kj_mol"), own.get("dg_err_kj_mol")
    if barrier is not None:
        dg, dg_err = number(barrier, "energy", "barrier")
    dnu_ppm = shift_in_ppm(dnu, dnu_field) if dnu is not None else own.get("dnu_ppm")
    j_hz = number(j, "frequency", "j", default_unit="Hz")[0] if j is not None else None
    if dg is None:
        raise UsageError("barrier: give ΔG‡, or a measurement with a stored ΔG‡")
    if dnu_ppm is None:
        raise UsageError("dnu: give Δν, or a measurement with a stored coalescence Δν and field")
    return (
        float(dg),
        dg_err,
        float(dnu_ppm),
        float(j_hz if j_hz is not None else own.get("j_hz") or 0.0),
    )


def shift_in_ppm(dnu: float | str, dnu_field: float | str | None) -> float:
    """Δν in ppm; a frequency needs the field it was measured at (Δν in Hz scales with field)."""
    if isinstance(dnu, (int, float)) and not isinstance(dnu, bool):
        if dnu <= 0:
            raise UsageError(f"dnu {dnu!r}: Δν must be > 0 (ppm)")
        return float(dnu)
    if not isinstance(dnu, str):
        raise UsageError(f"dnu {dnu!r}: give Δν in ppm or a text with a unit")
    from registry.record.units import parse_value

    # read at a nominal 1 MHz: a value in ppm comes back as Hz per MHz, i.e. in ppm
    parsed = parse_value(dnu, "shift", field="dnu", spectrometer_mhz=1.0)
    if parsed.unit.strip().lower() == "ppm":
        return parsed.value
    if dnu_field is None:
        raise UsageError(
            f"dnu {dnu!r}: a Δν in Hz holds at one field only; give the field it was measured"
            " at (dnu_field, e.g. '400 MHz') or Δν in ppm"
        )
    field_mhz = number(dnu_field, "field", "dnu_field", default_unit="MHz")[0]
    if field_mhz <= 0:
        raise UsageError(f"dnu_field {dnu_field!r}: the field must be > 0")
    return parsed.value / field_mhz
