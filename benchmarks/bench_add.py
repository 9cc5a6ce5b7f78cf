"""Benchmark: add single measurements through the library API (WAL on), one at a time.

Each variant starts from a fresh registry file and adds N measurements on one open registry
(real structures cycled from a small set, so compounds are both created and reused, and
coalescence data so the rules have work):

* ``api.add_measurement`` — with the validation check it runs on every new row;
* the same inside ``api.deferred_checks`` — each add commits on its own, the rules run once
  over all rows at the end of the block (inside the timing);
* the storage path alone — normalize, structure (RDKit), the write transaction; no check;
* re-opening the registry (with its schema-head check) before every add, as a caller that
  opens per call would (N/10 adds);
* one add step by step (N/5 adds): normalize, structure, write, check, timed separately;
* floors: bare ``sqlite3`` one-row transactions (synchronous NORMAL and FULL).

Rates are adds per second of wall time and of CPU time of the adding process (the machine is
shared: CPU time is what an unloaded machine would come close to). Every round runs in a fresh
process; with ``--against TREE`` (a checkout of another version) the rounds alternate between
this tree and that one, and the ratios of their medians compare the two.

Usage: python benchmarks/bench_add.py [N] [rounds] [--against TREE]
"""

from __future__ import annotations

import json
import os
import statistics
import subprocess
import sys
import tempfile
import time
from collections.abc import Callable
from pathlib import Path
from typing import Any

HERE = Path(__file__).resolve()
THIS_TREE = HERE.parent.parent
#: adds per second through the library with a check after every add (issue 15)
TARGET_PER_S = 300

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


def entry(i: int) -> Any:
    """An invented coalescence entry (most of them disagree with their own data: the checks
    then also diagnose the slip, the dearer path)."""
    from registry.record.entry import EntryInput

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


def _close(database: Any) -> None:
    (getattr(database, "close", None) or database.dispose)()  # older trees: dispose()


def _fresh(folder: Path, name: str) -> str:
    from registry import api

    path = folder / f"{name}.sqlite"
    api.init_registry(str(path))
    return str(path)


def _clocked(fn: Callable[[], None], n: int) -> dict[str, float]:
    wall, cpu = time.perf_counter(), time.process_time()
    fn()
    return {"wall": n / (time.perf_counter() - wall), "cpu": n / (time.process_time() - cpu)}


def run_api(db: str, n: int) -> dict[str, float]:
    """``api.add_measurement`` n times on one open registry."""
    from registry import api

    database = api.open_registry(db)
    entries = [entry(i) for i in range(n)]

    def work() -> None:
        for e in entries:
            api.add_measurement(database, e)

    rates = _clocked(work, n)
    _close(database)
    return rates


def run_api_deferred(db: str, n: int) -> dict[str, float]:
    """The same inside ``api.deferred_checks`` (its one check inside the timing)."""
    from registry import api

    database = api.open_registry(db)
    entries = [entry(i) for i in range(n)]

    def work() -> None:
        with api.deferred_checks(database) as block:
            for e in entries:
                api.add_measurement(database, e)
        assert block.report is not None and block.report.checked == n

    rates = _clocked(work, n)
    _close(database)
    return rates


def run_reopen(db: str, n: int) -> dict[str, float]:
    """``open_registry`` (schema-head check) before every add."""
    from registry import api

    entries = [entry(i) for i in range(n)]

    def work() -> None:
        for e in entries:
            database = api.open_registry(db)
            api.add_measurement(database, e)
            _close(database)

    return _clocked(work, n)


def run_write_only(db: str, n: int) -> dict[str, float]:
    """Normalize + structure + write transaction, no validation check: the storage path."""
    from registry import api
    from registry.record.chem import structure_for
    from registry.record.entry import normalize_entry
    from registry.storage.writer import known_process_kinds, write_entries

    database = api.open_registry(db)
    with database.read() as conn:
        kinds = known_process_kinds(conn)
    entries = [entry(i) for i in range(n)]

    def work() -> None:
        for e in entries:
            normalized = normalize_entry(e, kinds)[0]
            structure = structure_for(normalized.compound["smiles_input"])
            database.write(
                lambda conn, normalized=normalized, structure=structure: write_entries(
                    conn, [normalized], [structure], actor="bench"
                )
            )

    rates = _clocked(work, n)
    _close(database)
    return rates


def run_steps(db: str, n: int) -> dict[str, float]:
    """The steps of one add, timed separately: CPU ms per add."""
    from registry import api
    from registry.record.chem import structure_for
    from registry.record.entry import normalize_entry
    from registry.storage.writer import known_process_kinds, write_entries
    from registry.validation import check_measurements

    database = api.open_registry(db)
    steps = {"normalize": 0.0, "structure (RDKit)": 0.0, "write": 0.0, "check": 0.0}

    def timed(name: str, fn: Callable[[], Any]) -> Any:
        t = time.process_time()
        out = fn()
        steps[name] += time.process_time() - t
        return out

    for i in range(n):
        e = entry(i)

        def norm(e: Any = e) -> Any:
            with database.read() as conn:
                kinds = known_process_kinds(conn)
            return normalize_entry(e, kinds)[0]

        normalized = timed("normalize", norm)
        structure = timed(
            "structure (RDKit)", lambda n=normalized: structure_for(n.compound["smiles_input"])
        )
        result = timed(
            "write",
            lambda n=normalized, s=structure: database.write(
                lambda conn: write_entries(conn, [n], [s], actor="bench")
            ),
        )
        timed("check", lambda r=result: check_measurements(database, r.measurement_ids))
    _close(database)
    return {k: 1000 * v / n for k, v in steps.items()}


def child(n: int) -> dict[str, Any]:
    """One round of every variant, with the code on PYTHONPATH; imports outside the timings."""
    from registry.record.chem import structure_for
    from registry.validation import check_measurements  # noqa: F401  (load the rules' code)

    structure_for("CCO")  # load RDKit
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        return {
            "api": run_api(_fresh(folder, "api"), n),
            "deferred": run_api_deferred(_fresh(folder, "deferred"), n),
            "write path": run_write_only(_fresh(folder, "write"), n),
            "re-open each add": run_reopen(_fresh(folder, "reopen"), max(n // 10, 20)),
            "steps": run_steps(_fresh(folder, "steps"), max(n // 5, 50)),
        }


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


def _run_child(tree: Path, n: int) -> dict[str, Any]:
    env = {**os.environ, "PYTHONPATH": str(tree), "FLUXLEDGER_USER": "bench"}
    done = subprocess.run(
        [sys.executable, str(HERE), "--child", str(n)],
        capture_output=True, text=True, env=env, timeout=3600, check=False,
    )  # fmt: skip
    if done.returncode != 0:
        raise SystemExit(f"round with {tree} failed:\n{done.stderr}")
    return json.loads(done.stdout.strip().splitlines()[-1])


def main(argv: list[str]) -> None:
    if argv[:1] == ["--child"]:
        print(json.dumps(child(int(argv[1]))))
        return
    against = None
    if "--against" in argv:
        at = argv.index("--against")
        against = Path(argv[at + 1]).resolve()
        argv = argv[:at] + argv[at + 2 :]
    n = int(argv[0]) if argv else 1000
    rounds = int(argv[1]) if len(argv) > 1 else 3
    trees = {"this tree": THIS_TREE} | ({f"against {against}": against} if against else {})
    results: dict[str, list[dict[str, Any]]] = {name: [] for name in trees}
    floors: dict[str, list[float]] = {"NORMAL": [], "FULL": []}
    print(f"load average before: {' '.join(f'{x:.1f}' for x in os.getloadavg())}")
    with tempfile.TemporaryDirectory() as tmp:
        for _ in range(rounds):  # alternate the trees: both see the same machine load
            for name, tree in trees.items():
                results[name].append(_run_child(tree, n))
            for sync in floors:
                floors[sync].append(run_floor(Path(tmp), n, sync))
    print(f"load average after:  {' '.join(f'{x:.1f}' for x in os.getloadavg())}")
    print(f"add {n} single measurements, WAL on, {rounds} rounds (medians; adds per second)")
    variants = ("api", "deferred", "write path", "re-open each add")
    for name, rs in results.items():
        print(f"{name}:")
        for v in variants:
            wall = statistics.median(r[v]["wall"] for r in rs)
            cpu = statistics.median(r[v]["cpu"] for r in rs)
            print(f"  {v:<18} wall {wall:8.0f} /s   cpu {cpu:8.0f} /s")
        print(f"  one add step by step (CPU ms per add, {max(n // 5, 50)} adds):")
        for step in rs[0]["steps"]:
            ms = statistics.median(r["steps"][step] for r in rs)
            print(f"    {step:<20} {ms:7.3f} ms")
        api = statistics.median(r["api"]["wall"] for r in rs)
        api_cpu = statistics.median(r["api"]["cpu"] for r in rs)
        verdict = "meets" if api >= TARGET_PER_S else "below"
        print(f"  target {TARGET_PER_S}/s with a check after every add: {verdict} "
              f"(wall {api:.0f}/s, cpu {api_cpu:.0f}/s)")  # fmt: skip
    for sync, rates in floors.items():
        print(f"floor: bare sqlite3 1-row transactions, synchronous={sync}: "
              f"{statistics.median(rates):8.0f} /s")  # fmt: skip
    if against:
        new, old = results["this tree"], results[f"against {against}"]
        print("ratio this tree / other tree (medians; > 1 is faster):")
        for v in variants:
            for kind in ("wall", "cpu"):
                a = statistics.median(r[v][kind] for r in new)
                b = statistics.median(r[v][kind] for r in old)
                print(f"  {v:<18} {kind:<4} {a / b:7.2f}")


if __name__ == "__main__":
    main(sys.argv[1:])
