"""Everyday commands on a 10,000-measurement registry, each against ``python -c "import typer"``.

What a chemist types many times a day should cost little more than starting Python with the CLI
library. Every command runs as a new process (as a user runs it), alternating with the bare
``import typer`` process, so the machine's load falls on both alike; the figures are medians
and the ratio of medians. Targets (issue 15; printed, never asserted): ``show``, ``list --limit
20``, ``edit``, ``check --id``, ``calc coalescence``, ``calc eyring`` (6 points) and a selective
``find`` within 6×; ``add`` (with its checks) within 8×; ``plot eyring`` within 12×. The library
figure: ``api.add_measurement`` with the check after every add, adds per second (target ≥ 300).

The registry: the first 10,000 molecules of the open molsets SMILES set (``find_data.py`` reads
them from the wheel), each with one invented coalescence measurement (demo data, not chemistry),
every 50th with six invented rate points; built once under ``benchmarks/out/``.

Usage: ``python benchmarks/bench_everyday.py [--repeats 5]``
"""

from __future__ import annotations

import argparse
import os
import random
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))

from find_data import molsets_smiles  # noqa: E402

N = 10_000
OUT = HERE / "out"
EXE = Path(sys.executable).with_name("fluxledger")

RATES = [  # six invented (T, k) pairs on one Eyring line (demo data)
    ("250 K", "1.2 s-1"), ("260 K", "4.0 s-1"), ("270 K", "12 s-1"),
    ("280 K", "33 s-1"), ("290 K", "85 s-1"), ("300 K", "2.0e2 s-1"),
]  # fmt: skip


def _entry(i: int, smiles: str, rng: random.Random) -> dict[str, object]:
    tc = rng.uniform(230.0, 350.0)
    dnu = rng.uniform(8.0, 120.0)
    entry: dict[str, object] = {
        "method": "coalescence" if i % 50 else "lineshape",
        "smiles": smiles,
        "compound": f"EV{i:05d}",
        "process": "bond-rotation",
        "nucleus": "1H",
        "solvent": rng.choice(["CDCl3", "toluene-d8", "DMSO-d6", "CD2Cl2"]),
        "field": "400 MHz",
        "reference": "benchmark: invented value",
    }
    if i % 50:
        entry.update(tc=f"{tc:.1f} K", dnu=f"{dnu:.1f} Hz", dg=f"{rng.uniform(45, 75):.1f} kJ/mol")
    else:
        entry.update(rates=list(RATES), dg="60.0 kJ/mol", dg_t="298.15 K")
    return entry


def registry_path() -> Path:
    """The 10,000-measurement registry, built on first use (through the library's writer)."""
    from registry import api

    path = OUT / f"everyday_{N}.sqlite"
    if path.exists():
        return path
    OUT.mkdir(parents=True, exist_ok=True)
    print(f"building {path.name} ({N:,} molsets molecules, one invented measurement each) …")
    t0 = time.perf_counter()
    tmp = path.with_suffix(".building")
    for p in (tmp, Path(f"{tmp}-wal"), Path(f"{tmp}-shm")):
        p.unlink(missing_ok=True)
    api.init_registry(str(tmp))
    rng = random.Random(20261204)
    rows = [_entry(i, s, rng) for i, s in enumerate(molsets_smiles(N))]
    csv = OUT / "everyday_rows.csv"
    _write_csv(csv, rows)
    database = api.open_registry(str(tmp))
    try:
        api.import_table(database, csv, actor="bench")
    finally:
        database.close()
    os.replace(tmp, path)
    print(f"  built in {time.perf_counter() - t0:.1f} s")
    return path


def _write_csv(path: Path, rows: list[dict[str, object]]) -> None:
    """The entries as a spreadsheet a group would keep; rate points go in one ``rates`` cell."""
    import csv

    columns = ["compound", "smiles", "process", "nucleus", "solvent", "field", "method",
               "tc", "dnu", "dg", "dg_t", "rates", "reference"]  # fmt: skip
    with open(path, "w", newline="", encoding="utf-8") as out:
        writer = csv.DictWriter(out, fieldnames=columns)
        writer.writeheader()
        for row in rows:
            cells = {k: v for k, v in row.items() if k != "rates"}
            if "rates" in row:
                cells["rates"] = "; ".join(f"{k} @ {t}" for t, k in row["rates"])  # type: ignore[attr-defined]
            writer.writerow(cells)


def _run(args: list[str], env: dict[str, str]) -> float:
    start = time.perf_counter()
    done = subprocess.run(args, env=env, capture_output=True, text=True, timeout=600)
    took = time.perf_counter() - start
    if done.returncode not in (0, 1):  # 1: findings are fine here
        raise SystemExit(f"{' '.join(args)} failed ({done.returncode}):\n{done.stderr}")
    return took


def commands(db: Path, work: Path) -> dict[str, tuple[list[str], float]]:
    """Command name → (argv factory result, target ratio)."""
    from registry import api

    database = api.open_registry(str(db))
    try:
        with database.read() as conn:
            coalescence_id = conn.scalar(
                "SELECT min(m.id) FROM measurement m JOIN coalescence co ON co.measurement_id = m.id"
            )
            rates_id = conn.scalar("SELECT min(measurement_id) FROM rate_point")
    finally:
        database.close()
    fl = str(EXE)
    points = [a for t, k in RATES for a in ("--point", f"{t}, {k}")]
    add = [fl, "add", "--method", "coalescence", "--compound", "EV-NEW-{n}", "--smiles",
           "CN(C)C(=O)c1ccc(Cl)cc1", "--tc", "-12 °C", "--dnu", "18 Hz", "--dg", "14.2 kcal/mol"]  # fmt: skip
    return {
        "show": ([fl, "show", str(coalescence_id)], 6.0),
        "list --limit 20": ([fl, "list", "--limit", "20"], 6.0),
        "edit": ([fl, "edit", str(coalescence_id), "--set", "reference=bench {n}"], 6.0),
        "check --id": ([fl, "check", "--id", str(coalescence_id)], 6.0),
        "calc coalescence": ([fl, "calc", "coalescence", "--tc", "-12 °C", "--dnu", "18 Hz"], 6.0),
        "calc eyring (6 points)": ([fl, "calc", "eyring", *points], 6.0),
        "find (selective)": ([fl, "find", "--motif", "thioamide"], 6.0),
        "add": (add, 8.0),
        "plot eyring": ([fl, "plot", "eyring", str(rates_id), "-o", str(work / "e.png")], 12.0),
    }


def library_adds(db: Path, n: int = 300) -> float:
    """Adds per second through ``api.add_measurement`` with its check after every add."""
    import shutil

    from registry import api

    with tempfile.TemporaryDirectory() as tmp:
        copy = Path(tmp) / "r.sqlite"
        shutil.copyfile(db, copy)
        database = api.open_registry(str(copy))
        try:
            api.add_measurement(database, _add_entry(-1))  # loads units and RDKit once
            start = time.perf_counter()
            for i in range(n):
                api.add_measurement(database, _add_entry(i))
            return n / (time.perf_counter() - start)
        finally:
            database.close()


def _add_entry(i: int) -> dict[str, object]:
    return {
        "method": "coalescence", "compound": "LIB-AMIDE", "smiles": "CN(C)C(=O)c1ccc(Cl)cc1",
        "solvent": "CDCl3", "field": "400 MHz", "tc": f"{250 + i % 40} K", "dnu": "18 Hz",
        "dg": "14.2 kcal/mol",
    }  # fmt: skip


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeats", type=int, default=5)
    parser.add_argument("--only", action="append", help="time only these commands (repeatable)")
    args = parser.parse_args()
    db = registry_path()
    with tempfile.TemporaryDirectory() as tmp:
        work = Path(tmp)
        copy = work / "r.sqlite"
        import shutil

        shutil.copyfile(db, copy)
        env = {**os.environ, "FLUXLEDGER_DB": str(copy), "FLUXLEDGER_USER": "bench"}
        # as on a user's machine: Python keeps the compiled modules between runs
        env.pop("PYTHONDONTWRITEBYTECODE", None)
        cases = commands(copy, work)
        if args.only:
            cases = {k: v for k, v in cases.items() if k in args.only}
        bare = [sys.executable, "-c", "import typer"]
        for argv, _ in cases.values():  # warm the file cache and build search caches once
            _run([a.replace("{n}", "warm") for a in argv], env)
        print(f"{args.repeats} alternating runs each; load average {os.getloadavg()[0]:.2f}")
        print(f"{'command':<26}{'median s':>9}{'typer s':>9}{'ratio':>7}{'target':>8}  met")
        print("-" * 64)
        ratios = {}
        for name, (argv, target) in cases.items():
            own, base = [], []
            for n in range(args.repeats):
                base.append(_run(bare, env))
                own.append(_run([a.replace("{n}", str(n)) for a in argv], env))
            med, bmed = statistics.median(own), statistics.median(base)
            ratios[name] = med / bmed
            met = "yes" if med / bmed <= target else "NO"
            print(f"{name:<26}{med:>9.3f}{bmed:>9.3f}{med / bmed:>7.1f}{target:>7.0f}×  {met}")
        print(f"load average after: {os.getloadavg()[0]:.2f}")
    rate = library_adds(db)
    print(f"library: api.add_measurement with its checks, {rate:,.0f} adds/s (target ≥ 300)")


if __name__ == "__main__":
    main()
