"""How long one line-shape fit of a 16,384-point spectrum takes (target: at most 0.2 s).

For several exchange regimes, prints the median wall time and CPU time of ``fit_spectrum`` over
several runs, and the ratio to two floors measured in the same run: one evaluation of the
model spectrum (what every Levenberg–Marquardt step needs at least once) and one evaluation
with its analytic Jacobian. The machine may be shared, so CPU time and the ratios are the
figures to compare. Also times the global (Eyring-tied) fit of six such spectra, and the whole
library call ``api.fit_lineshapes`` on six CSV files (reading, six fits, the Eyring line) against
the sum of its six ``fit_spectrum`` calls, which shows what the workflow adds around the fits.

OpenBLAS threads busy-wait inside scipy's Levenberg–Marquardt on tall 16,384×6 Jacobians; on a
busy 2-core machine that roughly doubles the CPU time. Compare with a single BLAS thread:

Run:  .venv/bin/python benchmarks/bench_lineshape.py
      OPENBLAS_NUM_THREADS=1 .venv/bin/python benchmarks/bench_lineshape.py
"""

from __future__ import annotations

import argparse
import math
import os
import statistics
import tempfile
import time
from collections.abc import Callable
from pathlib import Path

import numpy as np

from registry.lineshape.eyring import eyring_ln_rate
from registry.lineshape.fit import fit_spectrum
from registry.lineshape.fit_core import ModelShape
from registry.lineshape.fit_global import SpectrumInput, fit_global
from registry.lineshape.simulate import ExchangeModel

TARGET_S = 0.2


def medians(fn: Callable[[], object], runs: int) -> tuple[float, float]:
    """Median wall and CPU seconds of ``fn`` after one warm-up call."""
    fn()
    wall, cpu = [], []
    for _ in range(runs):
        w0, c0 = time.perf_counter(), time.process_time()
        fn()
        wall.append(time.perf_counter() - w0)
        cpu.append(time.process_time() - c0)
    return statistics.median(wall), statistics.median(cpu)


def spectrum(model: ExchangeModel, k: float, points: int, seed: int) -> tuple[np.ndarray, ...]:
    rng = np.random.default_rng(seed)
    freq = np.linspace(-400.0, 400.0, points)
    clean = 3.0 * model.spectrum(freq, k, 1.5, 0.5) + 0.01
    return freq, clean + rng.normal(0.0, 0.01 * clean.max(), points)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--points", type=int, default=16384, help="points per spectrum")
    parser.add_argument("--runs", type=int, default=7, help="timed runs per case (default 7)")
    args = parser.parse_args()
    n, runs = args.points, args.runs

    model = ExchangeModel.equal([-60.0, 60.0])
    freq, _ = spectrum(model, 100.0, n, 0)
    shape = ModelShape(model, 2 * np.pi * freq)
    floor_wall, floor_cpu = medians(lambda: shape.value(100.0, 1.5, 0.5), 50)
    jac_wall, jac_cpu = medians(lambda: shape.derivatives(100.0, 1.5, 0.5), 20)
    threads = os.environ.get("OPENBLAS_NUM_THREADS", "unset (OpenBLAS default)")
    print(f"{n} points, medians of {runs} runs (wall / CPU); OPENBLAS_NUM_THREADS={threads}")
    print(
        f"  floor: one model spectrum       {floor_wall * 1e3:8.2f} ms / {floor_cpu * 1e3:6.2f} ms"
    )
    print(f"  floor: spectrum + Jacobian      {jac_wall * 1e3:8.2f} ms / {jac_cpu * 1e3:6.2f} ms")

    three = ExchangeModel.equal([-80.0, 10.0, 75.0], scheme="cycle")
    cases: list[tuple[str, ExchangeModel, float, bool]] = [
        ("2 sites, slow (k = 5 s-1), width free", model, 5.0, False),
        ("2 sites, coalescence (k = 266 s-1), width free", model, 266.0, False),
        ("2 sites, fast (k = 3000 s-1), width fixed", model, 3000.0, True),
        ("2 sites 70:30, k = 90 s-1, width free", ExchangeModel((-60.0, 60.0), (0.7, 0.3)), 90.0, False),
        ("3-site cycle, k = 120 s-1, width free", three, 120.0, False),
    ]  # fmt: skip
    print(f"  {'one fit_spectrum':<48}{'wall':>9}{'CPU':>9}{'CPU/floor':>11}{'CPU/target':>12}")
    cpu_all = []
    for label, mdl, k, fixed in cases:
        f, y = spectrum(mdl, k, n, 1)

        def run(
            f: np.ndarray = f, y: np.ndarray = y, mdl: ExchangeModel = mdl, fixed: bool = fixed
        ) -> object:
            return fit_spectrum(f, y, mdl, width_hz=1.5 if fixed else 1.0, fix_width=fixed)

        wall, cpu = medians(run, runs)
        cpu_all.append(cpu)
        print(f"  {label:<48}{wall:8.3f}s{cpu:8.3f}s{cpu / floor_cpu:10.0f}×{cpu / TARGET_S:11.2f}")

    temps = [260.0, 270.0, 280.0, 290.0, 300.0, 310.0]
    rng = np.random.default_rng(2)
    inputs = []
    for t in temps:
        k = math.exp(eyring_ln_rate(t, 60.0, 5.0))
        clean = model.spectrum(freq, k, 1.5)
        inputs.append(SpectrumInput(freq, clean + rng.normal(0, 0.01 * clean.max(), n), t, f"T{t}"))
    starts = [
        fit_spectrum(s.freq_hz, s.intensity, model, width_hz=1.5, fix_width=True, t_k=s.t_k)
        for s in inputs
    ]
    g_wall, g_cpu = medians(
        lambda: fit_global(inputs, model, width_hz=1.5, fix_width=True, starts=starts),
        max(3, runs // 2),
    )
    print(
        f"  global fit, 6 spectra × {n} points (given per-T starts): {g_wall:.3f} s / {g_cpu:.3f} s"
    )
    print(
        f"median CPU of one fit over the cases: {statistics.median(cpu_all):.3f} s "
        f"(target {TARGET_S} s)"
    )
    workflow(model, temps, n, runs)


def workflow(model: ExchangeModel, temps: list[float], n: int, runs: int) -> None:
    """``api.fit_lineshapes`` on six CSV files against the bare fits of the same spectra."""
    from registry import api
    from registry.lineshape.spectrum import read_spectrum

    with tempfile.TemporaryDirectory() as folder:
        files = []
        for i, t in enumerate(temps):
            path = Path(folder) / f"T{t:.0f}.csv"
            k = math.exp(eyring_ln_rate(t, 60.0, 5.0))
            api.simulate_lineshape(
                "-60,60 Hz", k, out=path, width=1.5, points=n, window="-400,400 Hz",
                noise=0.01, seed=i, temperature=t,
            )  # fmt: skip
            files.append(path)
        spectra = [read_spectrum(f) for f in files]

        def bare() -> object:
            return [
                fit_spectrum(s.x, s.intensity, model, width_hz=1.5, fix_width=True, t_k=s.t_k)
                for s in spectra
            ]

        def call() -> object:
            return api.fit_lineshapes(files, "-60,60 Hz", width=1.5, fix_width=True)

        b_wall, b_cpu = medians(bare, max(3, runs // 2))
        w_wall, w_cpu = medians(call, max(3, runs // 2))
    print(f"  six bare fit_spectrum calls:            {b_wall:.3f} s / {b_cpu:.3f} s")
    print(
        f"  api.fit_lineshapes, six files:          {w_wall:.3f} s / {w_cpu:.3f} s "
        f"(CPU ratio to the bare fits {w_cpu / b_cpu:.2f})"
    )


if __name__ == "__main__":
    main()
