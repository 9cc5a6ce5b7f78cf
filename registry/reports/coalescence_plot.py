"""Predicted coalescence temperature against spectrometer field, for planning a VT-NMR run.

Δν in Hz grows with the field (Δν(Hz) = Δν(ppm)·field(MHz)), so coalescence moves to higher
temperature on a bigger magnet; the prediction is :func:`registry.kinetics.coalescence_temperature`
(Gutowsky–Holm k_c, Eyring). The figure marks the usual spectrometer fields, observed (field, Tc)
points from the registry and the solvent's liquid range; above the boiling point it says that
only a pressure-rated sealed tube will do (the facility's rules decide; see
:func:`registry.kinetics.safety_notes` for the full cautions).
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import numpy as np
from numpy.typing import ArrayLike, NDArray

from registry.errors import UsageError
from registry.reports.canvas import convert, energy_text, new_figure, set_title, styled
from registry.reports.style import SCREEN, FigureStyle

if TYPE_CHECKING:
    from matplotlib.axes import Axes
    from matplotlib.figure import Figure

#: a boiling point this close above the drawn temperatures is still drawn (common practice)
NEAR_BOILING_K = 20.0
#: spectrometer fields marked on coalescence plots, MHz (common instruments; common practice)
COMMON_FIELDS_MHZ = (300.0, 400.0, 500.0, 600.0, 800.0)


@dataclass(frozen=True)
class CoalescencePrediction:
    """Predicted Tc (K) over a range of spectrometer fields for one barrier and one Δν in ppm."""

    fields_mhz: NDArray
    tc_k: NDArray
    tc_low_k: NDArray | None
    tc_high_k: NDArray | None
    dg_kj_mol: float
    dg_err_kj_mol: float | None
    dnu_ppm: float
    j_hz: float


def predict_coalescence(
    dg_kj_mol: float,
    dnu_ppm: float,
    fields_mhz: ArrayLike,
    *,
    dg_err_kj_mol: float | None = None,
    j_hz: float = 0.0,
) -> CoalescencePrediction:
    """Tc(field): Δν(Hz) = Δν(ppm)·field(MHz) grows with the field, so coalescence moves up.

    Uses :func:`registry.kinetics.coalescence_temperature` (Gutowsky–Holm k_c, Eyring); with an
    uncertainty of ΔG‡ the band is Tc at ΔG‡ ± σ.
    """
    from registry.kinetics import coalescence_temperature
    from registry.record.units import ppm_to_hz

    fields = np.asarray(fields_mhz, dtype=float)
    if dnu_ppm <= 0:
        raise UsageError("Δν must be > 0")
    dnu_hz = ppm_to_hz(dnu_ppm, 1.0) * fields
    tc = np.asarray(coalescence_temperature(dnu_hz, dg_kj_mol, j_hz=j_hz), dtype=float)
    lo = hi = None
    if dg_err_kj_mol:
        lo = np.asarray(
            coalescence_temperature(dnu_hz, dg_kj_mol - dg_err_kj_mol, j_hz=j_hz), dtype=float
        )
        hi = np.asarray(
            coalescence_temperature(dnu_hz, dg_kj_mol + dg_err_kj_mol, j_hz=j_hz), dtype=float
        )
    return CoalescencePrediction(
        fields, tc, lo, hi, float(dg_kj_mol), dg_err_kj_mol, float(dnu_ppm), float(j_hz)
    )


def coalescence_figure(
    prediction: CoalescencePrediction,
    *,
    observed: Sequence[Mapping[str, Any]] = (),
    solvent: Mapping[str, Any] | None = None,
    title: str | None = None,
    energy_unit: str = "kJ/mol",
    width: float = 6.4,
    height: float = 4.4,
    style: FigureStyle = SCREEN,
) -> Figure:
    """Predicted Tc against field, observed (field, Tc) points, and the solvent's liquid range.

    ``observed``: mappings with ``field_mhz``, ``tc_k``, ``label`` and ``flagged``. ``solvent``: ``name``,
    ``mp_k``, ``bp_k`` (either may be None); temperatures outside the liquid range are shaded.
    ``style`` (:mod:`.style`) sets colours, type and size.
    """
    p = prediction
    with styled(style):
        fig = new_figure(width, height, (0.75, 0.55, 0.75, 0.45 if title else 0.15), style)
        ax = fig.add_subplot()
        if p.tc_low_k is not None and p.tc_high_k is not None:
            ax.fill_between(
                p.fields_mhz,
                p.tc_low_k,
                p.tc_high_k,
                color=style.band,
                alpha=0.45,
                linewidth=0,
                label=f"ΔG‡ ± {convert(p.dg_err_kj_mol or 0.0, 'kJ/mol', energy_unit):.2g}"
                f" {energy_unit}",
            )
        ax.plot(
            p.fields_mhz,
            p.tc_k,
            color=style.fit,
            label=f"predicted, ΔG‡ = {energy_text(p.dg_kj_mol, None, energy_unit)}, "
            f"Δν = {p.dnu_ppm:g} ppm" + (f", J = {p.j_hz:g} Hz" if p.j_hz else ""),
        )
        for field in COMMON_FIELDS_MHZ:
            if p.fields_mhz.min() <= field <= p.fields_mhz.max():
                ax.axvline(field, color=style.rule, linewidth=1.0, zorder=0)
        _mark_observed(ax, observed, style)
        if solvent:
            _shade_outside_liquid_range(ax, solvent, p.fields_mhz, style)
        ax.set_xlabel("spectrometer frequency, ¹H (MHz)")
        ax.set_ylabel("coalescence temperature Tc (K)")
        right = ax.secondary_yaxis("right", functions=(_k_to_c, _c_to_k))
        right.set_ylabel("Tc (°C)", color=style.muted)
        right.tick_params(colors=style.muted, labelcolor=style.muted)
        if title:
            set_title(fig, ax, title, style)
        ax.legend(
            loc="lower right", fontsize=style.note_size
        )  # Tc rises with the field: below it is free
    return fig


def _mark_observed(ax: Axes, observed: Sequence[Mapping[str, Any]], style: FigureStyle) -> None:
    """Observed (field, Tc) points, each labelled (its compound's label or name); flagged ones
    (an open error finding) as crosses in the warning colour."""
    points = [o for o in observed if o.get("field_mhz") and o.get("tc_k")]
    if not points:
        return
    for flagged, marker, label in (
        (
            False,
            {"marker": "D", "color": style.data, "markersize": style.marker_size * 1.08},
            "observed in the registry",
        ),
        (
            True,
            {"marker": "X", "color": style.warn, "markersize": style.marker_size * 1.5},
            "observed, flagged: an error finding is open",
        ),
    ):
        chosen = [o for o in points if bool(o.get("flagged")) == flagged]
        if not chosen:
            continue
        ax.plot(
            [o["field_mhz"] for o in chosen],
            [o["tc_k"] for o in chosen],
            linestyle="none",
            markeredgecolor=style.paper,
            label=label,
            zorder=3,
            **marker,
        )
    for o in points:
        ax.annotate(
            str(o.get("label") or ""),
            (o["field_mhz"], o["tc_k"]),
            textcoords="offset points",
            xytext=(5, 5),
            fontsize=style.note_size - 0.5,
            color=style.muted,
        )


def _shade_outside_liquid_range(
    ax: Axes, solvent: Mapping[str, Any], fields_mhz: NDArray, style: FigureStyle
) -> None:
    """Shade above the boiling point (with the sealed-tube warning written on) and below the
    melting point; a boiling point just above the drawn range is brought into view."""
    lo_y, hi_y = ax.get_ylim()
    bp, mp = solvent.get("bp_k"), solvent.get("mp_k")
    if bp is not None and hi_y < bp < hi_y + NEAR_BOILING_K:
        hi_y = bp + 0.2 * NEAR_BOILING_K  # close enough that the reader should see it
    name = solvent.get("name") or "solvent"
    if bp is not None and bp < hi_y:
        ax.axhspan(bp, hi_y, color=style.warn, alpha=0.08, linewidth=0)
        ax.axhline(bp, color=style.warn, linewidth=1.0, linestyle="--")
        ax.text(
            fields_mhz.max(),
            bp,
            f"b.p. {name}: above it only in a pressure-rated sealed tube ",
            va="bottom",
            ha="right",
            fontsize=style.note_size - 0.5,
            color=style.warn,
        )
    if mp is not None and mp > lo_y:
        ax.axhspan(lo_y, mp, color=style.muted, alpha=0.10, linewidth=0)
        ax.text(
            fields_mhz.min(),
            mp,
            f" m.p. {name}",
            va="top",
            fontsize=style.note_size - 0.5,
            color=style.muted,
        )
    ax.set_ylim(lo_y, hi_y)


def _k_to_c(t: NDArray) -> NDArray:
    return np.asarray(t, dtype=float) - 273.15


def _c_to_k(t: NDArray) -> NDArray:
    return np.asarray(t, dtype=float) + 273.15
