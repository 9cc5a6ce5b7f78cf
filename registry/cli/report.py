"""``fluxledger report``: the registry as a static HTML folder to open offline from a shared drive.

Tables for papers are written by ``fluxledger export -o FILE.tex|FILE.md``.
"""

from __future__ import annotations

import typer

from registry.cli import flags
from registry.cli.context import state
from registry.cli.output import print_json


def register(app: typer.Typer) -> None:
    app.command("report")(report)


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
