"""Pictures of line-shape fits and of the Eyring plot of the fitted rates (PNG, SVG or PDF).

Drawn in the one figure style of every plot (:mod:`registry.reports.style`: screen or print,
size, dpi) on the shared canvas (:mod:`registry.reports.canvas`: matplotlib's Agg canvas, no
pyplot state, the layout fitted to the text so no axis label is clipped, files written whole
or not at all). matplotlib is imported inside the functions, so importing this module costs
nothing.
"""

from __future__ import annotations

import math
import re
from collections.abc import Sequence
from pathlib import Path
from typing import TYPE_CHECKING

import numpy as np

from registry.errors import UsageError
from registry.lineshape.store_link import value_with_error_text
from registry.reports.style import SCREEN, FigureStyle

if TYPE_CHECKING:
    from registry.kinetics.fits import EyringFit
    from registry.lineshape.eyring import EyringParameters
    from registry.lineshape.fit_core import LineShapeFit


#: the formats the line-shape pictures can be written in (the file suffix)
PLOT_FORMATS = ("png", "svg", "pdf")


def _safe_stem(source: str) -> str:
    return re.sub(r"[^A-Za-z0-9_.-]+", "_", Path(source).stem) or "spectrum"


def plot_fit(
    fit: LineShapeFit,
    path: str | Path,
    *,
    observe_mhz: float | None = None,
    style: FigureStyle = SCREEN,
    zoom: bool = True,
) -> Path:
    """Data, fitted line shape and residuals of one spectrum (x in ppm when MHz is known);
    ``zoom`` shows where the exchanging lines are (:func:`_zoomed`), else the whole window."""
    from registry.reports.canvas import new_figure, save_figure, set_title, styled

    with styled(style):
        fig = new_figure(7.0, 5.2, None, style)
        grid = fig.add_gridspec(2, 1, height_ratios=(3, 1))
        top = fig.add_subplot(grid[0])
        bottom = fig.add_subplot(grid[1], sharex=top)
        x = fit.freq_hz / observe_mhz if observe_mhz else fit.freq_hz
        thin = style.line_width * 0.45
        top.plot(x, fit.data, color=style.muted, lw=thin, label="data")
        top.plot(x, fit.best_fit, color=style.fit, lw=style.line_width * 0.6, label="fit")
        bottom.plot(x, fit.data - fit.best_fit, color=style.muted, lw=thin * 0.75)
        bottom.axhline(0.0, color=style.fit, lw=thin)
        if zoom:
            lo, hi = _zoomed(x, fit.best_fit)
            top.set_xlim(lo, hi)
        if observe_mhz:  # NMR convention: shift increases to the left
            top.invert_xaxis()
        bottom.set_xlabel("δ / ppm" if observe_mhz else "ν / Hz")
        top.set_ylabel("intensity")
        bottom.set_ylabel("residual")
        fig.align_ylabels([top, bottom])
        top.tick_params(labelbottom=False)
        temp = f"{fit.t_k:.1f} K, " if fit.t_k is not None else ""
        title = (
            f"{Path(fit.source).name}: {temp}"
            f"k = {value_with_error_text(fit.k_per_s, fit.k_err_per_s, 's⁻¹')}, "
            f"w = {fit.width_hz:.2f} Hz ({fit.method})"
        )
        set_title(fig, top, title, style, style.note_size + 1)
        top.legend(loc="upper right", fontsize=style.note_size)
    return save_figure(fig, path, style=style)  # whole or not at all


def plot_eyring(
    fits: Sequence[LineShapeFit],
    path: str | Path,
    *,
    line: EyringFit | EyringParameters | None = None,
    style: FigureStyle = SCREEN,
) -> Path:
    """ln(k/T) against 1000/T with ±1σ bars, and the Eyring line when one was fitted."""
    from registry.reports.canvas import new_figure, save_figure, set_title, styled

    usable = [f for f in fits if f.t_k is not None]
    if not usable:
        raise UsageError("an Eyring plot needs temperatures")
    t = np.array([f.t_k for f in usable], dtype=float)
    y = np.log(np.array([f.k_per_s for f in usable]) / t)
    yerr = np.array([f.ln_k_err if f.ln_k_err is not None else math.nan for f in usable])
    with styled(style):
        fig = new_figure(7.0, 4.8, None, style)
        ax = fig.add_subplot()
        ax.errorbar(
            1000.0 / t, y, yerr=np.nan_to_num(yerr), fmt="o", color=style.data,
            ms=style.marker_size * 0.7, capsize=2, label="fitted rate constants",
        )  # fmt: skip
        if line is not None:
            tt = np.linspace(t.min() * 0.98, t.max() * 1.02, 100)
            ax.plot(1000.0 / tt, _ln_k(line, tt) - np.log(tt), color=style.fit, label="Eyring fit")
            title = (
                f"ΔH‡ = {value_with_error_text(line.dh_kj_mol, line.dh_err_kj_mol, 'kJ/mol')}, "
                "ΔS‡ = " + value_with_error_text(line.ds_j_mol_k, line.ds_err_j_mol_k, "J/(mol·K)")
            )
            size = style.note_size + 1
            set_title(fig, ax, title, style, size)
        ax.set_xlabel("1000 K / T")
        ax.set_ylabel("ln(k / T)   (k in s⁻¹, T in K)")
    return save_figure(fig, path, style=style)  # whole or not at all


def _ln_k(line: EyringFit | EyringParameters, t: np.ndarray) -> np.ndarray:
    from registry.lineshape.eyring import eyring_ln_rate

    return eyring_ln_rate(t, line.dh_kj_mol, line.ds_j_mol_k)


#: the zoomed view keeps the fitted shape where it stands above this fraction of its height
#: over the baseline, with this fraction of that span added on each side (common practice,
#: no source)
ZOOM_LEVEL, ZOOM_MARGIN = 0.01, 0.3


def _zoomed(x: np.ndarray, fitted: np.ndarray) -> tuple[float, float]:
    """The x range of the exchanging lines: where the fitted shape rises above
    :data:`ZOOM_LEVEL` of its height over its lowest point, widened by :data:`ZOOM_MARGIN`,
    within the data (the whole window when the shape is flat)."""
    lo, hi = float(np.min(x)), float(np.max(x))
    if fitted.size == 0:
        return lo, hi
    above = fitted - float(np.min(fitted))
    top = float(np.max(above))
    inside = x[above > ZOOM_LEVEL * top] if top > 0 else x[:0]
    if inside.size == 0:
        return lo, hi
    a, b = float(np.min(inside)), float(np.max(inside))
    pad = ZOOM_MARGIN * max(b - a, 1e-9)
    return max(lo, a - pad), min(hi, b + pad)


def write_plots(
    fits: Sequence[LineShapeFit],
    directory: str | Path,
    *,
    line: EyringFit | EyringParameters | None = None,
    observe_mhz: Sequence[float | None] | None = None,
    style: FigureStyle = SCREEN,
    fmt: str = "png",
    zoom: bool = True,
) -> list[Path]:
    """One picture per spectrum (``<stem>_fit.png``) and ``eyring.png`` when temperatures are
    known; ``fmt`` png, svg or pdf, in ``style``."""
    if fmt not in PLOT_FORMATS:
        raise UsageError(f"plot format {fmt!r}: use png, svg or pdf")
    out_dir = Path(directory)
    try:
        out_dir.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise UsageError(f"cannot create the plot directory {out_dir}: {exc.strerror}") from exc
    written: list[Path] = []
    seen: dict[str, int] = {}
    for i, fit in enumerate(fits):
        stem = _safe_stem(fit.source)
        seen[stem] = seen.get(stem, 0) + 1
        name = f"{stem}_fit.{fmt}" if seen[stem] == 1 else f"{stem}_{seen[stem]}_fit.{fmt}"
        mhz = observe_mhz[i] if observe_mhz is not None else None
        written.append(plot_fit(fit, out_dir / name, observe_mhz=mhz, style=style, zoom=zoom))
    if any(f.t_k is not None for f in fits):
        written.append(plot_eyring(fits, out_dir / f"eyring.{fmt}", line=line, style=style))
    return written
