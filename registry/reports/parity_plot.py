"""The parity plot of computed against measured barriers: one point per pair, one colour per
level of theory, the line of equality with a ±1 kcal/mol band ("chemical accuracy", common
practice), and the pairs furthest from it labelled by compound."""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path
from typing import TYPE_CHECKING, Any

from registry.reports.canvas import new_figure, save_figure, set_title, styled
from registry.reports.style import SCREEN

if TYPE_CHECKING:
    from registry.comparison.pairs import Pair
    from registry.comparison.stats import ErrorStats
    from registry.reports.style import FigureStyle

#: half-width of the shaded band: 1 kcal/mol in kJ/mol (thermochemical calorie)
BAND_KJ_MOL = 4.184
#: at most this many pairs are labelled: those with the largest |error| beyond the band
LABELLED = 5


def parity_figure(
    pairs: Sequence[Pair],
    stats: Sequence[ErrorStats],
    path: str | Path,
    *,
    protect: Any = None,
    style: FigureStyle = SCREEN,
) -> Path:
    """Draw and write the parity plot of the aligned ``pairs`` in the figure ``style``
    (:mod:`.style`); returns the file written."""
    with styled(style):
        fig = new_figure(5.0, 4.6, style=style)
        ax = fig.add_subplot(1, 1, 1)
        xs = [p.measured_kj_mol for p in pairs]
        ys = [p.computed_kj_mol for p in pairs]
        lo, hi = min(xs + ys), max(xs + ys)
        pad = max(2.0, 0.06 * (hi - lo))
        lo, hi = lo - pad, hi + pad
        ax.fill_between([lo, hi], [lo - BAND_KJ_MOL, hi - BAND_KJ_MOL],
                        [lo + BAND_KJ_MOL, hi + BAND_KJ_MOL], color=style.rule, lw=0,
                        label="±1 kcal/mol")  # fmt: skip
        ax.plot([lo, hi], [lo, hi], color=style.muted, lw=1.0)
        for i, s in enumerate(stats):
            mine = [p for p in pairs if p.level == s.level]
            ax.scatter([p.measured_kj_mol for p in mine], [p.computed_kj_mol for p in mine],
                       s=22, color=style.groups[i % len(style.groups)], zorder=3,
                       label=f"{_short(s.level)} (N={s.n}, MAE {s.mae:.1f})")  # fmt: skip
        far = sorted((p for p in pairs if abs(p.error_kj_mol or 0) > BAND_KJ_MOL),
                     key=lambda p: -abs(p.error_kj_mol or 0))[:LABELLED]  # fmt: skip
        for p in far:
            ax.annotate(p.compound, (p.measured_kj_mol, p.computed_kj_mol),
                        fontsize=style.label_size, xytext=(4, 4), textcoords="offset points",
                        color=style.ink)  # fmt: skip
        ax.set_xlim(lo, hi)
        ax.set_ylim(lo, hi)
        ax.set_aspect("equal")
        t = {p.t_k for p in pairs}
        at = f" at {t.pop():.2f} K" if len(t) == 1 else " (each pair at its own temperature)"
        ax.set_xlabel("measured ΔG‡ (kJ/mol)")
        ax.set_ylabel("computed ΔG‡ (kJ/mol)")
        set_title(fig, ax, f"Computed vs measured ΔG‡{at}", style)
        # under the plot, laid out with it: level-of-theory names are long, a column narrow
        fig.legend(fontsize=style.label_size, loc="outside lower center", frameon=False)
    return save_figure(fig, path, protect=protect, style=style)


def _short(level: str, width: int = 38) -> str:
    return level if len(level) <= width else level[: width - 1] + "…"
