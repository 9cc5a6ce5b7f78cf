"""The one figure style every plot fluxledger draws uses: for the screen or for print.

``screen`` is our own look (:mod:`.theme`: warm paper, slate ink, 150 dpi) for reports and
slides; ``print`` is what journals ask of a figure: a white background, a plain sans-serif
face at 7–8 pt at the final printed size, thin dark lines, 600 dpi for raster output, fonts
embedded as TrueType in PDF (many journals refuse Type 3 fonts). A size is a journal column
(``single``, ``double``) or ``W×H`` in inches; without one each figure keeps its own size.

The style is a frozen record handed to the drawing functions; its colours replace the
palette constants in figure code, and its matplotlib settings are applied in an
``rc_context`` (never globally), so a notebook's own settings are untouched.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, replace
from typing import Any

from registry.errors import UsageError
from registry.reports import theme

#: journal column widths in inches: about 85 mm and 178 mm — the widths ACS, RSC and Elsevier
#: give authors (3.25–3.5 in single, ~7 in double); common practice, from their author guides
#: as remembered, no single source
COLUMN_WIDTHS_IN = {"single": 3.3, "double": 7.0}
#: height over width of a figure set to a column (a little taller for the narrow column so the
#: written numbers still fit); common practice, no source
COLUMN_ASPECT = {"single": 0.8, "double": 0.6}
#: dpi per style: 150 for screens; 600 for print (journals ask 300 dpi for photographs and
#: 600–1200 for line art; common practice, from author guides as remembered)
DEFAULT_DPI = {"screen": 150, "print": 600}
#: limits on what may be asked for: an inch to a poster's width; 30 to 1200 dpi; the pixel cap
#: keeps a typo (``--dpi 12000``) from filling memory (common practice, no source)
SIZE_LIMITS_IN = (1.0, 40.0)
DPI_LIMITS = (30, 1200)
MAX_PIXELS = 120_000_000

#: preferred faces for print, first one installed wins (Liberation Sans has Arial's metrics);
#: DejaVu Sans, which matplotlib ships, is last and fills in glyphs the others lack
PRINT_FONTS = ("Arial", "Helvetica", "Liberation Sans", "DejaVu Sans")


@dataclass(frozen=True)
class FigureStyle:
    """Colours, type sizes, dpi and (optional) size of every figure drawn with it."""

    name: str
    paper: str
    ink: str
    muted: str
    rule: str
    data: str
    fit: str
    band: str
    warn: str
    groups: tuple[str, ...]
    font_size: float
    title_size: float
    label_size: float
    note_size: float
    line_width: float
    marker_size: float
    dpi: int
    #: the asked-for size: a column name, (width, height) in inches, or None (the figure's own)
    size: str | tuple[float, float] | None = None

    @property
    def fixed_layout(self) -> bool:
        """True for the screen style at a figure's own size: the fixed margins drawn for it
        (twice as fast as the constrained layout, which matters for a report of hundreds of
        plots). Any other size or the print style lays out by the text it holds."""
        return self.name == "screen" and self.size is None

    def figsize(self, own: tuple[float, float]) -> tuple[float, float]:
        """Width and height in inches: the asked-for size, else the figure's ``own``."""
        if self.size is None:
            return own
        if isinstance(self.size, str):
            width = COLUMN_WIDTHS_IN[self.size]
            return width, round(width * COLUMN_ASPECT[self.size], 3)
        return self.size

    def rc(self) -> dict[str, Any]:
        """matplotlib settings for this style (applied in a context, never globally)."""
        rc = dict(theme.RC)
        rc.update(
            {
                "figure.facecolor": self.paper,
                "axes.facecolor": self.paper,
                "savefig.facecolor": self.paper,
                "axes.edgecolor": self.muted if self.name == "screen" else self.ink,
                "axes.labelcolor": self.ink,
                "axes.titlecolor": self.ink,
                "axes.titlesize": self.title_size,
                "axes.labelsize": self.label_size,
                "axes.linewidth": 0.8 if self.name == "screen" else 0.6,
                "grid.color": self.rule,
                "xtick.color": self.muted if self.name == "screen" else self.ink,
                "ytick.color": self.muted if self.name == "screen" else self.ink,
                "xtick.labelcolor": self.ink,
                "ytick.labelcolor": self.ink,
                "xtick.labelsize": self.font_size,
                "ytick.labelsize": self.font_size,
                "legend.fontsize": self.note_size,
                "font.size": self.font_size,
                "lines.linewidth": self.line_width,
                "pdf.fonttype": 42,  # TrueType embedded: journals refuse Type 3 fonts
            }
        )
        if self.name == "print":
            rc.update(
                {
                    "axes.grid": False,
                    "axes.titleweight": "normal",
                    "font.family": "sans-serif",
                    "font.sans-serif": list(installed_fonts(PRINT_FONTS)),
                    "xtick.major.width": 0.6,
                    "ytick.major.width": 0.6,
                    "xtick.major.size": 3.0,
                    "ytick.major.size": 3.0,
                }
            )
        return rc


def installed_fonts(wanted: tuple[str, ...]) -> tuple[str, ...]:
    """The faces of ``wanted`` that are installed, in order (DejaVu Sans always is: matplotlib
    ships it). Asking matplotlib for a missing face logs a warning on every figure."""
    from matplotlib import font_manager

    have = {f.name for f in font_manager.fontManager.ttflist}
    return tuple(f for f in wanted if f in have) or ("DejaVu Sans",)


SCREEN = FigureStyle(
    name="screen",
    paper=theme.PAPER,
    ink=theme.INK,
    muted=theme.MUTED,
    rule=theme.RULE,
    data=theme.DATA,
    fit=theme.FIT,
    band=theme.BAND,
    warn=theme.WARN,
    groups=theme.GROUPS,
    font_size=9.5,
    title_size=11.0,
    label_size=10.0,
    note_size=8.0,
    line_width=1.8,
    marker_size=6.0,
    dpi=DEFAULT_DPI["screen"],
)

#: white paper, near-black ink, the same hues a little darker so they survive print
PRINT = FigureStyle(
    name="print",
    paper="#ffffff",
    ink="#000000",
    muted="#4d4d4d",
    rule="#d9d9d9",
    data="#0b5754",
    fit="#a0441c",
    band="#f0c8a8",
    warn="#9b1c1c",
    groups=("#0b5754", "#a0441c", "#4a3f7a", "#566b1f", "#8a2a4a", "#23507a", "#6e5421"),
    font_size=7.0,
    title_size=8.0,
    label_size=7.5,
    note_size=6.5,
    line_width=1.0,
    marker_size=4.0,
    dpi=DEFAULT_DPI["print"],
)

STYLES = {"screen": SCREEN, "print": PRINT}

_SIZE = re.compile(
    r"^\s*(\d+(?:\.\d+)?)\s*(?:[x×*]|by)\s*(\d+(?:\.\d+)?)\s*(?:in|inch|inches|\")?\s*$", re.I
)


def figure_style(
    style: str | FigureStyle | None = None,
    *,
    size: str | tuple[float, float] | None = None,
    dpi: int | float | str | None = None,
) -> FigureStyle:
    """The style asked for: ``style`` (screen or print), ``size`` (single, double, or
    ``'W×H'`` / ``'WxH in'`` / (W, H) in inches), ``dpi`` (default by style). Checked here,
    before any work, with errors naming the field."""
    if isinstance(style, FigureStyle):
        base = style
    else:
        key = (style or "screen").strip().lower()
        if key not in STYLES:
            raise UsageError(f"style {style!r}: use screen or print")
        base = STYLES[key]
    chosen = replace(base)
    if size is not None:
        chosen = replace(chosen, size=read_size(size))
    if dpi is not None:
        chosen = replace(chosen, dpi=read_dpi(dpi))
    if chosen.size is not None:
        w, h = chosen.figsize((1.0, 1.0))
        if w * h * chosen.dpi**2 > MAX_PIXELS:
            raise UsageError(
                f"size {w:g}×{h:g} in at {chosen.dpi} dpi is {w * chosen.dpi:.0f}×"
                f"{h * chosen.dpi:.0f} pixels, more than {MAX_PIXELS:,}; lower the dpi"
            )
    return chosen


def read_size(size: str | tuple[float, float]) -> str | tuple[float, float]:
    """``single``/``double`` or (width, height) in inches within :data:`SIZE_LIMITS_IN`."""
    if isinstance(size, str):
        key = size.strip().lower()
        if key in COLUMN_WIDTHS_IN:
            return key
        match = _SIZE.match(size)
        if not match:
            raise UsageError(
                f"size {size!r}: use single, double (journal columns) or width×height in inches,"
                " e.g. 3.3x2.5"
            )
        pair = (float(match.group(1)), float(match.group(2)))
    else:
        try:
            pair = (float(size[0]), float(size[1]))
        except (TypeError, ValueError, IndexError):
            raise UsageError(f"size {size!r}: give (width, height) in inches") from None
    lo, hi = SIZE_LIMITS_IN
    if not all(lo <= v <= hi for v in pair):
        raise UsageError(f"size {pair[0]:g}×{pair[1]:g} in: each side must be {lo:g}–{hi:g} in")
    return pair


def read_dpi(dpi: int | float | str) -> int:
    """Dots per inch, a whole number within :data:`DPI_LIMITS`."""
    try:
        value = float(dpi)
    except (TypeError, ValueError):
        raise UsageError(f"dpi {dpi!r}: give a number, e.g. 300") from None
    lo, hi = DPI_LIMITS
    if isinstance(dpi, bool) or not lo <= value <= hi or value != int(value):
        raise UsageError(f"dpi {dpi!r}: give a whole number from {lo} to {hi}")
    return int(value)
