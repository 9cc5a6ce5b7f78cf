"""Wall time of everyday ``fluxledger calc`` commands next to a bare ``python -c "import typer"``.

Runs each command as a fresh process, alternating the variants round by round (so a burst of
load on a shared machine hits all of them alike), and prints the median of each, its ratio to
``import typer`` and the load average before and after. Issue 15 asks for ≤ 6× on
``calc coalescence`` and ``calc eyring`` with six points; this script only reports, it never
asserts. A floor row shows what reading one unit costs before any kinetics (typer, numpy and
pint with its cached definitions).

Python normally caches compiled modules; a shell with PYTHONDONTWRITEBYTECODE=1 recompiles
every ``registry`` module in every process (~40 files). By default the commands run as an
installed package would, with the bytecode cache on, kept in a temporary folder
(PYTHONPYCACHEPREFIX) so the source tree stays clean; ``--no-bytecode-cache`` measures the
shell's setting as it is. Run:

    PYTHONPATH=$PWD .venv/bin/python benchmarks/bench_calc.py [--runs 5] [--no-bytecode-cache]
"""

from __future__ import annotations

import argparse
import os
import statistics
import subprocess
import sys
import tempfile
import time
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
    args = parser.parse_args()
    with tempfile.TemporaryDirectory(prefix="bench_calc_pyc_") as pyc:
        env = dict(os.environ)
        if not args.no_bytecode_cache:
            env.pop("PYTHONDONTWRITEBYTECODE", None)
            env["PYTHONPYCACHEPREFIX"] = pyc
        cached = "off (as the shell has it)" if env.get("PYTHONDONTWRITEBYTECODE") else "on"
        times, load_before, load_after = measure(variants(), env, args.runs)
    print(f"bytecode cache: {cached}")
    report(times, load_before, load_after, args.runs)


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
