"""Every plot command in every output format and both styles: the file is there, is what its
suffix says, and a PNG has exactly size × dpi pixels. Plus the one style's option checks, and
the overview's labels measured on the rendered canvas (no two overlap, none leaves the figure)
with the longest words of the vocabulary and of the motif library.

Demo values are invented. Column widths are the journals' (about 85 and 178 mm; common
practice) and pixel counts are width × dpi, rounded (the PNG definition of an image of that
size at that resolution; W3C PNG specification, pHYs chunk) — computed here, not read from the
code under test.
"""

from __future__ import annotations

import struct
from pathlib import Path

import numpy as np
import pytest

from registry import api
from registry.errors import UsageError
from registry.record.entry import EntryInput
from registry.record.vocab import PROCESS_KINDS
from registry.reports import canvas, labels, plots
from registry.reports.style import PRINT, SCREEN, figure_style

FORMATS = ("png", "svg", "pdf")
STYLES = ("screen", "print")


def png_size(path: Path) -> tuple[int, int]:
    """Width and height from the IHDR chunk (PNG spec §11.2.2: bytes 16–24, big-endian)."""
    head = path.read_bytes()[:24]
    assert head[:8] == b"\x89PNG\r\n\x1a\n" and head[12:16] == b"IHDR"
    return struct.unpack(">II", head[16:24])


def assert_pixels(got: tuple[int, int], size_in: tuple[float, float], dpi: int) -> None:
    """size × dpi pixels, to the pixel (a fraction of a pixel is dropped: 3.3 in at 72 dpi is
    237.6, so 237 pixels)."""
    for n, inches in zip(got, size_in, strict=True):
        assert 0 <= inches * dpi - n < 1, f"{got} is not {size_in} in at {dpi} dpi"


def check_file(path: Path, fmt: str, size_in: tuple[float, float] | None, dpi: int) -> None:
    data = path.read_bytes()
    assert len(data) > 1000, f"{path.name} is nearly empty"
    if fmt == "pdf":
        assert data.startswith(b"%PDF-")
        assert b"/FontFile2" in data  # TrueType embedded (pdf.fonttype 42), not Type 3
    elif fmt == "svg":
        assert data.lstrip().startswith(b"<?xml") and b"<svg" in data
    else:
        width, height = png_size(path)
        if size_in is not None:
            assert_pixels((width, height), size_in, dpi)


def _filled(database) -> None:  # type: ignore[no-untyped-def]
    """Invented measurements in several process kinds, one with rate points."""
    rates = [(f"{t} K", f"{k} s-1") for t, k in ((263, 12.0), (283, 95.0), (303, 560.0))]
    api.add_measurement(
        database,
        EntryInput(method="lineshape", compound="DEMO-S1", smiles="CC(=O)N(C)C",
                   process="bond-rotation", dg="66 kJ/mol", rates=rates),
        check=False,
    )  # fmt: skip
    for i, (kind, dg, smiles) in enumerate(
        [("ring-inversion", 43.0, "C1CCCCC1"), ("degenerate-rearrangement", 55.0, "C1=CCC=CC1"),
         ("bond-rotation", 70.0, "CN(C)C=O")]
    ):  # fmt: skip
        api.add_measurement(
            database,
            EntryInput(method="coalescence", compound=f"DEMO-S{i + 2}", smiles=smiles,
                       process=kind, dg=f"{dg} kJ/mol", solvent="CDCl3", field="400 MHz",
                       tc="300 K", dnu="50 Hz"),
            check=False,
        )  # fmt: skip


@pytest.mark.parametrize("style", STYLES)
@pytest.mark.parametrize("fmt", FORMATS)
def test_every_plot_command_renders(database, tmp_path: Path, fmt: str, style: str) -> None:  # type: ignore[no-untyped-def]
    _filled(database)
    dpi = 72  # small pictures keep the test quick; the pixel count still has to be exact
    size = (3.3, 2.64)  # the single column: 3.3 in wide, 0.8 of that high
    made = [
        api.plot_eyring(database, measurement_id=1, out=tmp_path / f"e.{fmt}", style=style,
                        size="single", dpi=dpi).file,
        api.plot_coalescence(database, measurement_id=2, out=tmp_path / f"c.{fmt}",
                             style=style, size="single", dpi=dpi).file,
        api.plot_overview(database, out=tmp_path / f"o.{fmt}", by="kind", style=style,
                          size="single", dpi=dpi).file,
    ]  # fmt: skip
    for path in made:
        check_file(Path(path), fmt, size, dpi)


@pytest.mark.parametrize("style", STYLES)
def test_line_shape_pictures_use_the_style(tmp_path: Path, style: str) -> None:
    from registry.lineshape.plots import write_plots

    class Fit:  # the attributes a picture reads from a line-shape fit (invented numbers)
        source, method, width_hz, k_per_s, k_err_per_s, ln_k_err = (
            "s.csv",
            "mutual",
            1.2,
            80.0,
            4.0,
            0.05,
        )
        freq_hz = np.linspace(-100, 100, 201)
        data = np.exp(-((freq_hz / 20) ** 2))
        best_fit = data * 0.99

        def __init__(self, t_k: float) -> None:
            self.t_k = t_k

    look = figure_style(style, size="double", dpi=50)
    for fmt in FORMATS:
        written = write_plots([Fit(280.0), Fit(300.0)], tmp_path / fmt, style=look, fmt=fmt)
        assert [p.suffix for p in written] == [f".{fmt}"] * 3
        for p in written:
            check_file(p, fmt, (7.0, 4.2), 50)


def test_default_dpi_and_print_look(tmp_path: Path) -> None:
    from registry.kinetics import fit_eyring

    t = np.array([260.0, 280.0, 300.0])
    fit = fit_eyring(t, np.array([5.0, 60.0, 500.0]))
    look = figure_style("print", size="single")
    assert look.dpi == 600 and SCREEN.dpi == 150
    fig, _ = plots.eyring_figure(fit, style=look)
    out = canvas.save_figure(fig, tmp_path / "p.png", style=look)
    assert_pixels(png_size(out), (3.3, 2.64), 600)
    assert fig.get_facecolor()[:3] == (1.0, 1.0, 1.0)  # white paper for print
    svg = canvas.save_figure(fig, tmp_path / "p.svg", style=look).read_text(encoding="utf-8")
    assert "#ffffff" in svg and PRINT.paper == "#ffffff"
    assert "font-size: 7px" in svg or "font: 7px" in svg or "7px" in svg  # journal type size
    screen, _ = plots.eyring_figure(fit)
    own = canvas.save_figure(screen, tmp_path / "s.png")
    assert_pixels(png_size(own), (6.4, 4.4), 150)  # its own size at 150 dpi


def test_the_same_data_give_the_same_pdf(tmp_path: Path) -> None:
    from registry.kinetics import fit_eyring

    fit = fit_eyring(np.array([260.0, 280.0, 300.0]), np.array([5.0, 60.0, 500.0]))
    look = figure_style("print")
    a = canvas.save_figure(plots.eyring_figure(fit, style=look)[0], tmp_path / "a.pdf", style=look)
    b = canvas.save_figure(plots.eyring_figure(fit, style=look)[0], tmp_path / "b.pdf", style=look)
    assert a.read_bytes() == b.read_bytes()


@pytest.mark.parametrize(
    ("kwargs", "message"),
    [
        ({"style": "poster"}, "style 'poster': use screen or print"),
        ({"size": "A4"}, "size 'A4': use single, double"),
        ({"size": "0.2x3"}, "size 0.2×3 in: each side must be"),
        ({"dpi": "lots"}, "dpi 'lots': give a number"),
        ({"dpi": 5}, "dpi 5: give a whole number from 30 to 1200"),
        ({"size": "40x40", "dpi": 1200}, "size 40×40 in at 1200 dpi"),
    ],
)
def test_style_options_are_checked(kwargs, message) -> None:  # type: ignore[no-untyped-def]
    with pytest.raises(UsageError) as caught:
        figure_style(**kwargs)
    assert str(caught.value).startswith(message)


def test_sizes_are_read() -> None:
    assert figure_style(size="3.5x2").figsize((1, 1)) == (3.5, 2.0)
    assert figure_style(size="3.5 × 2.5 in").figsize((1, 1)) == (3.5, 2.5)
    assert figure_style(size="double").figsize((1, 1)) == (7.0, 4.2)
    assert figure_style().figsize((6.4, 4.4)) == (6.4, 4.4)


def test_a_bad_option_writes_nothing(database, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    _filled(database)
    with pytest.raises(UsageError, match="size"):
        api.plot_overview(database, out=tmp_path / "o.png", size="huge")
    assert not (tmp_path / "o.png").exists()


# --- labels that never overlap ---------------------------------------------------------------


def _motif_names() -> list[str]:
    try:
        from registry.search.motifs import BUILTIN
    except ImportError:  # motif search needs RDKit
        return []
    return [m.name for m in BUILTIN]


def _longest(words: list[str], n: int) -> list[str]:
    return sorted(set(words), key=lambda w: (-len(w), w))[:n]


def _assert_readable(fig) -> None:  # type: ignore[no-untyped-def]
    ax = fig.axes[0]
    boxes = labels.label_boxes(fig, ax)
    assert boxes, "no labels drawn"
    clash = labels.overlapping(boxes, gap=0.0)
    assert not clash, f"labels overlap: {[ax.get_xticklabels()[i].get_text() for i in clash[0]]}"
    whole = fig.bbox
    for b in boxes:  # inside the figure: nothing clipped at an edge
        assert whole.x0 - 0.5 <= b.x0 and b.x1 <= whole.x1 + 0.5
        assert whole.y0 - 0.5 <= b.y0 and b.y1 <= whole.y1 + 0.5


@pytest.mark.parametrize("style", STYLES)
@pytest.mark.parametrize("size", [None, "single", "double"])
def test_overview_labels_never_overlap(style: str, size: str | None) -> None:
    words = _longest(list(PROCESS_KINDS) + _motif_names(), 9)
    assert "degenerate-rearrangement" in words  # the longest process kind is among them
    groups = {w: [50.0 + i, 52.0 + i, 55.0 + i] for i, w in enumerate(words)}
    look = figure_style(style, size=size, dpi=72)
    fig = plots.overview_figure(groups, style=look, group_title="structural motif")
    _assert_readable(fig)


def test_many_groups_widen_the_figure_or_are_refused() -> None:
    groups = {f"very-long-group-name-{i:02d}": [40.0 + i] for i in range(60)}
    fig = plots.overview_figure(groups)
    _assert_readable(fig)  # its own size: widened until the labels fit
    with pytest.raises(UsageError, match="60 groups do not fit side by side"):
        plots.overview_figure(groups, style=figure_style("print", size="single"))


def test_the_overlap_check_can_fail() -> None:
    """The measurement used by the tests above does see overlapping labels."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    fig = Figure(figsize=(3, 2))
    FigureCanvasAgg(fig)
    ax = fig.add_subplot()
    ax.set_xticks([1, 2, 3], ["degenerate-rearrangement"] * 3)
    assert labels.overlapping(labels.label_boxes(fig, ax))


def test_labels_are_wrapped_at_hyphens() -> None:
    assert labels.wrap_label("degenerate-rearrangement") == "degenerate-\nrearrangement"
    assert labels.wrap_label("pyramidal-inversion") == "pyramidal-\ninversion"
    assert labels.wrap_label("(no motif)") == "(no motif)"
    assert labels.shorten("x" * 40, 10) == "x" * 9 + "…"


def test_small_groups_are_points_not_boxes() -> None:
    fig = plots.overview_figure({"four": [1.0, 2.0, 3.0, 4.0], "five": [1.0, 2.0, 3.0, 4.0, 5.0]})
    # with patch_artist a box plot adds one patch per box (matplotlib Axes.boxplot)
    boxes = fig.axes[0].patches
    assert len(boxes) == 1 and plots.MIN_BOX == 5
    x0, x1 = sorted(boxes[0].get_path().get_extents().intervalx)
    assert x0 < 2.0 < x1  # the box is the five-value group's (second position), not the four's


# --- each measurement once ---------------------------------------------------------------------


def test_a_compound_in_several_motifs_is_drawn_once_under_the_narrowest() -> None:
    from registry.reports.gather import _motifs_of

    matches = {"biaryl": [1, 2, 3], "biaryl-ortho": [2], "amide": [3, 4]}
    assert _motifs_of(matches, overlap=False) == {
        2: ["biaryl-ortho"], 3: ["amide"], 4: ["amide"], 1: ["biaryl"]
    }  # fmt: skip
    both = _motifs_of(matches, overlap=True)
    assert sorted(both[2]) == ["biaryl", "biaryl-ortho"] and sorted(both[3]) == ["amide", "biaryl"]
    # two motifs that match the same compounds: one group, not two identical ones
    assert _motifs_of({"biaryl": [1], "biaryl-ortho": [1]}, overlap=False) == {1: ["biaryl"]}


def test_overview_by_motif_counts_each_measurement_once(database, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    pytest.importorskip("registry.search")
    for label, smiles, dg in (
        ("DEMO-B1", "c1ccc(cc1)-c1ccccc1", 60.0),  # biphenyl (invented barrier)
        ("DEMO-B2", "Cc1ccccc1-c1ccccc1C", 75.0),  # 2,2'-dimethylbiphenyl: ortho groups too
        ("DEMO-B3", "CC(=O)N(C)C", 66.0),
    ):
        api.add_measurement(
            database,
            EntryInput(method="coalescence", compound=label, smiles=smiles,
                       process="bond-rotation", dg=f"{dg} kJ/mol"),
            check=False,
        )  # fmt: skip
    once = api.plot_overview(database, out=tmp_path / "once.svg", by="motif")
    assert once.measurements == 3 and once.points == 3
    assert sum(g["n"] for g in once.groups) == 3
    many = api.plot_overview(database, out=tmp_path / "many.svg", by="motif", motif_overlap=True)
    assert many.measurements == 3 and many.points == sum(g["n"] for g in many.groups)
    assert many.points > 3 and many.shared >= 1  # the ortho biaryl matches two motifs at least
    assert many.notes[0].startswith("motifs overlap:")
    svg = (tmp_path / "many.svg").read_text(encoding="utf-8")
    assert "motifs overlap" in svg  # said on the figure, not only in the record
    with pytest.raises(UsageError, match="motif_overlap: applies to grouping by motif only"):
        api.plot_overview(database, out=tmp_path / "k.svg", by="kind", motif_overlap=True)


def _inside(fig, artist) -> bool:  # type: ignore[no-untyped-def]
    box = artist.get_window_extent(fig.canvas.get_renderer())
    whole = fig.bbox
    return whole.x0 - 0.5 <= box.x0 and box.x1 <= whole.x1 + 0.5 and box.y1 <= whole.y1 + 0.5


@pytest.mark.parametrize("size", ["single", "double"])
def test_long_titles_wrap_inside_a_journal_column(size: str) -> None:
    from registry.kinetics import fit_eyring

    fit = fit_eyring(np.array([260.0, 280.0, 300.0]), np.array([5.0, 60.0, 500.0]))
    title = "DEMO-LONG (1-(2-methylphenyl)-2-(2,6-diisopropylphenyl)naphthalene) [run 12]"
    look = figure_style("print", size=size, dpi=300)
    fig, _ = plots.eyring_figure(fit, title=title, style=look)
    fig.draw_without_rendering()
    shown = [t for t in (fig.axes[0].title, fig.axes[0]._left_title) if t.get_text()]
    assert shown and all(_inside(fig, t) for t in shown)
    drawn = shown[0].get_text()
    assert "".join(drawn.split()) == "".join(title.split())  # wrapped, nothing lost
    assert ("\n" in drawn) == (size == "single")  # 76 characters do not fit 3.3 in at 8 pt


def test_line_shape_labels_are_not_clipped(tmp_path: Path) -> None:
    """The residual axis label (and every other) lies inside the figure at a column width."""
    from registry.lineshape import plots as ls_plots

    class Fit:  # invented numbers
        source, method, width_hz, k_per_s, k_err_per_s = (
            "long-spectrum-name-280K.csv",
            "two-site",
            1.2,
            80.0,
            4.0,
        )
        freq_hz = np.linspace(-100, 100, 201)
        data = np.exp(-((freq_hz / 20) ** 2))
        best_fit = data * 0.99
        t_k = 280.0

    look = figure_style("print", size="single", dpi=150)
    captured = {}
    from registry.reports import canvas as canvas_module

    save = canvas_module.save_figure

    def keep(fig, path, **kwargs):  # type: ignore[no-untyped-def]
        captured["fig"] = fig
        return save(fig, path, **kwargs)

    canvas_module.save_figure = keep
    try:
        ls_plots.plot_fit(Fit(), tmp_path / "f.png", observe_mhz=400.0, style=look)
    finally:
        canvas_module.save_figure = save
    fig = captured["fig"]
    fig.draw_without_rendering()
    for ax in fig.axes:
        for artist in (ax.yaxis.label, ax.xaxis.label, ax._left_title):
            if artist.get_text():
                assert _inside(fig, artist), artist.get_text()
