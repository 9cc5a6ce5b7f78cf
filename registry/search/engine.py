"""Run a structure search: filter measurements in SQL, screen, confirm with RDKit, return rows.

Order of work, cheapest first, all on one read snapshot of the registry: (1) the measurement
filters run in SQL and give the compounds that have a qualifying barrier; (2) the screens and
RDKit's confirmation (:mod:`.matching`) find the compounds that contain the query, or the
similarity search (:mod:`.similarity`) ranks them; (3) the measurements of those compounds are
picked from the measurement listing (:mod:`.listing`) on a SQLite file, or read through SQL
(:meth:`~registry.storage.connection.Connection.rows_where_in`) elsewhere, and sorted.
"""

from __future__ import annotations

import time
from collections import Counter
from collections.abc import Sequence
from operator import itemgetter
from typing import Any

import numpy as np

from registry.errors import UsageError
from registry.record.fields import LISTING_SELECT
from registry.search.filters import Filters, Where, conditions
from registry.search.index import ScreenIndex, load_index
from registry.search.listing import Listing, load_listing
from registry.search.matching import SearchStats, match_atoms, search_positions
from registry.search.patterns import Query
from registry.search.result import (
    ROW_COLUMNS,
    FindResult,
    first_seen_counts,
    sort_key,
    sort_rows,
    unique,
)
from registry.storage.connection import Connection
from registry.storage.database import Database

#: warn when a pattern matches more than this fraction of the compounds searched …
BROAD_FRACTION = 0.9
#: … and at least this many of them
BROAD_MIN = 50


def _filtered(conn: Connection, where: Where) -> tuple[np.ndarray, np.ndarray]:
    """The measurements passing the filters and their compounds: two sorted, unique id arrays."""
    rows = conn.rows(
        f"SELECT m.id, m.compound_id FROM measurement m{where.joins()} WHERE {where.sql()} "
        "ORDER BY m.id",
        where.params,
    )
    ids = np.fromiter((r[0] for r in rows), dtype=np.int64, count=len(rows))
    compounds = np.fromiter((r[1] for r in rows), dtype=np.int64, count=len(rows))
    return ids, unique(compounds)


def rows_for(conn: Connection, where: Where, compound_ids: Sequence[int]) -> list[tuple[Any, ...]]:
    """The measurements (joined with compound and process) of these compounds that pass the
    filters, as tuples in :data:`.result.ROW_COLUMNS` order."""
    return conn.rows_where_in(
        f"{LISTING_SELECT} WHERE {where.sql()}", "m.compound_id", compound_ids, where.params
    )


def rows_at(
    conn: Connection, where: Where, compound_ids: Sequence[int], at_t_k: float
) -> tuple[tuple[str, ...], list[tuple[Any, ...]]]:
    """:func:`rows_for` with ΔG‡ at a common temperature (see :mod:`.at_temperature`)."""
    from registry.record.fields import LISTING_COLUMNS, LISTING_FROM
    from registry.search.at_temperature import AT_COLUMNS, finish_tuples

    chosen = {**LISTING_COLUMNS, **AT_COLUMNS}
    sql = f"SELECT {', '.join(chosen.values())} FROM {LISTING_FROM} WHERE {where.sql()}"
    rows = conn.rows_where_in(sql, "m.compound_id", compound_ids, {**where.params, "at_t": at_t_k})
    return finish_tuples(tuple(chosen), rows)


def _check(
    query: Query | None, similar: str | None, min_similarity: float, limit: int | None
) -> None:
    if (query is None) == (similar is None):
        raise UsageError("give exactly one of smarts, smiles, motif or similar")
    if similar is not None and not 0.0 < min_similarity <= 1.0:
        raise UsageError(f"min_similarity {min_similarity}: give a number in (0, 1]")
    if limit is not None and limit <= 0:
        raise UsageError(f"limit {limit}: give a positive whole number")


def find(
    database: Database,
    *,
    query: Query | None = None,
    similar: str | None = None,
    min_similarity: float = 0.6,
    filters: Filters | None = None,
    sort: str | None = None,
    limit: int | None = None,
    atoms: bool = False,
    threads: int | None = None,
    rebuild_index: bool = False,
    output: str = "rows",
    include_flagged: bool = False,
) -> FindResult:
    """Every measurement on a compound that matches ``query`` (or is similar to ``similar``).

    Nothing is capped: ``limit`` only shortens the returned rows (``total_rows`` says how many
    there were). ``atoms`` adds the matched atom indices of each compound for highlighting.
    ``output="csv"`` is for a caller that will only call :meth:`FindResult.write_csv`: on a
    SQLite registry the rows then stay ready CSV lines of the measurement listing. Every row
    carries ``flagged``; ``include_flagged`` lets flagged values into the result's aggregates
    (:meth:`FindResult.compound_table`).
    """
    # long: the steps share one read snapshot, from the first cache check to the last row
    _check(query, similar, min_similarity, limit)
    if output not in ("rows", "csv"):
        raise ValueError(f"output={output!r}: 'rows' or 'csv'")
    column, descending = sort_key(sort, similar is not None)
    filters = filters or Filters()
    at = filters.at_t_k
    if at is not None and column == "dg_kj_mol":
        column = "dg_at_kj_mol"  # the barrier at the common temperature
    stats = SearchStats()
    warnings: list[str] = []
    with database.read() as conn:
        t0 = time.perf_counter()
        index = load_index(database, conn, rebuild=rebuild_index)
        warnings += index.take_notes()
        stats.indexed = len(index)
        where = conditions(conn, filters)
        listing = (  # ΔG‡ at a common temperature is computed in SQL: no ready listing rows
            None
            if similar is not None or at is not None
            else load_listing(database, conn, rebuild=rebuild_index)
        )
        if listing is not None:
            warnings += listing.take_notes()
        stats.seconds["caches"] = time.perf_counter() - t0
        allowed_ids = None
        positions = np.arange(len(index), dtype=np.int64)
        if filters.active():
            allowed_ids, allowed = _filtered(conn, where)
            positions = index.positions_of(allowed)
        stats.searched = int(positions.size)
        similarity: dict[int, float] = {}
        if query is not None:
            hit_positions = search_positions(
                index, query, positions, threads=threads, stats=stats, conn=conn
            )
            description = {"kind": query.kind, "text": query.text,
                           "smarts": list(query.pattern_texts), "stereo": query.stereo}  # fmt: skip
        else:
            hit_positions, similarity = _similar(
                database, conn, index, positions, similar or "", min_similarity, stats
            )
            description = {"kind": "similar", "text": similar, "min_similarity": min_similarity}
        t3 = time.perf_counter()
        hit_ids = index.ids[hit_positions]
        if listing is not None:
            picked = listing.pick(hit_ids, allowed_ids, filters.include_retracted)
            table, columns, total, counts, returned, csv_body = _picked(
                listing, conn, picked, (column, descending), limit, output == "csv" and not atoms,
                stats,
            )  # fmt: skip
        else:
            if at is not None:
                columns, table = rows_at(conn, where, hit_ids.tolist(), at)
            else:
                table, columns = rows_for(conn, where, hit_ids.tolist()), ROW_COLUMNS
            table, columns, total, counts, returned = _arrange(
                table, columns, similarity, column, descending, limit, stats
            )
            csv_body = None
    stats.seconds["rows"] = time.perf_counter() - t3
    if query is not None:
        warnings += _broad(stats)
    compounds = _compounds(index, hit_positions, counts, similarity, query if atoms else None)
    if atoms and query is not None:
        by_id = {c["compound_id"]: c["atoms"] for c in compounds}
        of_compound = itemgetter(columns.index("compound_id"))
        table = [(*t, by_id[of_compound(t)]) for t in table]
        columns = (*columns, "match_atoms")
    description["filters"] = filters.describe()
    return FindResult(
        description, columns, table, compounds, stats, warnings, total, returned, csv_body,
        include_flagged=include_flagged,
    )  # fmt: skip


def _broad(stats: SearchStats) -> list[str]:
    """A warning when the pattern matches nearly everything searched (it says little then)."""
    if stats.searched < BROAD_MIN or stats.matched <= BROAD_FRACTION * stats.searched:
        return []
    return [
        f"the pattern matches {stats.matched:,} of {stats.searched:,} compounds searched "
        f"({100.0 * stats.matched / stats.searched:.0f}%); a more specific pattern or "
        "filters would say more"
    ]


def _similar(
    database: Database,
    conn: Connection,
    index: ScreenIndex,
    positions: np.ndarray,
    smiles: str,
    min_similarity: float,
    stats: SearchStats,
) -> tuple[np.ndarray, dict[int, float]]:
    """Positions at least ``min_similarity`` similar to ``smiles``, and each one's score."""
    from registry.search import index as screening
    from registry.search.patterns import compile_smiles
    from registry.search.similarity import (
        morgan_generator,
        morgan_words,
        similarity_index,
        tanimoto,
    )

    t0 = time.perf_counter()
    mol = compile_smiles(smiles, field="similar")
    query_words = morgan_words(mol.ToBinary(), morgan_generator())
    state = screening.index_state(conn)
    fps = similarity_index(database, index, state)
    scores = tanimoto(fps[:, positions], query_words) if positions.size else np.zeros(0)
    keep = scores >= min_similarity - 1e-12
    hits = positions[keep]
    similarity = {int(index.ids[p]): float(s) for p, s in zip(hits, scores[keep], strict=True)}
    stats.screened = stats.matched = int(hits.size)
    stats.seconds["similarity"] = time.perf_counter() - t0
    return hits, similarity


def _picked(
    listing: Listing,
    conn: Connection,
    picked: np.ndarray,
    order: tuple[str, bool],
    limit: int | None,
    as_lines: bool,
    stats: SearchStats,
) -> tuple[list[tuple[Any, ...]], tuple[str, ...], int, list[tuple[int, int]], int, bytes | None]:
    """The listing's positions sorted and cut to ``limit``, as rows read by id or as ready CSV
    lines; (rows, columns, total, rows per compound in first-seen order, returned, lines)."""
    stats.with_rows = int(unique(listing.compound_ids[picked]).size)
    picked = listing.order(picked, *order)
    total = int(picked.size)
    picked = picked if limit is None else picked[:limit]
    counts = first_seen_counts(listing.compound_ids[picked])
    if as_lines:
        return [], ROW_COLUMNS, total, counts, int(picked.size), listing.lines(picked)
    return listing.table(picked, conn), ROW_COLUMNS, total, counts, int(picked.size), None


def _arrange(
    table: list[tuple[Any, ...]],
    columns: tuple[str, ...],
    similarity: dict[int, float],
    column: str,
    descending: bool,
    limit: int | None,
    stats: SearchStats,
) -> tuple[list[tuple[Any, ...]], tuple[str, ...], int, list[tuple[int, int]], int]:
    """Rows read through SQL: scored, sorted and cut to ``limit`` (the listing does this with
    numpy); (rows, columns, total, rows per compound in first-seen order, returned)."""
    of_compound = itemgetter(columns.index("compound_id"))
    if similarity:
        table = [(*t, round(similarity[of_compound(t)], 4)) for t in table]
        columns = (*columns, "similarity")
    stats.with_rows = len(set(map(of_compound, table)))
    sort_rows(table, columns, column, descending)
    total = len(table)
    if limit is not None:
        table = table[:limit]
    counts = list(Counter(map(of_compound, table)).items())  # first-seen order, as the rows
    return table, columns, total, counts, len(table)


def _compounds(
    index: ScreenIndex,
    hit_positions: np.ndarray,
    counts: list[tuple[int, int]],
    similarity: dict[int, float],
    atoms_of: Query | None,
) -> list[dict[str, Any]]:
    """One entry per compound with rows: its measurement count, similarity, matched atoms."""
    position_of: dict[int, int] = {}
    if atoms_of is not None:
        ids = index.ids[hit_positions].tolist()
        position_of = dict(zip(ids, hit_positions.tolist(), strict=True))
    out = []
    for cid, n in counts:
        entry: dict[str, Any] = {"compound_id": cid, "measurements": n}
        if similarity:
            entry["similarity"] = round(similarity[cid], 4)
        if atoms_of is not None:
            entry["atoms"] = match_atoms(index.mol_binary(position_of[cid]), atoms_of)
        out.append(entry)
    return out


def brute_force(database: Database, query: Query) -> list[int]:
    """Compound ids matching ``query`` by parsing every stored SMILES and matching — no screen.

    The reference the tests compare :func:`find` against.
    """
    from registry.search.patterns import _rdkit

    Chem = _rdkit()
    out = []
    with database.read() as conn:
        rows = conn.rows("SELECT id, smiles_canonical, mol_binary FROM compound ORDER BY id")
    for cid, smiles, binary in rows:
        if binary is None:
            continue
        mol = Chem.MolFromSmiles(smiles) if smiles else None
        if mol is None:
            mol = Chem.Mol(bytes(binary))
        if any(mol.HasSubstructMatch(q, useChirality=query.stereo) for q in query.mols):
            out.append(int(cid))
    return out


def motif_matches(
    database: Database, names: Sequence[str] | None = None, *, threads: int | None = None
) -> dict[str, list[int]]:
    """Compound ids per motif (built-in and the registry's own), e.g. to group barriers by motif.

    Uses the same screen and confirmation as :func:`find`; a compound may appear under several
    motifs.
    """
    from registry.search.motifs import get_motif, list_motifs
    from registry.search.patterns import build_query

    with database.read() as conn:
        index = load_index(database, conn)
        wanted = list(names) if names is not None else [m.name for m in list_motifs(database)]
        out: dict[str, list[int]] = {}
        for name in wanted:
            query = build_query(motif=get_motif(name, database))
            out[name] = index.ids[search_positions(index, query, threads=threads)].tolist()
    return out
