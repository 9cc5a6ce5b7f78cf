"""How long recomputing a registry's coalescence barriers takes (vectorized), 10⁶ entries.

Prints the median of several runs, the cost per entry, and ratios against a bare numpy floor
(the Eyring expression ΔG‡ = RT·ln(k_B·T/(h·k)) alone: no checks, no k_c, no uncertainty) measured in the same run, so the
figures compare across noisy machines. Run:  .venv/bin/python benchmarks/bench_kinetics.py
"""

from __future__ import annotations

import argparse
import statistics
import time
from collections.abc import Callable

import numpy as np

from registry.kinetics import (
    coalescence_barrier,
    coalescence_temperature,
    eyring_barrier,
    unequal_population_barriers,
)
from registry.kinetics.constants import LN_KB_OVER_H, R_KJ_MOL_K


def median_seconds(fn: Callable[[], object], runs: int) -> float:
    fn()  # warm-up: first-touch page faults and lazy imports are not the steady cost
    times = []
    for _ in range(runs):
        start = time.perf_counter()
        fn()
        times.append(time.perf_counter() - start)
    return statistics.median(times)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--n", type=int, default=1_000_000, help="entries (default 10⁶)")
    parser.add_argument("--runs", type=int, default=7, help="timed runs per case (default 7)")
    args = parser.parse_args()
    n, runs = args.n, args.runs

    rng = np.random.default_rng(0)
    tc = rng.uniform(170.0, 430.0, n)
    dnu = rng.uniform(2.0, 3000.0, n)
    j = np.where(rng.random(n) < 0.2, rng.uniform(2.0, 16.0, n), 0.0)
    tc_err = rng.uniform(0.5, 2.0, n)
    dnu_err = 0.02 * dnu
    ratio = rng.uniform(1.0, 9.0, n)
    dg = rng.uniform(40.0, 110.0, n)

    def floor() -> object:
        return R_KJ_MOL_K * tc * (LN_KB_OVER_H + np.log(tc) - np.log(dnu))

    cases: list[tuple[str, Callable[[], object]]] = [
        ("bare numpy Eyring expression (floor)", floor),
        ("eyring_barrier(k, T)", lambda: eyring_barrier(dnu, tc)),
        (
            "coalescence_barrier, with J and errors",
            lambda: coalescence_barrier(tc, dnu, j, tc_err, dnu_err),
        ),
        (
            "unequal_population_barriers, Tc/Δν errors",
            lambda: unequal_population_barriers(tc, dnu, ratio, tc_err, dnu_err),
        ),
        (
            "… and a ratio error (secant, 3 roots)",
            lambda: unequal_population_barriers(tc, dnu, ratio, tc_err, dnu_err, 0.05 * ratio),
        ),
        ("coalescence_temperature (Lambert W)", lambda: coalescence_temperature(dnu, dg)),
    ]
    print(f"{n:,} entries, median of {runs} runs")
    print(f"{'case':48s} {'median s':>9s} {'ns/entry':>9s} {'× floor':>8s}")
    base = None
    for name, fn in cases:
        sec = median_seconds(fn, runs)
        base = base or sec
        print(f"{name:48s} {sec:9.3f} {sec / n * 1e9:9.1f} {sec / base:8.1f}")

    # the same recomputation one entry at a time, on a sample, to show what vectorizing buys
    m = 2_000
    loop = median_seconds(
        lambda: [coalescence_barrier(float(tc[i]), float(dnu[i])) for i in range(m)], 3
    )
    vec = median_seconds(lambda: coalescence_barrier(tc, dnu), runs)
    print(
        f"scalar loop: {loop / m * 1e6:.1f} µs/entry vs vectorized {vec / n * 1e9:.1f} ns/entry"
        f" (× {loop / m / (vec / n):,.0f})"
    )


if __name__ == "__main__":
    main()
