"""``fluxledger report``: the registry as a static HTML folder to open offline from a shared drive.

Also ``fluxledger table`` (LaTeX or Markdown tables for papers) while the ``export`` command
does not offer those formats itself.
"""

from __future__ import annotations

import os
from pathlib import Path

import typer

from registry.cli.context import state
from registry.cli.output import print_json


def register(app: typer.Typer) -> None:
    app.command("report")(report)
    if not _export_has_tables():
        app.command("table")(table)


def _export_has_tables() -> bool:
    """True once the import/export commands render latex/markdown through reports.tables."""
    here = os.path.join(os.path.dirname(__file__), "io_commands.py")
    if not os.path.exists(here):
        return False
    with open(here, encoding="utf-8") as handle:
        return "render_latex" in handle.read()


def report(
    ctx: typer.Context,
    out: Path = typer.Option(..., "-o", "--out", help="Folder to write (created if missing)."),
    title: str = typer.Option("Barrier registry", "--title", help="Title of the pages."),
    include_retracted: bool = typer.Option(
        False, "--include-retracted", help="Show retracted measurements too."
    ),
    no_plots: bool = typer.Option(
        False, "--no-plots", help="Skip the Eyring and overview plots (faster for big registries)."
    ),
    as_json: bool = typer.Option(False, "--json", help="Print what was written as JSON."),
) -> None:
    """Write a browsable HTML view of the registry: a filterable, sortable index and a page per
    compound with its structure, measurements, validation findings and Eyring plots."""
    from registry import api
    from registry.reports.site import build_report

    database = api.open_registry(state(ctx).db)
    result = build_report(
        database, out, title=title, include_retracted=include_retracted, plots=not no_plots
    )
    if as_json:
        print_json(result.as_dict())
        return
    typer.echo(
        f"wrote {result.index}: {result.measurements} measurement(s), "
        f"{result.compound_pages} compound page(s), {result.eyring_plots} Eyring plot(s)"
    )
    for note in result.notes:
        typer.echo(f"note: {note}")
    typer.echo("open index.html in a browser; the folder works offline and can be copied as is")


def table(
    ctx: typer.Context,
    fmt: str = typer.Option("markdown", "--format", help="latex or markdown."),
    energy_unit: str = typer.Option(
        "kJ/mol", "--energy-unit", help="Unit of ΔG‡ and ΔH‡: kJ/mol or kcal/mol."
    ),
    uncertainty: str = typer.Option(
        "paren", "--uncertainty", help="'paren' for 62.3(4), 'pm' for 62.3 ± 0.4."
    ),
    ids: list[int] = typer.Option(None, "--id", help="Only this measurement (repeatable)."),
    compound: str = typer.Option(None, help="Compound label or name contains this text."),
    method: str = typer.Option(None, help="Only this method."),
    solvent: str = typer.Option(None, help="Solvent contains this text."),
    process: str = typer.Option(None, help="Only this process kind."),
    status: str = typer.Option(None, help="Only this status."),
    caption: str = typer.Option(None, "--caption", help="LaTeX caption."),
    out: Path = typer.Option(None, "-o", "--out", help="Write to this file instead of stdout."),
    as_json: bool = typer.Option(
        False, "--json", help="Print JSON: the table text and the rows it was made from."
    ),
) -> None:
    """A table of barriers for a paper (LaTeX booktabs or Markdown), notes for methods/solvents."""
    from registry import api
    from registry.cli.plot import energy_unit_option
    from registry.errors import UsageError
    from registry.reports.tables import render_latex, render_markdown, table_rows

    if fmt not in ("latex", "markdown"):
        raise UsageError(f"--format {fmt!r}: use latex or markdown")
    if uncertainty not in ("paren", "pm"):
        raise UsageError(f"--uncertainty {uncertainty!r}: use paren or pm")
    unit = energy_unit_option(energy_unit)
    database = api.open_registry(state(ctx).db)
    rows = table_rows(
        database,
        ids=ids or None,
        compound=compound,
        method=method,
        solvent=solvent,
        process=process,
        status=status,
    )
    if fmt == "latex":
        text = render_latex(rows, energy_unit=unit, uncertainty=uncertainty, caption=caption)
    else:
        text = render_markdown(rows, energy_unit=unit, uncertainty=uncertainty)
    if out is not None:
        out.write_text(text, encoding="utf-8")
    if as_json:
        print_json({"format": fmt, "energy_unit": unit, "text": text, "rows": rows})
    elif out is not None:
        typer.echo(f"wrote {out}: {len(rows)} measurement(s) as a {fmt} table")
    else:
        typer.echo(text, nl=False)
