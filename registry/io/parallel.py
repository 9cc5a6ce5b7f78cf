"""The CPU-heavy half of an import — reading structures and values — in a process pool.

Import time is almost all RDKit (PERFORMANCE.md): parsing, InChI/InChIKey, the pattern
fingerprint. Distinct SMILES are parsed once each (a sheet repeats its compounds), in chunks,
on ``workers`` processes. The chunks are handed to the pool as soon as the SMILES column has been
read (:meth:`Workers.submit_structures`), so the pool parses while this process builds and
normalizes the entries; normalizing in this process meanwhile costs no pickling of entries and
keeps both cores busy. A file without structures normalizes its entries in the pool instead.
Small inputs stay in this process, where starting a pool would cost more than it saves.
"""

from __future__ import annotations

import os
import signal
from collections.abc import Callable, Iterable, Sequence
from concurrent.futures import Future, ProcessPoolExecutor
from concurrent.futures.process import BrokenProcessPool
from types import TracebackType
from typing import Any

from registry.errors import StructureError
from registry.record.chem import Structure, read_structure
from registry.record.entry import EntryInput, NormalizedEntry, Problem, normalize_entry

#: below this many rows (or a third as many distinct SMILES) the work runs in this process
PARALLEL_MIN_ROWS = 3000
CHUNK_ROWS = 2000
CHUNK_SMILES = 1000

Progress = Callable[[int], None]
StructureResult = tuple[Structure | None, str | None]


def default_workers() -> int:
    """Two workers on a two-core machine; never more than the cores there are."""
    return max(1, min(2, os.cpu_count() or 1))


#: what a row says when reading its structure crashed the process that read it
CRASHED = "reading this structure crashed RDKit (a giant or damaged structure?); check it"


def _worker_setup(parent: int) -> None:
    """Workers leave Ctrl-C to the parent, which cancels the pool and rolls back (no
    tracebacks), and end when the parent dies (a killed import must not leave them running)."""
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    try:  # Linux: the kernel sends SIGTERM to this process when its parent ends
        import ctypes

        libc = ctypes.CDLL(None, use_errno=True)
        libc.prctl(1, signal.SIGTERM)  # PR_SET_PDEATHSIG
    except (OSError, AttributeError):  # pragma: no cover - not Linux
        pass
    if os.getppid() != parent:  # the parent died before the line above took effect
        os._exit(1)


def _in_fresh_process(smiles: list[str]) -> list[StructureResult] | None:
    """:func:`_structure_chunk` in a process of its own; None when that process crashed."""
    with ProcessPoolExecutor(1, initializer=_worker_setup, initargs=(os.getpid(),)) as one:
        try:
            return one.submit(_structure_chunk, smiles).result()
        except BrokenProcessPool:
            return None


def isolate_crash(smiles: list[str]) -> list[StructureResult]:
    """Read a chunk whose process crashed again, so that the crash is pinned on its SMILES:
    the chunk in a fresh process, and if that crashes too, each SMILES in one of its own."""
    whole = _in_fresh_process(smiles)
    if whole is not None:
        return whole
    out: list[StructureResult] = []
    for text in smiles:
        alone = _in_fresh_process([text])
        out.extend(alone if alone is not None else [(None, CRASHED)])
    return out


def _normalize_chunk(
    args: tuple[list[EntryInput], tuple[str, ...]],
) -> list[tuple[NormalizedEntry | None, list[Problem]]]:
    entries, kinds = args
    return [normalize_entry(e, kinds) for e in entries]


def _structure_chunk(smiles: list[str]) -> list[StructureResult]:
    out: list[StructureResult] = []
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


class Workers:
    """A process pool started only when there is enough work, and the structures handed to it.

    Use as a context manager: on any exception (Ctrl-C included) queued work is cancelled and
    the pool shut down without waiting, so the caller can roll back at once.
    """

    def __init__(self, workers: int | None = None) -> None:
        self.workers = workers or default_workers()  # None or 0: as many as default_workers
        self._pool: ProcessPoolExecutor | None = None
        self._pending: list[tuple[list[str], Future[list[StructureResult]] | _InProcess]] = []
        self._submitted: set[str] = set()
        self._done: dict[str, StructureResult] = {}

    def __enter__(self) -> Workers:
        return self

    def __exit__(
        self,
        exc_type: type[BaseException] | None,
        exc: BaseException | None,
        tb: TracebackType | None,
    ) -> None:
        if self._pool is not None:
            # work nobody collected (an early return: the file already has problems) is dropped
            self._pool.shutdown(wait=exc_type is None, cancel_futures=True)
            self._pool = None

    def pool(self, n_items: int, threshold: int) -> ProcessPoolExecutor | None:
        """The pool, started on first need, when ``n_items`` reach ``threshold``; else None."""
        if self._pool is None and (self.workers <= 1 or n_items < threshold):
            return None
        if self._pool is None:
            self._pool = ProcessPoolExecutor(
                max_workers=self.workers, initializer=_worker_setup, initargs=(os.getpid(),)
            )
        return self._pool

    @property
    def parsing(self) -> bool:
        """True while structure chunks are queued in the pool."""
        return any(isinstance(f, Future) for _, f in self._pending)

    def submit_structures(self, smiles: Iterable[str | None]) -> int:
        """Queue the distinct SMILES not seen before; returns how many were new.

        With enough of them they go to the pool at once and are parsed while the caller goes
        on; otherwise they wait for :meth:`structures`, which parses them in this process.
        """
        new = [s for s in dict.fromkeys(smiles) if s and s not in self._submitted]
        self._submitted.update(new)
        pool = self.pool(len(new), PARALLEL_MIN_ROWS // 3) if new else None
        if pool is None:
            for s in new:  # in this process, later (a few, or no pool)
                self._pending.append(([s], _InProcess(s)))
            return len(new)
        for chunk in _chunks(new, _chunk_size(len(new), CHUNK_SMILES)):
            self._pending.append((chunk, pool.submit(_structure_chunk, chunk)))
        return len(new)

    def structures(
        self, smiles: Sequence[str], progress: Progress | None = None
    ) -> dict[str, StructureResult]:
        """Each distinct SMILES of ``smiles`` → (Structure, None) or (None, why it is unreadable).

        Waits for the queued chunks (in order), parsing any SMILES not queued before.
        """
        self.submit_structures(smiles)
        ticked = 0
        for chunk, future in self._pending:
            try:
                results = future.result()
            except BrokenProcessPool:  # a worker crashed: find the SMILES that did it
                results = isolate_crash(chunk)
            self._done.update(zip(chunk, results, strict=True))
            ticked += len(chunk)
            if progress and ticked >= 200:
                progress(ticked)
                ticked = 0
        if progress and ticked:
            progress(ticked)
        self._pending.clear()
        return {s: self._done[s] for s in smiles if s}


class _InProcess:
    """A 'future' for one SMILES parsed in this process when its result is asked for."""

    def __init__(self, smiles: str) -> None:
        self.smiles = smiles

    def result(self) -> list[StructureResult]:
        return _structure_chunk([self.smiles])


def normalize_all(
    entries: Sequence[EntryInput],
    kinds: tuple[str, ...],
    pool: ProcessPoolExecutor | None,
    progress: Progress | None = None,
) -> list[tuple[NormalizedEntry | None, list[Problem]]]:
    """normalize_entry for every entry, in order (in ``pool`` when given and worth it)."""
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
