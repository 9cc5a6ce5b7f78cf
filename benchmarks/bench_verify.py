"""``fluxledger verify`` on a 100,000-measurement registry with a history to replay.

verify reads the whole history once (oldest first), replays each measurement, holds every
stored row against it, and derives the findings again where nothing changed since the last
check of the whole registry; it should stay usable on a large registry. Each run is a new
process, as a user runs it; the figure is the median. With ``--compare TREE`` the runs alternate
between this source tree and another one (e.g. a checkout of an earlier commit, put first on
PYTHONPATH), so that the machine's load falls on both alike, and the ratio of the medians is
printed. Nothing is asserted.

The registry (built once under ``benchmarks/out/``; invented demo data, not chemistry): N
coalescence and line-shape measurements of labelled compounds (no structures, so that building
it costs no RDKit time), imported from one sheet, checked, then a few hundred edits,
retractions, status changes and rate points through the library, and a last check of the
whole registry — so that verify replays every kind of revision and derives the findings of
every measurement again (its most expensive case).

Usage: ``python benchmarks/bench_verify.py [--n 100000] [--repeats 3] [--compare TREE]
[--registry FILE]`` (``--registry`` times a copy of an existing registry file instead).
"""

from __future__ import annotations

import argparse
import csv
import os
import random
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
OUT = HERE / "out"
SOURCE = HERE.parent
EXE = Path(sys.executable).with_name("fluxledger")


def _rows(n: int) -> list[dict[str, object]]:
    rng = random.Random(20261205)
    rows = []
    for i in range(n):
        row: dict[str, object] = {
            "compound": f"VF{i:06d}",
            "label": f"run-{i}",
            "process": "bond-rotation",
            "nucleus": "1H",
            "solvent": rng.choice(["CDCl3", "toluene-d8", "DMSO-d6", "CD2Cl2"]),
            "field": "400 MHz",
            "reference": "benchmark: invented value",
        }
        if i % 50:
            row.update(method="coalescence", tc=f"{rng.uniform(230, 350):.1f} K",
                       dnu=f"{rng.uniform(8, 120):.1f} Hz",
                       dg=f"{rng.uniform(45, 75):.1f} kJ/mol")  # fmt: skip
        else:
            row.update(method="lineshape", dg="60.0 kJ/mol", dg_t="298.15 K",
                       rates="1.2 s-1 @ 250 K; 12 s-1 @ 270 K; 85 s-1 @ 290 K")  # fmt: skip
        rows.append(row)
    return rows


def build(n: int) -> Path:
    """The registry of the module docstring, built on first use."""
    from registry import api

    path = OUT / f"verify_{n}.sqlite"
    if path.exists():
        return path
    OUT.mkdir(parents=True, exist_ok=True)
    print(f"building {path.name} ({n:,} invented measurements, then changes) …", flush=True)
    t0 = time.perf_counter()
    tmp = path.with_suffix(".building")
    for p in (tmp, Path(f"{tmp}-wal"), Path(f"{tmp}-shm")):
        p.unlink(missing_ok=True)
    api.init_registry(str(tmp))
    rows = _rows(n)
    sheet = OUT / f"verify_{n}_rows.csv"
    columns = ["compound", "label", "process", "nucleus", "solvent", "field", "method", "tc",
               "dnu", "dg", "dg_t", "rates", "reference"]  # fmt: skip
    with open(sheet, "w", newline="", encoding="utf-8") as out:
        writer = csv.DictWriter(out, fieldnames=columns)
        writer.writeheader()
        writer.writerows(rows)
    database = api.open_registry(str(tmp))
    try:
        api.import_table(database, sheet, actor="bench")
        api.check(database, actor="bench")
        _changes(api, database, n)
        api.check(database, actor="bench")  # every measurement unchanged since: all compared
    finally:
        database.close()
    sheet.unlink()
    os.replace(tmp, path)
    print(f"  built in {time.perf_counter() - t0:.1f} s", flush=True)
    return path


def _changes(api, database, n: int) -> None:  # type: ignore[no-untyped-def]
    rng = random.Random(5)
    ids = rng.sample(range(1, n + 1), 400)
    for k, mid in enumerate(ids):
        if k % 4 == 0:
            api.edit_measurement(database, mid, {"reference": f"notebook {k}"}, actor="ed")
        elif k % 4 == 1:
            api.edit_measurement(
                database, mid, {"solvent": "CDCl3", "field": "500 MHz"}, actor="ed"
            )
        elif k % 4 == 2:
            api.retract_measurement(database, mid, "benchmark", actor="ed")
        else:
            api.add_rate_points(
                database, mid, [{"t_k": 300.0, "t_text": "300 K", "k_per_s": 10.0,
                                 "k_text": "10 s-1"}], actor="ed",
            )  # fmt: skip


def _time(tree: Path, db: Path) -> float:
    env = {**os.environ, "PYTHONPATH": str(tree), "FLUXLEDGER_USER": "bench"}
    start = time.perf_counter()
    done = subprocess.run(
        [str(EXE), "--db", str(db), "verify", "--json"],
        env=env, capture_output=True, text=True, timeout=1800,
    )  # fmt: skip
    took = time.perf_counter() - start
    if done.returncode not in (0, 1):
        raise SystemExit(f"verify failed ({done.returncode}) with {tree}:\n{done.stderr}")
    return took


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--n", type=int, default=100_000)
    parser.add_argument("--repeats", type=int, default=3)
    parser.add_argument("--compare", type=Path, help="another source tree to alternate with")
    parser.add_argument("--registry", type=Path, help="time a copy of this registry file")
    args = parser.parse_args()
    source = args.registry or build(args.n)
    with tempfile.TemporaryDirectory() as tmp:
        db = Path(tmp) / "verify.sqlite"
        shutil.copyfile(source, db)  # verify only reads, but the original stays untouched
        trees = [SOURCE] + ([args.compare.resolve()] if args.compare else [])
        times: dict[Path, list[float]] = {t: [] for t in trees}
        for _ in range(args.repeats):
            for tree in trees:
                times[tree].append(_time(tree, db))
    print(f"verify of {source.name} ({source.stat().st_size / 1e6:.0f} MB), "
          f"{args.repeats} runs each, alternating")  # fmt: skip
    medians = {t: statistics.median(v) for t, v in times.items()}
    for tree, values in times.items():
        runs = ", ".join(f"{v:.2f}" for v in values)
        print(f"  {tree}: median {medians[tree]:.2f} s  ({runs})")
    if args.compare:
        print(f"  ratio {SOURCE.name} / {args.compare.name}: "
              f"{medians[SOURCE] / medians[args.compare.resolve()]:.2f}")  # fmt: skip


if __name__ == "__main__":
    main()
