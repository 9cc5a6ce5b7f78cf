"""Motif search on PostgreSQL: the server screen (RDKit cartridge) against the client screen.

Data: the 100,000-compound molsets registry of ``benchmarks/find_data.py`` (built once and
cached under ``benchmarks/out/``), copied into a fresh PostgreSQL database with ``migrate-to``
(timed: the copy includes the cartridge's trigger building every server-side molecule). Queries:
the motif list of ``bench_find.py`` (selective to common). For each query, medians of R runs:

* client — the client's pattern-fingerprint screen over its cached index + RDKit confirmation
  (what ``find`` does on SQLite, and on PostgreSQL without the cartridge);
* server — the SMARTS sent to the server (``mol @> qmol`` with the GiST index) + the same RDKit
  confirmation of the server's candidates on the client.

'same' says whether both give identical compound sets. The server URL comes from
``FLUXLEDGER_BENCH_PG_URL`` or ``FLUXLEDGER_TEST_PG_URL`` (any database on a server where the
user may create databases). Usage: ``python benchmarks/bench_pg.py [N] [--repeats R]``.
"""

from __future__ import annotations

import argparse
import os
import shutil
import statistics
import sys
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))

from bench_find import MOTIFS, SMARTS  # noqa: E402
from find_data import OUT, registry_path  # noqa: E402

BENCH_DB = "fluxledger_bench_pg"


def median_time(fn, repeats: int) -> tuple[float, object]:  # type: ignore[no-untyped-def]
    times, value = [], None
    for _ in range(repeats):
        t0 = time.perf_counter()
        value = fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times), value


def server_url() -> str | None:
    return os.environ.get("FLUXLEDGER_BENCH_PG_URL") or os.environ.get("FLUXLEDGER_TEST_PG_URL")


def fresh_database(base: str) -> str:
    """Drop and create the benchmark database (with the cartridge); returns its URL."""
    from sqlalchemy import create_engine, make_url

    from registry.storage.database import to_url

    admin = create_engine(to_url(base), isolation_level="AUTOCOMMIT")
    with admin.connect() as conn:
        conn.exec_driver_sql(f"DROP DATABASE IF EXISTS {BENCH_DB} WITH (FORCE)")
        conn.exec_driver_sql(f"CREATE DATABASE {BENCH_DB}")
    admin.dispose()
    url = make_url(to_url(base)).set(database=BENCH_DB).render_as_string(hide_password=False)
    engine = create_engine(url, isolation_level="AUTOCOMMIT")
    with engine.connect() as conn:
        conn.exec_driver_sql("CREATE EXTENSION IF NOT EXISTS rdkit")
    engine.dispose()
    return url


def source_copy(n: int) -> Path:
    """A private copy of the cached benchmark registry, at the current schema."""
    from registry.storage import migrate
    from registry.storage.database import open_database

    original = registry_path(n)
    copy = OUT / f"bench_pg_source_{n}.sqlite"
    if not copy.exists() or copy.stat().st_mtime < original.stat().st_mtime:
        shutil.copyfile(original, copy)
    database = open_database(str(copy))
    migrate.upgrade(database)
    database.close()
    return copy


def main() -> None:
    # long: one benchmark's steps in the order they run, printed as they go
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("n", nargs="?", type=int, default=100_000)
    parser.add_argument("--repeats", type=int, default=3)
    args = parser.parse_args()
    base = server_url()
    if not base:
        print("bench_pg: skipped (set FLUXLEDGER_BENCH_PG_URL to a PostgreSQL server URL)")
        return
    os.environ.setdefault("FLUXLEDGER_CACHE_DIR", str(OUT / "cache"))

    from registry import api
    from registry.pg.screen import server_positions
    from registry.search import build_query, get_motif
    from registry.search.index import load_index
    from registry.search.matching import confirm, default_threads

    source = api.open_registry(str(source_copy(args.n)))
    url = fresh_database(base)
    report = api.migrate_to(source, url)
    rows = {t.table: t.target_rows for t in report.tables}
    print(
        f"migrate-to: {rows['compound']:,} compounds + {rows['measurement']:,} measurements "
        f"copied and checked in {report.seconds:.1f} s (ok={report.ok})"
    )
    pg = api.open_registry(url)
    info = api.server_search_status(pg)
    with pg.read() as conn:
        server_rdkit = conn.scalar("SELECT rdkit_toolkit_version()")
    from rdkit import rdBase

    print(
        f"server: RDKit cartridge {info['cartridge_version']} (toolkit {server_rdkit}); "
        f"{info['molecules_indexed']:,} molecules, {info['molecules_unreadable_on_server']} "
        f"unreadable there; client RDKit {rdBase.rdkitVersion}"
    )
    threads = default_threads()
    t0 = time.perf_counter()
    with source.read() as conn:
        sqlite_index = load_index(source, conn)
    with pg.read() as conn:
        pg_index = load_index(pg, conn)
    print(
        f"client indexes ready in {time.perf_counter() - t0:.1f} s "
        f"({len(sqlite_index):,} / {len(pg_index):,} compounds); {threads} thread(s)\n"
    )

    def client(q, index) -> set[int]:  # type: ignore[no-untyped-def]
        hits: set[int] = set()
        for mol, words in zip(q.mols, q.fingerprints, strict=True):
            found = confirm(index, index.screen(words), mol, threads=threads)
            hits.update(index.ids[found].tolist())
        return hits

    def server(q, index, counts: list[int]) -> set[int] | None:  # type: ignore[no-untyped-def]
        hits: set[int] = set()
        counts.clear()
        with pg.read() as conn:
            for text, mol in zip(q.pattern_texts, q.mols, strict=True):
                candidates = server_positions(conn, index.ids, None, text, q.kind)
                if candidates is None:
                    return None
                counts.append(int(candidates.size))
                found = confirm(index, candidates, mol, threads=threads)
                hits.update(index.ids[found].tolist())
        return hits

    cases = [("motif", m) for m in MOTIFS] + [("smarts", s) for s in SMARTS]
    header = (
        f"{'query':<22}{'hits':>8}{'fp screen':>11}{'server':>8}"
        f"{'client s':>10}{'server s':>10}{'srv/cli':>9}  same"
    )
    print(header)
    print("-" * len(header))
    ratios = []
    for kind, text in cases:
        query = build_query(motif=get_motif(text)) if kind == "motif" else build_query(smarts=text)
        screened = sum(int(sqlite_index.screen(w).size) for w in query.fingerprints)
        client(query, sqlite_index)  # warm both paths once
        counts: list[int] = []
        server(query, pg_index, counts)
        client_s, client_hits = median_time(lambda q=query: client(q, sqlite_index), args.repeats)
        server_s, server_hits = median_time(
            lambda q=query, c=counts: server(q, pg_index, c), args.repeats
        )
        if server_hits is None:
            print(f"{text:<22}  the server cannot read this pattern; find falls back to the client")
            continue
        same = client_hits == server_hits
        ratios.append(server_s / client_s)
        print(
            f"{text:<22}{len(client_hits):>8,}{screened:>11,}{sum(counts):>8,}"
            f"{client_s:>10.3f}{server_s:>10.3f}{server_s / client_s:>9.2f}  "
            f"{'yes' if same else 'NO'}",
            flush=True,
        )
    print(
        f"\nmedian server/client {statistics.median(ratios):.2f} "
        f"(best {min(ratios):.2f}, worst {max(ratios):.2f}); "
        "'fp screen' / 'server' = candidates each screen hands to the RDKit confirmation"
    )
    pg.close()
    source.close()


if __name__ == "__main__":
    main()
