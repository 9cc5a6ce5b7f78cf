"""How long one line-shape fit of a 16,384-point spectrum takes (target: at most 0.2 s).

For several exchange regimes, prints the median wall time and CPU time of ``fit_spectrum`` over
several runs, and the ratio to two floors measured in the same run: one evaluation of the
model spectrum (what every Levenberg–Marquardt step needs at least once) and one evaluation
with its analytic Jacobian. The machine may be shared, so CPU time and the ratios are the
figures to compare. Also times the global (Eyring-tied) fit of six such spectra, and the whole
library call ``api.fit_lineshapes`` on six CSV files (reading, six fits, the Eyring line) against
the sum of its six ``fit_spectrum`` calls, which shows what the workflow adds around the fits.

Last, the drifting series of issue 19 (an invented VT series: 8 spectra, 270–340 K, sites
drifting by 0.015 and 0.005 ppm at 400 MHz, populations ≈ 57:43 → 53:47 by van 't Hoff, the
intrinsic width 1.4 → 1.0 Hz measured on a reference line, 1 % noise) over seeded repeats: the
worst rate error of each series, the ΔH‡ error, the share of series with every rate within 5 %,
the coverage of the stated σ_k, and the time of the series fit (sites varying) against the same
call with the sites held (alternated runs). Then the same figures for the global fit on those
series (Δν's drift and the van 't Hoff line fitted with ΔH‡, ΔS‡), and its CPU against the
per-temperature series fit alone.

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
    parser.add_argument(
        "--repeats", type=int, default=20, help="seeded drifting series (default 20)"
    )
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
    drifting_series(args.repeats)
    global_series(args.repeats)


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


DRIFT_TEMPS = [270.0, 280.0, 290.0, 300.0, 310.0, 320.0, 330.0, 340.0]
DRIFT_DH, DRIFT_DS = 58.0, -7.0  # kJ/mol, J/(mol·K): invented barrier
SITE_DH, SITE_DS = 2.0, 5.0  # kJ/mol, J/(mol·K): invented site equilibrium


def _drift_truth(t: float) -> dict[str, float]:
    frac = (t - DRIFT_TEMPS[0]) / (DRIFT_TEMPS[-1] - DRIFT_TEMPS[0])
    k_eq = math.exp(-SITE_DH * 1000.0 / (8.314462618 * t) + SITE_DS / 8.314462618)
    return {
        "k": math.exp(eyring_ln_rate(t, DRIFT_DH, DRIFT_DS)), "p1": 1.0 / (1.0 + k_eq),
        "nu1": 50.0 + 6.0 * frac, "nu2": -50.0 + 2.0 * frac, "w": 1.0 + 0.4 * (1.0 - frac),
    }  # fmt: skip


def _drift_series(seed: int) -> list[object]:
    from registry.lineshape.simulate import two_site_spectrum
    from registry.lineshape.spectrum import Spectrum

    rng = np.random.default_rng(seed)
    freq = np.linspace(-300.0, 300.0, 4096)
    out = []
    for t in DRIFT_TEMPS:
        v = _drift_truth(t)
        half = v["w"] / 2
        y = two_site_spectrum(freq, v["nu1"], v["nu2"], v["k"], v["p1"], v["w"], v["w"])
        y = y + 0.5 * (half / math.pi) / ((freq + 250.0) ** 2 + half**2)
        y = y + rng.normal(0.0, 0.01 * y.max(), freq.size)
        out.append(Spectrum(freq, y, "Hz", f"vt_{t:.0f}", t_k=t))
    return out


def drifting_series(repeats: int) -> None:
    """Accuracy and cost of the series fit on the drifting series (see module docstring), with
    Δν and the populations 'auto' (the default), 'tie' (every spectrum on the series' lines) and
    'hold' (as given: 50:50, no drift), the three run alternately on each series."""
    from registry import api

    modes = ("auto", "tie", "hold")
    worst: dict[str, list[float]] = {m: [] for m in modes}
    dh_err: dict[str, list[float]] = {m: [] for m in modes}
    cpu: dict[str, list[float]] = {m: [] for m in modes}
    z_all: dict[str, list[float]] = {m: [] for m in modes}
    for seed in range(repeats):
        spectra = _drift_series(seed)
        order = modes[seed % 3 :] + modes[: seed % 3]  # rotate which runs first
        for mode in order:
            c0 = time.process_time()
            result = api.fit_lineshapes(
                spectra, "50,-50 Hz", populations="0.5,0.5", region="-200,300 Hz",  # type: ignore[arg-type]
                reference="-280,-220 Hz", shifts_mode=mode, populations_mode=mode,
                store_doubtful=True,
            )  # fmt: skip
            cpu[mode].append(time.process_time() - c0)
            errors = []
            for f in result.fits:
                k = _drift_truth(f.t_k)["k"]  # type: ignore[arg-type]
                errors.append(abs(f.k_per_s / k - 1.0))
                if f.k_err_per_s:
                    z_all[mode].append((f.k_per_s - k) / f.k_err_per_s)
            worst[mode].append(max(errors))
            dh_err[mode].append(abs(result.eyring_line.dh_kj_mol - DRIFT_DH))  # type: ignore[union-attr]
    print(f"drifting VT series (8 spectra × 4096 points, 1 % noise), {repeats} seeded repeats:")
    print(
        f"  {'Δν, populations':<16}{'worst rate error':>22}{'all 8 ≤ 5 %':>13}"
        f"{'ΔH‡ error':>18}{'|z|<1':>7}{'|z|<2':>7}{'CPU/series':>12}"
    )
    base = statistics.median(cpu["hold"])
    for mode in modes:
        w, z = np.array(worst[mode]), np.abs(np.array(z_all[mode]))
        c = statistics.median(cpu[mode])
        print(
            f"  {mode:<16}{f'median {np.median(w):.1%}, max {w.max():.1%}':>22}"
            f"{np.mean(w <= 0.05):>12.0%} "
            f"{f'{np.median(dh_err[mode]):.2f} / {max(dh_err[mode]):.2f} kJ/mol':>18}"
            f"{np.mean(z < 1):>7.0%}{np.mean(z < 2):>7.0%} "
            f"{f'{c:.3f} s ({c / base:.1f}×)':>14}"
        )
    print("  (ΔH‡ error: median / max; |z|: share of rates within 1σ, 2σ — normal 68 %, 95 %)")


def global_series(repeats: int) -> None:
    """The global (Eyring-tied) fit on the same drifting series, Δν and the populations 'auto'
    (shared drift and van 't Hoff lines fitted with ΔH‡, ΔS‡), against the per-temperature
    series fit alone (the same call without the global fit; the two alternate which runs
    first). The global call includes the series fit that starts it."""
    from registry import api

    kw = dict(populations="0.5,0.5", region="-200,300 Hz", reference="-280,-220 Hz",
              shifts_mode="auto", populations_mode="auto", store_doubtful=True)  # fmt: skip
    worst, dh_err, z_all, z_dh = [], [], [], []
    cpu: dict[bool, list[float]] = {False: [], True: []}
    for seed in range(repeats):
        spectra = _drift_series(seed)
        for with_global in (True, False) if seed % 2 else (False, True):
            c0 = time.process_time()
            result = api.fit_lineshapes(spectra, "50,-50 Hz", global_fit=with_global, **kw)  # type: ignore[arg-type]
            cpu[with_global].append(time.process_time() - c0)
            if not with_global:
                continue
            g = result.global_fit
            errors = []
            for f in g.fits:  # type: ignore[union-attr]
                k = _drift_truth(f.t_k)["k"]  # type: ignore[arg-type]
                errors.append(abs(f.k_per_s / k - 1.0))
                z_all.append((f.k_per_s - k) / f.k_err_per_s if f.k_err_per_s else math.inf)
            worst.append(max(errors))
            dh_err.append(abs(g.eyring.dh_kj_mol - DRIFT_DH))  # type: ignore[union-attr]
            z_dh.append((g.eyring.dh_kj_mol - DRIFT_DH) / g.eyring.dh_err_kj_mol)  # type: ignore[union-attr, operator]
    w, z, zh = np.array(worst), np.abs(np.array(z_all)), np.abs(np.array(z_dh))
    per_t, both = statistics.median(cpu[False]), statistics.median(cpu[True])
    print(f"global fit on the drifting series, {repeats} seeded repeats (auto: shared lines):")
    print(f"  worst rate error: median {np.median(w):.1%}, max {w.max():.1%}; "
          f"series with all 8 rates ≤ 5 %: {np.mean(w <= 0.05):.0%}")  # fmt: skip
    print(f"  ΔH‡ error: median {np.median(dh_err):.2f}, max {max(dh_err):.2f} kJ/mol; "
          f"ΔH‡ |z| < 1: {np.mean(zh < 1):.0%}, < 2: {np.mean(zh < 2):.0%}")  # fmt: skip
    print(f"  rates |z| < 1: {np.mean(z < 1):.0%}, < 2: {np.mean(z < 2):.0%} "
          f"(normal 68 %, 95 %); mean z {np.mean(np.array(z_all)):+.2f}")  # fmt: skip
    print(f"  CPU per series: per-temperature {per_t:.3f} s, with the global fit {both:.3f} s "
          f"(ratio {both / per_t:.2f}; medians)")  # fmt: skip


if __name__ == "__main__":
    main()
