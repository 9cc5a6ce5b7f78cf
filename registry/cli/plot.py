"""``fluxledger plot``: figures as PNG, SVG or PDF (the output file's suffix chooses), in the
screen or print style, at a journal column's size or any size, at any dpi.

Each command parses its options, calls one :mod:`registry.api` function and says what it wrote;
``--json`` prints the numbers drawn. The api is imported inside the commands (``--help`` stays fast); it loads matplotlib,
numpy and (only for quantities written as text) the unit registry when a figure is drawn.
"""

from __future__ import annotations

from pathlib import Path

import typer

from registry.cli import flags
from registry.cli.context import state
from registry.cli.output import print_json, table_text
from registry.errors import NotFoundError, UsageError

NAME = "plot"

app = typer.Typer(
    no_args_is_help=True,
    help="Figures, PNG, SVG or PDF by the output suffix: Eyring plots, Tc against field, "
    "overviews; --style print for journals.",
)

_OUT = typer.Option(..., "-o", "--out", help="Output file; .png, .svg or .pdf chooses the format.")
_STYLE = typer.Option(
    "screen",
    "--style",
    help="screen (our colours, 150 dpi) or print (white, journal type sizes, 600 dpi).",
)
_SIZE = typer.Option(
    None,
    "--size",
    help="single or double (journal column, 3.3 or 7 in wide) or WxH in inches, e.g. 3.3x2.5.",
)
_DPI = typer.Option(None, "--dpi", help="Dots per inch of a PNG (default: 150 screen, 600 print).")
_JSON = typer.Option(False, "--json", help="Print what was drawn as JSON (canonical units).")
_UNIT = typer.Option(
    "kJ/mol", "--energy-unit", help="Energy unit written on the figure: kJ/mol or kcal/mol."
)


@app.command("eyring")
def eyring(
    ctx: typer.Context,
    source: str = typer.Argument(
        None,
        help="A measurement id, or a CSV/TSV/spreadsheet with T and k columns "
        "(optional σk; units in the headers or in the cells). Or give --point instead.",
    ),
    out: str = _OUT,
    point: list[str] = typer.Option(
        None,
        "--point",
        help="A rate point 'T, k' or 'T; k; σk' (K and s⁻¹ if no unit). Repeatable.",
    ),
    sheet: str = typer.Option(None, "--sheet", help="Sheet of a spreadsheet file."),
    t_ref: str = typer.Option(
        None,
        "--t-ref",
        help="Second temperature for ΔG‡, default 25 °C (the mean measured T is always shown).",
    ),
    title: str = typer.Option(None, "--title", help="Figure title (default: what was plotted)."),
    energy_unit: str = _UNIT,
    style: str = _STYLE,
    size: str = _SIZE,
    dpi: int = _DPI,
    as_json: bool = _JSON,
) -> None:
    """ln(k/T) against 1/T with the weighted fit, its 95 % confidence band, ΔH‡, ΔS‡ and ΔG‡."""
    from registry import api

    options = dict(out=out, title=title, energy_unit=energy_unit, style=style, size=size, dpi=dpi)
    if t_ref is not None:
        options["t_ref"] = t_ref
    if point:
        if source is not None:
            raise UsageError("give a measurement id or a file, or --point, not both")
        drawn = api.plot_eyring(points=point, **options)
    elif source is None:
        raise UsageError("give a measurement id, a rate table file, or --point 'T, k'")
    elif Path(source).exists():
        drawn = api.plot_eyring(file=source, sheet=sheet, **options)
    elif source.isdigit() and int(source) > 0:
        database = api.open_registry(state(ctx).db)
        drawn = api.plot_eyring(database, measurement_id=int(source), sheet=sheet, **options)
    else:
        raise NotFoundError(f"{source}: no such file (nor a measurement id)")
    if as_json:
        print_json(drawn.as_dict())
        return
    typer.echo(f"wrote {drawn.file}: Eyring plot of {drawn.summary.n_points} rate points")
    for line in drawn.lines[:4]:
        typer.echo(f"  {line}")
    for note in drawn.notes:
        typer.echo(f"note: {note}")


@app.command("coalescence")
def coalescence(
    ctx: typer.Context,
    out: str = _OUT,
    barrier: str = typer.Option(
        None, "--barrier", "--dg", help="ΔG‡ with unit, e.g. '15.2 ± 0.2 kcal/mol'."
    ),
    dnu: str = typer.Option(
        None, "--dnu", help="Shift difference of the two sites: '0.12 ppm', or Hz with --dnu-field."
    ),
    dnu_field: str = typer.Option(
        None, "--dnu-field", help="Spectrometer frequency at which a Δν in Hz was measured."
    ),
    j: str = typer.Option(None, "--j", help="Coupling between the exchanging sites, e.g. '12 Hz'."),
    measurement: int = typer.Option(
        None, "--measurement", help="Take ΔG‡, Δν and solvent from this measurement and mark it."
    ),
    compound: str = typer.Option(
        None,
        "--compound",
        help="Mark the observed Tc of compounds whose label or name contains this.",
    ),
    solvent: str = typer.Option(
        None, "--solvent", help="Shade temperatures outside this solvent's liquid range."
    ),
    min_field: str = typer.Option("60 MHz", "--min-field", help="Lowest field drawn."),
    max_field: str = typer.Option("1000 MHz", "--max-field", help="Highest field drawn."),
    title: str = typer.Option(None, "--title", help="Figure title."),
    energy_unit: str = _UNIT,
    style: str = _STYLE,
    size: str = _SIZE,
    dpi: int = _DPI,
    as_json: bool = _JSON,
) -> None:
    """Predicted coalescence temperature against spectrometer field, with observed points."""
    from registry import api

    database = None
    if measurement is not None or compound or solvent:
        database = api.open_registry(state(ctx).db)
    drawn = api.plot_coalescence(
        database,
        out=out,
        barrier=barrier,
        dnu=dnu,
        dnu_field=dnu_field,
        j=j,
        measurement_id=measurement,
        compound=compound,
        solvent=solvent,
        min_field=min_field,
        max_field=max_field,
        title=title,
        energy_unit=energy_unit,
        style=style,
        size=size,
        dpi=dpi,
    )
    if as_json:
        print_json(drawn.as_dict())
        return
    lo, hi = drawn.field_range_mhz
    typer.echo(
        f"wrote {drawn.file}: predicted Tc from {drawn.tc_range_k[0]:.1f} K at {lo:g} MHz"
        f" to {drawn.tc_range_k[1]:.1f} K at {hi:g} MHz ({len(drawn.observed)} observed point(s))"
    )
    if drawn.predicted:
        typer.echo(table_text(list(drawn.predicted), ["field_mhz", "tc_k", "tc_c"]))
    for note in drawn.notes:
        typer.echo(f"note: {note}")
    for line in drawn.cautions:
        typer.echo(f"caution: {line}")


@app.command("overview")
def overview(
    ctx: typer.Context,
    out: str = _OUT,
    by: str = typer.Option(
        "auto",
        "--by",
        help="Group by 'kind' (process kind), 'motif' (structural motif), or 'auto' (motif "
        "when motif matching is available, else kind).",
    ),
    include_retracted: bool = typer.Option(
        False, "--include-retracted", help="Plot retracted measurements too."
    ),
    include_flagged: bool = flags.include_option("the plot, drawn as crosses"),
    motif_overlap: bool = typer.Option(
        False,
        "--motif-overlap",
        help="By motif: draw a measurement under every motif its compound matches (default: "
        "once, under the narrowest).",
    ),
    title: str = typer.Option(None, "--title", help="Figure title."),
    energy_unit: str = _UNIT,
    style: str = _STYLE,
    size: str = _SIZE,
    dpi: int = _DPI,
    as_json: bool = _JSON,
) -> None:
    """ΔG‡ of every measurement, grouped: every value a point, a box for groups of ≥ 5;
    each measurement once; flagged values are left out unless asked for."""
    from registry import api

    database = api.open_registry(state(ctx).db)
    drawn = api.plot_overview(
        database,
        out=out,
        by=by,
        include_retracted=include_retracted,
        include_flagged=include_flagged,
        motif_overlap=motif_overlap,
        title=title,
        energy_unit=energy_unit,
        style=style,
        size=size,
        dpi=dpi,
    )
    if as_json:
        print_json(drawn.as_dict())
        return
    typer.echo(
        f"wrote {drawn.file}: ΔG‡ by {drawn.grouped_by}, {drawn.measurements} measurement(s)"
        + (f" as {drawn.points} points" if drawn.points != drawn.measurements else "")
    )
    columns = ["group", "n", "min_kj_mol", "max_kj_mol"]
    typer.echo(
        table_text(list(drawn.groups), [*columns, "flagged"] if include_flagged else columns)
    )
    if drawn.left_out_flagged:
        typer.echo(
            f"note: {drawn.left_out_flagged} flagged value(s) left out (an error finding is "
            "open); --include-flagged draws them as crosses"
        )
    if drawn.left_out_not_finite:
        typer.echo(
            f"note: {drawn.left_out_not_finite} stored ΔG‡ value(s) are not finite (inf or nan) "
            "and were left out; 'fluxledger verify' lists them"
        )
    for note in drawn.notes:
        typer.echo(f"note: {note}")
