"""Run a structure search: filter measurements in SQL, screen, confirm with RDKit, return rows.

Order of work, cheapest first: (1) the measurement filters run in SQL and give the compounds
that have a qualifying barrier; (2) the pattern-fingerprint screen (:mod:`.index`) and the
element screen (:mod:`.elements`) keep those that can contain the query; (3) RDKit confirms
in a :class:`rdkit.Chem.rdSubstructLibrary.SubstructLibrary` over just the candidates, with an
explicit thread count and ``maxResults`` equal to the candidate count, so no hit is ever
dropped; (4) the measurements of the confirmed compounds are picked from the measurement
listing (:mod:`.listing`; read through SQL on server databases) and sorted.
Similarity search ranks by Tanimoto similarity of Morgan fingerprints (radius 2, 2048 bits;
Rogers & Hahn, J. Chem. Inf. Model. 2010) kept in a second cache file beside the first.
"""

from __future__ import annotations

import contextlib
import os
import time
from collections import Counter
from collections.abc import Sequence
from dataclasses import dataclass, field
from functools import cached_property
from itertools import repeat
from operator import itemgetter
from typing import Any, BinaryIO

import numpy as np

from registry.errors import UsageError
from registry.search.elements import query_masks
from registry.search.filters import Filters, Where
from registry.search.index import ScreenIndex, load_index
from registry.search.listing import (
    CSV_COLUMNS,
    ROW_COLUMNS,
    ROWS_SQL,
    Listing,
    csv_lines,
    header_line,
)
from registry.search.patterns import Query, needs_ring_info

#: below this many candidates a plain loop beats setting up a threaded library
_SMALL = 64
#: warn when a pattern matches more than this fraction of the compounds searched …
BROAD_FRACTION = 0.9
#: … and at least this many of them
BROAD_MIN = 50

SORT_KEYS = {
    "id": ("id", False),
    "barrier": ("dg_kj_mol", False),
    "-barrier": ("dg_kj_mol", True),
    "temperature": ("dg_t_k", False),
    "-temperature": ("dg_t_k", True),
    "compound": ("compound", False),
    "solvent": ("solvent", False),
    "method": ("method", False),
    "similarity": ("similarity", True),
}


def default_threads() -> int:
    """All cores this process may use (RDKit's -1 would leave one idle)."""
    try:
        return max(1, len(os.sched_getaffinity(0)))
    except AttributeError:  # pragma: no cover - not on Linux
        return max(1, os.cpu_count() or 1)


@dataclass
class SearchStats:
    """How the search narrowed down: compounds searched, kept by the screen, confirmed."""

    indexed: int = 0
    searched: int = 0
    screened: int = 0
    matched: int = 0
    with_rows: int = 0  # matched compounds that have a measurement passing the filters
    seconds: dict[str, float] = field(default_factory=dict)


@dataclass
class FindResult:
    """Measurements on matching compounds, the compounds themselves, and how the search went.

    The measurements are kept as a table (``columns`` + one tuple per row); :attr:`rows` gives
    them as dicts, built on first use. A search run for CSV output (``find(output="csv")``)
    may carry its rows as ready CSV lines instead (:attr:`csv_body`, from the measurement
    listing; ``table`` is then empty and ``returned`` counts the lines).
    """

    query: dict[str, Any]
    columns: tuple[str, ...]
    table: list[tuple[Any, ...]]
    compounds: list[dict[str, Any]]
    stats: SearchStats
    warnings: list[str]
    total_rows: int  # before ``limit``
    returned: int = -1  # rows after ``limit`` (len(table) unless the rows are CSV lines)
    csv_body: bytes | None = None

    def __post_init__(self) -> None:
        if self.returned < 0:
            self.returned = len(self.table)

    @cached_property
    def rows(self) -> list[dict[str, Any]]:
        """One dict per measurement (column name → value)."""
        # every tuple has len(columns) values (built so above); map/zip keep the loop in C
        return list(map(dict, map(zip, repeat(self.columns), self.table)))

    def column_values(self, names: Sequence[str]) -> list[tuple[Any, ...]]:
        """The table cut to these columns, in this order (None for a column it lacks)."""
        where = {c: i for i, c in enumerate(self.columns)}
        if names and all(n in where for n in names):
            if len(names) == 1:
                at = where[names[0]]
                return [(t[at],) for t in self.table]
            return list(map(itemgetter(*(where[n] for n in names)), self.table))
        return [tuple(t[where[n]] if n in where else None for n in names) for t in self.table]

    def csv_columns(self) -> list[str]:
        """The columns of :meth:`write_csv` (a similarity search adds ``similarity`` third)."""
        columns = list(CSV_COLUMNS)
        if "similarity" in self.columns:
            columns.insert(2, "similarity")
        return columns

    def write_csv(self, out: BinaryIO) -> None:
        """The measurements as CSV (UTF-8, ``\\n`` line ends, a header line; a value that is
        not a finite number is written empty)."""
        columns = self.csv_columns()
        out.write(header_line(columns).encode("utf-8"))
        if self.csv_body is not None:
            out.write(self.csv_body)
        else:
            out.write("".join(csv_lines(self.column_values(columns))).encode("utf-8"))

    def as_dict(self) -> dict[str, Any]:
        return {
            "query": self.query,
            "counts": {
                "measurements": self.total_rows,
                "returned": self.returned,
                "compounds_matched": self.stats.matched,
                "compounds_with_measurements": self.stats.with_rows,
                "compounds_searched": self.stats.searched,
                "compounds_after_screen": self.stats.screened,
                "compounds_indexed": self.stats.indexed,
            },
            "warnings": self.warnings,
            "measurements": self.rows,
            "compounds": self.compounds,
        }


# ---------------------------------------------------------------- confirmation


def _rdkit() -> Any:
    from registry.search.patterns import _rdkit as load

    return load()


def confirm(
    index: ScreenIndex,
    positions: np.ndarray,
    query_mol: Any,
    *,
    stereo: bool = False,
    threads: int | None = None,
) -> np.ndarray:
    """The positions among ``positions`` whose molecule contains ``query_mol`` (all of them)."""
    Chem = _rdkit()
    if positions.size == 0:
        return positions
    threads = threads or default_threads()
    if positions.size <= _SMALL or threads == 1:
        keep = [
            p
            for p in positions.tolist()
            if Chem.Mol(index.mol_binary(p)).HasSubstructMatch(query_mol, useChirality=stereo)
        ]
        return np.asarray(keep, dtype=np.int64)
    if needs_ring_info(query_mol):
        # ring queries: loading the binaries (ring info included) beat parsing SMILES and
        # perceiving rings by 10–25 % on the ring-bond motifs of the benchmark
        return np.sort(_library_matches(index, positions, query_mol, stereo, threads, None))
    texts = index.trusted_smiles_many(positions.tolist())
    has_text = np.fromiter((bool(t) for t in texts), dtype=bool, count=len(texts))
    chosen, others = positions[has_text], positions[~has_text]
    found: list[np.ndarray] = []
    if chosen.size:
        smiles = [t for t in texts if t]
        try:
            found.append(_library_matches(index, chosen, query_mol, stereo, threads, smiles))
        except RuntimeError:
            # RDKit's trusted-SMILES path leaves ring info unset for recursive SMARTS with ring
            # primitives ($([r6]) …) and raises; the binary form carries ring info
            found.append(_library_matches(index, chosen, query_mol, stereo, threads, None))
    if others.size:
        found.append(_library_matches(index, others, query_mol, stereo, threads, None))
    return np.sort(np.concatenate(found)) if found else positions[:0]


def _library_matches(
    index: ScreenIndex,
    positions: np.ndarray,
    query_mol: Any,
    stereo: bool,
    threads: int,
    smiles: list[str] | None,
) -> np.ndarray:
    """Confirm in a threaded SubstructLibrary over just these molecules.

    Molecules come from RDKit's own canonical SMILES parsed without sanitization (the trusted
    holder: faster here than unpickling the binary) or, for structures kept unsanitized, from
    the binary. ``maxResults`` is the number of molecules, so no hit is ever dropped.
    """
    from rdkit.Chem import rdSubstructLibrary

    if smiles is not None:
        holder = rdSubstructLibrary.CachedTrustedSmilesMolHolder()
        add = holder.AddSmiles
        for text in smiles:
            add(text)
    else:
        holder = rdSubstructLibrary.CachedMolHolder()
        for p in positions.tolist():
            holder.AddBinary(index.mol_binary(p))
    library = rdSubstructLibrary.SubstructLibrary(holder)
    found = library.GetMatches(
        query_mol,
        recursionPossible=True,
        useChirality=stereo,
        useQueryQueryMatches=False,
        numThreads=threads,
        maxResults=int(positions.size),  # never fewer than could match
    )
    return positions[np.asarray(list(found), dtype=np.int64)]


def search_positions(
    index: ScreenIndex,
    query: Query,
    rows: np.ndarray | None = None,
    *,
    threads: int | None = None,
    stats: SearchStats | None = None,
    conn: Any = None,
) -> np.ndarray:
    """Index positions of the compounds matching any of the query's patterns.

    With ``conn`` on PostgreSQL with the RDKit cartridge the server screens each pattern
    (:func:`registry.pg.screen.server_positions`); RDKit here still confirms every candidate.
    """
    server_positions = None
    if conn is not None and _dialect(conn) != "sqlite":
        from registry.pg.screen import server_positions

    stats = stats if stats is not None else SearchStats()
    t0 = time.perf_counter()
    hits: list[np.ndarray] = []
    screened: list[np.ndarray] = []
    for text, mol, words in zip(query.pattern_texts, query.mols, query.fingerprints, strict=True):
        candidates = None
        if server_positions is not None:
            candidates = server_positions(conn, index.ids, rows, text, query.kind)
        if candidates is None:  # SQLite, no cartridge, or a pattern the server cannot read
            candidates = index.screen(words, rows)
        candidates = index.screen_elements(query_masks(mol), candidates)
        screened.append(candidates)
        t1 = time.perf_counter()
        stats.seconds["screen"] = stats.seconds.get("screen", 0.0) + t1 - t0
        hits.append(confirm(index, candidates, mol, stereo=query.stereo, threads=threads))
        t0 = time.perf_counter()
        stats.seconds["confirm"] = stats.seconds.get("confirm", 0.0) + t0 - t1
    stats.screened = int(_union(screened, len(index)).size)
    out = _union(hits, len(index))
    stats.matched = int(out.size)
    return out


def _dialect(conn: Any) -> str:
    from registry.search.sqlite_read import dialect_name

    return dialect_name(conn)


def _union(parts: list[np.ndarray], size: int) -> np.ndarray:
    """Sorted union of position arrays (a mask: np.unique would pull in numpy.ma, ~0.1 s)."""
    if len(parts) == 1:
        return np.sort(parts[0])
    mask = np.zeros(size, dtype=bool)
    for part in parts:
        mask[part] = True
    return np.flatnonzero(mask)


def match_atoms(binary: bytes, query: Query, max_matches: int = 1000) -> list[list[int]]:
    """Atom indices of every match (per pattern, unique atom sets) for highlighting."""
    Chem = _rdkit()
    mol = Chem.Mol(binary)
    out: list[list[int]] = []
    for pattern in query.mols:
        out += [
            list(m)
            for m in mol.GetSubstructMatches(
                pattern, useChirality=query.stereo, uniquify=True, maxMatches=max_matches
            )
        ]
    return out


# ---------------------------------------------------------------- similarity


def _morgan_words(binary: bytes, generator: Any) -> np.ndarray:
    Chem = _rdkit()
    mol = Chem.Mol(binary)
    mol.UpdatePropertyCache(strict=False)
    bits = generator.GetFingerprintAsNumPy(mol).astype(bool)
    return np.packbits(bits, bitorder="little").view("<u8")


def _morgan_generator() -> Any:
    from rdkit.Chem import rdFingerprintGenerator

    return rdFingerprintGenerator.GetMorganGenerator(radius=2, fpSize=2048)


def similarity_index(database: Any, screen: ScreenIndex) -> np.ndarray:
    """Morgan fingerprints (32 × N uint64, word-major) in screen-index order, cached in
    ``<db>.simindex``."""
    from registry.search.index import ScreenIndex as Store
    from registry.search.index import index_path_for, read_index, save_index

    path = index_path_for(database, ".simindex")
    signature = {**screen.signature, "fingerprint": "morgan-r2-2048"}
    cached = read_index(path)
    if cached is not None and cached.signature == signature and len(cached) == len(screen):
        return cached.fps
    generator = _morgan_generator()
    rows = np.zeros((len(screen), 32), dtype=np.uint64)
    for i in range(len(screen)):
        try:
            rows[i] = _morgan_words(screen.mol_binary(i), generator)
        except Exception:  # a molecule RDKit cannot fingerprint is simply not similar
            rows[i] = 0
    fps = np.ascontiguousarray(rows.T)
    store = Store(
        screen.ids.copy(),
        fps,
        np.zeros(1, dtype=np.int64),
        np.zeros(0, dtype=np.uint8),
        signature,
        screen.rdkit_version,
    )
    with contextlib.suppress(OSError):
        save_index(store, path)
    return fps


def tanimoto(fps: np.ndarray, query: np.ndarray) -> np.ndarray:
    """Tanimoto (Jaccard) similarity of each column (word-major fingerprints) with the query:
    |a∧b| / |a∨b|."""
    both = np.bitwise_count(fps & query[:, None]).sum(axis=0, dtype=np.int64)
    either = np.bitwise_count(fps | query[:, None]).sum(axis=0, dtype=np.int64)
    with np.errstate(invalid="ignore", divide="ignore"):
        return np.where(either > 0, both / np.maximum(either, 1), 0.0)


# ---------------------------------------------------------------- the whole search


_ALLOWED: dict[tuple, Any] = {}


def _remembered(
    database: Any, state: tuple[int, ...] | None, filters: Filters, kind: str, compute: Any
) -> Any:
    """``compute()``, remembered in-process while the registry file is unchanged (``state`` is
    the file state taken before the search's read transaction began)."""
    if state is None:
        return compute()
    key = (database.url, state, kind, repr(sorted(filters.describe().items())))
    if key not in _ALLOWED:
        if len(_ALLOWED) > 32:
            _ALLOWED.clear()
        _ALLOWED[key] = compute()
    return _ALLOWED[key]


def _filtered_compounds(conn: Any, where: Where) -> np.ndarray:
    """Compounds with at least one measurement passing the filters (no joins unless needed)."""
    from registry.search.sqlite_read import fetch

    join = " LEFT OUTER JOIN process p ON p.id = m.process_id" if where.needs_process else ""
    rows = fetch(
        conn,
        f"SELECT DISTINCT m.compound_id FROM measurement m{join} WHERE {where.sql()}",
        where.params,
    )
    return np.fromiter((r[0] for r in rows), dtype=np.int64, count=len(rows))


def _filtered_measurements(conn: Any, where: Where) -> tuple[np.ndarray, np.ndarray]:
    """The measurements passing the filters and their compounds: two sorted, unique id arrays."""
    from registry.search.sqlite_read import fetch

    join = " LEFT OUTER JOIN process p ON p.id = m.process_id" if where.needs_process else ""
    rows = fetch(
        conn,
        f"SELECT m.id, m.compound_id FROM measurement m{join} WHERE {where.sql()} ORDER BY m.id",
        where.params,
    )
    ids = np.fromiter((r[0] for r in rows), dtype=np.int64, count=len(rows))
    compounds = np.fromiter((r[1] for r in rows), dtype=np.int64, count=len(rows))
    return ids, _unique(compounds)


def _unique(values: np.ndarray) -> np.ndarray:
    """Sorted distinct values (np.unique would pull in numpy.ma, ~0.1 s of a cold run)."""
    if values.size == 0:
        return values
    ordered = np.sort(values)
    return ordered[np.concatenate(([True], ordered[1:] != ordered[:-1]))]


#: compound ids per bound-parameter IN list on servers
_CHUNK = 2000


def _rows_for(
    conn: Any, where: Where, compound_ids: Sequence[int], scan_above: int = 5000
) -> list[tuple[Any, ...]]:
    """The measurements (joined with compound and process) of these compounds that pass, as
    tuples in :data:`ROW_COLUMNS` order.

    Plain SQL and plain tuples (on SQLite through the ``sqlite3`` connection itself): for a
    common motif this reads tens of thousands of rows, where SQLAlchemy's rows cost more than
    the search. On SQLite the ids go in as one JSON array (:func:`.sqlite_read.fetch_with_ids`):
    looked up through the compound-id index when they are few, tested during one pass over the
    measurements (``+m.compound_id`` keeps the index out) when they are more than
    ``scan_above``. Elsewhere: one pass with the test in Python when there are many,
    bound-parameter IN lists in chunks when few.
    """
    from registry.search.sqlite_read import dialect_name, fetch, fetch_with_ids

    ids = list(compound_ids)
    if not ids:
        return []
    base = f"{ROWS_SQL} WHERE {where.sql()}"
    many = len(ids) > scan_above
    if many and dialect_name(conn) != "sqlite":
        hit = set(ids)
        at = tuple(ROW_COLUMNS).index("compound_id")
        return [tuple(r) for r in fetch(conn, base, where.params) if r[at] in hit]
    column = "+m.compound_id" if many else "m.compound_id"  # '+': SQLite scans, no index
    return [tuple(r) for r in fetch_with_ids(conn, base, column, ids, where.params, chunk=_CHUNK)]


def _sort_key(sort: str | None, similar: bool) -> tuple[str, bool]:
    """(column, descending) of a ``--sort`` text; the default is id (similarity for --similar)."""
    key_name = (sort or ("similarity" if similar else "id")).strip().lower()
    if key_name not in SORT_KEYS:
        raise UsageError(f"--sort {sort!r}: choose one of {', '.join(SORT_KEYS)}")
    return SORT_KEYS[key_name]


def _sort(
    table: list[tuple[Any, ...]], columns: Sequence[str], column: str, descending: bool
) -> None:
    """Sort in place; rows without the value go last, ties keep measurement-id order."""
    table.sort(key=itemgetter(columns.index("id")))  # never NULL; nearly sorted already
    if column == "id" or column not in columns:  # a column the rows lack: all 'missing'
        return
    at = columns.index(column)
    present = [t for t in table if t[at] is not None]
    missing = [t for t in table if t[at] is None]

    def value(row: tuple[Any, ...]) -> Any:
        v = row[at]
        return v.lower() if isinstance(v, str) else v

    present.sort(key=value, reverse=descending)  # stable: equal values stay in id order
    table[:] = present + missing


def _listing_for(
    database: Any, conn: Any, state: tuple[int, ...] | None, keep_rows: bool, rebuild: bool
) -> Listing | None:
    """The measurement listing of a SQLite registry (None elsewhere; tests replace this to
    compare the listing with the plain SQL path)."""
    from registry.search.listing import load_listing

    return load_listing(database, conn, state, keep_rows=keep_rows, rebuild=rebuild)


def find(
    database: Any,
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
    keep_rows: bool = True,
) -> FindResult:
    """Every measurement on a compound that matches ``query`` (or is similar to ``similar``).

    Nothing is capped: ``limit`` only shortens the returned rows (``total_rows`` says how many
    there were). ``atoms`` adds the matched atom indices of each compound for highlighting.
    ``output="csv"`` is for a caller that will only call :meth:`FindResult.write_csv`: on a
    SQLite registry the rows then stay ready CSV lines of the measurement listing.
    ``keep_rows`` (SQLite) keeps every measurement's row in this process while the registry file
    is unchanged, so that later searches pick rows instead of reading them (about 1 KB per
    measurement); a caller that searches once (the CLI) turns it off and reads only its rows.
    """
    from registry.search import filters as filtering
    from registry.search.cachefile import file_state
    from registry.search.sqlite_read import use_memory_map

    if (query is None) == (similar is None):
        raise UsageError("give exactly one of --smarts, --smiles, --motif or --similar")
    if similar is not None and not 0.0 < min_similarity <= 1.0:
        raise UsageError(f"--min-similarity {min_similarity}: give a number in (0, 1]")
    if limit is not None and limit <= 0:
        raise UsageError(f"--limit {limit}: give a positive whole number")
    if output not in ("rows", "csv"):
        raise ValueError(f"output={output!r}: 'rows' or 'csv'")
    column, descending = _sort_key(sort, similar is not None)
    filters = filters or Filters()
    stats = SearchStats()
    warnings: list[str] = []
    t0 = time.perf_counter()
    index = load_index(database, rebuild=rebuild_index)
    warnings += index.notes
    stats.indexed = len(index)
    stats.seconds["index"] = time.perf_counter() - t0
    state = file_state(database)  # before the read transaction (see load_listing)
    with database.read() as conn:
        t1 = time.perf_counter()
        use_memory_map(conn)
        where = filtering.conditions(conn, filters)
        listing = None
        if similar is None:
            wants_rows = keep_rows and (output == "rows" or atoms)
            listing = _listing_for(database, conn, state, wants_rows, rebuild_index)
        if listing is not None:
            warnings += listing.notes
        stats.seconds["listing"] = time.perf_counter() - t1
        allowed_ids = None
        if filters.active():
            if listing is not None:
                allowed_ids, allowed = _remembered(
                    database, state, filters, "measurements",
                    lambda: _filtered_measurements(conn, where),
                )  # fmt: skip
            else:
                allowed = _remembered(
                    database, state, filters, "compounds", lambda: _filtered_compounds(conn, where)
                )
            positions = _present(index, allowed)
        else:  # every indexed compound; those without measurements simply give no rows
            positions = np.arange(len(index), dtype=np.int64)
        stats.searched = int(positions.size)
        stats.seconds["filter"] = time.perf_counter() - t1 - stats.seconds["listing"]
        similarity: dict[int, float] = {}
        if query is not None:
            hit_positions = search_positions(
                index, query, positions, threads=threads, stats=stats, conn=conn
            )
            description = {
                "kind": query.kind,
                "text": query.text,
                "smarts": list(query.pattern_texts),
                "stereo": query.stereo,
            }
        else:
            from registry.search.patterns import compile_smiles

            t2 = time.perf_counter()
            mol = compile_smiles(similar or "", field="--similar")
            qwords = _morgan_words(mol.ToBinary(), _morgan_generator())
            fps = similarity_index(database, index)
            scores = tanimoto(fps[:, positions], qwords) if positions.size else np.zeros(0)
            keep = scores >= min_similarity - 1e-12
            hit_positions = positions[keep]
            similarity = {
                int(index.ids[p]): float(s)
                for p, s in zip(hit_positions, scores[keep], strict=True)
            }
            stats.screened = stats.matched = int(hit_positions.size)
            stats.seconds["similarity"] = time.perf_counter() - t2
            description = {"kind": "similar", "text": similar, "min_similarity": min_similarity}
        t3 = time.perf_counter()
        columns: tuple[str, ...] = tuple(ROW_COLUMNS)
        of_compound = itemgetter(columns.index("compound_id"))
        csv_body = None
        if listing is not None:
            picked = listing.pick(index.ids[hit_positions], allowed_ids, filters.include_retracted)
            stats.with_rows = int(_unique(listing.compound_ids[picked]).size)
            picked = listing.order(picked, column, descending)
            total = int(picked.size)
            if limit is not None:
                picked = picked[:limit]
            returned = int(picked.size)
            if output == "csv" and not atoms:
                table, csv_body = [], listing.lines(picked)
            else:
                table = listing.table(picked, conn)
            counts = _first_seen_counts(listing.compound_ids[picked])
        else:
            hit_ids = index.ids[hit_positions].tolist()
            scan_above = max(5000, (stats.searched * 3) // 5)
            table = _rows_for(conn, where, hit_ids, scan_above=scan_above)
        stats.seconds["rows"] = time.perf_counter() - t3
    if listing is None:
        if similarity:
            table = [(*t, round(similarity[of_compound(t)], 4)) for t in table]
            columns = (*columns, "similarity")
        stats.with_rows = len(set(map(of_compound, table)))
        _sort(table, columns, column, descending)
        total = len(table)
        if limit is not None:
            table = table[:limit]
        returned = len(table)
        counts = list(Counter(map(of_compound, table)).items())  # first-seen order, as the rows
    stats.seconds["rows"] = time.perf_counter() - t3
    if (
        query is not None
        and stats.searched >= BROAD_MIN
        and stats.matched > BROAD_FRACTION * stats.searched
    ):
        warnings.append(
            f"the pattern matches {stats.matched:,} of {stats.searched:,} compounds searched "
            f"({100.0 * stats.matched / stats.searched:.0f}%); a more specific pattern or "
            "filters would say more"
        )
    position_of: dict[int, int] = {}
    if atoms and query is not None:
        ids = index.ids[hit_positions].tolist()
        position_of = dict(zip(ids, hit_positions.tolist(), strict=True))
    compounds = []
    for cid, n in counts:
        entry: dict[str, Any] = {"compound_id": cid, "measurements": n}
        if similarity:
            entry["similarity"] = round(similarity[cid], 4)
        if atoms and query is not None:
            entry["atoms"] = match_atoms(index.mol_binary(position_of[cid]), query)
        compounds.append(entry)
    if atoms and query is not None:
        by_id = {c["compound_id"]: c["atoms"] for c in compounds}
        table = [(*t, by_id[of_compound(t)]) for t in table]
        columns = (*columns, "match_atoms")
    description["filters"] = filters.describe()
    return FindResult(
        description, columns, table, compounds, stats, warnings, total, returned, csv_body
    )


def _first_seen_counts(compound_ids: np.ndarray) -> list[tuple[int, int]]:
    """(compound id, rows) per distinct id, in order of first appearance (as a Counter would
    count the rows, without a Python step per row)."""
    if compound_ids.size == 0:
        return []
    order = np.argsort(compound_ids, kind="stable")
    ordered = compound_ids[order]
    starts = np.flatnonzero(np.concatenate(([True], ordered[1:] != ordered[:-1])))
    sizes = np.diff(np.concatenate((starts, [ordered.size])))
    sequence = np.argsort(order[starts], kind="stable")
    return list(zip(ordered[starts][sequence].tolist(), sizes[sequence].tolist(), strict=True))


def _present(index: ScreenIndex, compound_ids: np.ndarray) -> np.ndarray:
    """Index positions of those compound ids that the index holds (compounds with a structure)."""
    if compound_ids.size == 0 or len(index) == 0:
        return np.empty(0, dtype=np.int64)
    ids = np.sort(compound_ids)
    positions = np.searchsorted(index.ids, ids)
    inside = positions < len(index)
    positions, ids = positions[inside], ids[inside]
    return positions[index.ids[positions] == ids].astype(np.int64)


def brute_force(database: Any, query: Query) -> list[int]:
    """Compound ids matching ``query`` by parsing every stored SMILES and matching — no screen.

    The reference the tests compare :func:`find` against.
    """
    from registry.search.sqlite_read import fetch

    Chem = _rdkit()
    out = []
    with database.read() as conn:
        for cid, smiles, binary in fetch(
            conn, "SELECT id, smiles_canonical, mol_binary FROM compound ORDER BY id"
        ):
            if binary is None:
                continue
            mol = Chem.MolFromSmiles(smiles) if smiles else None
            if mol is None:
                mol = Chem.Mol(bytes(binary))
            if any(mol.HasSubstructMatch(q, useChirality=query.stereo) for q in query.mols):
                out.append(int(cid))
    return out


def motif_matches(
    database: Any, names: Sequence[str] | None = None, *, threads: int | None = None
) -> dict[str, list[int]]:
    """Compound ids per motif (built-in and the registry's own), e.g. to group barriers by motif.

    Uses the same screen and confirmation as :func:`find`; a compound may appear under several
    motifs.
    """
    from registry.search.motifs import get_motif, list_motifs
    from registry.search.patterns import build_query

    index = load_index(database)
    wanted = list(names) if names is not None else [m.name for m in list_motifs(database)]
    out: dict[str, list[int]] = {}
    for name in wanted:
        query = build_query(motif=get_motif(name, database))
        out[name] = index.ids[search_positions(index, query, threads=threads)].tolist()
    return out
