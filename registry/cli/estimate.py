"""``fluxledger estimate SMILES``: a first barrier for a compound not yet measured."""

from __future__ import annotations

import typer

from registry import api
from registry.cli.calc import show_plan
from registry.cli.calc_text import duration_text
from registry.cli.context import state
from registry.cli.output import print_json, table_text


def register(app: typer.Typer) -> None:
    app.command("estimate")(estimate)


def estimate(
    ctx: typer.Context,
    smiles: str = typer.Argument(..., help="Structure of the new compound (SMILES)."),
    process: str = typer.Option(None, help="Only neighbours measured for this process kind."),
    motif: str = typer.Option(None, help="Only neighbours that contain this motif."),
    neighbours: int = typer.Option(5, "--neighbours", "-n", help="How many neighbours to use."),
    min_similarity: float = typer.Option(
        0.3, "--min-similarity", help="Least Tanimoto similarity of a neighbour (0–1]."
    ),
    include_flagged: bool = typer.Option(
        False, "--include-flagged", help="Let flagged values count (left out by default)."
    ),
    dnu: str = typer.Option(
        None, "--dnu", help="Slow-exchange separation, '0.15 ppm' or '9 Hz': predicts Tc."
    ),
    field: list[str] = typer.Option(
        None, "--field", "--mhz", help="Spectrometer frequency (MHz); repeatable."
    ),
    nucleus: str = typer.Option(None, "--nucleus", help="Observed nucleus (default 1H)."),
    solvent: str = typer.Option(None, help="Solvent: checks Tc against its liquid range."),
    as_json: bool = typer.Option(False, "--json", help="Print JSON."),
) -> None:
    """Estimate ΔG‡ from the most similar measured compounds, and plan the experiment."""
    database = api.open_registry(state(ctx).db)
    res = api.estimate_barrier(
        database, smiles, process=process, motif=motif, neighbours=neighbours,
        min_similarity=min_similarity, include_flagged=include_flagged, dnu=dnu,
        field=field or None, nucleus=nucleus, solvent=solvent,
    )  # fmt: skip
    if as_json:
        print_json(res.to_dict())
        return
    est = res.estimate
    rows = [
        {
            "compound": n.compound,
            "similarity": f"{n.similarity:.2f}",
            "ΔG‡ (kJ/mol)": f"{n.dg_kj_mol:.1f}",
            "n": n.measurements,
            "T (K)": ", ".join(f"{t:.0f}" for t in n.temperatures_k),
            "method": ", ".join(n.methods),
            "process": ", ".join(n.processes),
        }
        for n in est.neighbours
    ]
    if rows:
        typer.echo(f"Nearest measured compounds (Tanimoto, Morgan radius 2; {len(rows)} used):")
        typer.echo(table_text(rows))
        typer.echo("")
    if est.dg_kj_mol is not None:
        spread = "" if est.spread_kj_mol is None else f" ± {est.spread_kj_mol:.1f}"
        kcal = est.dg_kj_mol / 4.184
        typer.echo(
            f"Estimated ΔG‡: {est.dg_kj_mol:.1f}{spread} kJ/mol ({kcal:.1f} kcal/mol), "
            "similarity-weighted (weights similarity³)"
        )
    if res.plan is None and res.atropisomer is not None and res.half_life_37c is not None:
        typer.echo(
            f"If an atropisomer: LaPlante {res.atropisomer.description}; "
            f"t½(37 °C) = {duration_text(res.half_life_37c)}"
        )
    for note in (*est.notes, *res.notes):
        typer.echo(f"note: {note}")
    if res.plan is not None:
        typer.echo("")
        if res.solvent:
            typer.echo(f"In {res.solvent}:")
        show_plan(res.plan)
    if est.dg_kj_mol is None:
        raise typer.Exit(1)
