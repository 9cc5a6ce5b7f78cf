"""The CPU-heavy half of an import — reading values and structures — in a process pool.

Import time is almost all RDKit (PERFORMANCE.md): parsing, InChI/InChIKey, the pattern
fingerprint. Distinct SMILES are parsed once each (a sheet repeats its compounds), in chunks,
on ``workers`` processes; entries are normalized in chunks the same way. Small inputs stay in
this process, where starting a pool would cost more than it saves.
"""

from __future__ import annotations

import os
import signal
from collections.abc import Callable, Iterator, Sequence
from concurrent.futures import Executor, ProcessPoolExecutor
from contextlib import contextmanager
from typing import Any

from registry.chem import Structure, read_structure
from registry.entry import EntryInput, NormalizedEntry, Problem, normalize_entry
from registry.errors import StructureError

#: below this many rows (or distinct SMILES) the work runs in this process
PARALLEL_MIN_ROWS = 3000
CHUNK_ROWS = 2000
CHUNK_SMILES = 1000

Progress = Callable[[int], None]


def default_workers() -> int:
    """Two workers on a two-core machine; never more than the cores there are."""
    return max(1, min(2, os.cpu_count() or 1))


@contextmanager
def worker_pool(workers: int, needed: bool) -> Iterator[Executor | None]:
    """A process pool when there is enough work for one; shut down (cancelling) on any exit."""
    if not needed or workers <= 1:
        yield None
        return
    pool = ProcessPoolExecutor(max_workers=workers, initializer=_ignore_interrupts)
    try:
        yield pool
    except BaseException:
        pool.shutdown(wait=False, cancel_futures=True)
        raise
    pool.shutdown(wait=True)


def _ignore_interrupts() -> None:
    """Workers leave Ctrl-C to the parent, which cancels the pool and rolls back (no tracebacks)."""
    signal.signal(signal.SIGINT, signal.SIG_IGN)


def _normalize_chunk(
    args: tuple[list[EntryInput], tuple[str, ...]],
) -> list[tuple[NormalizedEntry | None, list[Problem]]]:
    entries, kinds = args
    return [normalize_entry(e, kinds) for e in entries]


def _structure_chunk(smiles: list[str]) -> list[tuple[Structure | None, str | None]]:
    out: list[tuple[Structure | None, str | None]] = []
    for text in smiles:
        try:
            out.append((read_structure(text), None))
        except StructureError as exc:
            out.append((None, exc.reason))
    return out


def _chunk_size(n: int, largest: int) -> int:
    """At least ~8 chunks per worker, so that the last chunks do not leave a core idle."""
    return max(1, min(largest, -(-n // 16)))


def _chunks(items: Sequence[Any], size: int) -> list[list[Any]]:
    return [list(items[i : i + size]) for i in range(0, len(items), size)]


def normalize_all(
    entries: Sequence[EntryInput],
    kinds: tuple[str, ...],
    pool: Executor | None,
    progress: Progress | None = None,
) -> list[tuple[NormalizedEntry | None, list[Problem]]]:
    """normalize_entry for every entry, in order."""
    if pool is None or len(entries) < PARALLEL_MIN_ROWS:
        out = []
        for i, entry in enumerate(entries):
            out.append(normalize_entry(entry, kinds))
            if progress and i % 500 == 499:
                progress(500)
        if progress:
            progress(len(entries) % 500)
        return out
    results: list[tuple[NormalizedEntry | None, list[Problem]]] = []
    size = _chunk_size(len(entries), CHUNK_ROWS)
    for chunk in pool.map(_normalize_chunk, [(c, kinds) for c in _chunks(entries, size)]):
        results.extend(chunk)
        if progress:
            progress(len(chunk))
    return results


def read_structures(
    smiles: Sequence[str], pool: Executor | None, progress: Progress | None = None
) -> dict[str, tuple[Structure | None, str | None]]:
    """Each distinct SMILES → (Structure, None) or (None, why it cannot be read)."""
    distinct = list(dict.fromkeys(s for s in smiles if s))
    if pool is None or len(distinct) < PARALLEL_MIN_ROWS // 3:
        out = {}
        for i, s in enumerate(distinct):
            out[s] = _structure_chunk([s])[0]
            if progress and i % 200 == 199:
                progress(200)
        if progress:
            progress(len(distinct) % 200)
        return out
    results: dict[str, tuple[Structure | None, str | None]] = {}
    chunks = _chunks(distinct, _chunk_size(len(distinct), CHUNK_SMILES))
    for chunk, parsed in zip(chunks, pool.map(_structure_chunk, chunks), strict=True):
        results.update(zip(chunk, parsed, strict=True))
        if progress:
            progress(len(chunk))
    return results
