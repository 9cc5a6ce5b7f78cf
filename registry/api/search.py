"""Structure search and the motif library: find measurements by substructure, motif or
similarity, with the same filters as ``list``; list, show, add and remove motifs."""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path
from typing import TYPE_CHECKING

from registry.api.registry import actor_name
from registry.errors import UsageError
from registry.storage.database import Database

if TYPE_CHECKING:  # imported lazily at run time: the search loads numpy, RDKit on use
    from registry.search.motifs import Motif
    from registry.search.result import FindResult


def find(
    database: Database,
    *,
    smarts: str | None = None,
    smiles: str | None = None,
    motif: str | None = None,
    similar: str | None = None,
    min_similarity: float = 0.6,
    motif_files: Sequence[str] = (),
    stereo: bool = False,
    barrier: str | None = None,
    temperature: str | None = None,
    solvent: str | Sequence[str] | None = None,
    method: str | None = None,
    process: str | None = None,
    nucleus: str | None = None,
    status: str | None = None,
    reference: str | None = None,
    compound: str | None = None,
    include_retracted: bool = False,
    flagged: bool | None = None,
    include_flagged: bool = False,
    at: str | float | None = None,
    sort: str | None = None,
    limit: int | None = None,
    atoms: bool = False,
    threads: int | None = None,
    rebuild_index: bool = False,
    output: str = "rows",
    time_limit: float | None = None,
) -> FindResult:
    """
    # long: the keyword arguments of every filter and their docstring; the body only forwardsEvery measurement on a compound that contains ``smarts``/``smiles``/``motif`` (or is at
    least ``min_similarity`` similar to the SMILES ``similar``), filtered.

    Give exactly one of ``smarts``, ``smiles``, ``motif``, ``similar``. Filters are texts as
    chemists write them (``barrier='>= 22 kcal/mol'``, ``temperature='-40 to -10 °C'``,
    ``solvent='chlorinated'``). ``sort`` is one of ``id``, ``barrier``, ``-barrier``,
    ``temperature``, ``-temperature``, ``compound``, ``solvent``, ``method``, ``similarity``.
    ``limit`` shortens the rows only (the result says how many there were); ``atoms`` adds the
    matched atom indices per compound. The result's ``rows`` are dicts; ``to_frame()`` gives a
    pandas DataFrame; ``write_csv(binary_stream)`` writes CSV (with ``output="csv"`` straight
    from ready lines on a SQLite registry).

    Every row says whether it is ``flagged`` (1: an error finding nobody accepted). ``flagged``
    True keeps only those rows, False only clean ones. ``compound_table()`` gives each
    compound's barrier range from its clean values only, unless ``include_flagged``.
    ``time_limit`` (seconds) stops a search whose pattern confirms slowly with a clear error
    instead of running on; a Ctrl-C ends a search with no partial result.

    ``at`` (a temperature, e.g. ``'298.15 K'``) gives every row ΔG‡ at that temperature —
    ΔH‡ − TΔS‡ where both are stored, marked ``extrapolated`` outside the measured range; the
    reported ΔG‡ where it was quoted there — and makes ``barrier`` and the ``barrier`` sort use
    it (:mod:`registry.search.at_temperature`).
    """
    from registry import search

    chosen = [x for x in (smarts, smiles, motif, similar) if x is not None]
    if len(chosen) != 1:
        raise UsageError("give exactly one of smarts, smiles, motif, similar")
    if threads is not None and threads < 1:
        raise UsageError(f"threads {threads}: give a positive whole number")
    filters = search.make_filters(
        barrier=barrier, temperature=temperature,
        solvent=[solvent] if isinstance(solvent, str) else list(solvent or []),
        method=method, process=process, nucleus=nucleus, status=status, reference=reference,
        compound=compound, include_retracted=include_retracted, flagged=flagged, at=at,
    )  # fmt: skip
    query = None
    if similar is None:
        found = search.get_motif(motif, database, list(motif_files)) if motif else None
        query = search.build_query(smarts=smarts, smiles=smiles, motif=found, stereo=stereo)
    elif stereo:
        raise UsageError("stereo applies to substructure searches, not to similar")
    from registry.search.interrupts import time_limit as limited

    with limited(time_limit):
        return search.find(
            database, query=query, similar=similar, min_similarity=min_similarity,
            filters=filters, sort=sort, limit=limit, atoms=atoms, threads=threads,
            rebuild_index=rebuild_index, output=output, include_flagged=include_flagged,
        )  # fmt: skip


def motif_matches(
    database: Database, names: Sequence[str] | None = None, *, threads: int | None = None
) -> dict[str, list[int]]:
    """Compound ids per motif (all built-in and registry motifs unless ``names`` are given)."""
    from registry.search import motif_matches as matches

    return matches(database, names, threads=threads)


def motif_database(db: str) -> Database | None:
    """The registry at ``db`` when there is one (listing built-in motifs needs none)."""
    from registry.storage.database import open_registry

    if "://" not in db and not Path(db).expanduser().exists():
        return None
    return open_registry(db)


def list_motifs(database: Database | None = None, files: Sequence[str] = ()) -> list[Motif]:
    """Built-in motifs, then the registry's own, then those of the given TOML files."""
    from registry.search import list_motifs as listed

    return listed(database, list(files))


def get_motif(name: str, database: Database | None = None, files: Sequence[str] = ()) -> Motif:
    """One motif by name (its SMARTS, what it is for, built-in ones' test examples)."""
    from registry.search import get_motif as named

    return named(name, database, list(files))


def add_motif(
    database: Database,
    name: str,
    smarts: str | Sequence[str],
    *,
    description: str = "",
    actor: str | None = None,
) -> Motif:
    """Store a motif of your own (SMARTS alternatives; recorded in the history)."""
    from registry.search import add_motif as add

    return add(database, name, tuple([smarts] if isinstance(smarts, str) else smarts),
               description=description, actor=actor_name(actor))  # fmt: skip


def add_motifs_from_file(
    database: Database, path: str | Path, *, actor: str | None = None
) -> list[Motif]:
    """Store every motif of a TOML file (``[[motif]]`` tables with name, smarts, description);
    all are checked before the first is stored."""
    from registry.search import load_motif_file

    wanted = load_motif_file(path)
    return [
        add_motif(database, m.name, m.smarts, description=m.description, actor=actor)
        for m in wanted
    ]


def remove_motif(
    database: Database, name: str, *, actor: str | None = None, reason: str | None = None
) -> Motif:
    """Remove a motif of your own (built-in motifs stay); the history keeps what it was."""
    from registry.search import remove_motif as remove

    return remove(database, name, actor=actor_name(actor), reason=reason)
