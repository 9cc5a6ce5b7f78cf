"""Benchmark: what flagged values cost — the ``flagged`` listing column, the listing cache's
state, the flagged/clean filter, and the status rule in a check of the whole registry.

Builds the registry of ``bench_check.py`` (N measurements, about one in seven with an open
error finding once checked), checks it once, then times in this process, alternating the
variants of each pair so that machine load falls on both alike (medians of ``rounds``):

* the full listing query (every measurement, id order: what the ``<db>.listing`` cache is
  built from, and what ``list`` without a limit reads) with and without the ``flagged`` column;
* the state a listing cache is valid for, with and without the open-error digest (once per
  ``find``);
* ``list --flagged`` and ``list --clean`` against ``list`` (all rows);
* a check of the whole registry when every flagged measurement's status was reset to draft
  (so the status rule flags each again, with a history revision each) against a check in
  which nothing changed, and the status rule's query alone.

Usage: python benchmarks/bench_flags.py [N] [rounds]
"""

from __future__ import annotations

import statistics
import sys
import tempfile
import time
from collections.abc import Callable
from pathlib import Path
from typing import Any

sys.path.insert(0, str(Path(__file__).resolve().parent))


def _timed(fn: Callable[[], Any]) -> float:
    start = time.perf_counter()
    fn()
    return time.perf_counter() - start


def _pairs(rounds: int, variants: dict[str, Callable[[], Any]]) -> dict[str, float]:
    """Median wall time of each variant, the variants run in turn in every round."""
    times: dict[str, list[float]] = {name: [] for name in variants}
    for _ in range(rounds):
        for name, fn in variants.items():
            times[name].append(_timed(fn))
    return {name: statistics.median(t) for name, t in times.items()}


def main(argv: list[str]) -> None:
    from bench_check import build

    from registry import api
    from registry.record.fields import LISTING_COLUMNS, LISTING_FROM, LISTING_SELECT
    from registry.search import cachefile
    from registry.search.filters import listing_filters, listing_rows
    from registry.search.listing import COUNTERS, TABLES, listing_state
    from registry.validation import check_measurements, out_of_step

    n = int(argv[0]) if argv else 20_000
    rounds = int(argv[1]) if len(argv) > 1 else 5
    folder = Path(tempfile.mkdtemp(prefix="bench_flags_"))
    path = folder / "flags.sqlite"
    t0 = time.perf_counter()
    build(path, n)
    database = api.open_registry(str(path))
    first = check_measurements(database, actor="bench")
    print(f"registry of {n:,} measurements built and checked in {time.perf_counter() - t0:.1f} s;"
          f" {len(first.status_changes):,} flagged by that first check")  # fmt: skip

    plain = ", ".join(v for k, v in LISTING_COLUMNS.items() if k != "flagged")
    without_flag = f"SELECT {plain} FROM {LISTING_FROM} ORDER BY m.id"

    def rows(sql: str) -> Callable[[], Any]:
        def run() -> Any:
            with database.read() as conn:
                return conn.rows(sql)

        return run

    def state(with_digest: bool) -> Callable[[], Any]:
        def run() -> Any:
            with database.read() as conn:
                if with_digest:
                    return listing_state(conn)
                return cachefile.state_of(conn, COUNTERS, TABLES)

        return run

    def listed(**filters: Any) -> Callable[[], Any]:
        chosen = listing_filters(**filters)

        def run() -> Any:
            with database.read() as conn:
                return listing_rows(conn, chosen)

        return run

    set_again: list[int] = []

    def reset_then_check() -> float:
        database.write(
            lambda conn: conn.execute(
                "UPDATE measurement SET status = 'draft' WHERE status = 'flagged'"
            )
        )
        start = time.perf_counter()
        set_again.append(len(check_measurements(database, actor="bench").status_changes))
        return time.perf_counter() - start

    def status_query() -> Any:
        with database.read() as conn:
            return out_of_step(conn)

    listing = _pairs(rounds, {"with flagged": rows(f"{LISTING_SELECT} ORDER BY m.id"),
                              "without": rows(without_flag)})  # fmt: skip
    states = _pairs(rounds * 20, {"with digest": state(True), "without": state(False)})
    filters = _pairs(rounds, {"all rows": listed(), "--flagged": listed(flagged=True),
                              "--clean": listed(flagged=False)})  # fmt: skip
    flagging: list[float] = []
    unchanged: list[float] = []
    for _ in range(rounds):
        flagging.append(reset_then_check())
        unchanged.append(_timed(lambda: check_measurements(database, actor="bench")))
    query = _pairs(rounds, {"status rule query": status_query})
    again = len(check_measurements(database, actor="bench").status_changes)
    database.close()

    def line(label: str, value: float, base: float | None = None) -> str:
        ratio = f"   ratio {value / base:.2f}" if base else ""
        return f"  {label:<44} {value:8.4f} s{ratio}"

    print(f"medians of {rounds} alternating rounds (states: {rounds * 20})")
    print("listing query, every measurement:")
    print(line("without the flagged column", listing["without"]))
    print(line("with it", listing["with flagged"], listing["without"]))
    print("listing cache state (once per find):")
    print(line("without the open-error digest", states["without"]))
    print(line("with it", states["with digest"], states["without"]))
    print("listing with the filter (every row as a dict):")
    print(line("all rows", filters["all rows"]))
    print(line("--flagged", filters["--flagged"], filters["all rows"]))
    print(line("--clean", filters["--clean"], filters["all rows"]))
    print(f"check of the whole registry ({set_again[0]:,} statuses set again each round):")
    print(line("nothing changed", statistics.median(unchanged)))
    print(line("every flag set again (+ history)", statistics.median(flagging),
               statistics.median(unchanged)))  # fmt: skip
    print(line("the status rule's query alone", query["status rule query"]))
    print(f"statuses out of step after the runs: {again}")


if __name__ == "__main__":
    main(sys.argv[1:])
