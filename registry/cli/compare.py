"""``fluxledger compare``: computed barriers against measured ones, per level of theory."""

from __future__ import annotations

import typer

from registry import api
from registry.cli.context import state
from registry.cli.output import print_json, table_text


def register(app: typer.Typer) -> None:
    app.command("compare")(compare)


def _ci(ci: tuple[float, float] | None) -> str:
    return "" if ci is None else f" [{ci[0]:.1f}, {ci[1]:.1f}]"


def compare(
    ctx: typer.Context,
    at: str = typer.Option("298.15 K", "--at", help="Common temperature of the comparison."),
    level: str = typer.Option(None, help="Only levels of theory whose text contains this."),
    include_flagged: bool = typer.Option(
        False, "--include-flagged", help="Count flagged measured values too."
    ),
    plot: str = typer.Option(None, "--plot", help="Write a parity plot (.png, .svg, .pdf)."),
    style: str = typer.Option("screen", "--style", help="Plot style: screen or print."),
    size: str = typer.Option(None, "--size", help="Plot size: single, double or WxH inches."),
    dpi: int = typer.Option(None, "--dpi", help="Dots per inch of a PNG plot."),
    show_pairs: bool = typer.Option(False, "--pairs", help="List every pair."),
    as_json: bool = typer.Option(False, "--json", help="Print JSON."),
) -> None:
    """How far computed barriers lie from measured ones, per level of theory."""
    database = api.open_registry(state(ctx).db)
    res = api.compare_computed(
        database, at=at, include_flagged=include_flagged, level=level, plot=plot, style=style,
        size=size, dpi=dpi,
    )  # fmt: skip
    if as_json:
        print_json(res.to_dict())
    else:
        _render(res, show_pairs)
    if not res.stats:
        raise typer.Exit(1)


def _render(res: api.Comparison, show_pairs: bool) -> None:
    rows = [
        {
            "level of theory": s.level,
            "N": s.n,
            "MSE": f"{s.mse:+.1f}{_ci(s.mse_ci)}",
            "MAE": f"{s.mae:.1f}{_ci(s.mae_ci)}",
            "RMSE": f"{s.rmse:.1f}{_ci(s.rmse_ci)}",
            "max |error|": f"{s.max_abs:.1f}",
        }
        for s in res.stats
    ]
    if rows:
        typer.echo(
            f"computed − measured ΔG‡ (kJ/mol) at {res.t_k:.2f} K where ΔH‡/ΔS‡ allow, else at "
            "the temperature both were quoted at; [95 % bootstrap interval]:"
        )
        typer.echo(table_text(rows))
    else:
        typer.echo("no computed barrier could be compared with a measured one")
    if show_pairs and res.aligned:
        typer.echo("")
        typer.echo(table_text([_pair_row(p) for p in res.aligned]))
    if res.not_aligned:
        typer.echo("")
    for p in res.not_aligned:
        measured = ", ".join(str(i) for i in p.measured_ids)
        typer.echo(f"not aligned: {p.compound} (computed {p.computed_id}, measured {measured}): "
                   f"{p.why_not}")  # fmt: skip
    for note in res.notes:
        typer.echo(f"note: {note}")
    if res.plot:
        typer.echo(f"parity plot written: {res.plot}")


def _pair_row(p: object) -> dict[str, object]:
    d = p.to_dict()  # type: ignore[attr-defined]
    return {
        "ids": f"{d['computed_id']} vs " + ", ".join(str(i) for i in d["measured_ids"]),
        "compound": d["compound"],
        "level of theory": d["level"],
        "T (K)": f"{d['T_K']:.2f}",
        "computed": f"{d['computed_kj_mol']:.1f}",
        "measured": f"{d['measured_kj_mol']:.1f}",
        "error": f"{d['error_kj_mol']:+.1f}",
    }
