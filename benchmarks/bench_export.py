"""Export of a 10,000-measurement registry: this tree against an earlier revision (``--base``).

Shows what writing an export whole or not at all costs: the checked target, the temporary file
beside it, fsync and rename (:mod:`registry.outputs`), the odd-value notes and the workbook
escapes, against the plain ``open``/``book.save`` of the earlier code. Each timing is one
``api.export_measurements`` call (gather, rows, write) in a fresh process, so neither tree
profits from the other's caches; the two trees alternate, so the machine's load falls on both
alike. Printed: medians per format and tree, and the ratio new/old (never asserted).

The registry is ``benchmarks/out/everyday_10000.sqlite`` (``bench_everyday.py`` builds it) or
``--db``; it is copied into a temporary folder (and the copy's schema upgraded) first, so the
original is never changed. Both trees must read the same schema.

Usage: ``python benchmarks/bench_export.py [--base b7b1c78] [--repeats 5] [--db PATH]``
"""

from __future__ import annotations

import argparse
import json
import os
import shutil
import statistics
import subprocess
import sys
import tarfile
import tempfile
from pathlib import Path

HERE = Path(__file__).resolve().parent
ROOT = HERE.parent
DEFAULT_DB = HERE / "out" / "everyday_10000.sqlite"

#: one export, timed inside the process (start-up and imports are not the export's cost)
TIMED = """
import json, sys, time
from registry import api
db, out, fmt = sys.argv[1:4]
database = api.open_registry(db)
t0 = time.perf_counter()
result = api.export_measurements(database, out, format=fmt)
seconds = time.perf_counter() - t0
database.close()
print(json.dumps({"seconds": seconds, "measurements": result["measurements"]}))
"""


def _tree_of(revision: str, into: Path) -> Path:
    """``registry/`` and ``migrations/`` of ``revision`` (git archive), unpacked into ``into``."""
    into.mkdir(parents=True, exist_ok=True)
    archive = into / "tree.tar"
    with archive.open("wb") as fh:
        subprocess.run(
            ["git", "-C", str(ROOT), "archive", revision, "registry", "migrations"],
            stdout=fh, check=True, timeout=120,
        )  # fmt: skip
    with tarfile.open(archive) as tar:
        tar.extractall(into, filter="data")
    return into


def _run(tree: Path, db: Path, out: Path, fmt: str) -> float:
    done = subprocess.run(
        [sys.executable, "-c", TIMED, str(db), str(out), fmt],
        env={**os.environ, "PYTHONPATH": str(tree), "OPENBLAS_NUM_THREADS": "1"},
        capture_output=True, text=True, check=True, timeout=900,
    )  # fmt: skip
    return float(json.loads(done.stdout.strip().splitlines()[-1])["seconds"])


def _upgrade(db: Path) -> None:
    """Bring the copy to this tree's schema (a registry built by an older tree may be behind)."""
    sys.path.insert(0, str(ROOT))
    from registry import api

    api.upgrade_schema(str(db), no_backup=True)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--base", default="b7b1c78", help="the earlier revision to compare with")
    parser.add_argument("--repeats", type=int, default=5)
    parser.add_argument("--db", type=Path, default=DEFAULT_DB)
    parser.add_argument("--formats", default="csv,xlsx")
    args = parser.parse_args()
    if not args.db.exists():
        sys.exit(f"no registry at {args.db}; run benchmarks/bench_everyday.py once to build it")
    with tempfile.TemporaryDirectory(prefix="bench-export-") as scratch:
        work = Path(scratch)
        db = work / "registry.sqlite"
        shutil.copyfile(args.db, db)
        _upgrade(db)
        old_tree = _tree_of(args.base, work / "old")
        trees = {"old": old_tree, "new": ROOT}
        print(f"export of {args.db.name}: {args.base} (old) against this tree (new), "
              f"{args.repeats} alternating runs each, seconds inside the process")  # fmt: skip
        for fmt in args.formats.split(","):
            times: dict[str, list[float]] = {"old": [], "new": []}
            for i in range(args.repeats):
                order = ("old", "new") if i % 2 == 0 else ("new", "old")
                for name in order:
                    times[name].append(_run(trees[name], db, work / f"{name}.{fmt}", fmt))
            old, new = statistics.median(times["old"]), statistics.median(times["new"])
            print(
                f"{fmt:5s} old median {old:6.2f} s   new median {new:6.2f} s   "
                f"new/old {new / old:5.2f}   (old {_runs(times['old'])}; new {_runs(times['new'])})"
            )


def _runs(values: list[float]) -> str:
    return ", ".join(f"{v:.2f}" for v in values)


if __name__ == "__main__":
    main()
