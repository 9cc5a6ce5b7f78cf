"""Benchmark: check 100,000 measurements end to end (load → rules → store findings).

Builds a registry of N measurements with bulk inserts (70 % coalescence data, 20 % line-shape
rate points, 10 % activation parameters; about one in ten with a planted slip; one in twenty a
repeat of the one before), then times ``check_measurements`` on the whole registry: a first
run (every finding new and written), a re-run with nothing changed, and the one-measurement
check that ``add`` performs. Prints medians, the CPU time of the checking process, and the
ratio to a floor timed in the same process (reading the measurement table's rows).

Each timing round runs in a fresh process. With ``--against TREE`` (a checkout of another
version, e.g. a ``git worktree`` of an older commit) the rounds alternate between this tree and
that one on the same registry file, so both see the same machine load; the ratios of their
medians compare the two versions.

Usage: python benchmarks/bench_check.py [N] [rounds] [--against TREE]
"""

from __future__ import annotations

import json
import math
import os
import statistics
import subprocess
import sys
import tempfile
import time
from datetime import UTC, datetime
from pathlib import Path
from typing import Any

HERE = Path(__file__).resolve()
THIS_TREE = HERE.parent.parent


def _draw(n: int, seed: int, solvents: list[tuple[Any, ...]]) -> dict[str, Any]:
    """The generated values: kinds, Tc, Δν, fields, true and reported barriers, repeats."""
    import numpy as np
    from scipy import constants as C

    r_kj, kb_h = C.R / 1000.0, C.Boltzmann / C.Planck
    rng = np.random.default_rng(seed)
    d: dict[str, Any] = {"n": n, "r_kj": r_kj, "kb_h": kb_h}
    d["kind"] = rng.choice(3, size=n, p=[0.7, 0.2, 0.1])
    tc = d["tc"] = rng.uniform(180, 420, n)
    dnu = d["dnu"] = np.exp(rng.uniform(math.log(5), math.log(300), n))
    field = d["field"] = rng.choice([200.0, 300.0, 400.0, 500.0, 600.0, 800.0], n)
    # Gutowsky–Holm k_c = πΔν/√2 and the Eyring equation (constants: CODATA via scipy)
    dg_true = d["dg_true"] = r_kj * tc * np.log(kb_h * tc / (math.pi * dnu / math.sqrt(2)))
    slip = rng.random(n) < 0.1
    repeat = np.zeros(n, dtype=bool)
    repeat[np.arange(1, n, 20)] = True
    for arr in (tc, dnu, field, dg_true):
        arr[repeat] = arr[np.flatnonzero(repeat) - 1]
    d["compound"] = np.cumsum(~repeat) - 1  # a repeat shares its predecessor's compound
    d["dg"] = np.where(slip, dg_true / C.calorie, dg_true + rng.normal(0, 0.2, n))
    d["dh"] = rng.uniform(40, 90, n)
    d["ds"] = rng.uniform(-40, 20, n)
    d["liquid"] = [
        [(sid, formula) for sid, formula, mp, bp in solvents if mp < t - 35 and bp > t + 35]
        or [solvents[0][:2]]
        for t in range(150, 460)
    ]
    return d


def _measurement_row(d: dict[str, Any], i: int, compound_id: int, process_id: int,
                     now: datetime) -> dict[str, Any]:  # fmt: skip
    tc, dg, kind = d["tc"][i], d["dg"][i], d["kind"][i]
    fits = d["liquid"][int(tc) - 150]
    sid, formula = fits[int(d["compound"][i]) % len(fits)]
    row = {
        "compound_id": compound_id, "process_id": process_id,
        "method": ("coalescence", "lineshape", "equilibration")[kind],
        "solvent_id": sid, "solvent_text": formula,
        "field_mhz": float(d["field"][i]), "field_text": f"{d['field'][i]:g} MHz",
        "t_min_k": float(tc - 30), "t_min_text": f"{tc - 30:.1f} K",
        "t_max_k": float(tc + 30), "t_max_text": f"{tc + 30:.1f} K",
        "dg_kj_mol": float(dg), "dg_text": f"{dg:.2f} kJ/mol", "dg_t_k": float(tc),
        "dh_kj_mol": None, "dh_text": None, "ds_j_mol_k": None, "ds_text": None,
        "ea_kj_mol": None, "ea_text": None,
        "status": "draft", "entered_by": "bench", "entered_at": now,
    }  # fmt: skip
    if kind == 2:  # activation parameters: ΔG‡ = ΔH‡ − TΔS‡, Ea = ΔH‡ + RT
        dh, ds, r_kj = d["dh"][i], d["ds"][i], d["r_kj"]
        row.update(
            dh_kj_mol=float(dh), dh_text=f"{dh:.1f} kJ/mol",
            ds_j_mol_k=float(ds), ds_text=f"{ds:.1f} J/(mol K)",
            dg_kj_mol=float(dh - tc * ds / 1000), dg_text=f"{dh - tc * ds / 1000:.2f} kJ/mol",
            ea_kj_mol=float(dh + r_kj * tc), ea_text=f"{dh + r_kj * tc:.2f} kJ/mol",
        )  # fmt: skip
    return row


def _write(conn: Any, d: dict[str, Any], now: datetime) -> None:
    import numpy as np

    n_compounds = int(d["compound"][-1]) + 1
    compound_ids = conn.insert_many(
        "compound",
        [{"label": f"B-{i}", "structure_ok": True, "created_at": now} for i in range(n_compounds)],
        new_ids=True,
    )
    process_ids = conn.insert_many(
        "process",
        [{"compound_id": c, "kind": "bond-rotation", "sites": "", "nucleus": "1H"}
         for c in compound_ids],
        new_ids=True,
    )  # fmt: skip
    rows = [
        _measurement_row(d, i, compound_ids[c], process_ids[c], now)
        for i, c in enumerate(d["compound"].tolist())
    ]
    ids = conn.insert_many("measurement", rows, new_ids=True)
    tc, dnu, field, kind = d["tc"], d["dnu"], d["field"], d["kind"]
    conn.insert_many(
        "coalescence",
        [{"measurement_id": ids[i], "tc_k": float(tc[i]), "tc_text": f"{tc[i]:.1f} K",
          "dnu_hz": float(dnu[i]), "dnu_text": f"{dnu[i]:.2f} Hz", "field_mhz": float(field[i])}
         for i in np.flatnonzero(kind == 0)],
    )  # fmt: skip
    rates = []
    for i in np.flatnonzero(kind == 1):
        for t in (tc[i] - 20, tc[i] - 10, tc[i], tc[i] + 10, tc[i] + 20):
            k = d["kb_h"] * t * math.exp(-d["dg_true"][i] / (d["r_kj"] * t))  # Eyring
            rates.append({"measurement_id": ids[i], "t_k": float(t), "t_text": f"{t:.1f} K",
                          "k_per_s": k, "k_text": f"{k:.5g} s-1"})  # fmt: skip
    conn.insert_many("rate_point", rates)


def build(path: Path, n: int, seed: int = 1) -> None:
    """A registry of ``n`` measurements written with one bulk insert per table."""
    from registry import api

    api.init_registry(str(path))
    database = api.open_registry(str(path))
    with database.read() as conn:
        solvents = conn.rows("SELECT id, formula, mp_k, bp_k FROM solvent ORDER BY id")
    draw = _draw(n, seed, solvents)
    now = datetime.now(UTC)
    database.write(lambda conn: _write(conn, draw, now))
    database.close()


# ---------------------------------------------------------------- one timing round (child)


def _execute(conn: Any, sql: str) -> Any:
    """SQL text on this tree's Connection, or on an older tree's SQLAlchemy connection."""
    if hasattr(conn, "rows"):
        return conn.rows(sql) if sql.lstrip().upper().startswith("SELECT") else conn.execute(sql)
    from sqlalchemy import text

    result = conn.execute(text(sql))
    return result.all() if sql.lstrip().upper().startswith("SELECT") else result


def timed_round(path: str, repeats: int) -> dict[str, Any]:
    """Time the checks on the registry at ``path`` with whatever code is on the path."""
    from registry import api
    from registry.validation import CheckConfig, check_measurements
    from registry.validation.data import load_check_data
    from registry.validation.engine import run_rules

    database = api.open_registry(path)
    with database.read() as conn:
        n = len(_execute(conn, "SELECT id FROM measurement"))
    out: dict[str, Any] = {"wall": {}, "cpu": {}}

    def clock(name: str, fn: Any) -> Any:
        w, c = time.perf_counter(), time.process_time()
        result = fn()
        out["wall"].setdefault(name, []).append(time.perf_counter() - w)
        out["cpu"].setdefault(name, []).append(time.process_time() - c)
        return result

    def floor() -> None:
        with database.read() as conn:
            _execute(conn, "SELECT * FROM measurement")

    def first() -> None:
        database.write(lambda conn: _execute(conn, "DELETE FROM validation_finding"))
        out["counts"] = dict(check_measurements(database).counts)

    for _ in range(repeats):
        clock("floor", floor)
        clock("first run", first)
        clock("nothing changed", lambda: check_measurements(database))
    for k in range(11):
        clock("one measurement", lambda k=k: check_measurements(database, [1 + (n // 11) * k]))
    with database.read() as conn:
        data = clock("load", lambda: load_check_data(conn))
    clock("rules", lambda: run_rules(data, CheckConfig()))
    (getattr(database, "close", None) or database.dispose)()  # older trees: dispose()
    return out


# ---------------------------------------------------------------- the driver


def _run_child(tree: Path, path: Path, repeats: int) -> dict[str, Any]:
    env = {**os.environ, "PYTHONPATH": str(tree), "FLUXLEDGER_USER": "bench"}
    done = subprocess.run(
        [sys.executable, str(HERE), "--child", str(path), str(repeats)],
        capture_output=True, text=True, env=env, timeout=3600, check=False,
    )  # fmt: skip
    if done.returncode != 0:
        raise SystemExit(f"timing round with {tree} failed:\n{done.stderr}")
    return json.loads(done.stdout.strip().splitlines()[-1])


def _median(rounds: list[dict[str, Any]], kind: str, name: str) -> float:
    return statistics.median(x for r in rounds for x in r[kind][name])


def main(argv: list[str]) -> None:
    if argv[:1] == ["--child"]:
        print(json.dumps(timed_round(argv[1], int(argv[2]))))
        return
    against = None
    if "--against" in argv:
        at = argv.index("--against")
        against = Path(argv[at + 1]).resolve()
        argv = argv[:at] + argv[at + 2 :]
    n = int(argv[0]) if argv else 100_000
    rounds = int(argv[1]) if len(argv) > 1 else 3
    trees = {"this tree": THIS_TREE} | ({f"against {against}": against} if against else {})
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "bench.sqlite"
        t0 = time.perf_counter()
        build(path, n)
        print(f"built a registry of {n:,} measurements in {time.perf_counter() - t0:.1f} s")
        print(f"load average before: {' '.join(f'{x:.1f}' for x in os.getloadavg())}")
        results: dict[str, list[dict[str, Any]]] = {name: [] for name in trees}
        for _ in range(rounds):  # alternate the trees: both see the same machine load
            for name, tree in trees.items():
                results[name].append(_run_child(tree, path, 1))
        print(f"load average after:  {' '.join(f'{x:.1f}' for x in os.getloadavg())}")
    steps = ("floor", "first run", "nothing changed", "one measurement", "load", "rules")
    for name, rs in results.items():
        print(f"{name}: findings {rs[0].get('counts')}")
        floor = _median(rs, "wall", "floor")
        for step in steps:
            wall, cpu = _median(rs, "wall", step), _median(rs, "cpu", step)
            ratio = (
                f"  ({wall / floor:.1f}× floor)" if step in ("first run", "nothing changed") else ""
            )
            print(f"  {step:<26} wall {wall:8.3f} s   cpu {cpu:8.3f} s{ratio}")
    if against:
        new, old = results["this tree"], results[f"against {against}"]
        print("ratio this tree / other tree (medians of the alternating rounds; < 1 is faster):")
        for step in steps[1:]:
            print(
                f"  {step:<26} wall {_median(new, 'wall', step) / _median(old, 'wall', step):6.2f}"
                f"   cpu {_median(new, 'cpu', step) / _median(old, 'cpu', step):6.2f}"
            )


if __name__ == "__main__":
    main(sys.argv[1:])
