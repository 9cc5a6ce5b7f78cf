"""Wall time of ``fluxledger plot eyring`` (six stored rate points, one PNG) on a 10,000-measurement
registry, next to a bare ``python -c "import typer"``.

The commands alternate (typer, plot, floor, typer, plot, floor, …) so that load on the shared
machine hits them alike; the floor is numpy and matplotlib's Figure + Agg drawing one line into
one PNG, what any PNG plot pays. The script prints the median of each, the ratios to typer and
the load average before and after. The registry is built once under ``benchmarks/out/`` (git-ignored) from invented demo
values: compounds without structures, one measurement each, and six rate points per measurement
made with the Eyring equation from an invented ΔH‡/ΔS‡ with a little scatter — demo data, not
chemistry. It also prints which heavy libraries the command imports (it should need only numpy
and matplotlib's object API). It also times the print style (a single journal column,
600 dpi PNG, and the same as PDF), alternated with the rest, as ratios to the screen PNG.

Run: ``PYTHONPATH=$PWD .venv/bin/python benchmarks/bench_plot.py [--runs 5] [--size 10000]``
"""

from __future__ import annotations

import argparse
import math
import os
import random
import statistics
import subprocess
import sys
import tempfile
import time
from datetime import UTC, datetime
from pathlib import Path

HERE = Path(__file__).resolve().parent
OUT = HERE / "out"
FLUXLEDGER = Path(sys.executable).with_name("fluxledger")
#: Boltzmann and Planck constants and R, CODATA 2018 exact values (SI 2019 definitions)
K_B, H, R = 1.380649e-23, 6.62607015e-34, 8.314462618
TEMPERATURES_K = (263.0, 273.0, 283.0, 293.0, 303.0, 313.0)


#: the floor a plot command cannot go below: import numpy and matplotlib's Figure + Agg canvas,
#: draw one line and write one PNG at the same size and resolution
FLOOR = (
    "import numpy as np\n"
    "from matplotlib.figure import Figure\n"
    "from matplotlib.backends.backend_agg import FigureCanvasAgg\n"
    "fig = Figure(figsize=(6.4, 4.4)); FigureCanvasAgg(fig)\n"
    "fig.add_subplot().plot(np.arange(6.0), np.arange(6.0), 'o-')\n"
    "fig.savefig('/dev/null', format='png', dpi=150)\n"
)


def eyring_k(t_k: float, dh_kj_mol: float, ds_j_mol_k: float) -> float:
    """k = (k_B·T/h)·exp(ΔS‡/R − ΔH‡/RT) (H. Eyring, J. Chem. Phys. 3, 107 (1935))."""
    return K_B * t_k / H * math.exp(ds_j_mol_k / R - dh_kj_mol * 1000.0 / (R * t_k))


def build_registry(path: Path, size: int) -> None:
    """``size`` invented compounds, one measurement each, six rate points per measurement."""
    from registry import api
    from registry.storage.database import open_registry

    tmp = path.with_suffix(".building")
    for p in (tmp, Path(f"{tmp}-wal"), Path(f"{tmp}-shm")):
        p.unlink(missing_ok=True)
    api.init_registry(str(tmp))
    database = open_registry(str(tmp))
    rng = random.Random(20261204)
    now = datetime.now(UTC)

    def work(conn):  # type: ignore[no-untyped-def]
        compound_ids = conn.insert_many(
            "compound",
            [
                {"label": f"BENCH-{i:05d}", "structure_ok": True, "created_at": now}
                for i in range(size)
            ],
            new_ids=True,
        )
        measurements = []
        made = []  # the invented (ΔH‡, ΔS‡) each rate series is made from
        for cid in compound_ids:
            dh, ds = rng.uniform(45.0, 85.0), rng.uniform(-30.0, 10.0)
            made.append((dh, ds))
            measurements.append(
                {
                    "compound_id": cid,
                    "method": "lineshape",
                    "solvent_text": "toluene-d8",
                    "dg_kj_mol": round(dh - 298.15 * ds / 1000.0, 1),
                    "dg_t_k": 298.15,
                    "reference": "benchmark: invented value",
                    "entered_by": "bench",
                    "entered_at": now,
                    "status": "draft",
                }
            )
        measurement_ids = conn.insert_many("measurement", measurements, new_ids=True)
        points = []
        for mid, (dh, ds) in zip(measurement_ids, made, strict=True):
            for t in TEMPERATURES_K:
                k = eyring_k(t, dh, ds) * rng.uniform(0.95, 1.05)
                points.append(
                    {
                        "measurement_id": mid,
                        "t_k": t,
                        "t_text": f"{t:g} K",
                        "k_per_s": k,
                        "k_text": f"{k:.4g} s-1",
                    }
                )
        conn.insert_many("rate_point", points)

    database.write(work)
    database.close()
    os.replace(tmp, path)


def registry_path(size: int) -> Path:
    OUT.mkdir(parents=True, exist_ok=True)
    path = OUT / f"plot_{size}.sqlite"
    if not path.exists():
        t0 = time.perf_counter()
        build_registry(path, size)
        print(f"built {path.name} in {time.perf_counter() - t0:.1f} s")
    return path


def timed(cmd: list[str]) -> float:
    start = time.perf_counter()
    subprocess.run(cmd, capture_output=True, check=True, timeout=120)
    return time.perf_counter() - start


def heavy_modules(db: Path, out: Path, measurement_id: int) -> list[str]:
    """Heavy libraries the plot command imports (run in-process, once)."""
    code = (
        "import sys\n"
        "from registry.cli.main import app\n"
        f"sys.argv = ['fluxledger', '--db', {str(db)!r}, 'plot', 'eyring', '{measurement_id}',"
        f" '-o', {str(out)!r}]\n"
        "try:\n    app(prog_name='fluxledger')\nexcept SystemExit:\n    pass\n"
        "names = ('pandas', 'scipy', 'sqlalchemy', 'rdkit', 'pint', 'matplotlib.pyplot',"
        " 'matplotlib', 'numpy')\n"
        "print('loaded:' + ','.join(n for n in names if n in sys.modules))\n"
    )
    done = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, check=True, timeout=120
    )
    line = done.stdout.strip().splitlines()[-1]  # the command's own output comes first
    return [m for m in line.removeprefix("loaded:").split(",") if m]


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--runs", type=int, default=5)
    parser.add_argument("--size", type=int, default=10_000)
    args = parser.parse_args()
    db = registry_path(args.size)
    measurement_id = args.size // 2
    load_before = os.getloadavg()
    with tempfile.TemporaryDirectory() as tmp:
        out = Path(tmp) / "eyring.png"
        plot = [str(FLUXLEDGER), "--db", str(db), "plot", "eyring", str(measurement_id)]
        plot += ["-o", str(out)]
        bare = [sys.executable, "-c", "import typer"]
        floor = [sys.executable, "-c", FLOOR]
        printed = [*plot[:-1], str(Path(tmp) / "print.png"), "--style", "print", "--size", "single"]
        pdf = [*printed[:-5], str(Path(tmp) / "print.pdf"), *printed[-4:]]
        timed(bare), timed(plot), timed(floor)  # warm the file cache once, not counted
        typer_s, plot_s, floor_s, print_s, pdf_s = [], [], [], [], []
        for _ in range(args.runs):
            typer_s.append(timed(bare))
            plot_s.append(timed(plot))
            floor_s.append(timed(floor))
            print_s.append(timed(printed))
            pdf_s.append(timed(pdf))
        heavy = heavy_modules(db, out, measurement_id)
    load_after = os.getloadavg()
    t_typer, t_plot = statistics.median(typer_s), statistics.median(plot_s)
    t_floor = statistics.median(floor_s)
    print(f"registry: {db.name} ({args.size} measurements, 6 rate points each)")
    print(f"runs: {args.runs} each, alternating; medians")
    print(f"python -c 'import typer'         {t_typer:.3f} s")
    print(f"fluxledger plot eyring (PNG)      {t_plot:.3f} s   ratio {t_plot / t_typer:.1f}x")
    print(f"floor: numpy + Figure/Agg, 1 PNG  {t_floor:.3f} s   ratio {t_floor / t_typer:.1f}x")
    for name, runs in (("print, single column, 600 dpi PNG", print_s), ("print, PDF", pdf_s)):
        t = statistics.median(runs)
        print(f"plot eyring --style {name}: {t:.3f} s   ratio to the screen PNG {t / t_plot:.2f}x")
    print(f"modules the plot command imports: {', '.join(heavy) or 'none of the heavy ones'}")
    print(
        "load average (1/5/15 min) before: "
        + " ".join(f"{x:.2f}" for x in load_before)
        + "; after: "
        + " ".join(f"{x:.2f}" for x in load_after)
    )


if __name__ == "__main__":
    main()
