"""Which compounds match a query: the screens, then RDKit's confirmation of every candidate.

Per pattern of the query: the pattern-fingerprint screen (:class:`.index.ScreenIndex`; on
PostgreSQL with the RDKit cartridge the server's screen instead, :mod:`registry.pg.screen`) and
the element screen (:mod:`.elements`) keep the compounds that can contain it; RDKit confirms
them in a :class:`rdkit.Chem.rdSubstructLibrary.SubstructLibrary` over just the candidates,
with an explicit thread count and ``maxResults`` equal to the candidate count, so no hit is
ever dropped (RDKit stops at 1,000 otherwise).
"""

from __future__ import annotations

import os
import time
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from registry.search.elements import query_masks
from registry.search.index import ScreenIndex
from registry.search.interrupts import check_deadline, rdkit_matching
from registry.search.patterns import Query, needs_ring_info
from registry.storage.connection import Connection

#: below this many candidates a plain loop beats setting up a threaded library
_SMALL = 64


@dataclass
class SearchStats:
    """How the search narrowed down: compounds searched, kept by the screen, confirmed."""

    indexed: int = 0
    searched: int = 0
    screened: int = 0
    matched: int = 0
    with_rows: int = 0  # matched compounds that have a measurement passing the filters
    seconds: dict[str, float] = field(default_factory=dict)


def default_threads() -> int:
    """All cores this process may use (RDKit's -1 would leave one idle)."""
    try:
        return max(1, len(os.sched_getaffinity(0)))
    except AttributeError:  # pragma: no cover - not on Linux
        return max(1, os.cpu_count() or 1)


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
        keep = []
        for i, p in enumerate(positions.tolist()):
            if i % 1000 == 999:
                check_deadline()
            if Chem.Mol(index.mol_binary(p)).HasSubstructMatch(query_mol, useChirality=stereo):
                keep.append(p)
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
    found: list[int] = []
    n = int(positions.size)
    for start in range(0, n, CONFIRM_CHUNK):
        check_deadline()
        end = min(n, start + CONFIRM_CHUNK)
        with rdkit_matching():  # a Ctrl-C meanwhile ends the search, never thins it
            found += library.GetMatches(
                query_mol, start, end,
                recursionPossible=True, useChirality=stereo, useQueryQueryMatches=False,
                numThreads=threads, maxResults=end - start,  # never fewer than could match
            )  # fmt: skip
    return positions[np.asarray(found, dtype=np.int64)]


#: molecules confirmed per call into RDKit: between calls a Ctrl-C or the time limit is seen
CONFIRM_CHUNK = 20_000


def search_positions(
    index: ScreenIndex,
    query: Query,
    rows: np.ndarray | None = None,
    *,
    threads: int | None = None,
    stats: SearchStats | None = None,
    conn: Connection | None = None,
) -> np.ndarray:
    """Index positions of the compounds matching any of the query's patterns.

    With ``conn`` on PostgreSQL with the RDKit cartridge the server screens each pattern
    (:func:`registry.pg.screen.server_positions`); RDKit here still confirms every candidate.
    """
    server_positions = None
    if conn is not None and conn.dialect == "postgresql":
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
