"""``backup``, ``restore``, ``verify`` and the ``db`` group (``upgrade``, ``current``)."""

from __future__ import annotations

from typing import Any

import typer

from registry.cli.context import state
from registry.cli.output import print_json

db_app = typer.Typer(
    help="The registry's schema: show its version, upgrade it (a backup is taken first).",
    no_args_is_help=True,
)


def register(app: typer.Typer) -> None:
    app.command("backup")(backup)
    app.command("restore")(restore)
    app.command("verify")(verify)
    app.add_typer(db_app, name="db")


def backup(
    ctx: typer.Context,
    dest: str = typer.Argument(
        ..., help="Backup file, or a folder (the file is then named with the date and time)."
    ),
    force: bool = typer.Option(False, "--force", help="Replace DEST if it exists."),
    as_json: bool = typer.Option(False, "--json", help="Print JSON."),
) -> None:
    """Copy the registry to a file while others keep working (one consistent snapshot)."""
    from registry import api

    result = api.backup(state(ctx).db, dest, overwrite=force)
    if as_json:
        print_json(result)
        return
    typer.echo(
        f"backup written: {result['backup']} ({result['measurements']} measurements, "
        f"{result['revisions']} revisions, schema {result['schema_version']}, "
        f"{result['bytes'] / 1e6:.1f} MB)"
    )
    if result["anchor"]:
        typer.echo(
            f"history anchor {result['anchor']}: keep it; 'fluxledger verify --anchor "
            f"{result['anchor']}' later shows whether any revision was removed since"
        )


def restore(
    ctx: typer.Context,
    source: str = typer.Argument(..., help="A backup file made by 'fluxledger backup'."),
    force: bool = typer.Option(
        False, "--force", help="Replace an existing registry (its content is backed up first)."
    ),
    as_json: bool = typer.Option(False, "--json", help="Print JSON."),
) -> None:
    """Replace the registry's content with a backup, after verifying the backup."""
    from registry import api

    result = api.restore(state(ctx).db, source, force=force)
    if as_json:
        print_json(result)
        return
    if result["safety_backup"]:
        typer.echo(f"previous content saved to {result['safety_backup']}")
    typer.echo(
        f"restored {result['restored']} from {result['source']} "
        f"({result['measurements']} measurements, {result['revisions']} revisions, "
        f"schema {result['schema_version']})"
    )
    if result["schema_version"] != result["schema_head"]:
        typer.echo(
            f"note: the restored schema is {result['schema_version']}; "
            "run 'fluxledger db upgrade' to bring it to the current one",
            err=True,
        )


def verify(
    ctx: typer.Context,
    anchor: str = typer.Option(
        None,
        "--anchor",
        help="A history anchor REVISION:HASH kept from 'backup' or 'history': check that the "
        "history still reaches it (no revision removed or rewritten since).",
    ),
    as_json: bool = typer.Option(False, "--json", help="Print JSON."),
) -> None:
    """Check the registry: integrity, foreign keys, schema, history chain, each measurement and
    finding against what its history and the rules account for, values vs their texts.

    Exit status 1 when any check finds a problem.
    """
    from registry import api

    report = api.verify(state(ctx).db, anchor=anchor)
    if as_json:
        print_json(report)
    else:
        typer.echo(_verify_text(report))
    if not report["ok"]:
        raise typer.Exit(1)


def _verify_text(report: dict[str, Any]) -> str:
    lines = [f"verify {report['database']}"]
    for c in report["checks"]:
        mark = "ok     " if c["ok"] else "PROBLEM"
        detail = f"  ({c['detail']})" if c["detail"] else ""
        count = "" if c["ok"] else f"  {c['problem_count']} problem(s)"
        lines.append(f"  {mark} {c['check']}{count}{detail}")
        for problem in c["problems"]:
            lines.append(f"          {problem}")
        if c["problem_count"] > len(c["problems"]):
            lines.append(f"          … and {c['problem_count'] - len(c['problems'])} more")
        for note in c.get("notes", ()):
            lines.append(f"          note: {note}")
    lines.append("all checks passed" if report["ok"] else "the registry has problems (exit 1)")
    return "\n".join(lines)


@db_app.command("current")
def db_current(
    ctx: typer.Context,
    as_json: bool = typer.Option(False, "--json", help="Print JSON."),
) -> None:
    """The registry's schema version and the one this fluxledger needs."""
    from registry import api

    result = api.schema_state(state(ctx).db)
    if as_json:
        print_json(result)
        return
    typer.echo(f"schema {result['current'] or '(none)'}  (head {result['head']})")
    if not result["known"]:
        typer.echo("this schema is unknown to this fluxledger (made by a newer version?)")
    elif result["pending"]:
        typer.echo(f"pending: {', '.join(result['pending'])}  → run 'fluxledger db upgrade'")
    else:
        typer.echo("up to date")


@db_app.command("upgrade")
def db_upgrade(
    ctx: typer.Context,
    backup_dir: str = typer.Option(
        None,
        "--backup-dir",
        help="Folder for the backup taken first (default: beside the registry).",
    ),
    no_backup: bool = typer.Option(
        False, "--no-backup", help="Skip the backup (PostgreSQL: after your own pg_dump)."
    ),
    as_json: bool = typer.Option(False, "--json", help="Print JSON."),
) -> None:
    """Bring the schema to the current version; a SQLite registry is backed up first."""
    from registry import api

    result = api.upgrade_schema(state(ctx).db, backup_dir=backup_dir, no_backup=no_backup)
    if as_json:
        print_json(result)
        return
    if not result["applied"]:
        typer.echo(f"schema already at {result['to']}; nothing to do")
        return
    if result["backup"]:
        typer.echo(f"backup written: {result['backup']}")
    typer.echo(
        f"schema upgraded {result['from']} → {result['to']} (applied {', '.join(result['applied'])})"
    )
