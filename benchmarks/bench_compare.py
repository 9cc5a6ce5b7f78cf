"""``compare`` on a registry of many computed and measured barriers: how long one comparison takes.

The registry (built in a temporary folder; invented data, not chemistry): N compounds (labels
only, no structures, so that building costs no RDKit time), each with one measured line-shape
barrier at 298.15 K, half of them with ΔH‡/ΔS‡ instead, and computed values at three levels of
theory (errors drawn from normal distributions with a different offset per level). Printed:
the median of R calls of ``api.compare_computed`` (warm, library), and of the same with a
parity plot; the statistics found beside the offsets put in (a check by eye). Nothing is
asserted.

Usage: ``python benchmarks/bench_compare.py [--n 3000] [--repeats 5]``
"""

from __future__ import annotations

import argparse
import csv
import random
import statistics
import tempfile
import time
from pathlib import Path

LEVELS = {"B3LYP-D3/6-31G(d)": (-2.0, 2.5), "M06-2X/def2-TZVP": (1.0, 1.5),
          "DLPNO-CCSD(T)/def2-TZVP": (0.2, 0.8)}  # fmt: skip


def _sheet(path: Path, n: int, rng: random.Random) -> None:
    with open(path, "w", newline="", encoding="utf-8") as out:
        w = csv.writer(out)
        w.writerow(["compound", "method", "process", "T (K)", "dG (kJ/mol)", "dH (kJ/mol)",
                    "dS (J/(mol K))", "T min (K)", "T max (K)", "level of theory"])  # fmt: skip
        for i in range(n):
            dg = rng.uniform(50, 110)
            if i % 2:
                ds = rng.uniform(-20, 10)
                w.writerow(
                    [
                        f"B{i:05d}",
                        "lineshape",
                        "bond-rotation",
                        "",
                        "",
                        f"{dg + 298.15 * ds / 1000:.2f}",
                        f"{ds:.1f}",
                        260,
                        330,
                        "",
                    ]
                )
            else:
                w.writerow([f"B{i:05d}", "lineshape", "bond-rotation", 298.15, f"{dg:.2f}",
                            "", "", "", "", ""])  # fmt: skip
            for level, (offset, sd) in LEVELS.items():
                w.writerow(
                    [
                        f"B{i:05d}",
                        "computed",
                        "bond-rotation",
                        298.15,
                        f"{dg + rng.gauss(offset, sd):.2f}",
                        "",
                        "",
                        "",
                        "",
                        level,
                    ]
                )


def main() -> None:
    from registry import api

    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--n", type=int, default=3000)
    parser.add_argument("--repeats", type=int, default=5)
    args = parser.parse_args()
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        sheet = folder / "barriers.csv"
        _sheet(sheet, args.n, random.Random(5))
        api.init_registry(str(folder / "r.sqlite"))
        database = api.open_registry(str(folder / "r.sqlite"))
        api.import_table(database, str(sheet))
        plain, plotted = [], []
        for _ in range(args.repeats):
            start = time.perf_counter()
            res = api.compare_computed(database)
            plain.append(time.perf_counter() - start)
            start = time.perf_counter()
            api.compare_computed(database, plot=str(folder / "parity.png"))
            plotted.append(time.perf_counter() - start)
        database.close()
    print(f"{args.n:,} compounds: {args.n:,} measured and {3 * args.n:,} computed barriers; "
          f"{args.repeats} calls each")  # fmt: skip
    print(f"  compare: median {statistics.median(plain):.2f} s; with a parity plot: "
          f"{statistics.median(plotted):.2f} s")  # fmt: skip
    for s in res.stats:
        put = LEVELS[s.level]
        print(
            f"  {s.level}: N {s.n}, MSE {s.mse:+.2f} (put in {put[0]:+.1f}), RMSE {s.rmse:.2f} "
            f"(put in {(put[0] ** 2 + put[1] ** 2) ** 0.5:.2f})"
        )


if __name__ == "__main__":
    main()
