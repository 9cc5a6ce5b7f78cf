"""Group labels under an axis that never overlap: wrapped, then turned upright, then shortened.

The check is made on the rendered text: the figure is laid out, each label's box on the canvas
(:meth:`matplotlib.text.Text.get_window_extent`) is measured and neighbours are compared. Labels
are only ever horizontal or upright (90°), so those boxes are the text's exact extent and a
"no overlap" answer is true of what is printed, not an estimate.
"""

from __future__ import annotations

import re
from collections.abc import Sequence
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from matplotlib.axes import Axes
    from matplotlib.figure import Figure
    from matplotlib.transforms import Bbox

#: characters per line of a wrapped label (common practice, no source)
WRAP_CHARS = 12
#: an upright label longer than this is shortened with an ellipsis (the full names are in the
#: command's table and JSON)
UPRIGHT_CHARS = 28
#: the smallest type an upright label is set in before giving up on a size (pt; journals ask
#: at least 5–6 pt at print size; common practice)
MIN_FONT_PT = 5.0
#: space kept between neighbouring labels, in pixels at 100 dpi
GAP_PX = 2.0


def wrap_label(name: str, width: int = WRAP_CHARS) -> str:
    """``degenerate-rearrangement`` → ``degenerate-`` / ``rearrangement``: broken after
    hyphens and at spaces, never inside a word."""
    parts = re.findall(r"[^\s-]+-?|\s+", name)
    words = [p for p in parts if not p.isspace()]
    lines: list[str] = []
    line = ""
    for word in words:
        joiner = "" if line.endswith("-") or not line else " "
        if line and len(line) + len(joiner) + len(word) > width:
            lines.append(line)
            line = word
        else:
            line += joiner + word
    if line:
        lines.append(line)
    return "\n".join(lines) or name


def shorten(name: str, limit: int = UPRIGHT_CHARS) -> str:
    """``name`` cut to ``limit`` characters with an ellipsis when longer."""
    return name if len(name) <= limit else name[: limit - 1].rstrip(" -") + "…"


def label_boxes(fig: Figure, ax: Axes) -> list[Bbox]:
    """The canvas boxes of the visible x tick labels, after laying the figure out."""
    fig.draw_without_rendering()
    renderer = fig.canvas.get_renderer()  # type: ignore[attr-defined]
    return [
        t.get_window_extent(renderer)
        for t in ax.get_xticklabels()
        if t.get_visible() and t.get_text()
    ]


def overlapping(boxes: Sequence[Bbox], gap: float = GAP_PX) -> list[tuple[int, int]]:
    """Index pairs of boxes that overlap (or come closer than ``gap`` pixels)."""
    pairs = []
    for i in range(len(boxes)):
        for j in range(i + 1, len(boxes)):
            a, b = boxes[i], boxes[j]
            if a.x0 < b.x1 + gap and b.x0 < a.x1 + gap and a.y0 < b.y1 + gap and b.y0 < a.y1 + gap:
                pairs.append((i, j))
    return pairs


def fit_tick_labels(fig: Figure, ax: Axes, names: Sequence[str], counts: Sequence[int]) -> str:
    """Make the group labels under ``ax`` readable: wrapped and horizontal if they fit; else
    upright on one line, long names shortened and the type made smaller (down to
    :data:`MIN_FONT_PT`) until no two overlap and the plot keeps at least
    :data:`MIN_AXES_SHARE` of the figure's height. Returns how they were set: ``wrapped``,
    ``upright`` or ``crowded`` (too many groups for the width even so; the caller may widen
    the figure)."""
    import warnings

    with warnings.catch_warnings():  # a collapsed layout is what the loop below measures
        warnings.simplefilter("ignore", UserWarning)
        if _readable(fig, ax):
            return "wrapped"
        size = float(ax.get_xticklabels()[0].get_fontsize())
        for limit in (UPRIGHT_CHARS, 20, 14):
            upright = [f"{shorten(n, limit)} (n = {c})" for n, c in zip(names, counts, strict=True)]
            ax.set_xticks(ax.get_xticks(), upright)
            font = size
            while True:
                for t in ax.get_xticklabels():
                    t.set_rotation(90)
                    t.set_horizontalalignment("center")
                    t.set_verticalalignment("top")
                    t.set_fontsize(font)
                if _readable(fig, ax):
                    return "upright"
                if font <= MIN_FONT_PT:
                    break
                font = max(MIN_FONT_PT, font - 0.5)
    return "crowded"


#: the share of the figure's height the plot itself must keep when labels are turned upright
MIN_AXES_SHARE = 0.35


def _readable(fig: Figure, ax: Axes) -> bool:
    """No two labels overlap, all lie inside the figure, and the laid-out axes keep
    :data:`MIN_AXES_SHARE` of the figure's height."""
    boxes = label_boxes(fig, ax)
    whole = fig.bbox
    inside = all(
        whole.x0 - 0.5 <= b.x0 and b.x1 <= whole.x1 + 0.5 and whole.y0 - 0.5 <= b.y0 for b in boxes
    )
    return inside and not overlapping(boxes) and ax.get_position().height >= MIN_AXES_SHARE
