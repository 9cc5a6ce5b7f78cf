"""How good is a computational method for these barriers? Computed against measured values.

Pairs (:mod:`registry.comparison.pairs`) at a common temperature, statistics per level of
theory (:mod:`registry.comparison.stats`), and a parity plot
(:mod:`registry.reports.parity_plot`).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:
    from registry.comparison.pairs import Pair
    from registry.comparison.stats import ErrorStats
    from registry.storage.database import Database


@dataclass(frozen=True)
class Comparison:
    """Pairs, statistics per level of theory, and what could not be compared."""

    t_k: float
    pairs: tuple[Pair, ...]
    stats: tuple[ErrorStats, ...]
    computed_alone: int  # computed barriers with no measured one of the same compound/process
    include_flagged: bool
    plot: str | None = None
    notes: tuple[str, ...] = field(default=())

    @property
    def aligned(self) -> tuple[Pair, ...]:
        return tuple(p for p in self.pairs if p.t_k is not None)

    @property
    def not_aligned(self) -> tuple[Pair, ...]:
        return tuple(p for p in self.pairs if p.t_k is None)

    def to_dict(self) -> dict[str, Any]:
        return {
            "T_K": self.t_k,
            "levels": [s.to_dict() for s in self.stats],
            "pairs": [p.to_dict() for p in self.pairs],
            "computed_without_measured": self.computed_alone,
            "include_flagged": self.include_flagged,
            "plot": self.plot,
            "notes": list(self.notes),
        }


def compare_computed(
    database: Database,
    *,
    at: str | float = 298.15,
    include_flagged: bool = False,
    level: str | None = None,
    plot: str | Path | None = None,
    style: str | None = None,
    size: str | None = None,
    dpi: int | None = None,
) -> Comparison:
    """Computed barriers (method ``computed``) against measured ones of the same compound and
    process, at ``at`` (K, or a temperature text) where ΔH‡ and ΔS‡ allow, else at the
    temperature both were quoted at; per level of theory N, mean signed/absolute error, RMS and
    largest error with bootstrap 95 % intervals. ``level`` keeps the levels whose text contains
    it; ``plot`` writes a parity plot (.png/.svg/.pdf) in the figure ``style`` (screen or
    print) at ``size`` and ``dpi``, as every plot command."""
    from registry.comparison.pairs import make_pairs, read_rows
    from registry.comparison.stats import error_stats
    from registry.kinetics.quantities import read_quantity

    t_k = float(at) if isinstance(at, (int, float)) else read_quantity(at, "temperature", "at")[0]
    if plot is not None:
        from registry.reports.canvas import check_output
        from registry.reports.style import figure_style

        chosen = figure_style(style, size=size, dpi=dpi)
        check_output(plot, protect=database.path)
    pairs, alone = make_pairs(read_rows(database, t_k, include_flagged), t_k)
    if level:
        pairs = [p for p in pairs if level.lower() in p.level.lower()]
    by_level: dict[str, list[float]] = {}
    for p in pairs:
        if p.error_kj_mol is not None:
            by_level.setdefault(p.level, []).append(p.error_kj_mol)
    stats = sorted((error_stats(k, v) for k, v in by_level.items()), key=lambda s: (-s.n, s.level))
    notes = _notes(pairs, alone, include_flagged)
    written = None
    if plot is not None and any(p.t_k is not None for p in pairs):
        from registry.reports.parity_plot import parity_figure

        written = str(parity_figure([p for p in pairs if p.t_k is not None], stats, plot,
                                    protect=database.path, style=chosen))  # fmt: skip
    elif plot is not None:
        notes += ("no aligned pair: no parity plot written",)
    return Comparison(t_k, tuple(pairs), tuple(stats), alone, include_flagged, written, notes)


def _notes(pairs: list[Pair], alone: int, include_flagged: bool) -> tuple[str, ...]:
    notes = []
    apart = sum(1 for p in pairs if p.t_k is None)
    if apart:
        notes.append(f"{apart} pair(s) could not be brought to one temperature: listed, "
                     "not counted")  # fmt: skip
    if alone:
        notes.append(f"{alone} computed barrier(s) have no measured one of the same compound "
                     "and process")  # fmt: skip
    if not include_flagged:
        notes.append("flagged measured values left out (include_flagged to count them)")
    return tuple(notes)
