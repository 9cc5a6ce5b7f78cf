"""Server commands: ``migrate-to`` (copy a registry between SQLite and PostgreSQL) and
``server-search`` (is motif search screened on the PostgreSQL server?)."""

from __future__ import annotations

import typer

from registry import api
from registry.cli.context import state
from registry.cli.output import print_json, render_rows
from registry.errors import DatabaseError, UsageError


def register(app: typer.Typer) -> None:
    app.command("migrate-to")(migrate_to)
    app.command("server-search")(server_search)


def migrate_to(
    ctx: typer.Context,
    target: str = typer.Argument(
        ...,
        help="Where to copy the registry: a PostgreSQL URL (postgresql+psycopg://user@host/db) "
        "or a SQLite file path. It must be new or empty.",
        show_default=False,
    ),
    chunk_rows: int = typer.Option(5000, "--chunk-rows", help="Rows per insert batch."),
    as_json: bool = typer.Option(False, "--json", help="Print JSON."),
) -> None:
    """Copy the whole registry (--db) into another database, keeping every id, then check it."""
    if chunk_rows < 1:
        raise UsageError(f"--chunk-rows {chunk_rows}: give at least 1")
    source = api.open_registry(state(ctx).db)
    try:
        report = api.migrate_to(source, target, chunk_rows=chunk_rows)
    finally:
        source.close()
    if as_json:
        print_json(report.as_dict())
    else:
        typer.echo(f"copied {report.source} -> {report.target} in {report.seconds:.1f} s")
        render_rows(
            [
                {
                    "table": t.table,
                    "source_rows": t.source_rows,
                    "target_rows": t.target_rows,
                    "content": "same" if t.same_content else "DIFFERENT",
                }
                for t in report.tables
            ]
        )
        chain = "intact" if not report.target_chain_problems else "BROKEN"
        typer.echo(f"hash chain: {chain}; last hash {report.target_last_hash[:16]}…")
        for problem in report.source_chain_problems:
            typer.echo(f"warning: source history: {problem}", err=True)
    if not report.ok:
        raise DatabaseError(
            "the copy does not match the source (see the table above); the source is unchanged"
        )


def server_search(
    ctx: typer.Context,
    enable: bool = typer.Option(
        False,
        "--enable",
        help="Add the cartridge's molecule column, trigger and index (PostgreSQL with the RDKit "
        "cartridge installed; needs the right to create the extension if it is not there yet).",
    ),
    as_json: bool = typer.Option(False, "--json", help="Print JSON."),
) -> None:
    """Show whether motif search is screened on the server (PostgreSQL + RDKit cartridge)."""
    database = api.open_registry(state(ctx).db)
    try:
        if enable:
            result = api.enable_server_search(database)
        else:
            result = api.server_search_status(database)
    finally:
        database.close()
    if as_json:
        print_json(result)
        return
    if result["backend"] != "postgresql":
        typer.echo(f"backend {result['backend']}: motif search runs in the client (no server)")
        return
    where = "on the server (RDKit cartridge)" if result["server_search_active"] else "in the client"
    typer.echo(f"motif search screens {where}")
    for key, value in result.items():
        typer.echo(f"  {key:<32}{'' if value is None else value}")
