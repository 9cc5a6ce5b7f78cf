"""Wall time of everyday ``fluxledger calc`` commands next to a bare ``python -c "import typer"``.

Runs each command as a fresh process, alternating the variants round by round (so a burst of
load on a shared machine hits all of them alike), and prints the median of each, its ratio to
``import typer`` and the load average before and after. Issue 15 asks for ≤ 6× on
``calc coalescence`` and ``calc eyring`` with six points; this script only reports, it never
asserts. A floor row shows what reading one unit costs before any kinetics (typer, numpy and
pint with its cached definitions).

``--part library`` times the methods behind ``calc exsy``, ``calc transfer`` and ``calc
timecourse`` as library calls (:mod:`registry.api`) in one process, on invented data of
realistic size made here: EXSY with 2, 4 and 8 sites × 5 mixing times (one fit of all volumes,
and the single-mixing-time matrix method with σ propagated), an inversion-transfer course of 20
delays and a saturation-transfer pair, a racemization course of 30 points (from a CSV file, and
the fit alone). The calls alternate round by round; medians and their ratio to the cheapest.

Python normally caches compiled modules; a shell with PYTHONDONTWRITEBYTECODE=1 recompiles
every ``registry`` module in every process (~40 files). By default the commands run as an
installed package would, with the bytecode cache on, kept in a temporary folder
(PYTHONPYCACHEPREFIX) so the source tree stays clean; ``--no-bytecode-cache`` measures the
shell's setting as it is. Run:

    PYTHONPATH=$PWD .venv/bin/python benchmarks/bench_calc.py [--runs 5] [--no-bytecode-cache]
        [--part cli|library|all] [--library-runs 15]
"""

from __future__ import annotations

import argparse
import os
import statistics
import subprocess
import sys
import tempfile
import time
from collections.abc import Callable
from pathlib import Path

EXE = Path(sys.executable).with_name("fluxledger")

#: six rate points of an invented first-order process (our own demo numbers, K and s⁻¹)
POINTS = ("280 K, 0.002", "290 K, 0.006", "300 K, 0.02", "310 K, 0.05", "320 K, 0.15", "330 K, 0.4")


def variants() -> list[tuple[str, list[str]]]:
    eyring = [str(EXE), "calc", "eyring"]
    for point in POINTS:
        eyring += ["--point", point]
    return [
        ('python -c "import typer"', [sys.executable, "-c", "import typer"]),
        (
            "floor: import typer + units (pint)",
            [sys.executable, "-c", "import typer, registry.record.units"],
        ),
        (
            "calc coalescence",
            [
                str(EXE),
                "calc",
                "coalescence",
                "--tc",
                "-12 °C",
                "--dnu",
                "0.045 ppm",
                "--mhz",
                "600",
            ],
        ),
        ("calc eyring (6 points)", eyring),
    ]


def wall(cmd: list[str], env: dict[str, str]) -> float:
    start = time.perf_counter()
    subprocess.run(cmd, capture_output=True, check=True, timeout=120, env=env)
    return time.perf_counter() - start


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--runs", type=int, default=5, help="rounds (default 5; medians)")
    parser.add_argument(
        "--no-bytecode-cache",
        action="store_true",
        help="keep the shell's PYTHONDONTWRITEBYTECODE setting (modules recompiled per process)",
    )
    parser.add_argument("--part", choices=("cli", "library", "all"), default="all")
    parser.add_argument(
        "--library-runs", type=int, default=15, help="rounds of the library calls (medians)"
    )
    args = parser.parse_args()
    if args.part in ("library", "all"):
        run_library(args.library_runs)
        if args.part == "library":
            return
        print()
    with tempfile.TemporaryDirectory(prefix="bench_calc_pyc_") as pyc:
        env = dict(os.environ)
        if not args.no_bytecode_cache:
            env.pop("PYTHONDONTWRITEBYTECODE", None)
            env["PYTHONPYCACHEPREFIX"] = pyc
        cached = "off (as the shell has it)" if env.get("PYTHONDONTWRITEBYTECODE") else "on"
        times, load_before, load_after = measure(variants(), env, args.runs)
    print(f"bytecode cache: {cached}")
    report(times, load_before, load_after, args.runs)


# --- the methods as library calls ------------------------------------------------------------


def _exsy_data(n: int, taus: list[float]) -> tuple[list[list[list[float]]], list[float]]:
    """Volumes of n sites at each mixing time, invented: populations from 1 to 2 (normalised),
    k(i→j) 0.2–1.5 s⁻¹ obeying detailed balance, R1 0.8 s⁻¹, total volume 1000, noise σ = 0.3
    (the σ the calls are given); forward model I = expm(−R·τm)·diag(M0) by scipy."""
    import numpy as np
    from scipy.linalg import expm

    rng = np.random.default_rng(n)
    p = np.linspace(1.0, 2.0, n)
    p /= p.sum()
    k = np.zeros((n, n))
    for i in range(n):
        for j in range(i + 1, n):
            k[i, j] = rng.uniform(0.2, 1.5)
            k[j, i] = k[i, j] * p[i] / p[j]
    r = -k.T.copy()
    np.fill_diagonal(r, 0.8 + k.sum(axis=1))
    mats = []
    for tau in taus:
        vol = expm(-r * tau) @ np.diag(1000.0 * p)
        mats.append((vol + rng.normal(0.0, 0.3, vol.shape)).clip(0).tolist())
    return mats, taus


def _course_files(folder: Path) -> tuple[str, str]:
    """A 20-delay inversion-transfer file and a 30-point racemization file (invented)."""
    import numpy as np
    from scipy.linalg import expm

    rng = np.random.default_rng(1)
    delays = np.geomspace(0.01, 6.0, 20)
    gen = np.array([[-0.8 - 1.5, 1.5], [1.5, -0.8 - 1.5]])
    m0, start = np.array([50.0, 50.0]), np.array([-47.0, 50.0])
    inv = folder / "inversion.csv"
    rows = [m0 + expm(gen * t) @ (start - m0) + rng.normal(0, 0.3, 2) for t in delays]
    inv.write_text(
        "delay (s),A,B\n"
        + "".join(f"{t:g},{a:.2f},{b:.2f}\n" for t, (a, b) in zip(delays, rows, strict=True)),
        encoding="utf-8",
    )
    minutes = np.linspace(0, 360, 30)
    ee = 96.0 * np.exp(-1.1e-4 * 60 * minutes) + rng.normal(0, 0.4, minutes.size)
    rac = folder / "racemization.csv"
    rac.write_text(
        "t (min),ee (%)\n" + "".join(f"{t:g},{e:.2f}\n" for t, e in zip(minutes, ee, strict=True)),
        encoding="utf-8",
    )
    return str(inv), str(rac)


def library_cases(folder: Path) -> list[tuple[str, Callable[[], object]]]:
    from registry import api
    from registry.kinetics.timecourse import fit_racemization

    taus = [0.05, 0.1, 0.2, 0.4, 0.8]
    cases: list[tuple[str, Callable[[], object]]] = []
    for n in (2, 4, 8):
        mats, _ = _exsy_data(n, taus)
        cases.append(
            (
                f"exsy {n} sites × 5 mixing times (fit)",
                lambda m=mats: api.calc_exsy(mixing=taus, volumes=m, volume_err=0.3),
            )
        )
        cases.append(
            (
                f"exsy {n} sites, 1 mixing time (matrix, σ)",
                lambda m=mats: api.calc_exsy(mixing=taus[1], volumes=m[1], volume_err=0.3),
            )
        )
    inv, rac = _course_files(folder)
    minutes, ee = _columns(rac)
    cases += [
        ("transfer: inversion, 20 delays (file + fit)", lambda: api.calc_transfer(file=inv)),
        ("transfer: saturation (ratio, T1)", lambda: api.calc_transfer(ratio=0.42, t1="1.2 s")),
        ("timecourse: 30 points (file + fit)", lambda: api.calc_timecourse(rac)),
        ("timecourse: 30 points (fit alone)", lambda: fit_racemization(minutes, ee)),
    ]
    return cases


def _columns(path: str) -> tuple[list[float], list[float]]:
    """Times in s and ee as fractions from the racemization file (for the bare fit)."""
    lines = Path(path).read_text(encoding="utf-8").splitlines()[1:]
    pairs = [tuple(map(float, line.split(","))) for line in lines]
    return [60.0 * t for t, _ in pairs], [e / 100.0 for _, e in pairs]


def run_library(runs: int) -> None:
    """Median wall time of each library call, the calls alternated round by round."""
    with tempfile.TemporaryDirectory(prefix="bench_calc_methods_") as folder:
        cases = library_cases(Path(folder))
        for _, fn in cases:  # warm-up: lazy imports (scipy, pandas, pint) are not the steady cost
            fn()
        times: dict[str, list[float]] = {name: [] for name, _ in cases}
        load_before = os.getloadavg()
        for _ in range(runs):
            for name, fn in cases:
                start = time.perf_counter()
                fn()
                times[name].append(time.perf_counter() - start)
        load_after = os.getloadavg()
    base = min(statistics.median(v) for v in times.values())
    print(f"library calls: {runs} rounds, alternated; medians (one process, imports warm)")
    print("load average before: {:.2f} {:.2f} {:.2f}".format(*load_before))
    for name, values in times.items():
        med = statistics.median(values)
        print(
            f"{name:45s} {1000 * med:9.2f} ms  (range {1000 * min(values):.2f}–"
            f"{1000 * max(values):.2f})  ×{med / base:,.0f} the cheapest"
        )
    print("load average after:  {:.2f} {:.2f} {:.2f}".format(*load_after))


def measure(
    cases: list[tuple[str, list[str]]], env: dict[str, str], runs: int
) -> tuple[dict[str, list[float]], tuple[float, ...], tuple[float, ...]]:
    """Time every case ``runs`` times, alternating; the load average around the timed rounds."""
    for _, cmd in cases:  # warm the file cache, bytecode and pint's definitions; not timed
        wall(cmd, env)
    load_before = os.getloadavg()
    times: dict[str, list[float]] = {name: [] for name, _ in cases}
    for _ in range(runs):
        for name, cmd in cases:
            times[name].append(wall(cmd, env))
    return times, load_before, os.getloadavg()


def report(
    times: dict[str, list[float]],
    load_before: tuple[float, ...],
    load_after: tuple[float, ...],
    runs: int,
) -> None:
    cases = list(times.items())
    base = statistics.median(cases[0][1])
    print(f"rounds: {runs}, variants alternated; medians of wall time per fresh process")
    print("load average before: {:.2f} {:.2f} {:.2f}".format(*load_before))
    for name, _ in cases:
        med = statistics.median(times[name])
        spread = f"{min(times[name]):.3f}–{max(times[name]):.3f}"
        print(f"{name:38s} {med:.3f} s  (range {spread})  ratio {med / base:.2f}x")
    print("load average after:  {:.2f} {:.2f} {:.2f}".format(*load_after))


if __name__ == "__main__":
    main()
