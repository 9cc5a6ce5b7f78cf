"""Benchmark: what the raw-data rule costs a check of a whole registry.

Builds the registry of ``benchmarks/bench_check.py`` (N measurements: coalescence data, rate
points, activation parameters, planted slips) and adds M measurements with raw data (invented:
two-site EXSY volumes, saturation-transfer ratios with T1, ee courses of six points; one in
three with a factor-2 slip). Then, on one loaded :class:`~registry.validation.data.CheckData`,
times the rules with and without ``raw-data-barrier``, alternating the two variants, and the
rule alone. Prints medians (s) and the ratio of the medians.

Usage: python benchmarks/bench_rawdata.py [N] [M] [rounds]
"""

from __future__ import annotations

import math
import statistics
import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))

from bench_check import build


def _raw_entries(m: int) -> list[dict[str, str]]:
    """M invented raw-data entries (Eyring with the CODATA constants of scipy.constants)."""
    from scipy import constants as codata

    def dg(k: float, t: float) -> str:
        return f"{codata.R * t * math.log(codata.k * t / (codata.h * k)) / 1000:.2f} kJ/mol"

    out = []
    for i in range(m):
        slip = 2.0 if i % 3 == 0 else 1.0
        k, t = 0.5 + (i % 17) / 5, 290.0 + i % 50
        if i % 3 == 0:
            e = math.exp(-2 * k * 0.1)
            a, b = (1 + e) / 4, (1 - e) / 4
            out.append(
                {
                    "method": "2d-exchange",
                    "mixing": "100 ms",
                    "volumes": f"{a:.6f},{b:.6f};{b:.6f},{a:.6f}",
                    "dg": dg(k * slip, t),
                }
            )
        elif i % 3 == 1:
            r = 0.3 + (i % 11) / 30
            out.append(
                {
                    "method": "saturation-transfer",
                    "ss_ratio": f"{r:.4f}",
                    "t1": "1.5 s",
                    "dg": dg((1 - r) / 1.5 * slip, t),
                }
            )
        else:
            k_rac = 1e-4 * (1 + i % 7)
            rows = "; ".join(
                f"{m_:g},{97 * math.exp(-k_rac * 60 * m_):.4f}" for m_ in (0, 20, 40, 80, 160, 320)
            )
            out.append(
                {
                    "method": "equilibration",
                    "course": f"t (min),ee (%); {rows}",
                    "dg": dg(k_rac / 2 * slip, t),
                }
            )
        out[-1].update(compound=f"RAW-{i}", dg_t=f"{t} K")
    return out  # fmt: skip


def main(argv: list[str]) -> None:
    n = int(argv[0]) if argv else 20_000
    m = int(argv[1]) if len(argv) > 1 else 300
    rounds = int(argv[2]) if len(argv) > 2 else 5
    from registry import api
    from registry.validation.base import CheckConfig
    from registry.validation.data import load_check_data
    from registry.validation.engine import RULES, run_rules

    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "bench.sqlite"
        build(path, n)
        database = api.open_registry(str(path))
        started = time.perf_counter()
        for entry in _raw_entries(m):
            api.add_measurement(database, entry, actor="bench")
        added = time.perf_counter() - started
        with database.read() as conn:
            data = load_check_data(conn)
        config = CheckConfig()
        without = tuple(r for r in RULES if r.id != "raw-data-barrier")
        alone = tuple(r for r in RULES if r.id == "raw-data-barrier")
        times: dict[str, list[float]] = {"all rules": [], "without raw-data": [], "alone": []}
        found = 0
        for _ in range(rounds):  # alternate the variants, so each sees the same machine load
            for name, rules in (("all rules", RULES), ("without raw-data", without),
                                ("alone", alone)):  # fmt: skip
                data._hash_cache.clear()
                t0 = time.perf_counter()
                result = run_rules(data, config, rules)
                times[name].append(time.perf_counter() - t0)
                if name == "alone":
                    found = len(result)
        database.close()
    med = {k: statistics.median(v) for k, v in times.items()}
    print(f"{n:,} measurements + {m:,} with raw data ({added / max(m, 1) * 1000:.0f} ms per add, "
          f"each checked as add does); {rounds} rounds, medians:")  # fmt: skip
    for name, value in med.items():
        print(f"  {name:<18} {value:.3f} s")
    print(f"  ratio all/without  {med['all rules'] / med['without raw-data']:.2f}")
    if m:
        print(f"  raw-data rule: {med['alone'] / m * 1000:.1f} ms per raw-data measurement, "
              f"{found} findings")  # fmt: skip
    else:
        print(f"  raw-data rule on rows without raw data: {med['alone'] * 1000:.1f} ms in all")


if __name__ == "__main__":
    main(sys.argv[1:])
