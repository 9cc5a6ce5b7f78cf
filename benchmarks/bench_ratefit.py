"""What keeping each line-shape rate's fit record costs (rate_point.fit_json, migration 0009).

Two registries alike but for the records: N line-shape measurements (invented demo data,
labelled compounds without structures), each given 8 rate points through
``api.add_rate_points`` — in one registry every point carries the fit record of a real fit of a
simulated drifting VT series (about 1.4 kB), in the other none. Timed, each a new process as a
user runs it, the two registries alternating: ``verify`` (which replays the history holding
the records and checks each record), ``show`` of one measurement, and ``export`` to JSON. Also
the time to write the rate points and the size of the files. Prints medians and the ratio of
the medians; nothing is asserted.

Usage: ``python benchmarks/bench_ratefit.py [--n 2000] [--repeats 5]``
"""

from __future__ import annotations

import argparse
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
EXE = Path(sys.executable).with_name("fluxledger")


def _records() -> list[str]:
    """The eight fit records of one real fit (the benchmark's drifting series, seed 0)."""
    sys.path.insert(0, str(HERE))
    from bench_lineshape import _drift_series

    from registry import api

    result = api.fit_lineshapes(
        _drift_series(0), "50,-50 Hz", populations="0.5,0.5", region="-200,300 Hz",  # type: ignore[arg-type]
        reference="-280,-220 Hz", store_doubtful=True,
    )  # fmt: skip
    return [p["fit_json"] for p in result.rate_points]


def _build(path: Path, n: int, records: list[str] | None) -> float:
    """The registry at ``path``; returns the seconds spent adding the rate points."""
    from registry import api

    api.init_registry(str(path))
    database = api.open_registry(str(path))
    try:
        entries = [{"method": "lineshape", "compound": f"RF{i:05d}", "label": f"rf-{i}"}
                   for i in range(n)]  # fmt: skip
        ids = [api.add_measurement(database, e, actor="bench") for e in entries]
        start = time.perf_counter()
        for mid in ids:
            points = [
                {"t_k": 270.0 + 10 * j, "t_text": f"{270 + 10 * j} K", "k_per_s": 10.0 * 2.3**j,
                 "k_text": f"{10.0 * 2.3**j:.4g} s-1",
                 "fit_json": None if records is None else records[j]}
                for j in range(8)
            ]  # fmt: skip
            api.add_rate_points(database, mid, points, actor="bench")
        return time.perf_counter() - start
    finally:
        database.close()


def _run(path: Path, *args: str) -> float:
    start = time.perf_counter()
    done = subprocess.run(
        [str(EXE), "--db", str(path), *args], capture_output=True, text=True, timeout=900
    )
    took = time.perf_counter() - start
    if done.returncode not in (0, 1):
        raise SystemExit(f"{args}: exit {done.returncode}: {done.stderr[-500:]}")
    return took


def main(argv: list[str]) -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--n", type=int, default=2000)
    parser.add_argument("--repeats", type=int, default=5)
    opts = parser.parse_args(argv)
    records = _records()
    print(f"fit record: {statistics.median(len(r) for r in records):.0f} bytes (median of 8)")
    with tempfile.TemporaryDirectory() as tmp:
        paths = {"with records": Path(tmp) / "with.sqlite", "without": Path(tmp) / "without.sqlite"}
        writes = {
            "with records": _build(paths["with records"], opts.n, records),
            "without": _build(paths["without"], opts.n, None),
        }
        times: dict[tuple[str, str], list[float]] = {}
        tasks = {
            "verify": ("verify",),
            "show": ("show", str(opts.n // 2)),
            "export json": ("export", "-o", str(Path(tmp) / "out.json")),
        }
        for r in range(opts.repeats):
            order = list(paths) if r % 2 == 0 else list(reversed(paths))
            for task, args in tasks.items():
                for kind in order:
                    times.setdefault((task, kind), []).append(_run(paths[kind], *args))
        n_points = 8 * opts.n
        print(
            f"{opts.n} line-shape measurements × 8 rate points, {opts.repeats} alternated rounds:"
        )
        w, wo = writes["with records"], writes["without"]
        print(f"  writing the points   {w:7.2f} s vs {wo:7.2f} s  (×{w / wo:.2f}; one run each)")
        for kind, path in paths.items():
            print(f"  file {kind:<13} {path.stat().st_size / 1e6:7.1f} MB")
        for task in tasks:
            a = statistics.median(times[(task, "with records")])
            b = statistics.median(times[(task, "without")])
            print(f"  {task:<20} {a:7.3f} s vs {b:7.3f} s  (×{a / b:.2f}, medians)")
        print(f"  ({n_points} rate points; 'vs' = with records vs without)")


if __name__ == "__main__":
    main(sys.argv[1:])
