"""PNG pictures of line-shape fits and of the Eyring plot of the fitted rates.

matplotlib is imported inside the functions and drives a bare ``Figure`` on the Agg canvas
(no pyplot state, no display needed), so importing this module costs nothing.
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
from registry.outputs import write_file

if TYPE_CHECKING:
    from matplotlib.figure import Figure

    from registry.kinetics.fits import EyringFit
    from registry.lineshape.eyring import EyringParameters
    from registry.lineshape.fit_core import LineShapeFit


def _figure(height: float = 4.8) -> Figure:
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    fig = Figure(figsize=(7.0, height), dpi=110)
    FigureCanvasAgg(fig)
    return fig


def _safe_stem(source: str) -> str:
    return re.sub(r"[^A-Za-z0-9_.-]+", "_", Path(source).stem) or "spectrum"


def plot_fit(fit: LineShapeFit, path: str | Path, *, observe_mhz: float | None = None) -> Path:
    """Data, fitted line shape and residuals of one spectrum (x in ppm when MHz is known)."""
    fig = _figure(5.2)
    grid = fig.add_gridspec(2, 1, height_ratios=(3, 1), hspace=0.05)
    top = fig.add_subplot(grid[0])
    bottom = fig.add_subplot(grid[1], sharex=top)
    x = fit.freq_hz / observe_mhz if observe_mhz else fit.freq_hz
    top.plot(x, fit.data, color="0.35", lw=0.8, label="data")
    top.plot(x, fit.best_fit, color="tab:red", lw=1.1, label="fit")
    bottom.plot(x, fit.data - fit.best_fit, color="0.35", lw=0.6)
    bottom.axhline(0.0, color="tab:red", lw=0.8)
    if observe_mhz:  # NMR convention: shift increases to the left
        top.invert_xaxis()
    bottom.set_xlabel("δ / ppm" if observe_mhz else "ν / Hz")
    top.set_ylabel("intensity")
    bottom.set_ylabel("residual")
    top.tick_params(labelbottom=False)
    temp = f"{fit.t_k:.1f} K, " if fit.t_k is not None else ""
    top.set_title(
        f"{Path(fit.source).name}: {temp}"
        f"k = {value_with_error_text(fit.k_per_s, fit.k_err_per_s, 's⁻¹')}, "
        f"w = {fit.width_hz:.2f} Hz ({fit.method})",
        fontsize=9,
    )
    top.legend(loc="upper right", fontsize=8, frameon=False)
    out = Path(path)
    write_file(out, fig.savefig)  # whole or not at all
    return out


def plot_eyring(
    fits: Sequence[LineShapeFit],
    path: str | Path,
    *,
    line: EyringFit | EyringParameters | None = None,
) -> Path:
    """ln(k/T) against 1000/T with ±1σ bars, and the Eyring line when one was fitted."""
    usable = [f for f in fits if f.t_k is not None]
    if not usable:
        raise UsageError("an Eyring plot needs temperatures")
    t = np.array([f.t_k for f in usable], dtype=float)
    y = np.log(np.array([f.k_per_s for f in usable]) / t)
    yerr = np.array([f.ln_k_err if f.ln_k_err is not None else math.nan for f in usable])
    fig = _figure()
    ax = fig.add_subplot()
    ax.errorbar(1000.0 / t, y, yerr=np.nan_to_num(yerr), fmt="o", color="0.2", ms=4, capsize=2)
    if line is not None:
        tt = np.linspace(t.min() * 0.98, t.max() * 1.02, 100)
        ax.plot(1000.0 / tt, _ln_k(line, tt) - np.log(tt), color="tab:red", lw=1.0)
        ax.set_title(
            f"ΔH‡ = {value_with_error_text(line.dh_kj_mol, line.dh_err_kj_mol, 'kJ/mol')}, "
            f"ΔS‡ = {value_with_error_text(line.ds_j_mol_k, line.ds_err_j_mol_k, 'J/(mol·K)')}",
            fontsize=9,
        )
    ax.set_xlabel("1000 K / T")
    ax.set_ylabel("ln(k / T)   (k in s⁻¹, T in K)")
    out = Path(path)
    write_file(out, fig.savefig)  # whole or not at all
    return out


def _ln_k(line: EyringFit | EyringParameters, t: np.ndarray) -> np.ndarray:
    from registry.lineshape.eyring import eyring_ln_rate

    return eyring_ln_rate(t, line.dh_kj_mol, line.ds_j_mol_k)


def write_plots(
    fits: Sequence[LineShapeFit],
    directory: str | Path,
    *,
    line: EyringFit | EyringParameters | None = None,
    observe_mhz: Sequence[float | None] | None = None,
) -> list[Path]:
    """One PNG per spectrum (``<stem>_fit.png``) and ``eyring.png`` when temperatures are known."""
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
        name = f"{stem}_fit.png" if seen[stem] == 1 else f"{stem}_{seen[stem]}_fit.png"
        mhz = observe_mhz[i] if observe_mhz is not None else None
        written.append(plot_fit(fit, out_dir / name, observe_mhz=mhz))
    if any(f.t_k is not None for f in fits):
        written.append(plot_eyring(fits, out_dir / "eyring.png", line=line))
    return written
