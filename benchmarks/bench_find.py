"""Motif search at scale: ``registry.search.find`` and a cold ``fluxledger find`` against the floor.

The floor, measured in the same run on the same molecules: RDKit's ``SubstructLibrary`` with a
trusted-SMILES holder and a pattern-fingerprint holder (``CachedTrustedSmilesMolHolder`` +
``PatternHolder``, filled from the registry's canonical SMILES and stored pattern fingerprints),
``maxResults`` = all molecules and an explicit thread count. Targets (not asserted anywhere):

* warm library call  ≤ 1.5 × floor
* cold CLI process   ≤ floor + Python/RDKit start-up + 0.5 s (the floor timed again beside the
  cold runs, as the machine's speed drifts over minutes)

"Warm" means this process has searched the registry before: the screening index and the
measurement listing are mapped from their files (held while the registry's change counters and
table sizes stay the same; checking them is one small query per search). The measurement rows
a search returns are read by id through SQL (no rows are kept in memory). What the first search
after a write pays instead (rebuilding the listing) is measured once and printed before the
table, with the resident memory the warm process holds.

``--caches`` first measures what each cache saves (the figures that decided which caches stay):
building vs mapping the screening index, the similarity index and the listing; and, per common
query, a warm and a cold search with and without the listing.

Data: ``benchmarks/find_data.py`` (100,000 molsets compounds, built once and cached under
``benchmarks/out/``). Usage: ``python benchmarks/bench_find.py [N] [--repeats R] [--caches]``.
"""

from __future__ import annotations

import argparse
import os
import statistics
import subprocess
import sys
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))

from find_data import registry_path  # noqa: E402

#: from very selective to very common (a few plain SMARTS at the common end)
MOTIFS = [
    "cp-metal",
    "divinylcyclopropane",
    "hexadiene-1,5",
    "thioamide",
    "biaryl-ortho",
    "carbamate",
    "urea",
    "sulfonamide",
    "enamine",
    "n-aryl-amide",
    "ring6-heterocycle",
    "amide",
]
SMARTS = ["c1ccccc1", "[#6]~[#7]"]


def floor_library(db: Path):  # type: ignore[no-untyped-def]
    """The reference library over the registry's own molecules (same order as compound ids)."""
    import sqlite3

    from rdkit import DataStructs
    from rdkit.Chem import rdSubstructLibrary

    mols = rdSubstructLibrary.CachedTrustedSmilesMolHolder()
    fps = rdSubstructLibrary.PatternHolder()
    ids = []
    with sqlite3.connect(db) as conn:
        for cid, smiles, fp in conn.execute(
            "SELECT id, smiles_canonical, pattern_fp FROM compound "
            "WHERE mol_binary IS NOT NULL ORDER BY id"
        ):
            mols.AddSmiles(smiles)
            fps.AddFingerprint(DataStructs.CreateFromBinaryText(fp))
            ids.append(cid)
    return rdSubstructLibrary.SubstructLibrary(mols, fps), ids


def _rss_mb() -> float:
    """Resident memory of this process (Linux), in MB."""
    try:
        with open("/proc/self/status", encoding="ascii") as status:
            for line in status:
                if line.startswith("VmRSS:"):
                    return int(line.split()[1]) / 1024
    except OSError:
        pass
    return float("nan")


def _median_s(fn, repeats: int) -> float:  # type: ignore[no-untyped-def]
    times = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


#: a warm library process: memory after importing and opening, then after searching (results
#: dropped: what the library itself keeps). Anonymous memory is the process's own; file-backed
#: pages are the mapped cache files, shared and given back by the kernel under pressure.
_MEMORY_CODE = """
import gc, sys
from registry import api
from registry.search import engine  # noqa: F401
import rdkit.Chem, numpy  # noqa: F401
def rss():
    found = {}
    for line in open('/proc/self/status'):
        if line.startswith(('RssAnon:', 'RssFile:')):
            found[line.split(':')[0]] = int(line.split()[1]) / 1024
    return found['RssAnon'], found['RssFile']
database = api.open_registry(sys.argv[1])
print(*rss())
for motif in ('amide', 'ring6-heterocycle', 'sulfonamide', 'amide'):
    rows = api.find(database, motif=motif).rows
print(*rss(), len(rows))
del rows
gc.collect()
print(*rss())
api.find(database, similar='CC(=O)N(C)c1ccccc1')
gc.collect()
print(*rss())
"""


def measure_caches(database, db: Path, exe: Path, env: dict, repeats: int, cold: int) -> None:  # type: ignore[no-untyped-def]
    """What each cache saves on this registry (see the module docstring); long: one line of
    figures per cache, in the order they are printed."""
    from registry import api
    from registry.search import cachefile, engine
    from registry.search.index import load_index
    from registry.search.listing import load_listing

    def index_load(rebuild: bool = False, fresh: bool = False) -> None:
        if fresh:
            cachefile.forget()
        with database.read() as conn:
            load_index(database, conn, rebuild=rebuild)

    def listing_load(rebuild: bool = False, fresh: bool = False) -> None:
        if fresh:
            cachefile.forget()
        with database.read() as conn:
            load_listing(database, conn, rebuild=rebuild)

    print("what the caches save (medians):")
    print(
        f"  screening index: build {_median_s(lambda: index_load(rebuild=True), 1):.2f} s; "
        f"map from <db>.fpindex {_median_s(lambda: index_load(fresh=True), repeats):.3f} s; "
        f"held (state check only) {_median_s(index_load, repeats):.4f} s"
    )
    Path(f"{db}.simindex").unlink(missing_ok=True)
    cachefile.forget()
    similar = "CC(=O)N(C)c1ccccc1"
    built = _median_s(lambda: api.find(database, similar=similar), 1)
    cachefile.forget()
    mapped = _median_s(lambda: api.find(database, similar=similar), 1)
    held = _median_s(lambda: api.find(database, similar=similar), repeats)
    print(
        f"  similarity search: first (fingerprints built) {built:.2f} s; new process with "
        f"<db>.simindex {mapped:.2f} s; warm {held:.2f} s"
    )
    print(
        f"  listing: build {_median_s(lambda: listing_load(rebuild=True), 1):.2f} s; map from "
        f"<db>.listing {_median_s(lambda: listing_load(fresh=True), repeats):.3f} s"
    )
    filters = {"barrier": ">= 80 kJ/mol", "solvent": "chlorinated"}
    filtered = _median_s(lambda: api.find(database, motif="cp-metal", **filters), repeats)
    plain = _median_s(lambda: api.find(database, motif="cp-metal"), repeats)
    print(
        f"  filters in SQL per search (what an in-process memo of them would save): "
        f"{filtered - plain:.3f} s ({filtered:.3f} s with, {plain:.3f} s without)"
    )
    sql_code = (
        "import sys\nfrom registry.cli.main import run\nfrom registry.search import engine\n"
        "if sys.argv[1] == 'sql':\n    engine.load_listing = lambda *a, **k: None\n"
        "sys.argv = ['fluxledger', 'find', *sys.argv[2:]]\nrun()\n"
    )
    print(f"  {'query':<20}{'rows':>8}{'warm s':>9}{'no-list':>9}{'cold s':>9}{'no-list':>9}")
    for kind, text in (("motif", "sulfonamide"), ("motif", "amide"),
                       ("motif", "ring6-heterocycle"), ("smarts", "c1ccccc1")):  # fmt: skip
        spec = {kind: text}
        listed = _median_s(lambda s=spec: api.find(database, **s).rows, repeats)
        with_rows = api.find(database, **spec).total_rows
        original = engine.load_listing
        engine.load_listing = lambda *a, **k: None  # type: ignore[assignment]
        try:
            through_sql = _median_s(lambda s=spec: api.find(database, **s).rows, repeats)
        finally:
            engine.load_listing = original
        times: dict[str, list[float]] = {"listing": [], "sql": []}
        for _ in range(cold):
            for mode in ("listing", "sql"):
                t0 = time.perf_counter()
                subprocess.run(
                    [sys.executable, "-c", sql_code, mode, f"--{kind}", text, "--csv"],
                    check=True, env=env, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL,
                )  # fmt: skip
                times[mode].append(time.perf_counter() - t0)
        print(
            f"  {text:<20}{with_rows:>8,}{listed:>9.3f}{through_sql:>9.3f}"
            f"{statistics.median(times['listing']):>9.2f}{statistics.median(times['sql']):>9.2f}"
        )
    out = subprocess.run(
        [sys.executable, "-c", _MEMORY_CODE, str(db)],
        check=True, capture_output=True, text=True, env=env,
    )  # fmt: skip
    lines = [[float(v) for v in line.split()] for line in out.stdout.splitlines()]
    (anon0, file0), (anon1, file1, rows), (anon2, file2), (anon3, file3) = lines
    print(
        f"  memory of a warm library process (MB, own / file-backed maps): {anon0:.0f} / "
        f"{file0:.0f} after imports and opening; {anon1:.0f} / {file1:.0f} holding the last "
        f"result ({rows:,.0f} rows as dicts); {anon2:.0f} / {file2:.0f} after dropping it; "
        f"{anon3:.0f} / {file3:.0f} after a similarity search\n"
    )


def main() -> None:
    # long: one benchmark's steps in the order they run, printed as they go
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("n", nargs="?", type=int, default=100_000)
    parser.add_argument("--repeats", type=int, default=5)
    parser.add_argument("--cold-repeats", type=int, default=3)
    parser.add_argument("--caches", action="store_true", help="measure what each cache saves")
    args = parser.parse_args()

    rss_start = _rss_mb()
    from registry import api
    from registry.search import build_query, cachefile, find, get_motif
    from registry.search.index import load_index
    from registry.search.listing import load_listing
    from registry.search.matching import default_threads, search_positions

    db = registry_path(args.n)
    threads = default_threads()
    database = api.open_registry(str(db))
    exe = Path(sys.executable).with_name("fluxledger")
    env = {**os.environ, "FLUXLEDGER_DB": str(db)}
    if args.caches:
        measure_caches(database, db, exe, env, args.repeats, args.cold_repeats)
    t0 = time.perf_counter()
    with database.read() as conn:
        index = load_index(database, conn)
    print(f"registry {db.name}: {len(index):,} compounds; index ready in "
          f"{time.perf_counter() - t0:.2f} s; {threads} thread(s); RDKit confirmation")  # fmt: skip
    t0 = time.perf_counter()
    library, library_ids = floor_library(db)
    print(
        f"floor library (trusted SMILES + pattern holder) filled in {time.perf_counter() - t0:.1f} s"
    )
    t0 = time.perf_counter()
    with database.read() as conn:
        listing = load_listing(database, conn, rebuild=True)
    built_s = time.perf_counter() - t0
    with database.read() as conn:
        t0 = time.perf_counter()
        cachefile.state_of(conn, ("structure", "listing"), ("compound", "measurement"))
        state_s = time.perf_counter() - t0
    assert listing is not None
    print(
        f"measurement listing: {len(listing):,} rows rebuilt in {built_s:.2f} s (once after a "
        f"write); checking the registry state {1000 * state_s:.1f} ms per search"
    )

    def startup() -> None:
        subprocess.run([sys.executable, "-c", "from rdkit import Chem"], check=True)

    print(
        "Timings are medians; floor/warm and start-up/cold runs alternate so that machine load "
        "falls on both alike.\n"
    )
    cases = [("motif", m) for m in MOTIFS] + [("smarts", s) for s in SMARTS]
    header = (
        f"{'query':<20}{'hits':>7}{'screen':>8}{'floor s':>9}{'search s':>9}{'find s':>8}"
        f"{'find/fl':>8}{'start s':>8}{'floor2':>8}{'cold s':>8}{'budget':>8}{'cold/b':>7}  same"
    )
    print(header)
    print("-" * len(header))
    ratios_warm, ratios_cold = [], []
    for kind, text in cases:
        query = build_query(motif=get_motif(text)) if kind == "motif" else build_query(smarts=text)

        def floor(q=query):  # type: ignore[no-untyped-def]
            hits: set[int] = set()
            for mol in q.mols:
                hits.update(
                    library.GetMatches(
                        mol, recursionPossible=True, useChirality=False,
                        useQueryQueryMatches=False, numThreads=threads,
                        maxResults=len(library_ids),
                    )
                )  # fmt: skip
            return hits

        def warm(q=query):  # type: ignore[no-untyped-def]
            result = find(database, query=q, threads=threads)
            built = len(result.rows)  # the row dicts are built on first use: time them too
            assert built == len(result.table)
            return result

        def compounds_only(q=query):  # type: ignore[no-untyped-def]
            with database.read() as conn:
                return search_positions(load_index(database, conn), q, threads=threads)

        option = ["--motif", text] if kind == "motif" else ["--smarts", text]

        def cold(o=option) -> None:  # type: ignore[no-untyped-def]
            subprocess.run(
                [str(exe), "find", *o, "--csv"],
                check=True, env=env, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL,
            )  # fmt: skip

        result = warm()  # first call maps the cache files
        times: dict[str, list[float]] = {"floor": [], "warm": [], "search": []}
        floor_hits: set[int] = set()
        for _ in range(args.repeats):
            for name, fn in (("floor", floor), ("warm", warm), ("search", compounds_only)):
                t0 = time.perf_counter()
                value = fn()
                times[name].append(time.perf_counter() - t0)
                if name == "floor":
                    floor_hits = value
                elif name == "warm":
                    result = value
        # the floor is timed again beside the cold runs: this machine's speed drifts by 10–30 %
        # over minutes, and the budget should come from the same minutes as the cold runs
        cold_times: dict[str, list[float]] = {"start": [], "cold": [], "floor": []}
        for _ in range(args.cold_repeats):
            for name, fn in (("start", startup), ("cold", cold), ("floor", floor)):
                t0 = time.perf_counter()
                fn()
                cold_times[name].append(time.perf_counter() - t0)
        floor_s, warm_s = statistics.median(times["floor"]), statistics.median(times["warm"])
        search_s = statistics.median(times["search"])
        start_s, cold_s, floor_cold_s = (
            statistics.median(cold_times[k]) for k in ("start", "cold", "floor")
        )
        same = sorted(library_ids[i] for i in floor_hits) == sorted(
            {r["compound_id"] for r in result.rows}
        )
        budget = floor_cold_s + start_s + 0.5
        ratios_warm.append(warm_s / floor_s)
        ratios_cold.append(cold_s / budget)
        print(
            f"{text:<20}{result.stats.matched:>7,}{result.stats.screened:>8,}{floor_s:>9.3f}"
            f"{search_s:>9.3f}{warm_s:>8.3f}{warm_s / floor_s:>8.2f}{start_s:>8.2f}"
            f"{floor_cold_s:>8.3f}{cold_s:>8.2f}{budget:>8.2f}{cold_s / budget:>7.2f}  {'yes' if same else 'NO'}",
            flush=True,
        )
    print(
        f"\nmedian warm/floor {statistics.median(ratios_warm):.2f} (target ≤ 1.5; worst "
        f"{max(ratios_warm):.2f}); median cold/budget {statistics.median(ratios_cold):.2f} "
        f"(target ≤ 1.0; worst {max(ratios_cold):.2f})"
    )
    print(
        "search = compound hits only (screen + confirm); find = the library call with its "
        "measurement rows;\nfloor2 = the floor timed again beside the cold runs; budget = floor2 "
        "+ Python/RDKit start-up + 0.5 s;\ncold = a new 'fluxledger find … --csv' process; "
        "same = identical compound sets to the floor"
    )
    # what a notebook that searched holds: the library's own objects plus RDKit and numpy (the
    # floor library above, ~0.1 GB of this process, is the benchmark's, not the search's)
    print(
        f"resident memory of this process: {_rss_mb():.0f} MB (at start {rss_start:.0f} MB); "
        f"the caches are file-backed maps: index {_file_mb(db, '.fpindex'):.0f} MB, listing "
        f"{_file_mb(db, '.listing'):.0f} MB on disk"
    )
    database.close()


def _file_mb(db: Path, suffix: str) -> float:
    try:
        return Path(f"{db}{suffix}").stat().st_size / 1e6
    except OSError:
        return float("nan")


if __name__ == "__main__":
    main()
