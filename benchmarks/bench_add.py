"""Benchmark: add 1,000 single measurements through the library API (WAL on), one at a time.

Each run starts from a fresh registry file and calls ``api.add_measurement`` 1,000 times on one
open :class:`Database` (real structures cycled from a small set, so compounds are both created
and reused, and coalescence data so the rules have work). Prints the median rate of several runs
in measurements per second, and where one add spends its time, timed step by step in the same
run (one run of N/5 adds): normalize, structure (RDKit), the write transaction, and the validation check that ``add``
runs on the new row. Also times the same adds inside ``api.deferred_checks`` (each add commits
on its own; the rules run once over all of them at the end of the block, inside the timing), the
write path alone and, for comparison, re-opening the registry (with its schema-head check)
before every add, as a caller that opens per call would.

Usage: python benchmarks/bench_add.py [N] [runs]
"""

from __future__ import annotations

import os
import statistics
import sys
import tempfile
import time
from collections.abc import Callable
from pathlib import Path

os.environ.setdefault("FLUXLEDGER_USER", "bench")

from registry import api
from registry.record.chem import structure_for
from registry.record.entry import EntryInput, normalize_entry
from registry.storage.writer import known_process_kinds, write_entries

#: real, public structures (amides, biaryls, rings) cycled through the adds
SMILES = [
    "CC(=O)N(C)C",
    "CN(C)C=O",
    "CN(C)C(=O)c1ccccc1",
    "CN(C)C(=O)c1ccc(Cl)cc1",
    "CC(C)N(C(C)C)C(=O)c1ccccc1",
    "C1CCCCC1",
    "C1CCC2CCCCC2C1",
    "Cc1ccccc1-c1ccccc1C",
    "COc1ccccc1-c1ccccc1OC",
    "CN1CCCCC1",
    "O=C1CCCCC1",
    "CC(C)(C)c1ccccc1",
    "CN(C)N=O",
    "CC(=O)N1CCCCC1",
    "O=CN1CCOCC1",
    "C1=CC=CC=CC=C1",
    "CC1=CC=CC=C1C(=O)N(C)C",
    "CN(C)c1ccccc1",
    "c1ccc2c(c1)ccc1ccccc12",
    "CC(C)c1cccc(C(C)C)c1N(C)C=O",
]


def entry(i: int) -> EntryInput:
    return EntryInput(
        method="coalescence",
        smiles=SMILES[i % len(SMILES)],
        name=f"bench compound {i % len(SMILES)}",
        process="bond-rotation",
        nucleus="1H",
        solvent="CDCl3",
        field="400 MHz",
        tc=f"{240 + i % 60} K",
        dnu=f"{0.05 + (i % 20) / 100:.2f} ppm",
        dg=f"{12 + (i % 40) / 10:.1f} kcal/mol",
        reference=f"bench run, row {i}",
    )


def fresh_registry(folder: Path, name: str) -> str:
    path = folder / f"{name}.sqlite"
    api.init_registry(str(path))
    return str(path)


def run_api(db: str, n: int) -> float:
    """``api.add_measurement`` n times on one open registry; returns adds per second."""
    database = api.open_registry(db)
    entries = [entry(i) for i in range(n)]
    started = time.perf_counter()
    for e in entries:
        api.add_measurement(database, e)
    elapsed = time.perf_counter() - started
    database.dispose()
    return n / elapsed


def run_api_deferred(db: str, n: int) -> float:
    """``add_measurement`` n times inside ``api.deferred_checks``: each add commits on its own,
    the rules run once over all n rows when the block ends (that check is inside the timing)."""
    database = api.open_registry(db)
    entries = [entry(i) for i in range(n)]
    started = time.perf_counter()
    with api.deferred_checks(database) as block:
        for e in entries:
            api.add_measurement(database, e)
    elapsed = time.perf_counter() - started
    assert block.report is not None and block.report.checked == n
    database.dispose()
    return n / elapsed


def run_reopen(db: str, n: int) -> float:
    """``open_registry`` (schema-head check) before every add, as a per-call caller would."""
    entries = [entry(i) for i in range(n)]
    started = time.perf_counter()
    for e in entries:
        database = api.open_registry(db)
        api.add_measurement(database, e)
        database.dispose()
    return n / (time.perf_counter() - started)


def run_steps(db: str, n: int) -> tuple[float, dict[str, float]]:
    """The steps of one add, timed separately (ms per add); returns (adds/s, step times)."""
    from registry.validation import check_measurements

    database = api.open_registry(db)
    steps = {"normalize": 0.0, "structure (RDKit)": 0.0, "write": 0.0, "check": 0.0}

    def timed(name: str, fn: Callable[[], object]) -> object:
        t = time.perf_counter()
        out = fn()
        steps[name] += time.perf_counter() - t
        return out

    started = time.perf_counter()
    for i in range(n):
        e = entry(i)

        def norm(e: EntryInput = e) -> object:
            with database.read() as conn:
                kinds = known_process_kinds(conn)
            return normalize_entry(e, kinds)[0]

        normalized = timed("normalize", norm)
        structure = timed(
            "structure (RDKit)",
            lambda normalized=normalized: structure_for(normalized.compound["smiles_input"]),
        )
        result = timed(
            "write",
            lambda normalized=normalized, structure=structure: database.write(
                lambda conn: write_entries(conn, [normalized], [structure], actor="bench")
            ),
        )
        timed("check", lambda result=result: check_measurements(database, result.measurement_ids))
    elapsed = time.perf_counter() - started
    database.dispose()
    return n / elapsed, {k: 1000 * v / n for k, v in steps.items()}


def run_write_only(db: str, n: int) -> float:
    """Normalize + structure + write transaction, no validation check: the storage path alone."""
    database = api.open_registry(db)
    with database.read() as conn:
        kinds = known_process_kinds(conn)
    started = time.perf_counter()
    for i in range(n):
        normalized = normalize_entry(entry(i), kinds)[0]
        structure = structure_for(normalized.compound["smiles_input"])
        database.write(
            lambda conn, normalized=normalized, structure=structure: write_entries(
                conn, [normalized], [structure], actor="bench"
            )
        )
    elapsed = time.perf_counter() - started
    database.dispose()
    return n / elapsed


def run_floor(folder: Path, n: int, synchronous: str) -> float:
    """Bare sqlite3: n single-row transactions in WAL (the cost of a commit on this disk)."""
    import sqlite3

    conn = sqlite3.connect(folder / f"floor-{synchronous}.sqlite", isolation_level=None)
    conn.execute("PRAGMA journal_mode = WAL")
    conn.execute(f"PRAGMA synchronous = {synchronous}")
    conn.execute("CREATE TABLE IF NOT EXISTS t (id INTEGER PRIMARY KEY, a TEXT, b REAL)")
    started = time.perf_counter()
    for i in range(n):
        conn.execute("BEGIN IMMEDIATE")
        conn.execute("INSERT INTO t (a, b) VALUES (?, ?)", (f"row {i}", i * 0.5))
        conn.execute("COMMIT")
    elapsed = time.perf_counter() - started
    conn.close()
    return n / elapsed


def main() -> None:
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 1000
    runs = int(sys.argv[2]) if len(sys.argv) > 2 else 3
    structure_for("CCO")  # load RDKit outside the timing
    from registry.validation import check_measurements  # noqa: F401  (pandas, likewise)

    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        api_rates = [run_api(fresh_registry(folder, f"api{r}"), n) for r in range(runs)]
        write_rates = [run_write_only(fresh_registry(folder, f"w{r}"), n) for r in range(runs)]
        batch_rates = [run_api_deferred(fresh_registry(folder, f"b{r}"), n) for r in range(runs)]
        step_runs = [run_steps(fresh_registry(folder, "steps"), max(n // 5, 50))]
        floor_normal = [run_floor(folder, n, "NORMAL") for _ in range(runs)]
        floor_full = [run_floor(folder, n, "FULL") for _ in range(runs)]
        reopen_n = max(n // 10, 50)
        reopen_rates = [run_reopen(fresh_registry(folder, f"o{r}"), reopen_n) for r in range(runs)]
    api_median = statistics.median(api_rates)
    write_median = statistics.median(write_rates)
    reopen_median = statistics.median(reopen_rates)
    print(f"add {n} single measurements, WAL on, {runs} runs each (medians)")
    print(f"  api.add_measurement (with its validation check)  {api_median:8.0f} /s")
    batch_median = statistics.median(batch_rates)
    print(f"  the same inside api.deferred_checks (one check)  {batch_median:8.0f} /s")
    print(f"  write path only (normalize+RDKit+transaction)    {write_median:8.0f} /s")
    print(f"  re-open registry before every add ({reopen_n} adds)   {reopen_median:8.0f} /s")
    print(f"  ratio write-only / api                            {write_median / api_median:8.2f}")
    print(f"  ratio api / re-open each time                     {api_median / reopen_median:8.2f}")
    normal, full = statistics.median(floor_normal), statistics.median(floor_full)
    print(f"  floor: bare sqlite3 1-row transactions, synchronous=NORMAL {normal:8.0f} /s")
    print(f"  floor: bare sqlite3 1-row transactions, synchronous=FULL   {full:8.0f} /s")
    print(f"  ratio floor(NORMAL) / api                         {normal / api_median:8.1f}")
    print(f"  one add, step by step (ms per add, {max(n // 5, 50)} adds):")
    for step in step_runs[0][1]:
        ms = step_runs[0][1][step]
        print(f"    {step:<20} {ms:7.3f} ms")
    target = 500
    for label, rate in (
        ("with a check per add", api_median),
        ("checks deferred to the end of the block", batch_median),
    ):
        verdict = "meets" if rate >= target else "below"
        print(f"  target {target}/s through the library API, {label}: {verdict} ({rate:.0f}/s)")


if __name__ == "__main__":
    main()
