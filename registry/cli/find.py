"""``fluxledger find`` (structure search with filters) and ``fluxledger motifs`` (the motif library).

Parsing and rendering only; the work is :func:`registry.api.find` and the motif functions of
:mod:`registry.api.search`. Nothing heavy is imported here.
"""

from __future__ import annotations

from typing import Any

import typer

from registry import api
from registry.cli import flags
from registry.cli.context import state
from registry.cli.output import print_json, render_rows
from registry.errors import UsageError

motifs_app = typer.Typer(
    help="The motif library: built-in motifs and the registry's own (list, show, add, remove).",
    no_args_is_help=True,
)


def register(app: typer.Typer) -> None:
    app.command("find")(find)
    app.add_typer(motifs_app, name="motifs")


def find(
    ctx: typer.Context,
    smarts: str = typer.Option(None, "--smarts", help="Substructure as SMARTS, e.g. '[CX3](=O)N'."),
    smiles: str = typer.Option(
        None, "--smiles", help="Substructure as SMILES (atoms and bonds as written)."
    ),
    motif: str = typer.Option(
        None, "--motif", help="A named motif (see 'fluxledger motifs list')."
    ),
    similar: str = typer.Option(
        None, "--similar", help="Rank compounds by similarity to this SMILES."
    ),
    min_similarity: float = typer.Option(
        0.6, "--min-similarity", help="Lowest Tanimoto similarity kept with --similar (Morgan r=2)."
    ),
    motif_file: list[str] = typer.Option(
        None,
        "--motif-file",
        help="A TOML file of extra motifs ([[motif]] name/smarts); repeatable.",
    ),
    stereo: bool = typer.Option(
        False, "--stereo", help="Stereo-aware matching: chirality in the pattern must match."
    ),
    barrier: str = typer.Option(
        None,
        "--barrier",
        help="ΔG‡ range in any unit: '>= 22 kcal/mol', '80-100 kJ/mol', '95 ± 5 kJ/mol'.",
    ),
    temperature: str = typer.Option(
        None, "--temperature", help="Range of the temperature ΔG‡ refers to, e.g. '250-300 K'."
    ),
    solvent: list[str] = typer.Option(
        None,
        "--solvent",
        help="Solvent name or alias, or a class: nonpolar, chlorinated, polar-aprotic, protic. "
        "Repeat or separate by commas for any of several.",
    ),
    method: str = typer.Option(
        None, "--method", help="Only this method (coalescence, lineshape …)."
    ),
    process: str = typer.Option(None, "--process", help="Only this process kind."),
    nucleus: str = typer.Option(
        None, "--nucleus", help="Only this observed nucleus, e.g. 1H, 19F."
    ),
    status: str = typer.Option(None, "--status", help="Only this status (draft, reviewed …)."),
    reference: str = typer.Option(None, "--reference", help="Reference contains this text."),
    include_retracted: bool = typer.Option(
        False, "--include-retracted", help="Also retracted measurements."
    ),
    flagged: bool = flags.FLAGGED,
    clean: bool = flags.CLEAN,
    include_flagged: bool = flags.include_option("the barrier ranges of --compounds"),
    at: str = typer.Option(
        None,
        "--at",
        help="Compare barriers at one temperature, e.g. '298.15 K': ΔG‡ = ΔH‡ − TΔS‡ where "
        "both are stored (marked when extrapolated); --barrier and --sort barrier use it.",
    ),
    sort: str = typer.Option(
        None,
        "--sort",
        help="id, barrier, -barrier, temperature, -temperature, compound, solvent, method, "
        "similarity ('-' = descending).",
    ),
    limit: int = typer.Option(
        None, "--limit", help="Show at most this many rows (the total is always reported)."
    ),
    compounds: bool = typer.Option(
        False, "--compounds", help="List the matching compounds instead of measurements."
    ),
    threads: int = typer.Option(
        None, "--threads", help="Threads for the RDKit confirmation (default: all cores)."
    ),
    rebuild_index: bool = typer.Option(
        False, "--rebuild-index", help="Rebuild the screening cache file first."
    ),
    time_limit: float = typer.Option(
        None,
        "--time-limit",
        help="Stop with an error after this many seconds (for a pattern that confirms slowly).",
    ),
    as_json: bool = typer.Option(
        False, "--json", help="Print JSON (with matched atom indices per compound)."
    ),
    no_atoms: bool = typer.Option(
        False, "--no-atoms", help="Leave the matched atom indices out of --json (faster)."
    ),
    as_csv: bool = typer.Option(False, "--csv", help="Print CSV."),
) -> None:
    """Every barrier measured on compounds with a substructure or motif, with filters."""
    # long: only by its option declarations; the body parses, calls api.find and renders
    chosen = [x for x in (smarts, smiles, motif, similar) if x is not None]
    if len(chosen) != 1:
        raise UsageError("give exactly one of --smarts, --smiles, --motif, --similar")
    if as_json and as_csv:
        raise UsageError("choose one of --json and --csv")
    if threads is not None and threads < 1:
        raise UsageError(f"--threads {threads}: give a positive whole number")
    if stereo and similar is not None:
        raise UsageError("--stereo applies to substructure searches, not --similar")
    only = flags.choice(flagged, clean)
    database = api.open_registry(state(ctx).db)
    try:
        result = api.find(
            database, smarts=smarts, smiles=smiles, motif=motif, similar=similar,
            min_similarity=min_similarity, motif_files=motif_file or (), stereo=stereo,
            barrier=barrier, temperature=temperature, solvent=solvent, method=method,
            process=process, nucleus=nucleus, status=status, reference=reference,
            include_retracted=include_retracted, flagged=only, include_flagged=include_flagged,
            at=at, sort=sort, limit=None if compounds else limit, atoms=as_json and not no_atoms,
            threads=threads, rebuild_index=rebuild_index, time_limit=time_limit,
            output="csv" if as_csv and not compounds else "rows",
        )  # fmt: skip
    finally:
        database.close()
    for warning in result.warnings:
        typer.echo(f"warning: {warning}", err=True)
    if compounds:
        _render_compounds(result, limit, as_json, as_csv)
        return
    if as_json:
        print_json(result.as_dict())
        return
    if as_csv:
        _write_bytes(result.write_csv)
    else:  # a compound without a label is shown by its name
        columns = list(api.TABLE_COLUMNS["find"])
        if similar is not None:
            columns = [*columns[:2], "similarity", *columns[2:]]
        if at is not None:  # ΔG‡ at the common temperature beside each reported ΔG‡ and its T
            where = columns.index("dg_t_k") + 1
            columns[where:where] = ["dg_at_kj_mol", "dg_at_err_kj_mol", "at_t_k", "extrapolated"]
        rows = [{**r, "compound": r["compound"] or r["compound_name"]} for r in result.rows]
        render_rows(flags.marked(rows), columns=columns)
    typer.echo(_summary(result), err=True)


def _write_bytes(write: Any) -> None:
    """Let ``write(binary_stream)`` write UTF-8 to standard output (through its buffer when it
    has one: a motif search's CSV can be megabytes of ready lines)."""
    import io
    import sys

    sys.stdout.flush()
    buffer = getattr(sys.stdout, "buffer", None)
    if buffer is not None:
        write(buffer)
        buffer.flush()
        return
    sink = io.BytesIO()
    write(sink)
    sys.stdout.write(sink.getvalue().decode("utf-8"))


def _summary(result: Any) -> str:
    s = result.stats
    shown = (
        f"showing {result.returned:,} of {result.total_rows:,} measurements (drop --limit to see all)"
        if result.returned < result.total_rows
        else f"{result.total_rows:,} measurement(s)"
    )
    flagged = sum(1 for r in result.rows if r.get("flagged"))
    marked = (
        f"; {flagged:,} of the rows shown flagged (an error finding is open)" if flagged else ""
    )
    return (
        f"{shown} on {s.with_rows:,} compound(s); {s.matched:,} of {s.searched:,} compound(s) "
        f"searched match ({s.screened:,} passed the fingerprint and element screens){marked}"
    )


def _render_compounds(result: Any, limit: int | None, as_json: bool, as_csv: bool) -> None:
    rows = result.compound_table()
    total = len(rows)
    left_out = sum(r["flagged"] for r in rows)
    if limit is not None:
        rows = rows[:limit]
    if as_json:
        print_json(
            {
                "query": result.query,
                "include_flagged": result.include_flagged,
                "compounds_matched": total,
                "compounds": rows,
            }
        )
        return
    columns = [
        "compound_id",
        "compound",
        "smiles",
        "measurements",
        "flagged",
        "dg_min_kj_mol",
        "dg_max_kj_mol",
    ]
    if rows and "similarity" in rows[0]:
        columns.insert(3, "similarity")
    render_rows(rows, as_csv=as_csv, columns=columns)
    more = f" (showing {len(rows):,})" if len(rows) < total else ""
    typer.echo(f"{total:,} matching compound(s) with measurements{more}", err=True)
    if left_out and not result.include_flagged:
        typer.echo(
            f"{left_out:,} flagged measurement(s) not counted in the ranges (--include-flagged "
            "counts them)",
            err=True,
        )


# ---------------------------------------------------------------- motifs


@motifs_app.command("list")
def motifs_list(
    ctx: typer.Context,
    motif_file: list[str] = typer.Option(None, "--file", help="Also list motifs from a TOML file."),
    as_json: bool = typer.Option(False, "--json", help="Print JSON."),
    as_csv: bool = typer.Option(False, "--csv", help="Print CSV."),
) -> None:
    """Built-in motifs, the registry's own motifs, and those of --file."""
    database = api.motif_database(state(ctx).db)
    try:
        motifs = api.list_motifs(database, motif_file or ())
    finally:
        if database is not None:
            database.close()
    rows = [m.as_dict() for m in motifs]
    if as_json:
        print_json(rows)
        return
    table = [
        {
            "name": r["name"],
            "source": r["source"],
            "process": r["process"],
            "smarts": " | ".join(r["smarts"]),
            "description": r["description"],
        }
        for r in rows
    ]
    render_rows(table, as_csv=as_csv)


@motifs_app.command("show")
def motifs_show(
    ctx: typer.Context,
    name: str = typer.Argument(..., help="Motif name."),
    motif_file: list[str] = typer.Option(None, "--file", help="Also look in a TOML file."),
    as_json: bool = typer.Option(False, "--json", help="Print JSON."),
) -> None:
    """One motif: its SMARTS, what it is for, and (built-in ones) its test examples."""
    database = api.motif_database(state(ctx).db)
    try:
        motif = api.get_motif(name, database, motif_file or ())
    finally:
        if database is not None:
            database.close()
    record = {
        **motif.as_dict(),
        "positives": list(motif.positives),
        "negatives": list(motif.negatives),
    }
    if as_json:
        print_json(record)
        return
    typer.echo(f"{motif.name}  ({motif.source})")
    typer.echo(f"  {motif.description}")
    for text in motif.smarts:
        typer.echo(f"  SMARTS         {text}")
    for text in motif.stereo_smarts:
        typer.echo(f"  with --stereo  {text}")
    if motif.process:
        typer.echo(f"  usual process  {motif.process}")
    if motif.positives:
        typer.echo(f"  matches        {'  '.join(motif.positives)}")
    if motif.negatives:
        typer.echo(f"  does not match {'  '.join(motif.negatives)}")


@motifs_app.command("add")
def motifs_add(
    ctx: typer.Context,
    name: str = typer.Argument(None, help="New motif name (lowercase, digits, -,._+)."),
    smarts: list[str] = typer.Argument(
        None, help="SMARTS; several are alternatives (the motif matches if any does)."
    ),
    description: str = typer.Option("", "--description", help="What the motif is for."),
    motif_file: str = typer.Option(
        None, "--file", help="Add every motif of this TOML file instead."
    ),
    as_json: bool = typer.Option(False, "--json", help="Print JSON."),
) -> None:
    """Store a motif of your own in the registry (recorded in the history)."""
    st = state(ctx)
    if motif_file and (name or smarts):
        raise UsageError("give either NAME SMARTS or --file, not both")
    if not motif_file and not (name and smarts):
        raise UsageError("give NAME and SMARTS (or --file motifs.toml)")
    database = api.open_registry(st.db)
    try:
        if motif_file:
            added = api.add_motifs_from_file(database, motif_file, actor=st.actor)
        else:
            added = [api.add_motif(database, name, smarts, description=description, actor=st.actor)]
    finally:
        database.close()
    if as_json:
        print_json([m.as_dict() for m in added])
        return
    for m in added:
        typer.echo(f"added motif {m.name}: {' | '.join(m.smarts)}")


@motifs_app.command("remove")
def motifs_remove(
    ctx: typer.Context,
    name: str = typer.Argument(..., help="Name of a motif of this registry."),
    reason: str = typer.Option(None, "--reason", help="Why (kept in the history)."),
    as_json: bool = typer.Option(False, "--json", help="Print JSON."),
) -> None:
    """Remove a motif of your own (built-in motifs stay)."""
    st = state(ctx)
    database = api.open_registry(st.db)
    try:
        removed = api.remove_motif(database, name, actor=st.actor, reason=reason)
    finally:
        database.close()
    if as_json:
        print_json(removed.as_dict())
        return
    typer.echo(f"removed motif {removed.name}")
