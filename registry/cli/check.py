"""``fluxledger check``: run the validation rules; ``fluxledger accept``: accept a finding."""

from __future__ import annotations

import textwrap
from typing import Any

import typer

from registry.cli.context import state
from registry.cli.output import print_json, table_text
from registry.errors import UsageError

_LEVELS = ("error", "warning", "note")


def register(app: typer.Typer) -> None:
    app.command("check")(check)
    app.command("accept")(accept)


def _row(f: Any) -> dict[str, Any]:
    status = "accepted" if f.accepted else ("new" if f.new else "")
    diff = f"{f.difference:+.2f}" if f.difference is not None else ""

    def num(value: float | None) -> str:
        return "" if value is None else f"{value:.2f}"

    return {
        "finding": f.id,
        "measurement": f.measurement_id,
        "severity": f.severity,
        "rule": f.rule_id,
        "reported": num(f.reported),
        "recomputed": num(f.recomputed),
        "difference": diff,
        "unit": f.unit or "",
        "status": status,
    }


def _render(findings: list[Any]) -> str:
    """One table line per finding, its message and likely cause wrapped underneath."""
    if not findings:
        return "no findings"
    lines = table_text([_row(f) for f in findings]).splitlines()
    out = lines[:2]
    wrap = textwrap.TextWrapper(
        width=100, initial_indent="    ", subsequent_indent="    ", break_on_hyphens=False
    )
    for line, f in zip(lines[2:], findings, strict=True):
        out.append(line)
        out.extend(wrap.wrap(f.message))
        if f.likely_cause:
            out.extend(wrap.wrap(f"likely cause: {f.likely_cause}"))
        if f.accepted:
            out.extend(wrap.wrap(f"accepted by {f.accepted_by}: {f.accept_reason}"))
    return "\n".join(out)


def check(
    ctx: typer.Context,
    ids: list[int] = typer.Option(None, "--id", help="Check only this measurement (repeat)."),
    severity: str = typer.Option(
        None, "--severity", help="Show findings at this level or worse: error, warning, note."
    ),
    new: bool = typer.Option(False, "--new", help="Show only findings new since the last run."),
    tolerance: str = typer.Option(
        None,
        "--tolerance",
        help="Base tolerance of recomputed ΔG‡ with a unit, e.g. '0.2 kcal/mol' (default 1 kJ/mol).",
    ),
    as_json: bool = typer.Option(
        False, "--json", help="Print a JSON list, one object per finding."
    ),
) -> None:
    """Recompute every stored barrier from its raw data and flag disagreements.

    Exits with status 1 when an error-level finding has not been accepted.
    """
    from registry import api

    if severity is not None and severity.lower() not in _LEVELS:
        raise UsageError(f"--severity {severity!r}: use one of {', '.join(_LEVELS)}")
    st = state(ctx)
    database = api.open_registry(st.db)
    report = api.check(database, ids or None, tolerance=tolerance or None, actor=st.actor)
    shown = report.select(severity=severity.lower() if severity else None, new_only=new)
    missing = sorted(set(ids or ()) - set(report.measurement_ids))
    if as_json:
        print_json([f.as_dict() for f in shown])
    else:
        typer.echo(_render(shown))
    for mid in missing:
        typer.echo(f"warning: no measurement {mid} to check (unknown or retracted)", err=True)
    typer.echo(report.summary(), err=as_json)
    if report.has_errors:
        raise typer.Exit(1)


def accept(
    ctx: typer.Context,
    finding_id: int = typer.Argument(..., help="Finding id, as 'check' lists it."),
    reason: str = typer.Option(..., "--reason", help="Why the finding is acceptable."),
    as_json: bool = typer.Option(False, "--json", help="Print JSON."),
) -> None:
    """Accept a finding with a reason; it stays accepted while its inputs are unchanged."""
    from registry import api

    st = state(ctx)
    database = api.open_registry(st.db)
    finding = api.accept_finding(database, finding_id, reason, actor=st.actor)
    if as_json:
        print_json(finding.as_dict())
        return
    typer.echo(
        f"finding {finding.id} ({finding.severity}, {finding.rule_id}, measurement "
        f"{finding.measurement_id}) accepted by {finding.accepted_by}: {finding.accept_reason}"
    )
