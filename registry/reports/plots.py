"""Figures: Eyring plots, predicted coalescence temperature against field, barrier overviews.

matplotlib is imported inside the functions and used through its object API with the Agg
canvas (``Figure`` + ``FigureCanvasAgg``), never through pyplot, so drawing a figure does not
change a notebook's backend or global settings; our look (:mod:`.theme`) is applied in an
``rc_context``. PNG or SVG is chosen by the output file's suffix.

The numbers drawn come from :mod:`registry.kinetics`; this module adds only the 95 % confidence
band of the fitted line, y(x) ± c·√(gᵀ·C·g) with g = (1, x) and C the covariance of
(intercept, slope) — the usual band for the mean response of a straight-line fit (e.g.
D. C. Montgomery and G. C. Runger, Applied Statistics and Probability for Engineers, ch. 11,
"confidence interval on the mean response"; from memory).
"""

from __future__ import annotations

import math
from collections.abc import Iterator, Mapping, Sequence
from contextlib import contextmanager
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING, Any

import numpy as np
from numpy.typing import ArrayLike, NDArray

from registry.errors import UsageError
from registry.reports import theme
from registry.reports.numbers import format_uncertain

if TYPE_CHECKING:
    from matplotlib.figure import Figure

    from registry.kinetics import EyringFit

#: output formats by file suffix
FORMATS = {".png": "png", ".svg": "svg"}
#: the reference temperature for ΔG‡ in papers: 25 °C (common practice, no source)
T_STANDARD_K = 298.15
#: a boiling point this close above the drawn temperatures is still drawn (common practice)
NEAR_BOILING_K = 20.0
#: spectrometer fields marked on coalescence plots, MHz (common instruments; common practice)
COMMON_FIELDS_MHZ = (300.0, 400.0, 500.0, 600.0, 800.0)


def figure_format(path: str | Path) -> str:
    """'png' or 'svg' from the suffix; anything else is a usage error naming the file."""
    suffix = Path(path).suffix.lower()
    if suffix not in FORMATS:
        raise UsageError(f"{path}: write a .png or .svg file (the suffix chooses the format)")
    return FORMATS[suffix]


@contextmanager
def _styled() -> Iterator[Any]:
    import matplotlib

    with matplotlib.rc_context(theme.RC):
        yield matplotlib


def _new_figure(
    width: float, height: float, margins: tuple[float, float, float, float] | None = None
) -> Figure:
    """A figure on the Agg canvas. Fixed ``margins`` (left, bottom, right, top in inches) are
    twice as fast to draw as the constrained layout, which matters for a report with many plots;
    without them the layout adapts (for labels of unknown length)."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    fig = Figure(figsize=(width, height), dpi=100, layout=None if margins else "constrained")
    if margins:
        left, bottom, right, top = margins
        fig.subplots_adjust(
            left=left / width,
            bottom=bottom / height,
            right=1.0 - right / width,
            top=1.0 - top / height,
        )
    FigureCanvasAgg(fig)
    return fig


def check_output(path: str | Path) -> str:
    """The format of an output file, once its suffix and folder are known to be fine: checked
    before any work so a bad name costs nothing."""
    out = Path(path)
    fmt = figure_format(out)
    if not out.parent.exists():
        raise UsageError(f"{out}: the folder {out.parent} does not exist")
    return fmt


def save_figure(fig: Figure, path: str | Path) -> Path:
    """Write ``fig`` as PNG (150 dpi) or SVG; the folder must exist."""
    out = Path(path)
    fmt = check_output(out)
    metadata = {"Date": None} if fmt == "svg" else {"Software": "fluxledger"}
    with _styled():
        fig.savefig(out, format=fmt, dpi=150, metadata=metadata)
    return out


def figure_bytes(fig: Figure, fmt: str = "svg") -> bytes:
    """The figure as SVG or PNG bytes (for embedding in pages)."""
    import io

    buffer = io.BytesIO()
    metadata = {"Date": None} if fmt == "svg" else {"Software": "fluxledger"}
    with _styled():
        fig.savefig(buffer, format=fmt, dpi=150, metadata=metadata)
    return buffer.getvalue()


def convert(value: float, from_unit: str, to_unit: str) -> float:
    """``value`` in ``to_unit``: through the unit registry (pint), loaded only when the units
    differ, so a figure in the canonical units never pays for building it."""
    if from_unit == to_unit:
        return float(value)
    from registry.record.units import convert as through_pint

    return through_pint(value, from_unit, to_unit)


def _energy(value_kj: float, err_kj: float | None, unit: str) -> str:
    v = convert(value_kj, "kJ/mol", unit)
    e = convert(err_kj, "kJ/mol", unit) if err_kj is not None and math.isfinite(err_kj) else None
    return format_uncertain(v, e, style="pm", minus="−") + f" {unit}"


def _entropy(value: float, err: float | None, energy_unit: str) -> str:
    unit, label = (
        ("cal/(mol*K)", "cal/(mol·K)") if energy_unit == "kcal/mol" else ("J/(mol*K)", "J/(mol·K)")
    )
    v = convert(value, "J/(mol*K)", unit)
    e = convert(err, "J/(mol*K)", unit) if err is not None and math.isfinite(err) else None
    return format_uncertain(v, e, style="pm", minus="−", default_decimals=0) + f" {label}"


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


def eyring_summary(fit: EyringFit, *, t_ref_k: float = T_STANDARD_K) -> EyringSummary:
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
    t_ref_k: float = T_STANDARD_K,
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
    with _styled():
        fig = _new_figure(width, height, (0.75, 0.55, 0.15, 0.75 if title else 0.5))
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
    ref = f"ΔG‡({s.t_ref_k:.2f} K) = {_energy(s.dg_ref_kj_mol, s.dg_ref_err_kj_mol, energy_unit)}"
    if abs(s.t_ref_k - s.t_mean_k) > 10.0 and any("extrapolated" in w for w in s.warnings):
        ref += "  (extrapolated)"
    return [
        f"ΔH‡ = {_energy(s.dh_kj_mol, s.dh_err_kj_mol, energy_unit)}",
        f"ΔS‡ = {_entropy(s.ds_j_mol_k, s.ds_err_j_mol_k, energy_unit)}",
        f"ΔG‡({s.t_mean_k:.1f} K, mean T) = "
        + _energy(s.dg_mean_kj_mol, s.dg_mean_err_kj_mol, energy_unit),
        ref,
        f"n = {s.n_points},  R² = {s.r_squared:.4f};  ± one standard error",
    ]


# --- coalescence temperature against field ---------------------------------------------------


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
) -> Figure:
    """Predicted Tc against field, observed (field, Tc) points, and the solvent's liquid range.

    ``observed``: mappings with ``field_mhz``, ``tc_k`` and ``label``. ``solvent``: ``name``,
    ``mp_k``, ``bp_k`` (either may be None); temperatures outside the liquid range are shaded.
    """
    p = prediction
    with _styled():
        fig = _new_figure(width, height, (0.75, 0.55, 0.75, 0.45 if title else 0.15))
        ax = fig.add_subplot()
        if p.tc_low_k is not None and p.tc_high_k is not None:
            ax.fill_between(
                p.fields_mhz,
                p.tc_low_k,
                p.tc_high_k,
                color=theme.BAND,
                alpha=0.45,
                linewidth=0,
                label=f"ΔG‡ ± {convert(p.dg_err_kj_mol or 0.0, 'kJ/mol', energy_unit):.2g}"
                f" {energy_unit}",
            )
        ax.plot(
            p.fields_mhz,
            p.tc_k,
            color=theme.FIT,
            linewidth=1.8,
            label=f"predicted, ΔG‡ = {_energy(p.dg_kj_mol, None, energy_unit)}, "
            f"Δν = {p.dnu_ppm:g} ppm" + (f", J = {p.j_hz:g} Hz" if p.j_hz else ""),
        )
        for field in COMMON_FIELDS_MHZ:
            if p.fields_mhz.min() <= field <= p.fields_mhz.max():
                ax.axvline(field, color=theme.RULE, linewidth=1.0, zorder=0)
        points = [o for o in observed if o.get("field_mhz") and o.get("tc_k")]
        if points:
            ax.plot(
                [o["field_mhz"] for o in points],
                [o["tc_k"] for o in points],
                "D",
                color=theme.DATA,
                markersize=6.5,
                markeredgecolor=theme.PAPER,
                label="observed in the registry",
                zorder=3,
            )
            for o in points:
                ax.annotate(
                    str(o.get("label") or ""),
                    (o["field_mhz"], o["tc_k"]),
                    textcoords="offset points",
                    xytext=(5, 5),
                    fontsize=7.5,
                    color=theme.MUTED,
                )
        lo_y, hi_y = ax.get_ylim()
        if solvent:
            bp, mp = solvent.get("bp_k"), solvent.get("mp_k")
            if bp is not None and hi_y < bp < hi_y + NEAR_BOILING_K:
                hi_y = bp + 0.2 * NEAR_BOILING_K  # close enough that the reader should see it
            name = solvent.get("name") or "solvent"
            if bp is not None and bp < hi_y:
                ax.axhspan(bp, hi_y, color=theme.WARN, alpha=0.08, linewidth=0)
                ax.axhline(bp, color=theme.WARN, linewidth=1.0, linestyle="--")
                ax.text(
                    p.fields_mhz.max(),
                    bp,
                    f"b.p. {name}: above it only in a pressure-rated sealed tube ",
                    va="bottom",
                    ha="right",
                    fontsize=7.5,
                    color=theme.WARN,
                )
            if mp is not None and mp > lo_y:
                ax.axhspan(lo_y, mp, color=theme.MUTED, alpha=0.10, linewidth=0)
                ax.text(
                    p.fields_mhz.min(),
                    mp,
                    f" m.p. {name}",
                    va="top",
                    fontsize=7.5,
                    color=theme.MUTED,
                )
            ax.set_ylim(lo_y, hi_y)
        ax.set_xlabel("spectrometer frequency, ¹H (MHz)")
        ax.set_ylabel("coalescence temperature Tc (K)")
        right = ax.secondary_yaxis("right", functions=(_k_to_c, _c_to_k))
        right.set_ylabel("Tc (°C)", color=theme.MUTED)
        right.tick_params(colors=theme.MUTED, labelcolor=theme.MUTED)
        if title:
            ax.set_title(title)
        ax.legend(loc="lower right", fontsize=8)  # Tc rises with the field: below it is free
    return fig


def _k_to_c(t: NDArray) -> NDArray:
    return np.asarray(t, dtype=float) - 273.15


def _c_to_k(t: NDArray) -> NDArray:
    return np.asarray(t, dtype=float) + 273.15


# --- overview --------------------------------------------------------------------------------


def overview_figure(
    groups: Mapping[str, Sequence[float]],
    *,
    energy_unit: str = "kJ/mol",
    group_title: str = "process kind",
    title: str | None = None,
    width: float | None = None,
    height: float = 4.6,
) -> Figure:
    """Barriers (kJ/mol in, shown in ``energy_unit``) per group: a box per group with ≥ 3 values
    and every value as a point (jittered deterministically so the same data give the same file)."""
    names = [g for g in groups if len(groups[g])]
    if not names:
        raise UsageError("no barriers (ΔG‡) to plot")
    rng = np.random.default_rng(20)
    values = [np.array([convert(v, "kJ/mol", energy_unit) for v in groups[g]]) for g in names]
    with _styled():
        fig = _new_figure(width or max(5.0, 1.1 * len(names) + 2.4), height)
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
        for i, v in enumerate(values):
            jitter = rng.uniform(-0.16, 0.16, v.size)
            ax.scatter(
                positions[i] + jitter,
                v,
                s=26,
                color=theme.GROUPS[i % len(theme.GROUPS)],
                edgecolors=theme.PAPER,
                linewidths=0.6,
                zorder=3,
            )
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


#: the kinds of plot the CLI offers, with one-line descriptions (for help and docs)
PLOTS: dict[str, str] = {
    "eyring": "ln(k/T) against 1/T with the fit, its 95 % band and ΔH‡, ΔS‡, ΔG‡",
    "coalescence": "predicted coalescence temperature against spectrometer field",
    "overview": "barriers grouped by process kind (or motif) as boxes and points",
}
