"""The canvas every figure is drawn on, and how figures are written to files.

matplotlib is imported inside the functions and used through its object API with the Agg
canvas (``Figure`` + ``FigureCanvasAgg``), never through pyplot, so drawing a figure does not
change a notebook's backend or global settings; the figure style (:mod:`.style`: screen or
print, size, dpi) is applied in an ``rc_context``. PNG, SVG or PDF is chosen by the output
file's suffix; SVG text stays text, element ids are salted (see :data:`.theme.RC`) and PDF and
SVG carry no date, so unchanged data give byte-identical files.
"""

from __future__ import annotations

import math
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path
from typing import TYPE_CHECKING, Any

from registry.errors import UsageError
from registry.outputs import check_target, write_file
from registry.reports.numbers import format_uncertain
from registry.reports.style import SCREEN, FigureStyle

if TYPE_CHECKING:
    from matplotlib.figure import Figure

#: output formats by file suffix
FORMATS = {".png": "png", ".svg": "svg", ".pdf": "pdf"}
#: what each format's metadata says: no date, so the same data give the same file
_METADATA: dict[str, dict[str, Any]] = {
    "png": {"Software": "fluxledger"},
    "svg": {"Date": None},
    "pdf": {"Creator": "fluxledger", "Producer": "fluxledger", "CreationDate": None},
}


def figure_format(path: str | Path) -> str:
    """'png', 'svg' or 'pdf' from the suffix; anything else is a usage error naming the file."""
    suffix = Path(path).suffix.lower()
    if suffix not in FORMATS:
        raise UsageError(f"{path}: write a .png, .svg or .pdf file (the suffix chooses the format)")
    return FORMATS[suffix]


@contextmanager
def styled(style: FigureStyle = SCREEN) -> Iterator[Any]:
    """matplotlib with ``style``'s settings, for the drawing inside the block only."""
    import matplotlib

    with matplotlib.rc_context(style.rc()):
        yield matplotlib


def new_figure(
    width: float,
    height: float,
    margins: tuple[float, float, float, float] | None = None,
    style: FigureStyle = SCREEN,
) -> Figure:
    """A figure on the Agg canvas, ``width`` × ``height`` inches unless ``style`` asks for a
    size. Fixed ``margins`` (left, bottom, right, top in inches) are twice as fast to draw as
    the constrained layout, which matters for a report with many plots; they are used only at
    the screen style's own size (:attr:`.FigureStyle.fixed_layout`) — at any other size or
    type size the layout adapts to the text, so no label is clipped."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    width, height = style.figsize((width, height))
    if not style.fixed_layout:
        margins = None
    # laid out at the dpi it is written at: text at a low dpi is hinted narrower, and a label
    # measured to fit there can overflow in the file
    fig = Figure(figsize=(width, height), dpi=style.dpi, layout=None if margins else "constrained")
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


def set_title(
    fig: Figure, ax: Any, text: str, style: FigureStyle, size_pt: float | None = None
) -> None:
    """``ax``'s title, broken into lines that fit the figure's width, so a long compound name
    wraps instead of running off a journal column. At the screen style's own size (a report's
    hundreds of plots) an estimate does: a character is at most about 0.6 of the type size
    wide (common practice, no source); at any other size the laid-out title is measured and
    wrapped shorter until it fits."""
    import textwrap

    size = size_pt or style.title_size
    chars = max(16, int(fig.get_size_inches()[0] * 72.0 / (0.6 * size)))

    def put(width: int) -> Any:
        lines = textwrap.wrap(text, width) or [text]  # after hyphens too, as names break
        return ax.set_title("\n".join(lines), fontsize=size)

    title = put(chars)
    if style.fixed_layout:
        return
    for _ in range(8):
        fig.draw_without_rendering()
        box = title.get_window_extent(fig.canvas.get_renderer())
        if (box.x1 <= fig.bbox.x1 and box.x0 >= fig.bbox.x0) or chars <= 16:
            return
        chars = max(16, int(chars * 0.85))
        title = put(chars)


def check_output(path: str | Path, *, protect: Path | None = None) -> str:
    """The format of an output file, once the file may be written
    (:func:`registry.outputs.check_target`: never the registry ``protect``, a SQLite file, a
    folder or a symlink) and its suffix is known: checked before any work, so a bad name costs
    nothing."""
    return figure_format(check_target(path, what="plot", protect=protect))


def save_figure(
    fig: Figure, path: str | Path, *, protect: Path | None = None, style: FigureStyle = SCREEN
) -> Path:
    """Write ``fig`` as PNG (at ``style.dpi``: the image is size × dpi pixels), SVG or PDF,
    whole or not at all; the folder must exist."""
    out = Path(path)
    fmt = check_output(out, protect=protect)
    metadata = _METADATA[fmt]
    with styled(style):
        write_file(out, lambda tmp: fig.savefig(tmp, format=fmt, dpi=style.dpi, metadata=metadata))
    return out


def convert(value: float, from_unit: str, to_unit: str) -> float:
    """``value`` in ``to_unit``: through the unit registry (pint), loaded only when the units
    differ, so a figure in the canonical units never pays for building it."""
    if from_unit == to_unit:
        return float(value)
    from registry.record.units import convert as through_pint

    return through_pint(value, from_unit, to_unit)


def energy_text(value_kj: float, err_kj: float | None, unit: str) -> str:
    v = convert(value_kj, "kJ/mol", unit)
    e = convert(err_kj, "kJ/mol", unit) if err_kj is not None and math.isfinite(err_kj) else None
    return format_uncertain(v, e, style="pm", minus="−") + f" {unit}"


def entropy_text(value: float, err: float | None, energy_unit: str) -> str:
    unit, label = (
        ("cal/(mol*K)", "cal/(mol·K)") if energy_unit == "kcal/mol" else ("J/(mol*K)", "J/(mol·K)")
    )
    v = convert(value, "J/(mol*K)", unit)
    e = convert(err, "J/(mol*K)", unit) if err is not None and math.isfinite(err) else None
    return format_uncertain(v, e, style="pm", minus="−", default_decimals=0) + f" {label}"
