"""Figures of fitted data: Eyring plots and barrier overviews (the coalescence planning figure
is :mod:`.coalescence_plot`; the canvas and file writing :mod:`.canvas`).

The numbers drawn come from :mod:`registry.kinetics`; this module adds only the 95 % confidence
band of the fitted line, y(x) ± c·√(gᵀ·C·g) with g = (1, x) and C the covariance of
(intercept, slope) — the usual band for the mean response of a straight-line fit (e.g.
D. C. Montgomery and G. C. Runger, Applied Statistics and Probability for Engineers, ch. 11,
"confidence interval on the mean response"; from memory). c is the fit's own 95 % factor
(Student's t or the normal quantile), so there is one quantile in the code.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import numpy as np
from numpy.typing import ArrayLike, NDArray

from registry.errors import UsageError
from registry.kinetics.constants import STANDARD_TEMPERATURE_K
from registry.reports import theme
from registry.reports.canvas import convert, energy_text, entropy_text, new_figure, styled

if TYPE_CHECKING:
    from matplotlib.figure import Figure

    from registry.kinetics import EyringFit

# --- Eyring ----------------------------------------------------------------------------------


def eyring_band(fit: EyringFit, inv_t: ArrayLike) -> tuple[NDArray, NDArray]:
    """ln(k/T) of the fitted line at x = 1/T and the half-width of its 95 % confidence band.

    The half-width is NaN when the fit has no degrees of freedom to estimate the scatter
    (two points without σ_k).
    """
    x = np.asarray(inv_t, dtype=float)
    line = fit.line
    y = line.intercept + line.slope * x
    c = line.cov
    var = c[0, 0] + 2.0 * x * c[0, 1] + x * x * c[1, 1]
    with np.errstate(invalid="ignore"):
        half = fit.ci95_factor * np.sqrt(np.where(var >= 0, var, np.nan))
    return y, half


@dataclass(frozen=True)
class EyringSummary:
    """What an Eyring figure shows, as numbers (kJ/mol, J/(mol·K), K)."""

    n_points: int
    dh_kj_mol: float
    dh_err_kj_mol: float
    ds_j_mol_k: float
    ds_err_j_mol_k: float
    t_mean_k: float
    dg_mean_kj_mol: float
    dg_mean_err_kj_mol: float
    t_ref_k: float
    dg_ref_kj_mol: float
    dg_ref_err_kj_mol: float
    r_squared: float
    band: bool
    warnings: tuple[str, ...]

    def as_dict(self) -> dict[str, Any]:
        return {k: getattr(self, k) for k in self.__dataclass_fields__}


def eyring_summary(fit: EyringFit, *, t_ref_k: float = STANDARD_TEMPERATURE_K) -> EyringSummary:
    """ΔH‡, ΔS‡ and ΔG‡ at the mean measured temperature and at ``t_ref_k`` with their errors."""
    t_mean = float(np.mean(fit.t_k))
    at_mean = fit.dg_at(t_mean)
    at_ref = fit.dg_at(t_ref_k)
    _, half = eyring_band(fit, np.array([1.0 / t_mean]))
    notes = list(fit.warnings)
    if at_ref.warning and at_ref.warning not in notes:
        notes.append(at_ref.warning)
    return EyringSummary(
        n_points=fit.n_points,
        dh_kj_mol=fit.dh_kj_mol,
        dh_err_kj_mol=fit.dh_err_kj_mol,
        ds_j_mol_k=fit.ds_j_mol_k,
        ds_err_j_mol_k=fit.ds_err_j_mol_k,
        t_mean_k=t_mean,
        dg_mean_kj_mol=at_mean.dg_kj_mol,
        dg_mean_err_kj_mol=at_mean.dg_err_kj_mol,
        t_ref_k=float(t_ref_k),
        dg_ref_kj_mol=at_ref.dg_kj_mol,
        dg_ref_err_kj_mol=at_ref.dg_err_kj_mol,
        r_squared=fit.r_squared,
        band=bool(np.isfinite(half).all()),
        warnings=tuple(notes),
    )


def eyring_figure(
    fit: EyringFit,
    *,
    title: str | None = None,
    energy_unit: str = "kJ/mol",
    t_ref_k: float = STANDARD_TEMPERATURE_K,
    k_err_per_s: ArrayLike | None = None,
    width: float = 6.4,
    height: float = 4.4,
) -> tuple[Figure, EyringSummary]:
    """ln(k/T) against 1/T with the weighted fit line, its 95 % band and the parameters written on.

    ``k_err_per_s`` (the σ_k the fit was given, in the same order) draws error bars.
    """
    summary = eyring_summary(fit, t_ref_k=t_ref_k)
    t, k = fit.t_k, fit.k_per_s
    inv = 1.0 / t
    y = np.log(k / t)
    span = float(inv.max() - inv.min()) or float(inv.mean()) * 0.02
    xs = np.linspace(inv.min() - 0.06 * span, inv.max() + 0.06 * span, 200)
    line, half = eyring_band(fit, xs)
    with styled():
        fig = new_figure(width, height, (0.75, 0.55, 0.15, 0.75 if title else 0.5))
        ax = fig.add_subplot()
        if summary.band:
            ax.fill_between(
                1e3 * xs,
                line - half,
                line + half,
                color=theme.BAND,
                alpha=0.45,
                linewidth=0,
                label="95 % confidence band of the line",
            )
        ax.plot(1e3 * xs, line, color=theme.FIT, linewidth=1.8, label="weighted Eyring fit")
        yerr = None
        if k_err_per_s is not None:
            yerr = np.asarray(k_err_per_s, dtype=float) / k  # σ(ln k) = σ_k / k
        ax.errorbar(
            1e3 * inv,
            y,
            yerr=yerr,
            fmt="o",
            color=theme.DATA,
            markersize=6,
            markeredgecolor=theme.PAPER,
            markeredgewidth=1.0,
            elinewidth=1.0,
            capsize=2.5,
            label="measured rate constants",
            zorder=3,
        )
        ax.set_xlabel("10³ / T   (K⁻¹)")
        ax.set_ylabel("ln(k / T)   (k in s⁻¹, T in K)")
        top = ax.secondary_xaxis("top", functions=(_thousand_over, _thousand_over))
        top.set_xlabel("T (K)", color=theme.MUTED)
        top.tick_params(colors=theme.MUTED, labelcolor=theme.MUTED)
        if title:
            ax.set_title(title)
        lines = eyring_text(summary, energy_unit)
        ax.text(
            0.98,
            0.97,
            "\n".join(lines),
            transform=ax.transAxes,
            ha="right",
            va="top",
            fontsize=8.5,
            color=theme.INK,
            linespacing=1.45,
            bbox={"boxstyle": "round,pad=0.5", "fc": "#ffffff", "ec": theme.RULE, "alpha": 0.92},
        )
        ax.legend(loc="lower left", fontsize=8)
    return fig, summary


def _thousand_over(x: NDArray) -> NDArray:
    x = np.asarray(x, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.where(np.abs(x) > 1e-9, 1e3 / np.where(np.abs(x) > 1e-9, x, 1.0), np.inf)


def eyring_text(s: EyringSummary, energy_unit: str) -> list[str]:
    """The lines written on an Eyring figure (and printed by the CLI), ± one standard error."""
    ref = (
        f"ΔG‡({s.t_ref_k:.2f} K) = {energy_text(s.dg_ref_kj_mol, s.dg_ref_err_kj_mol, energy_unit)}"
    )
    if abs(s.t_ref_k - s.t_mean_k) > 10.0 and any("extrapolated" in w for w in s.warnings):
        ref += "  (extrapolated)"
    return [
        f"ΔH‡ = {energy_text(s.dh_kj_mol, s.dh_err_kj_mol, energy_unit)}",
        f"ΔS‡ = {entropy_text(s.ds_j_mol_k, s.ds_err_j_mol_k, energy_unit)}",
        f"ΔG‡({s.t_mean_k:.1f} K, mean T) = "
        + energy_text(s.dg_mean_kj_mol, s.dg_mean_err_kj_mol, energy_unit),
        ref,
        f"n = {s.n_points},  R² = {s.r_squared:.4f};  ± one standard error",
    ]


# --- overview --------------------------------------------------------------------------------


def overview_figure(
    groups: Mapping[str, Sequence[float]],
    *,
    flagged: Mapping[str, Sequence[bool]] | None = None,
    energy_unit: str = "kJ/mol",
    group_title: str = "process kind",
    title: str | None = None,
    width: float | None = None,
    height: float = 4.6,
) -> Figure:
    """Barriers (kJ/mol in, shown in ``energy_unit``) per group: a box per group with ≥ 3 values
    and every value as a point (jittered deterministically so the same data give the same file).

    ``flagged`` (per group, parallel to its values) marks values with an open error finding:
    they are drawn as crosses in the warning colour, with a legend entry saying why.
    """
    names = [g for g in groups if len(groups[g])]
    if not names:
        raise UsageError("no barriers (ΔG‡) to plot")
    rng = np.random.default_rng(20)
    values = [np.array([convert(v, "kJ/mol", energy_unit) for v in groups[g]]) for g in names]
    marks = [
        np.array((flagged or {}).get(g) or [False] * len(groups[g]), dtype=bool) for g in names
    ]
    with styled():
        fig = new_figure(width or max(5.0, 1.1 * len(names) + 2.4), height)
        ax = fig.add_subplot()
        positions = np.arange(1, len(names) + 1)
        boxed = [i for i, v in enumerate(values) if v.size >= 3]
        if boxed:
            ax.boxplot(
                [values[i] for i in boxed],
                positions=positions[boxed],
                widths=0.5,
                showfliers=False,
                patch_artist=True,
                boxprops={"facecolor": "#ffffff", "edgecolor": theme.MUTED},
                medianprops={"color": theme.INK, "linewidth": 1.6},
                whiskerprops={"color": theme.MUTED},
                capprops={"color": theme.MUTED},
            )
        labelled = False
        for i, v in enumerate(values):
            jitter = rng.uniform(-0.16, 0.16, v.size)
            clean = ~marks[i]
            ax.scatter(
                positions[i] + jitter[clean],
                v[clean],
                s=26,
                color=theme.GROUPS[i % len(theme.GROUPS)],
                edgecolors=theme.PAPER,
                linewidths=0.6,
                zorder=3,
            )
            if marks[i].any():
                ax.scatter(
                    positions[i] + jitter[marks[i]],
                    v[marks[i]],
                    s=46,
                    marker="X",
                    color=theme.WARN,
                    edgecolors=theme.PAPER,
                    linewidths=0.6,
                    zorder=4,
                    label=None if labelled else "flagged: an error finding is open",
                )
                labelled = True
        if labelled:
            ax.legend(loc="best", fontsize=8)
        ax.set_xticks(
            positions, [f"{n}\n(n = {len(v)})" for n, v in zip(names, values, strict=True)]
        )
        ax.set_xlim(0.4, len(names) + 0.6)
        ax.grid(axis="x", visible=False)
        ax.set_ylabel(f"ΔG‡ ({energy_unit})")
        ax.set_xlabel(group_title)
        if title:
            ax.set_title(title)
    return fig
