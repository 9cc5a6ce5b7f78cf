"""``history``, ``edit`` and ``retract``: changes without loss, and who made them."""

from __future__ import annotations

from typing import Any

import typer

from registry.cli.context import read_id, state
from registry.cli.output import print_json
from registry.errors import UsageError

HISTORY_COLUMNS = ["revision", "at (UTC)", "actor", "action", "measurement", "what"]


def register(app: typer.Typer) -> None:
    app.command("history")(history)
    app.command("edit")(edit)
    app.command("retract")(retract)


def history(
    ctx: typer.Context,
    measurement_id: str = typer.Argument(
        None, help="Measurement id (default: the whole registry)."
    ),
    limit: int = typer.Option(50, "--limit", "-n", help="Show the latest N revisions (0 = all)."),
    as_json: bool = typer.Option(
        False, "--json", help="Print JSON with before/after of each change."
    ),
) -> None:
    """Who changed what and when: one measurement's revisions, or the latest N of all."""
    from registry import api

    if limit < 0:
        raise UsageError("--limit must be 0 (all) or more")
    database = api.open_registry(state(ctx).db)
    mid = read_id(measurement_id) if measurement_id is not None else None
    entries = api.history(database, mid, limit=limit or None)
    if as_json:
        print_json(entries)
        return
    rows = [
        {
            "revision": e["revision"],
            "at (UTC)": e["at"].strftime("%Y-%m-%d %H:%M:%S"),
            "actor": e["actor"],
            "action": e["action"],
            "measurement": e["entity_id"]
            if e["entity"] == "measurement"
            else f"{e['entity']} {e['entity_id']}",
            "what": e["summary"] + (f"  (reason: {e['reason']})" if e["reason"] else ""),
        }
        for e in entries
    ]
    if not rows:
        typer.echo("(no revisions)")
        return
    typer.echo(_table(rows))
    head = api.history_anchor(database)
    if head:
        typer.echo(
            f"history anchor {head} (keep it: 'fluxledger verify --anchor {head}')", err=True
        )


def _table(rows: list[dict[str, Any]]) -> str:
    """The history table; the last column is not cut, a change must be readable in full."""
    widths = {c: max(len(c), *(len(str(r[c])) for r in rows)) for c in HISTORY_COLUMNS[:-1]}
    head = "  ".join(c.ljust(widths[c]) for c in HISTORY_COLUMNS[:-1]) + "  what"
    rule = "  ".join("-" * widths[c] for c in HISTORY_COLUMNS[:-1]) + "  ----"
    body = [
        "  ".join(str(r[c]).ljust(widths[c]) for c in HISTORY_COLUMNS[:-1]) + "  " + r["what"]
        for r in rows
    ]
    return "\n".join([head, rule, *body])


def edit(
    ctx: typer.Context,
    measurement_id: str = typer.Argument(..., help="Measurement id."),
    assignments: list[str] = typer.Option(
        None,
        "--set",
        help='FIELD=VALUE (repeat), e.g. dg="14.5 kcal/mol", tc="-10 °C", solvent=CD2Cl2; '
        "an empty VALUE clears the field.",
    ),
    reason: str = typer.Option(None, "--reason", help="Why (kept in the history)."),
    as_json: bool = typer.Option(False, "--json", help="Print JSON."),
) -> None:
    """Change values of a measurement; units in any usual notation; the old values stay in the history."""
    from registry import api

    if not assignments:
        raise UsageError("nothing to change; give at least one --set FIELD=VALUE")
    st = state(ctx)
    mid = read_id(measurement_id)
    database = api.open_registry(st.db)
    result = api.edit_measurement(database, mid, assignments, actor=st.actor, reason=reason)
    if as_json:
        print_json(result)
        return
    if not result["changed"]:
        typer.echo(f"measurement {result['id']}: nothing changed (the values are the same)")
        return
    typer.echo(f"measurement {result['id']} changed (revision {result['revision']}):")
    summary = api.summarize_change(result["action"], result["before"], result["after"])
    typer.echo("  " + summary.replace("; ", "\n  "))
    for finding in result.get("findings") or []:
        typer.echo(f"  {finding.get('severity', 'note')}: {finding.get('message', '')}")
    moved = result.get("status_change")
    if moved:  # the status follows the findings (the check that ran after the edit)
        typer.echo(f"  status: {moved['before']} → {moved['after']} (set by the check)")


def retract(
    ctx: typer.Context,
    measurement_id: str = typer.Argument(..., help="Measurement id."),
    reason: str = typer.Option(..., "--reason", help="Why it is retracted (kept in the history)."),
    as_json: bool = typer.Option(False, "--json", help="Print JSON."),
) -> None:
    """Retract a measurement: hidden from listings (see --include-retracted), never deleted."""
    from registry import api

    st = state(ctx)
    mid = read_id(measurement_id)
    database = api.open_registry(st.db)
    result = api.retract_measurement(database, mid, reason, actor=st.actor)
    if as_json:
        print_json(result)
        return
    typer.echo(
        f"measurement {result['id']} retracted (was {result['previous_status']}; "
        f"revision {result['revision']}): {result['reason']}"
    )
