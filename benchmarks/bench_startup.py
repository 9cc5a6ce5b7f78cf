"""Start-up time of `fluxledger --help` and `fluxledger info` next to a bare `python -c "import typer"`.

Prints medians of several runs and the ratio; commands that need no chemistry must not import
RDKit, pandas or matplotlib. Run: .venv/bin/python benchmarks/bench_startup.py
"""

from __future__ import annotations

import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

RUNS = 7
BIN = Path(sys.executable).parent


def median_seconds(cmd: list[str], env: dict[str, str]) -> float:
    times = []
    for _ in range(RUNS):
        start = time.perf_counter()
        subprocess.run(cmd, env=env, capture_output=True, check=True)
        times.append(time.perf_counter() - start)
    return statistics.median(times)


def heavy_modules_loaded(env: dict[str, str]) -> list[str]:
    code = (
        "import sys; sys.argv=['fluxledger','--help']\n"
        "from registry.cli import main\n"
        "print(','.join(m for m in ('rdkit','pandas','matplotlib','scipy') if m in sys.modules))"
    )
    out = subprocess.run(
        [sys.executable, "-c", code], env=env, capture_output=True, text=True, check=True
    )
    return [m for m in out.stdout.strip().split(",") if m]


def main() -> None:
    with tempfile.TemporaryDirectory() as tmp:
        env = {**os.environ, "FLUXLEDGER_DB": str(Path(tmp) / "r.sqlite")}
        subprocess.run([str(BIN / "fluxledger"), "init"], env=env, capture_output=True, check=True)
        bare = median_seconds([sys.executable, "-c", "import typer"], env)
        helped = median_seconds([str(BIN / "fluxledger"), "--help"], env)
        info = median_seconds([str(BIN / "fluxledger"), "info"], env)
        heavy = heavy_modules_loaded(env)
    print(f"runs per command: {RUNS} (medians)")
    print(f"python -c 'import typer'   {bare:.3f} s")
    print(f"fluxledger --help          {helped:.3f} s   ratio {helped / bare:.2f}x")
    print(f"fluxledger info            {info:.3f} s   ratio {info / bare:.2f}x")
    print(f"heavy modules loaded by importing the CLI: {heavy or 'none'}")


if __name__ == "__main__":
    main()
