"""Import of a spreadsheet with structures against the bare pipeline, measured in the same run.

    .venv/bin/python benchmarks/bench_import.py [--rows 100000] [--repeats 3] [--format csv]

Bare pipeline (the floor): pandas read → RDKit MolFromSmiles → MolToInchiKey → one sqlite3
executemany in one transaction, single process. fluxledger: ``registry.api.import_table`` into a
fresh registry (header mapping, every value through the unit layer, structures parsed in a pool
of 2 processes with InChI, InChIKey, pattern fingerprint and mol binary, compounds, measurements,
coalescence rows and revisions written, validation rules run on the new rows). Both print
medians; the ratio is fluxledger / bare. The import's wall time is also split by phase, and CPU
time (bare; this process; the pool workers) is printed because on a shared 2-core machine the
wall-time ratio follows the other jobs' load. Nothing is asserted (RULES 5).

Molecules: the open SMILES set in the PyPI ``molsets`` wheel (``moses/dataset/data/
train.csv.gz``), read as ``find_data.molsets_smiles`` reads it (the wheel fetched once with
``pip download --no-deps molsets`` into ``benchmarks/out/wheels/``; installing molsets would drag
in torch and a pinned pomegranate that does not build on current Python).

``--reimport`` also times importing the same sheet again into the registry it just filled: every
row matched (by label), nothing changed — the path a group takes every time a student re-imports
(the three-way merge compares each row with the registry; snapshots of unchanged rows are not
written again).

``--what-if-cache`` adds a third timing with ``registry.record.units.parse_value`` memoized (an
experiment in this process only, to size a possible change to the unit layer; not a product
path).
"""

from __future__ import annotations

import argparse
import os
import resource
import sqlite3
import statistics
import sys
import tempfile
import time
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from pathlib import Path
from typing import Any

import numpy as np
import pandas as pd

sys.path.insert(0, str(Path(__file__).resolve().parent))
from find_data import molsets_smiles


def make_sheet(smiles: list[str], path: Path, fmt: str) -> None:
    """A group-style sheet: one coalescence measurement per molecule, values with units."""
    from registry.kinetics import coalescence_barrier

    n = len(smiles)
    rng = np.random.default_rng(7)
    tc = rng.integers(200, 370, n).astype(float)
    dnu = np.round(rng.uniform(5.0, 200.0, n), 1)
    dg = np.round(np.asarray(coalescence_barrier(tc, dnu).dg_kj_mol), 1)
    frame = pd.DataFrame(
        {
            "label": [f"M{i}" for i in range(n)],
            "compound": [f"C{i}" for i in range(n)],
            "SMILES": smiles,
            "method": "coalescence",
            "solvent": "toluene-d8",
            "field (MHz)": 400,
            "Tc (K)": tc.astype(int),
            "Δν (Hz)": dnu,
            "ΔG‡ (kJ/mol)": dg,
            "ref": "benchmark",
        }
    )
    if fmt == "csv":
        frame.to_csv(path, index=False)
    else:
        frame.to_excel(path, index=False, engine="openpyxl")


def bare_pipeline(path: Path, fmt: str, db: Path) -> None:
    """pandas read → MolFromSmiles → MolToInchiKey → one executemany (single process)."""
    from rdkit import Chem, RDLogger

    RDLogger.DisableLog("rdApp.*")
    frame = pd.read_csv(path) if fmt == "csv" else pd.read_excel(path, engine="calamine")
    rows = []
    for label, smi, tc, dnu, dg in zip(
        frame["label"], frame["SMILES"], frame["Tc (K)"], frame["Δν (Hz)"], frame["ΔG‡ (kJ/mol)"],
        strict=True,
    ):  # fmt: skip
        mol = Chem.MolFromSmiles(smi)
        key = Chem.MolToInchiKey(mol) if mol is not None else None
        rows.append((label, smi, key, float(tc), float(dnu), float(dg)))
    conn = sqlite3.connect(db)
    conn.execute(
        "CREATE TABLE m (label TEXT, smiles TEXT, inchikey TEXT, tc REAL, dnu REAL, dg REAL)"
    )
    with conn:
        conn.executemany("INSERT INTO m VALUES (?, ?, ?, ?, ?, ?)", rows)
    conn.close()


@contextmanager
def timing(module: Any, name: str, stages: dict[str, list[float]], key: str) -> Iterator[None]:
    """Replace ``module.name`` by a copy that adds its wall time to ``stages[key]``."""
    real = getattr(module, name)

    def timed_call(*args: Any, **kwargs: Any) -> Any:
        t0 = time.perf_counter()
        try:
            return real(*args, **kwargs)
        finally:
            stages.setdefault(key, []).append(time.perf_counter() - t0)

    setattr(module, name, timed_call)
    try:
        yield
    finally:
        setattr(module, name, real)


def cpu_seconds() -> tuple[float, float]:
    """CPU time (user + system) of this process and of its finished children (pool workers)."""
    me = resource.getrusage(resource.RUSAGE_SELF)
    children = resource.getrusage(resource.RUSAGE_CHILDREN)
    return me.ru_utime + me.ru_stime, children.ru_utime + children.ru_stime


def fluxledger_import(path: Path, db: Path, stages: dict[str, list[float]]) -> None:
    from registry import api
    from registry.io import commit, prepare, report

    api.init_registry(str(db))
    database = api.open_registry(str(db))
    phase: dict[str, list[float]] = {}
    cpu0 = cpu_seconds()
    t0 = time.perf_counter()
    try:
        with (
            timing(prepare, "prepare", phase, "read, normalize, structures"),
            timing(commit, "write_entries", phase, "write new rows (writer)"),
            timing(report, "validation_report", phase, "validation of the new rows"),
            _optional_timing(commit, "write_snapshots", phase, "snapshots (import_snapshot)"),
        ):
            # skip_bad: the set holds a few pairs of SMILES with one InChIKey (same structure),
            # which the importer refuses under two different compound labels; set aside
            summary = api.import_table(
                database, path, workers=2, skip_bad=True, rejects=db.with_suffix(".rejected.csv")
            )
    finally:
        database.dispose()
    total = time.perf_counter() - t0
    cpu1 = cpu_seconds()
    for key, values in phase.items():
        stages.setdefault(key, []).append(sum(values))
    stages.setdefault("rest (checks, write transaction, summary)", []).append(
        total - sum(sum(v) for v in phase.values())
    )
    stages.setdefault("CPU: this process", []).append(cpu1[0] - cpu0[0])
    stages.setdefault("CPU: pool workers", []).append(cpu1[1] - cpu0[1])
    if summary["rejected"]:
        print(f"  note: {summary['rejected']} row(s) set aside (same structure, other label)")


@contextmanager
def _optional_timing(
    module: Any, name: str, stages: dict[str, list[float]], key: str
) -> Iterator[None]:
    """As :func:`timing`, for a stage older code does not have (then nothing is timed)."""
    if not hasattr(module, name):
        yield
        return
    with timing(module, name, stages, key):
        yield


def fluxledger_reimport(path: Path, db: Path) -> None:
    """Import ``path`` again into the registry ``db`` it was just imported into."""
    from registry import api

    database = api.open_registry(str(db))
    try:
        summary = api.import_table(database, path, workers=2, skip_bad=True,
                                   rejects=db.with_suffix(".again.csv"))  # fmt: skip
    finally:
        database.dispose()
    if summary["added"] or summary["updated"]:
        print(f"  note: the re-import added {summary['added']}, updated {summary['updated']}")


def timed(fn: Callable[[], None], repeats: int, name: str = "") -> list[float]:
    out = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        fn()
        out.append(time.perf_counter() - t0)
        print(f"  run: {name} {out[-1]:.1f} s", flush=True)
    return out


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--rows", type=int, default=100_000)
    ap.add_argument("--repeats", type=int, default=3)
    ap.add_argument("--format", choices=("csv", "xlsx"), default="csv")
    ap.add_argument("--what-if-cache", action="store_true")
    ap.add_argument("--reimport", action="store_true", help="also time re-importing the sheet")
    args = ap.parse_args()
    os.environ.setdefault("FLUXLEDGER_USER", "bench")
    smiles = molsets_smiles(args.rows)
    with tempfile.TemporaryDirectory() as tmp:
        tmpdir = Path(tmp)
        sheet = tmpdir / f"sheet.{args.format}"
        make_sheet(smiles, sheet, args.format)
        print(f"{len(smiles)} rows ({args.format}), {len(set(smiles))} distinct SMILES, "
              f"{os.cpu_count()} cores, load average {os.getloadavg()[0]:.1f}")  # fmt: skip
        counter = iter(range(10_000))
        stages: dict[str, list[float]] = {}
        results: dict[str, list[float]] = {}
        for _ in range(args.repeats):  # interleaved, so drifting machine load hits both alike
            n = next(counter)
            cpu0 = cpu_seconds()[0]
            results.setdefault("bare", []).extend(
                timed(
                    lambda n=n: bare_pipeline(sheet, args.format, tmpdir / f"b{n}.sqlite"),
                    1,
                    "bare",
                )
            )
            stages.setdefault("CPU: bare pipeline", []).append(cpu_seconds()[0] - cpu0)
            results.setdefault("fluxledger", []).extend(
                timed(
                    lambda n=n: fluxledger_import(sheet, tmpdir / f"f{n}.sqlite", stages),
                    1,
                    "fluxledger",
                )
            )
            if args.reimport:
                results.setdefault("fluxledger re-import (unchanged)", []).extend(
                    timed(
                        lambda n=n: fluxledger_reimport(sheet, tmpdir / f"f{n}.sqlite"),
                        1,
                        "re-import",
                    )
                )
            if args.what_if_cache:
                from functools import lru_cache

                from registry.record import entry as entry_mod

                original = entry_mod.parse_value
                entry_mod.parse_value = lru_cache(maxsize=None)(original)  # experiment only
                try:
                    results.setdefault("fluxledger, parse_value memoized (what-if)", []).extend(
                        timed(
                            lambda n=n: fluxledger_import(sheet, tmpdir / f"c{n}.sqlite", {}),
                            1,
                        )
                    )
                finally:
                    entry_mod.parse_value = original
    bare = statistics.median(results["bare"])
    for name, values in results.items():
        med = statistics.median(values)
        runs = ", ".join(f"{v:.1f}" for v in values)
        print(f"{name:<45} median {med:8.2f} s   ratio {med / bare:5.2f}   (runs: {runs})")
    print("fluxledger import, wall time by phase (medians):")
    for name, values in stages.items():
        if not name.startswith("CPU"):
            print(f"  {name:<43} median {statistics.median(values):8.2f} s")
    print("CPU time (user + system; less sensitive to other jobs than wall time):")
    for name, values in stages.items():
        if name.startswith("CPU"):
            print(f"  {name[5:]:<43} median {statistics.median(values):8.2f} s")
    print(f"load average at the end {os.getloadavg()[0]:.1f}")
    print("target: fluxledger ≤ 1.5 × bare")


if __name__ == "__main__":
    main()
