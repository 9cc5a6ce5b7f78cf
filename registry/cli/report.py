"""``fluxledger report``: the registry as a static HTML folder to open offline from a shared drive;
``fluxledger si-table``: a supporting-information table (LaTeX, Markdown or a workbook).

Tables for the paper itself are written by ``fluxledger export -o FILE.tex|FILE.md``.
"""

from __future__ import annotations

import typer

from registry.cli import flags
from registry.cli.context import state
from registry.cli.output import print_json


def register(app: typer.Typer) -> None:
    app.command("report")(report)
    app.command("si-table")(si_table)


def report(
    ctx: typer.Context,
    out: str = typer.Option(..., "-o", "--out", help="Folder to write (created if missing)."),
    title: str = typer.Option("Barrier registry", "--title", help="Title of the pages."),
    include_retracted: bool = typer.Option(
        False, "--include-retracted", help="Show retracted measurements too."
    ),
    include_flagged: bool = flags.include_option("the overview and the compounds' ΔG‡ ranges"),
    no_plots: bool = typer.Option(
        False, "--no-plots", help="Skip the Eyring and overview plots (faster for big registries)."
    ),
    column: list[str] = typer.Option(
        None,
        "--column",
        help="Add one of the group's own columns (e.g. operator, 'notebook page') to the "
        "index table. Repeatable.",
    ),
    as_json: bool = typer.Option(False, "--json", help="Print what was written as JSON."),
) -> None:
    """Write a browsable HTML view of the registry: a filterable, sortable index and a page per
    compound with its structure, measurements, validation findings and Eyring plots."""
    from registry import api

    database = api.open_registry(state(ctx).db)
    result = api.build_report(
        database, out, title=title, include_retracted=include_retracted,
        include_flagged=include_flagged, plots=not no_plots, columns=column or (),
    )  # fmt: skip
    if as_json:
        print_json(result.as_dict())
        return
    typer.echo(
        f"wrote {result.index}: {result.measurements} measurement(s), "
        f"{result.compound_pages} compound page(s), {result.eyring_plots} Eyring plot(s)"
        + (f"; {result.flagged} flagged (marked)" if result.flagged else "")
    )
    for note in result.notes:
        typer.echo(f"note: {note}")
    typer.echo("open index.html in a browser; the folder works offline and can be copied as is")


def si_table(
    ctx: typer.Context,
    out: str = typer.Option(..., "-o", "--out", help="File to write: .tex, .md or .xlsx."),
    fmt: str = typer.Option(
        None, "--format", help="latex, markdown or xlsx (default: from the file name)."
    ),
    compound: str = typer.Option(None, help="Compound label or name contains this text."),
    method: str = typer.Option(None, help="Only this method."),
    solvent: str = typer.Option(None, help="Solvent contains this text."),
    process: str = typer.Option(None, help="Only this process kind."),
    status: str = typer.Option(None, help="Only this status."),
    include_retracted: bool = typer.Option(
        False, "--include-retracted", help="Retracted measurements too."
    ),
    include_flagged: bool = flags.include_option("the table, marked †"),
    energy_unit: str = typer.Option("kJ/mol", "--energy-unit", help="kJ/mol or kcal/mol."),
    uncertainty: str = typer.Option(
        "paren", "--uncertainty", help="'paren' 62.3(4) or 'pm' 62.3 ± 0.4 (text tables)."
    ),
    caption: str = typer.Option(None, "--caption", help="LaTeX caption."),
    column: list[str] = typer.Option(
        None, "--column", help="Add one of the group's own columns (e.g. operator). Repeatable."
    ),
    as_json: bool = typer.Option(False, "--json", help="Print what was written as JSON."),
) -> None:
    """A table for supporting information: ΔG‡, ΔH‡, ΔS‡ as reported and normalised, method,
    solvent, the temperature of each ΔG‡ and the reference, one row per measurement."""
    from registry import api

    database = api.open_registry(state(ctx).db)
    result = api.export_si_table(
        database, out, format=fmt, compound=compound, method=method, solvent=solvent,
        process=process, status=status, include_retracted=include_retracted,
        include_flagged=include_flagged, energy_unit=energy_unit, uncertainty=uncertainty,
        caption=caption, columns=column or (),
    )  # fmt: skip
    if as_json:
        print_json(result)
        return
    typer.echo(
        f"wrote {result['file']}: {result['measurements']} measurement(s) as a "
        f"{result['format']} supporting-information table ({result['energy_unit']})"
    )
    if result["flagged_left_out"]:
        typer.echo(
            f"note: {result['flagged_left_out']} flagged measurement(s) left out (an error "
            "finding is open); --include-flagged shows them marked †"
        )
    for note in result["notes"]:
        typer.echo(f"note: {note}")
