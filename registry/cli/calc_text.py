"""Rendering the ``fluxledger calc`` records as text: numbers with sensible figures, energies in
kJ/mol and kcal/mol, temperatures in K and °C (the values in each unit come from the api).
"""

from __future__ import annotations

import math
from typing import Any

import typer


def figures(x: float | None, digits: int = 3) -> str:
    """A number with ``digits`` significant figures, plain notation where that reads well."""
    if x is None or not math.isfinite(x):
        return "n/a"
    if x != 0 and (abs(x) >= 1e6 or abs(x) < 1e-3):
        return f"{x:.{digits - 1}e}"
    return f"{x:.{digits}g}" if abs(x) >= 10**digits else f"{x:#.{digits}g}".rstrip(".")


def plus_minus(value: float, err: float | None, decimals: int = 1) -> str:
    if err is None or not math.isfinite(err):
        return f"{value:.{decimals}f}"
    return f"{value:.{decimals}f} ± {err:.{decimals}f}"


def energy_text(e: Any) -> str:
    """An :class:`~registry.kinetics.quantities.Energy` as 'x ± e kJ/mol  (y ± f kcal/mol)'."""
    return f"{plus_minus(e.kj_mol, e.err_kj_mol, 2)} kJ/mol  ({plus_minus(e.kcal_mol, e.err_kcal_mol, 2)} kcal/mol)"


def temperature_text(t: Any) -> str:
    """A :class:`~registry.kinetics.quantities.Temperature` as 'x ± e K  (y °C)'."""
    if not math.isfinite(t.k):
        return "n/a"
    return f"{plus_minus(t.k, t.err_k, 2)} K  ({t.celsius:.1f} °C)"


def duration_text(d: Any) -> str:
    """A :class:`~registry.kinetics.quantities.Duration` in its largest unit."""
    if not math.isfinite(d.seconds):
        return "n/a"
    return f"{figures(d.value)} {d.unit}"


def dnu_text(
    dnu_hz: float,
    err: float | None,
    field_mhz: float | None,
    nucleus: str = "1H",
    observe_mhz: float | None = None,
) -> str:
    """Δν in Hz and where it was measured (another nucleus: its own observe frequency)."""
    text = f"{figures(dnu_hz)}" + (f" ± {figures(err)}" if err else "") + " Hz"
    if nucleus != "1H" and field_mhz:
        where = f" at {figures(observe_mhz)} MHz" if observe_mhz else ""
        return text + f" ({nucleus}{where}, {figures(field_mhz)} MHz magnet)"
    return text + (f" at {figures(field_mhz)} MHz" if field_mhz else "")


def print_lines(
    title: str, pairs: list[tuple[str, str]], notes: list[str] | tuple[str, ...]
) -> None:
    typer.echo(title)
    width = max(len(k) for k, _ in pairs)
    for key, value in pairs:
        typer.echo(f"  {key.ljust(width)}  {value}")
    for note in notes:
        typer.echo(f"note: {note}")
