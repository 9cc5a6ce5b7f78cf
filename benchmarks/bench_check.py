"""Benchmark: check 100,000 measurements end to end (load → rules → store findings).

Builds a registry of N measurements with Core inserts (70 % coalescence data, 20 % line-shape
rate points, 10 % activation parameters; about one in ten with a planted slip), then times
``check_measurements`` on the whole registry: a first run (every finding new and written), a
re-run with nothing changed, and the one-measurement check that ``add`` performs. Prints
medians and their ratio to a floor measured in the same run (reading the measurement table in
one query into pandas). Usage: python benchmarks/bench_check.py [N] [repeats]
"""

from __future__ import annotations

import math
import statistics
import sys
import tempfile
import time
from datetime import UTC, datetime
from pathlib import Path

import numpy as np
import pandas as pd
from scipy import constants as C
from sqlalchemy import delete, insert, select

from registry import api
from registry.storage.models import (
    CoalescenceObservation,
    Compound,
    Measurement,
    Process,
    RatePoint,
    Solvent,
    ValidationFinding,
)
from registry.validation import CheckConfig, check_measurements
from registry.validation.data import load_check_data
from registry.validation.engine import run_rules

R_KJ = C.R / 1000.0
KB_H = C.Boltzmann / C.Planck


def build(path: Path, n: int, seed: int = 1) -> None:
    """A registry of ``n`` measurements written with Core executemany (no ORM objects)."""
    api.init_registry(str(path))
    database = api.open_registry(str(path))
    rng = np.random.default_rng(seed)
    now = datetime.now(UTC)
    n_compounds = n - n // 20  # one measurement in twenty repeats the one before it
    with database.read() as conn:
        solvents = conn.execute(
            select(Solvent.id, Solvent.formula, Solvent.mp_k, Solvent.bp_k)
        ).all()
    kind = rng.choice(3, size=n, p=[0.7, 0.2, 0.1])
    tc = rng.uniform(180, 420, n)
    dnu = np.exp(rng.uniform(math.log(5), math.log(300), n))
    field = rng.choice([200.0, 300.0, 400.0, 500.0, 600.0, 800.0], n)
    dg_true = R_KJ * tc * np.log(KB_H * tc / (math.pi * dnu / math.sqrt(2)))
    slip = rng.random(n) < 0.1
    repeat = np.zeros(n, dtype=bool)
    repeat[np.arange(1, n, 20)] = True
    for name in ("tc", "dnu", "field", "dg_true"):
        arr = locals()[name]
        arr[repeat] = arr[np.flatnonzero(repeat) - 1]
    compound = np.cumsum(~repeat)  # 1-based compound ids; a repeat shares its predecessor's
    dg = np.where(slip, dg_true / C.calorie, dg_true + rng.normal(0, 0.2, n))
    dh = rng.uniform(40, 90, n)
    ds = rng.uniform(-40, 20, n)

    def work(conn):  # type: ignore[no-untyped-def]
        conn.execute(
            insert(Compound),
            [{"label": f"B-{i}", "name": None, "structure_ok": True, "created_at": now}
             for i in range(n_compounds)],
        )  # fmt: skip
        conn.execute(
            insert(Process),
            [{"compound_id": i + 1, "kind": "bond-rotation", "sites": "", "nucleus": "1H"}
             for i in range(n_compounds)],
        )  # fmt: skip
        rows = []
        liquid = [
            [(sid, formula) for sid, formula, mp, bp in solvents if mp < t - 35 and bp > t + 35]
            for t in range(150, 460)
        ]
        for i in range(n):
            fits = liquid[int(tc[i]) - 150] or [solvents[0][:2]]
            sid, formula = fits[int(compound[i]) % len(fits)]
            row = {
                "compound_id": int(compound[i]),
                "process_id": int(compound[i]),
                "method": ("coalescence", "lineshape", "equilibration")[kind[i]],
                "solvent_id": sid,
                "solvent_text": formula,
                "field_mhz": float(field[i]),
                "field_text": f"{field[i]:g} MHz",
                "t_min_k": float(tc[i] - 30),
                "t_min_text": f"{tc[i] - 30:.1f} K",
                "t_max_k": float(tc[i] + 30),
                "t_max_text": f"{tc[i] + 30:.1f} K",
                "dg_kj_mol": float(dg[i]),
                "dg_text": f"{dg[i]:.2f} kJ/mol",
                "dg_t_k": float(tc[i]),
                "status": "draft",
                "entered_by": "bench",
                "entered_at": now,
            }
            if kind[i] == 2:
                t = tc[i]
                row.update(
                    dh_kj_mol=float(dh[i]),
                    dh_text=f"{dh[i]:.1f} kJ/mol",
                    ds_j_mol_k=float(ds[i]),
                    ds_text=f"{ds[i]:.1f} J/(mol K)",
                    dg_kj_mol=float(dh[i] - t * ds[i] / 1000),
                    dg_text=f"{dh[i] - t * ds[i] / 1000:.2f} kJ/mol",
                    ea_kj_mol=float(dh[i] + R_KJ * t),
                    ea_text=f"{dh[i] + R_KJ * t:.2f} kJ/mol",
                )
            rows.append(row)
        conn.execute(insert(Measurement), rows)
        co = [
            {"measurement_id": int(i + 1), "tc_k": float(tc[i]), "tc_text": f"{tc[i]:.1f} K",
             "dnu_hz": float(dnu[i]), "dnu_text": f"{dnu[i]:.2f} Hz", "field_mhz": float(field[i])}
            for i in np.flatnonzero(kind == 0)
        ]  # fmt: skip
        conn.execute(insert(CoalescenceObservation), co)
        rates = []
        for i in np.flatnonzero(kind == 1):
            for t in (tc[i] - 20, tc[i] - 10, tc[i], tc[i] + 10, tc[i] + 20):
                k = KB_H * t * math.exp(-dg_true[i] / (R_KJ * t))
                rates.append({"measurement_id": int(i + 1), "t_k": float(t), "t_text": f"{t:.1f} K",
                              "k_per_s": k, "k_text": f"{k:.5g} s-1"})  # fmt: skip
        conn.execute(insert(RatePoint), rates)

    database.write(work)
    database.dispose()


CPU: dict[int, list[float]] = {}


def timed(fn, repeats: int) -> list[float]:  # type: ignore[no-untyped-def]
    """Wall times of ``repeats`` calls; their CPU times (this process) go to CPU[id(list)]."""
    out: list[float] = []
    cpu: list[float] = []
    for _ in range(repeats):
        start, cstart = time.perf_counter(), time.process_time()
        fn()
        out.append(time.perf_counter() - start)
        cpu.append(time.process_time() - cstart)
    CPU[id(out)] = cpu
    return out


def cpu_median(times: list[float]) -> float:
    return statistics.median(CPU[id(times)])


def main() -> None:
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 100_000
    repeats = int(sys.argv[2]) if len(sys.argv) > 2 else 3
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "bench.sqlite"
        t0 = time.perf_counter()
        build(path, n)
        print(f"built a registry of {n:,} measurements in {time.perf_counter() - t0:.1f} s")
        database = api.open_registry(str(path))

        def floor() -> None:
            with database.read() as conn:
                pd.DataFrame.from_records(conn.execute(select(Measurement.__table__)).all())

        def clear() -> None:
            database.write(lambda conn: conn.execute(delete(ValidationFinding)))

        def first_run() -> None:
            clear()
            report = check_measurements(database)
            first_run.counts = report.counts  # type: ignore[attr-defined]

        def phases() -> None:
            with database.read() as conn:
                t = time.perf_counter()
                data = load_check_data(conn)
                phases.load = time.perf_counter() - t  # type: ignore[attr-defined]
            t = time.perf_counter()
            run_rules(data, CheckConfig())
            phases.rules = time.perf_counter() - t  # type: ignore[attr-defined]

        floor_runs = timed(floor, repeats)
        floor_t = statistics.median(floor_runs)
        first = timed(first_run, repeats)
        again = timed(lambda: check_measurements(database), repeats)
        one = timed(lambda: check_measurements(database, [n // 2]), max(repeats, 11))
        phases()
        med_first, med_again = statistics.median(first), statistics.median(again)
        print(f"findings: {first_run.counts}")  # type: ignore[attr-defined]
        print(f"floor: read the measurement table into pandas   {floor_t:7.3f} s")
        print(f"check all, first run (all findings written)     {med_first:7.3f} s"
              f"   ({med_first / floor_t:.1f}× floor; runs {', '.join(f'{x:.2f}' for x in first)})")  # fmt: skip
        print(f"check all, nothing changed                      {med_again:7.3f} s"
              f"   ({med_again / floor_t:.1f}× floor; runs {', '.join(f'{x:.2f}' for x in again)})")  # fmt: skip
        print(f"check one measurement (what add does)           {statistics.median(one):7.3f} s")
        print(
            "CPU time of this process (medians; wall time above includes waiting for the CPU on "
            f"a shared machine): floor {cpu_median(floor_runs):.2f} s, first run "
            f"{cpu_median(first):.2f} s, nothing changed {cpu_median(again):.2f} s"
        )
        print(f"  of which: load {phases.load:.2f} s, rules {phases.rules:.2f} s")  # type: ignore[attr-defined]
        database.dispose()


if __name__ == "__main__":
    main()
