"""``fluxledger vocab``: the registry's own spellings (aliases) and solvents, and how a text reads.

Parsing and rendering only; the work is in :mod:`registry.api.vocabulary`.
"""

from __future__ import annotations

from typing import Any

import typer

from registry import api
from registry.cli.context import state
from registry.cli.output import print_json, render_rows

NAME = "vocab"

app = typer.Typer(
    help=(
        "The registry's vocabulary: spellings your group uses for methods, process kinds, "
        "solvents and nuclei (shared by everyone who opens the registry), and solvents with "
        "their liquid range."
    ),
    no_args_is_help=True,
)

KIND_HELP = "What the spelling is for: method, process, solvent or nucleus."
JSON_HELP = "Print JSON."


@app.command("read")
def read(
    ctx: typer.Context,
    kind: str = typer.Argument(..., help=KIND_HELP),
    text: str = typer.Argument(..., help="The text as a sheet or entry writes it."),
    as_json: bool = typer.Option(False, "--json", help=JSON_HELP),
) -> None:
    """How the registry reads a text: the name it means, or suggestions (exit 1)."""
    database = api.open_registry(state(ctx).db)
    try:
        reading = api.read_term(database, kind, text)
    finally:
        database.close()
    if as_json:
        print_json(reading)
    elif reading["reads_as"]:
        typer.echo(f"{text!r} reads as {reading['kind']} {reading['reads_as']} ({reading['how']})")
    elif reading["candidates"]:
        typer.echo(f"{text!r} could be {' or '.join(reading['candidates'])}: write the one meant")
    else:
        near = reading["suggestions"]
        typer.echo(
            f"{text!r} is not a known {reading['kind']}"
            + (f"; did you mean {' or '.join(near)}?" if near else "")
        )
    if not reading["reads_as"]:
        raise typer.Exit(1)


@app.command("list")
def list_(
    ctx: typer.Context,
    kind: str = typer.Option(None, "--kind", help="Only aliases of this kind. " + KIND_HELP),
    as_json: bool = typer.Option(False, "--json", help=JSON_HELP),
    as_csv: bool = typer.Option(False, "--csv", help="Print CSV."),
) -> None:
    """The aliases stored in the registry, with who added them and when."""
    database = api.open_registry(state(ctx).db)
    try:
        rows = api.list_aliases(database, kind)
    finally:
        database.close()
    if as_json:
        print_json(rows)
        return
    shown = [{**r, "created_at": r["created_at"].strftime("%Y-%m-%d %H:%M")} for r in rows]
    columns = ["kind", "alias", "target", "created_by", "created_at"]
    if not shown and not as_csv:
        typer.echo("(no stored aliases)")
        return
    render_rows(shown, as_csv=as_csv, columns=columns)


@app.command("add")
def add(
    ctx: typer.Context,
    kind: str = typer.Argument(..., help=KIND_HELP),
    alias: str = typer.Argument(..., help="The spelling your group writes."),
    target: str = typer.Argument(
        ..., help="What it means: a method, process kind, solvent or nucleus."
    ),
    reason: str = typer.Option(None, "--reason", help="Why (kept in the history)."),
    as_json: bool = typer.Option(False, "--json", help=JSON_HELP),
) -> None:
    """Store a spelling for everyone who opens the registry (recorded in the history)."""
    st = state(ctx)
    database = api.open_registry(st.db)
    try:
        done = api.add_alias(database, kind, alias, target, actor=st.actor, reason=reason)
    finally:
        database.close()
    if as_json:
        print_json(done)
        return
    typer.echo(f"stored {done['kind']} alias {done['alias']!r} → {done['target']}")
    if done["overrides"]:
        typer.echo(f"  (it read as {done['overrides']} before)")
    _moved("linked", done["measurements_linked"])


@app.command("remove")
def remove(
    ctx: typer.Context,
    kind: str = typer.Argument(..., help=KIND_HELP),
    alias: str = typer.Argument(..., help="A stored spelling."),
    reason: str = typer.Option(None, "--reason", help="Why (kept in the history)."),
    as_json: bool = typer.Option(False, "--json", help=JSON_HELP),
) -> None:
    """Remove a stored spelling (the history keeps what it was)."""
    st = state(ctx)
    database = api.open_registry(st.db)
    try:
        done = api.remove_alias(database, kind, alias, actor=st.actor, reason=reason)
    finally:
        database.close()
    if as_json:
        print_json(done)
        return
    typer.echo(f"removed {done['kind']} alias {done['alias']!r} (→ {done['target']})")
    _moved("unlinked", done["measurements_unlinked"])


def _moved(verb: str, ids: list[int]) -> None:
    if ids:
        listed = ", ".join(str(i) for i in ids)
        typer.echo(f"  {verb} the solvent of measurement(s) {listed}; checked them again")


@app.command("add-solvent")
def add_solvent(
    ctx: typer.Context,
    name: str = typer.Argument(..., help="The solvent's name, e.g. decalin or hexane-d14."),
    mp: str = typer.Option(..., "--mp", help="Melting point at 1 atm, with its unit ('-30.4 °C')."),
    bp: str = typer.Option(..., "--bp", help="Boiling point at 1 atm, with its unit ('187 °C')."),
    source: str = typer.Option(
        ..., "--source", help="Where mp and bp come from (handbook and edition, data sheet, paper)."
    ),
    formula: str = typer.Option("", "--formula", help="Molecular formula, e.g. C10H18."),
    spelling: list[str] = typer.Option(
        None, "--spelling", help="Another name it goes by; repeatable."
    ),
    deuterated: bool = typer.Option(
        None, "--deuterated/--protio", help="Default: from the formula or a -dN name."
    ),
    reason: str = typer.Option(None, "--reason", help="Why (kept in the history)."),
    as_json: bool = typer.Option(False, "--json", help=JSON_HELP),
) -> None:
    """Add a solvent with its melting and boiling points and their source."""
    st = state(ctx)
    database = api.open_registry(st.db)
    try:
        done = api.add_solvent(
            database, name, mp=mp, bp=bp, source=source, formula=formula,
            deuterated=deuterated, spellings=spelling or (), actor=st.actor, reason=reason,
        )  # fmt: skip
    finally:
        database.close()
    if as_json:
        print_json(done)
        return
    typer.echo(
        f"added solvent {done['name']}: mp {done['mp_text']}, bp {done['bp_text']} "
        f"(source: {done['source']})"
    )
    _moved("linked", done["measurements_linked"])
    typer.echo(f"note: {done['caution']}")


@app.command("solvents")
def solvents(
    ctx: typer.Context,
    unlinked: bool = typer.Option(
        False, "--unlinked", help="List the solvent texts of measurements that name no solvent."
    ),
    as_json: bool = typer.Option(False, "--json", help=JSON_HELP),
    as_csv: bool = typer.Option(False, "--csv", help="Print CSV."),
) -> None:
    """The solvent table (liquid ranges and their sources), or the texts it does not know."""
    database = api.open_registry(state(ctx).db)
    try:
        rows = api.unlinked_solvents(database) if unlinked else api.list_solvents(database)
    finally:
        database.close()
    if as_json:
        print_json(rows)
        return
    if unlinked:
        if not rows and not as_csv:
            typer.echo("(every solvent text names a solvent of the registry)")
            return
        shown = [{**r, "suggestions": " | ".join(r["suggestions"])} for r in rows]
        render_rows(shown, as_csv=as_csv, columns=["text", "measurements", "suggestions"])
        return
    render_rows([_solvent_row(r) for r in rows], as_csv=as_csv)


def _solvent_row(row: dict[str, Any]) -> dict[str, Any]:
    return {
        "name": row["name"],
        "formula": row["formula"],
        "mp_k": row["mp_k"],
        "bp_k": row["bp_k"],
        "source": row["source"],
        "stored aliases": ", ".join(row["stored_aliases"]),
    }
