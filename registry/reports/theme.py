"""fluxledger's own look: one palette and one set of matplotlib settings, shared by plots and pages.

A warm paper background, slate ink, a deep teal for data and a burnt orange for fitted lines.
The HTML report uses the same colours (see :data:`CSS_VARIABLES`) so a plot sits in a page
without a seam.
"""

from __future__ import annotations

from typing import Any

PAPER = "#fbf8f1"
INK = "#23303a"
MUTED = "#6f7b84"
RULE = "#e2ddd0"
DATA = "#0f6e6a"
FIT = "#b5562b"
BAND = "#eab995"
WARN = "#a23b2c"
#: colours for groups in overview plots, in order
GROUPS = (
    "#0f6e6a",
    "#b5562b",
    "#5a4e8c",
    "#6f8a2a",
    "#a23b5c",
    "#2f5f8a",
    "#8a6a2e",
    "#4f7d6e",
    "#6b6b6b",
)

#: matplotlib settings applied (in a context, never globally) to every figure we draw
RC: dict[str, Any] = {
    "figure.facecolor": PAPER,
    "axes.facecolor": PAPER,
    "savefig.facecolor": PAPER,
    "axes.edgecolor": MUTED,
    "axes.labelcolor": INK,
    "axes.titlecolor": INK,
    "axes.titleweight": "bold",
    "axes.titlesize": 11,
    "axes.titlelocation": "left",
    "axes.labelsize": 10,
    "axes.spines.top": False,
    "axes.spines.right": False,
    "axes.grid": True,
    "grid.color": RULE,
    "grid.linewidth": 0.8,
    "xtick.color": MUTED,
    "ytick.color": MUTED,
    "xtick.labelcolor": INK,
    "ytick.labelcolor": INK,
    "font.size": 9.5,
    "font.family": "DejaVu Sans",
    "legend.frameon": False,
    "svg.fonttype": "none",  # text stays text: searchable, small, sharp at any zoom
    "svg.hashsalt": "fluxledger",  # stable element ids, so the same data gives the same file
}

#: the palette as CSS custom properties for the HTML report
CSS_VARIABLES = f"""
  --paper: {PAPER};
  --ink: {INK};
  --muted: {MUTED};
  --rule: {RULE};
  --data: {DATA};
  --fit: {FIT};
  --band: {BAND};
  --warn: {WARN};
  --panel: #ffffff;
  --head: #1d3b3f;
"""
