"""Build (once) and cache the 100,000-compound registry that ``bench_find.py`` searches.

The molecules are the open SMILES training set shipped inside the PyPI wheel of ``molsets``
(``moses/dataset/data/train.csv.gz``). The wheel declares heavy dependencies (torch and others)
that the benchmark does not need, so it is fetched with ``pip download --no-deps molsets`` and the
file is read straight from the wheel (a zip). Each compound gets one invented measurement (a
random barrier, method and solvent) so that ``find`` has rows to return; these values are demo
data, not chemistry.

The registry is written with :func:`registry.record.chem.read_structure` (in a process pool) and
one bulk insert per table through :class:`registry.storage.connection.Connection`, and kept under
``benchmarks/out/`` (git-ignored).
"""

from __future__ import annotations

import csv
import glob
import gzip
import io
import os
import random
import subprocess
import sys
import time
import zipfile
from concurrent.futures import ProcessPoolExecutor
from datetime import UTC, datetime
from pathlib import Path

HERE = Path(__file__).resolve().parent
OUT = HERE / "out"
WHEELS = OUT / "wheels"
MEMBER = "moses/dataset/data/train.csv.gz"


def molsets_smiles(n: int) -> list[str]:
    """The first ``n`` SMILES of the molsets training set (downloads the wheel once, no deps)."""
    wheels = sorted(glob.glob(str(WHEELS / "molsets-*.whl")))
    if not wheels:
        WHEELS.mkdir(parents=True, exist_ok=True)
        subprocess.run(
            [sys.executable, "-m", "pip", "download", "--no-deps", "molsets", "-d", str(WHEELS)],
            check=True,
        )
        wheels = sorted(glob.glob(str(WHEELS / "molsets-*.whl")))
    with zipfile.ZipFile(wheels[-1]) as wheel:
        raw = gzip.decompress(wheel.read(MEMBER)).decode("utf-8")
    reader = csv.DictReader(io.StringIO(raw))
    out: list[str] = []
    for row in reader:
        out.append(row["SMILES"])
        if len(out) >= n:
            break
    return out


def _structures(chunk: list[str]) -> list[tuple]:
    from registry.record.chem import read_structure

    rows = []
    for smi in chunk:
        s = read_structure(smi)
        rows.append(
            (
                s.smiles_input,
                s.smiles_canonical,
                s.inchi,
                s.inchikey,
                s.formula,
                s.net_charge,
                s.ok,
                s.problem,
                s.mol_binary,
                s.pattern_fp,
            )
        )
    return rows


def build_registry(path: Path, n: int, workers: int = 2) -> None:
    """Write ``n`` molsets compounds (+ one invented measurement each) into a new registry."""
    from registry import api

    t0 = time.perf_counter()
    smiles = molsets_smiles(n)
    chunks = [smiles[i : i + 2000] for i in range(0, len(smiles), 2000)]
    with ProcessPoolExecutor(workers) as pool:
        parsed = [row for part in pool.map(_structures, chunks) for row in part]
    print(f"  parsed {len(parsed)} structures in {time.perf_counter() - t0:.1f} s", flush=True)
    tmp = path.with_suffix(".building")
    for p in (tmp, Path(f"{tmp}-wal"), Path(f"{tmp}-shm")):
        p.unlink(missing_ok=True)
    api.init_registry(str(tmp))
    database = api.open_registry(str(tmp))
    now = datetime.now(UTC)
    seen: set[str] = set()
    compounds = []
    for i, row in enumerate(parsed):
        key = row[3]
        if key in seen:
            continue
        seen.add(key)
        compounds.append(
            dict(
                zip(
                    (
                        "smiles_input",
                        "smiles_canonical",
                        "inchi",
                        "inchikey",
                        "formula",
                        "net_charge",
                        "structure_ok",
                        "structure_problem",
                        "mol_binary",
                        "pattern_fp",
                    ),
                    row,
                    strict=True,
                ),
                label=f"MS{i + 1:06d}",
                created_at=now,
            )
        )
    rng = random.Random(20240611)
    methods = ["coalescence", "lineshape", "2d-exchange", "equilibration"]
    solvents = ["CDCl3", "toluene-d8", "DMSO-d6", "CD2Cl2", "C6D6"]

    def work(conn):  # type: ignore[no-untyped-def]
        from registry.record.vocab import solvent_key
        from registry.storage.writer import solvent_index

        solvent_ids = solvent_index(conn)
        conn.insert_many("compound", compounds)
        ids = conn.column("SELECT id FROM compound ORDER BY id")
        conn.insert_many(
            "measurement",
            [
                {
                    "compound_id": cid,
                    "method": rng.choice(methods),
                    "solvent_text": (solvent := rng.choice(solvents)),
                    "solvent_id": solvent_ids.get(solvent_key(solvent)),
                    "dg_kj_mol": round(rng.uniform(40.0, 120.0), 1),
                    "dg_text": None,
                    "dg_t_k": round(rng.uniform(200.0, 400.0), 1),
                    "reference": "benchmark: invented value",
                    "entered_by": "bench",
                    "entered_at": now,
                    "status": "draft",
                }
                for cid in ids
            ],
        )

    database.write(work)
    database.close()
    os.replace(tmp, path)
    print(f"  built {path.name}: {len(compounds)} compounds in {time.perf_counter() - t0:.1f} s")


def registry_path(n: int) -> Path:
    """The cached benchmark registry of ``n`` compounds, built on first use."""
    OUT.mkdir(parents=True, exist_ok=True)
    path = OUT / f"find_{n}.sqlite"
    if not path.exists():
        print(f"building the benchmark registry ({n} molsets compounds; a few minutes) …")
        build_registry(path, n)
    from registry.storage import migrate
    from registry.storage.database import open_database

    database = open_database(str(path))
    try:
        if migrate.current_revision(database) != migrate.head_revision():
            migrate.upgrade(database)  # a cached registry from an older schema
    finally:
        database.close()
    return path


if __name__ == "__main__":
    registry_path(int(sys.argv[1]) if len(sys.argv) > 1 else 100_000)
