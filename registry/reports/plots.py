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

import textwrap
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import numpy as np
from numpy.typing import ArrayLike, NDArray

from registry.errors import UsageError
from registry.kinetics.constants import STANDARD_TEMPERATURE_K
from registry.reports.canvas import (
    convert,
    energy_text,
    entropy_text,
    new_figure,
    set_title,
    styled,
)
from registry.reports.style import SCREEN, FigureStyle

if TYPE_CHECKING:
    from matplotlib.axes import Axes
    from matplotlib.figure import Figure

    from registry.kinetics import EyringFit

#: a figure narrower than this (inches: a journal column) writes its fitted numbers under the
#: plot, where they cannot cover the points
NARROW_IN = 5.0

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
    style: FigureStyle = SCREEN,
) -> tuple[Figure, EyringSummary]:
    """ln(k/T) against 1/T with the weighted fit line, its 95 % band and the parameters written on.

    ``k_err_per_s`` (the σ_k the fit was given, in the same order) draws error bars; ``style``
    (:mod:`.style`) sets colours, type and the size (``width`` × ``height`` inches unless it
    asks for one).
    """
    summary = eyring_summary(fit, t_ref_k=t_ref_k)
    t, k = fit.t_k, fit.k_per_s
    inv = 1.0 / t
    y = np.log(k / t)
    span = float(inv.max() - inv.min()) or float(inv.mean()) * 0.02
    xs = np.linspace(inv.min() - 0.06 * span, inv.max() + 0.06 * span, 200)
    line, half = eyring_band(fit, xs)
    with styled(style):
        fig = new_figure(width, height, (0.75, 0.55, 0.15, 0.75 if title else 0.5), style)
        narrow = fig.get_size_inches()[0] < NARROW_IN
        if narrow:  # a journal column: the numbers go under the plot, not over the points
            grid = fig.add_gridspec(2, 1, height_ratios=(2.6, 1.0))
            ax, under = fig.add_subplot(grid[0]), fig.add_subplot(grid[1])
            under.set_axis_off()
        else:
            ax = fig.add_subplot()
        if summary.band:
            ax.fill_between(
                1e3 * xs,
                line - half,
                line + half,
                color=style.band,
                alpha=0.45,
                linewidth=0,
                label="95 % band of the line" if narrow else "95 % confidence band of the line",
            )
        ax.plot(
            1e3 * xs, line, color=style.fit, label="Eyring fit" if narrow else "weighted Eyring fit"
        )
        yerr = None
        if k_err_per_s is not None:
            yerr = np.asarray(k_err_per_s, dtype=float) / k  # σ(ln k) = σ_k / k
        ax.errorbar(
            1e3 * inv,
            y,
            yerr=yerr,
            fmt="o",
            color=style.data,
            markersize=style.marker_size,
            markeredgecolor=style.paper,
            markeredgewidth=style.marker_size / 6,
            elinewidth=style.line_width * 0.6,
            capsize=2.5,
            label="measured k" if narrow else "measured rate constants",
            zorder=3,
        )
        ax.set_xlabel("10³ / T   (K⁻¹)")
        ax.set_ylabel("ln(k / T)   (k in s⁻¹, T in K)")
        top = ax.secondary_xaxis("top", functions=(_thousand_over, _thousand_over))
        top.set_xlabel("T (K)", color=style.muted)
        top.tick_params(colors=style.muted, labelcolor=style.muted)
        if title:
            set_title(fig, ax, title, style)
        _write_numbers(under if narrow else ax, eyring_text(summary, energy_unit), narrow, style)
        if narrow:  # no corner is free of a line that crosses the plot: a framed legend
            ax.legend(loc="best", fontsize=style.note_size - 0.5, frameon=True,
                      facecolor=style.paper, edgecolor=style.rule, framealpha=0.9)  # fmt: skip
        else:
            ax.legend(loc="lower left", fontsize=style.note_size)
    return fig, summary


def _write_numbers(where: Axes, lines: list[str], narrow: bool, style: FigureStyle) -> None:
    """The fitted numbers: in a box in the plot's corner, or under a narrow plot."""
    box = {"boxstyle": "round,pad=0.5", "fc": "#ffffff", "ec": style.rule, "alpha": 0.92}
    where.text(
        0.0 if narrow else 0.98,
        1.0 if narrow else 0.97,
        "\n".join(lines),
        transform=where.transAxes,
        ha="left" if narrow else "right",
        va="top",
        fontsize=style.note_size + (0.0 if narrow else 0.5),
        color=style.ink,
        linespacing=1.3 if narrow else 1.45,
        bbox=None if narrow else box,
    )


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

#: a group with fewer values than this is drawn as its points only: a box (quartiles and
#: whiskers) of two to four values suggests a spread the data cannot show (common practice;
#: e.g. T. L. Weissgerber et al., PLoS Biol. 2015, 13, e1002128, on showing small samples as
#: points; from memory)
MIN_BOX = 5
#: the overview's own width grows with the groups up to this (inches); beyond it the labels
#: are rotated rather than the figure made wider
MAX_OWN_WIDTH_IN = 9.0


def overview_figure(
    groups: Mapping[str, Sequence[float]],
    *,
    flagged: Mapping[str, Sequence[bool]] | None = None,
    energy_unit: str = "kJ/mol",
    group_title: str = "process kind",
    title: str | None = None,
    note: str | None = None,
    width: float | None = None,
    height: float = 4.6,
    style: FigureStyle = SCREEN,
) -> Figure:
    """Barriers (kJ/mol in, shown in ``energy_unit``) per group: every value as a point
    (jittered deterministically so the same data give the same file), with a box when the
    group has at least :data:`MIN_BOX` values.

    ``flagged`` (per group, parallel to its values) marks values with an open error finding:
    they are drawn as crosses in the warning colour, with a legend entry saying why. ``note``
    is written under the axis title (e.g. that groups overlap). Group names are wrapped,
    rotated or shortened until no two labels overlap (:func:`.labels.fit_tick_labels`).
    """
    from registry.reports.labels import wrap_label

    names = [g for g in groups if len(groups[g])]
    if not names:
        raise UsageError("no barriers (ΔG‡) to plot")
    rng = np.random.default_rng(20)
    values = [np.array([convert(v, "kJ/mol", energy_unit) for v in groups[g]]) for g in names]
    marks = [
        np.array((flagged or {}).get(g) or [False] * len(groups[g]), dtype=bool) for g in names
    ]
    own = width or min(MAX_OWN_WIDTH_IN, max(5.0, 0.8 * len(names) + 2.4))
    with styled(style):
        fig = new_figure(own, height, None, style)
        ax = fig.add_subplot()
        positions = np.arange(1, len(names) + 1)
        _boxes(ax, values, positions, style)
        if _points(ax, values, marks, positions, rng, style):
            ax.legend(loc="best", fontsize=style.note_size)
        labels = [f"{wrap_label(n)}\n(n = {len(v)})" for n, v in zip(names, values, strict=True)]
        ax.set_xticks(positions, labels)
        ax.set_xlim(0.4, len(names) + 0.6)
        ax.grid(axis="x", visible=False)
        ax.set_ylabel(f"ΔG‡ ({energy_unit})")
        if note:  # wrapped to the figure's width (about 12 characters an inch at note size)
            chars = max(30, int(fig.get_size_inches()[0] * 96 / style.note_size))
            note = textwrap.fill(note, chars)
        ax.set_xlabel(group_title + (f"\n{note}" if note else ""))
        if title:
            set_title(fig, ax, title, style)
        _fit_labels(fig, ax, names, [len(v) for v in values], style)
    return fig


def _fit_labels(
    fig: Figure, ax: Axes, names: list[str], counts: list[int], style: FigureStyle
) -> None:
    """Labels that do not overlap; at the figure's own size it is widened for very many
    groups, at a size the user chose a crowded figure is refused rather than drawn illegibly."""
    from registry.reports.labels import fit_tick_labels

    while fit_tick_labels(fig, ax, names, counts) == "crowded":
        width, height = fig.get_size_inches()
        if style.size is not None or width >= 40.0:
            raise UsageError(
                f"{len(names)} groups do not fit side by side in {width:g} in with readable "
                "labels; choose a wider size (e.g. double, or 10x4)"
            )
        fig.set_size_inches(min(40.0, width * 1.5), height)


def _boxes(ax: Axes, values: list[NDArray], positions: NDArray, style: FigureStyle) -> None:
    """A box for each group of at least :data:`MIN_BOX` values."""
    boxed = [i for i, v in enumerate(values) if v.size >= MIN_BOX]
    if not boxed:
        return
    ax.boxplot(
        [values[i] for i in boxed],
        positions=positions[boxed],
        widths=0.5,
        showfliers=False,
        patch_artist=True,
        boxprops={"facecolor": "#ffffff", "edgecolor": style.muted},
        medianprops={"color": style.ink, "linewidth": style.line_width * 0.9},
        whiskerprops={"color": style.muted},
        capprops={"color": style.muted},
    )


def _points(
    ax: Axes,
    values: list[NDArray],
    marks: list[NDArray],
    positions: NDArray,
    rng: np.random.Generator,
    style: FigureStyle,
) -> bool:
    """Every value as a point, flagged ones as crosses; True when a cross was drawn."""
    size = (style.marker_size * 0.85) ** 2
    labelled = False
    for i, v in enumerate(values):
        jitter = rng.uniform(-0.16, 0.16, v.size)
        clean = ~marks[i]
        ax.scatter(
            positions[i] + jitter[clean],
            v[clean],
            s=size,
            color=style.groups[i % len(style.groups)],
            edgecolors=style.paper,
            linewidths=0.6,
            zorder=3,
        )
        if marks[i].any():
            ax.scatter(
                positions[i] + jitter[marks[i]],
                v[marks[i]],
                s=size * 1.8,
                marker="X",
                color=style.warn,
                edgecolors=style.paper,
                linewidths=0.6,
                zorder=4,
                label=None if labelled else "flagged: an error finding is open",
            )
            labelled = True
    return labelled
