"""ΔG‡ at a common temperature: what ``--at`` adds to ``list`` and ``find``.

``list --at T`` and ``find --at T`` compute ΔH‡ − T·ΔS‡ (and the measured range) in SQL for every
row instead of reading the cached listing, so they are expected to cost a little more than the
plain commands. Each command runs as a new process (as a user runs it), the variants alternate so
the machine's load falls on all alike; the figures are medians and ratios of medians (printed,
never asserted).

The registry: a copy of the everyday benchmark's 10,000-measurement registry
(``bench_everyday.py`` builds it under ``benchmarks/out/``; invented demo data), brought to the
current schema, with ΔH‡/ΔS‡ set on every 5th measurement (invented: 60 kJ/mol, −10 J/(mol·K),
measured 280–320 K) so that ``--at`` has values to compute and sort.

Usage: ``python benchmarks/bench_at_temperature.py [--repeats 5]``
"""

from __future__ import annotations

import argparse
import os
import shutil
import sqlite3
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
OUT = HERE / "out"
EXE = Path(sys.executable).with_name("fluxledger")


def _registry(work: Path) -> Path:
    source = OUT / "everyday_10000.sqlite"
    if not source.exists():
        subprocess.run([sys.executable, str(HERE / "bench_everyday.py"), "--repeats", "1"],
                       check=True, timeout=3600)  # fmt: skip
    db = work / "at.sqlite"
    shutil.copy(source, db)
    from registry import api

    if api.schema_state(str(db)).get("pending"):
        api.upgrade_schema(str(db), no_backup=True)
    conn = sqlite3.connect(db)
    with conn:
        conn.execute(
            "UPDATE measurement SET dh_kj_mol = 60.0, ds_j_mol_k = -10.0, t_min_k = 280.0, "
            "t_max_k = 320.0 WHERE id % 5 = 0"
        )
    conn.close()
    return db


def _run(args: list[str], env: dict[str, str]) -> float:
    start = time.perf_counter()
    subprocess.run([str(EXE), *args], env=env, check=True, capture_output=True, timeout=600)
    return time.perf_counter() - start


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--repeats", type=int, default=5)
    repeats = parser.parse_args().repeats
    with tempfile.TemporaryDirectory() as tmp:
        db = _registry(Path(tmp))
        env = {**os.environ, "FLUXLEDGER_DB": str(db)}
        variants = {
            "list --limit 20": ["list", "--limit", "20"],
            "list --at --limit 20": ["list", "--at", "298.15 K", "--limit", "20"],
            "list --at --sort barrier --limit 20": [
                "list",
                "--at",
                "298.15 K",
                "--sort",
                "-barrier",
                "--limit",
                "20",
            ],
            "list --json (all)": ["list", "--json"],
            "list --at --json (all)": ["list", "--at", "298.15 K", "--json"],
            "find amide --limit 20": ["find", "--smarts", "C(=O)N", "--limit", "20"],
            "find amide --at --limit 20": [
                "find",
                "--smarts",
                "C(=O)N",
                "--at",
                "298.15 K",
                "--limit",
                "20",
            ],
        }
        for args in variants.values():  # warm the caches (listing, index) once
            _run(args, env)
        times: dict[str, list[float]] = {name: [] for name in variants}
        for _ in range(repeats):
            for name, args in variants.items():
                times[name].append(_run(args, env))
    med = {name: statistics.median(t) for name, t in times.items()}
    print(f"{'command':40s} {'median s':>9s}")
    for name, m in med.items():
        print(f"{name:40s} {m:9.3f}")
    pairs = [("list --at --limit 20", "list --limit 20"),
             ("list --at --sort barrier --limit 20", "list --limit 20"),
             ("list --at --json (all)", "list --json (all)"),
             ("find amide --at --limit 20", "find amide --limit 20")]  # fmt: skip
    for a, b in pairs:
        print(f"ratio {a} / {b}: {med[a] / med[b]:.2f}")


if __name__ == "__main__":
    main()
