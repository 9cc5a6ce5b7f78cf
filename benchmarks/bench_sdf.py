"""Import and export of SD files against the same measurements as CSV.

An SD file carries each structure as a Molfile, which the importer reads with RDKit into a
SMILES before the rows go the way of any sheet; export draws 2D coordinates for each structure.
This prints what that costs on real molecules: the first N molecules of the open molsets set,
each with one invented computed barrier (demo data, not chemistry). Each timing is one
``fluxledger import``/``export`` in a fresh process on a fresh copy of an empty registry; SD and
CSV alternate so the machine's load falls on both alike. Printed: medians, and the ratio
SD/CSV (never asserted).

Usage: ``python benchmarks/bench_sdf.py [--n 10000] [--repeats 3]``
"""

from __future__ import annotations

import argparse
import csv
import os
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))

from find_data import molsets_smiles  # noqa: E402

EXE = Path(sys.executable).with_name("fluxledger")


def _files(n: int, folder: Path) -> tuple[Path, Path]:
    """The same n measurements as an SD file (RDKit writes the Molfiles) and as a CSV."""
    import random

    from rdkit import Chem

    rng = random.Random(7)
    sd, table = folder / "barriers.sdf", folder / "barriers.csv"
    with open(sd, "w", encoding="utf-8") as out_sd, open(table, "w", newline="") as out_csv:
        writer = csv.writer(out_csv)
        writer.writerow(["compound", "smiles", "method", "dG (kJ/mol)", "T (K)"])
        for i, smiles in enumerate(molsets_smiles(n)):
            mol = Chem.MolFromSmiles(smiles)
            dg = f"{rng.uniform(50, 110):.1f}"
            block = Chem.MolToMolBlock(mol)
            out_sd.write(block)
            out_sd.write(
                f">  <compound>\nSD{i:06d}\n\n>  <method>\ncomputed\n\n"
                f">  <dG (kJ/mol)>\n{dg}\n\n>  <T (K)>\n298.15\n\n$$$$\n"
            )
            writer.writerow([f"SD{i:06d}", Chem.MolToSmiles(mol), "computed", dg, "298.15"])
    return sd, table


def _timed(*args: str, env: dict[str, str]) -> float:
    start = time.perf_counter()
    done = subprocess.run([str(EXE), *args], env=env, capture_output=True, text=True, timeout=3600)
    seconds = time.perf_counter() - start
    if done.returncode != 0:
        raise SystemExit(f"{' '.join(args)} failed:\n{done.stdout}\n{done.stderr}")
    return seconds


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--n", type=int, default=10_000)
    parser.add_argument("--repeats", type=int, default=3)
    args = parser.parse_args()
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        sd, table = _files(args.n, folder)
        empty = folder / "empty.sqlite"
        env = {**os.environ}
        subprocess.run([str(EXE), "--db", str(empty), "init"], check=True, timeout=300,
                       capture_output=True)  # fmt: skip
        times: dict[str, list[float]] = {k: [] for k in ("import sdf", "import csv",
                                                         "export sdf", "export csv")}  # fmt: skip
        for _ in range(args.repeats):
            for kind, source in (("sdf", sd), ("csv", table)):
                db = folder / f"r-{kind}.sqlite"
                shutil.copyfile(empty, db)
                times[f"import {kind}"].append(
                    _timed("--db", str(db), "import", str(source), env=env)
                )
                times[f"export {kind}"].append(
                    _timed("--db", str(db), "export", "-o", str(folder / f"out.{kind}"), env=env)
                )
                for suffix in ("", "-wal", "-shm"):
                    Path(f"{db}{suffix}").unlink(missing_ok=True)
        print(f"{args.n:,} molsets molecules, one invented barrier each; {args.repeats} "
              "alternating runs, whole commands in fresh processes")  # fmt: skip
        medians = {k: statistics.median(v) for k, v in times.items()}
        for key, values in times.items():
            shown = ", ".join(f"{v:.2f}" for v in values)
            print(f"  {key}: median {medians[key]:.2f} s  ({shown})")
        for step in ("import", "export"):
            print(f"  {step} SD/CSV: {medians[f'{step} sdf'] / medians[f'{step} csv']:.2f}")
        print(
            f"  files: SD {sd.stat().st_size / 1e6:.1f} MB, CSV {table.stat().st_size / 1e6:.1f} MB"
        )


if __name__ == "__main__":
    main()
