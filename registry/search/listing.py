"""The measurement listing: every measurement's search row, kept beside a SQLite registry.

A motif search ends by listing the measurements of the compounds it matched; for a common
motif that is tens of thousands of rows. Reading them through SQL and writing them as CSV
costs about 0.4 s per 100,000 rows here, so the listing keeps them ready in ``<db>.listing``
(:mod:`.cachefile`), memory-mapped: measurement ids (ascending), their compound ids, a
retracted flag, the sort keys (ΔG‡, its temperature, and the rank of the compound label,
solvent and method in case-insensitive order) and each measurement's CSV line
(:data:`.result.CSV_COLUMNS`). A search picks its rows with numpy; a ``find --csv`` writes the
picked lines as they are; a search that needs the rows as values reads just those by id.

The file records the state it was built from: the ``listing`` change counter (every update or
delete of a measurement, compound or process row, plain SQL included), the measurement
table's row count and largest id, and a digest of the open error findings (each line carries
the ``flagged`` column, which a check or an acceptance can change without touching a
measurement row). Any difference rebuilds it (about a second per 100,000 measurements, once
after a write). Server registries have no listing: their rows are read through SQL on every
search.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np

from registry.record.fields import LISTING_SELECT
from registry.search import cachefile
from registry.search.result import CSV_COLUMNS, ROW_COLUMNS, csv_lines
from registry.storage.connection import Connection
from registry.storage.database import Database

MAGIC = b"FLXLIST1"
FORMAT_VERSION = 3  # 2: valid for a change-counter state; 3: lines carry ``flagged``
SUFFIX = ".listing"
COUNTERS = ("listing",)
TABLES = ("measurement",)
#: text sort keys: column → rank array name in the file
TEXT_KEYS = ("compound", "solvent", "method")
#: numeric sort keys
NUMBER_KEYS = ("dg_kj_mol", "dg_t_k")


@dataclass
class Listing:
    """Every measurement of the registry, in measurement-id order (see the module docstring)."""

    ids: np.ndarray  # int64, ascending
    compound_ids: np.ndarray  # int64
    retracted: np.ndarray  # bool
    numbers: dict[str, np.ndarray]  # NUMBER_KEYS → float64, NaN where missing
    ranks: dict[str, np.ndarray]  # TEXT_KEYS → int32 rank (missing values rank last)
    line_offsets: np.ndarray  # int64, len n + 1 (byte offsets into line_blob)
    line_blob: np.ndarray  # uint8: the CSV lines, UTF-8
    notes: list[str] = field(default_factory=list)
    _keep: Any = None  # the mmap the arrays view

    def __len__(self) -> int:
        return int(self.ids.shape[0])

    def take_notes(self) -> list[str]:
        notes, self.notes = self.notes, []
        return notes

    def pick(
        self, compound_ids: np.ndarray, allowed_ids: np.ndarray | None, include_retracted: bool
    ) -> np.ndarray:
        """Positions (ascending, i.e. in measurement-id order) of the measurements on these
        compounds (sorted ids) that are allowed: by ``allowed_ids`` (sorted measurement ids
        passing the filters) when given, else by not being retracted."""
        if len(self) == 0 or compound_ids.size == 0:
            return np.empty(0, dtype=np.int64)
        keep = _member(self.compound_ids, compound_ids)
        if allowed_ids is not None:
            keep &= _member(self.ids, allowed_ids)
        elif not include_retracted:
            keep &= ~self.retracted
        return np.flatnonzero(keep)

    def order(self, positions: np.ndarray, column: str, descending: bool) -> np.ndarray:
        """``positions`` sorted by a sort key; ties keep measurement-id order and rows without
        the value go last (as :func:`.result.sort_rows` sorts tuples)."""
        if column in self.numbers:
            values = self.numbers[column][positions]
            present = ~np.isnan(values)
            chosen = values[present]
            key = -chosen if descending else chosen
            ordered = positions[present][np.argsort(key, kind="stable")]
            return np.concatenate([ordered, positions[~present]])
        if column in self.ranks:
            ranks = self.ranks[column][positions]
            if descending:  # pragma: no cover - no descending text key is offered
                raise ValueError(f"no descending order on {column}")
            return positions[np.argsort(ranks, kind="stable")]
        return positions  # a key the listing lacks: every row 'missing', id order

    def lines(self, positions: np.ndarray) -> bytes:
        """The CSV lines of these positions, concatenated in this order."""
        if positions.size == 0:
            return b""
        # runs of consecutive positions are one slice each (a motif hit list in id order is
        # mostly runs); slices of a memoryview copy nothing until the join
        breaks = np.flatnonzero(np.diff(positions) != 1) + 1
        firsts = positions[np.concatenate([[0], breaks])]
        lasts = positions[np.concatenate([breaks - 1, [positions.size - 1]])]
        starts = self.line_offsets[firsts].tolist()
        ends = self.line_offsets[lasts + 1].tolist()
        view = memoryview(self.line_blob)
        return b"".join([view[a:b] for a, b in zip(starts, ends, strict=True)])

    def table(self, positions: np.ndarray, conn: Connection) -> list[tuple[Any, ...]]:
        """The row tuples of these positions, in this order, read by measurement id."""
        if positions.size == 0:
            return []
        return rows_by_id(conn, self.ids[positions].tolist())


def _member(values: np.ndarray, sorted_set: np.ndarray) -> np.ndarray:
    """``values ∈ sorted_set`` elementwise (np.isin would pull in extra numpy modules)."""
    if sorted_set.size == 0:
        return np.zeros(values.shape, dtype=bool)
    at = np.searchsorted(sorted_set, values)
    at[at >= sorted_set.size] = sorted_set.size - 1
    return sorted_set[at] == values


def rows_by_id(conn: Connection, ids: list[int]) -> list[tuple[Any, ...]]:
    """The row tuples of these measurement ids, in this order."""
    at = ROW_COLUMNS.index("id")
    found = conn.rows_where_in(f"{LISTING_SELECT} WHERE 1 = 1", "m.id", ids)
    by_id = {r[at]: r for r in found}
    return [by_id[i] for i in ids]


def from_rows(rows: list[tuple[Any, ...]]) -> Listing:
    """Build the listing from every measurement's row tuple (id order)."""
    at = {name: i for i, name in enumerate(ROW_COLUMNS)}
    n = len(rows)
    columns: list[tuple[Any, ...]] = list(zip(*rows, strict=True)) if rows else []

    def column(name: str) -> tuple[Any, ...]:
        return columns[at[name]] if columns else ()

    numbers = {k: np.array(column(k), dtype=np.float64).reshape(n) for k in NUMBER_KEYS}
    ranks = {}
    for key in TEXT_KEYS:
        values = column(key)
        order = {v: i for i, v in enumerate(sorted({v.lower() for v in values if v is not None}))}
        missing = len(order)
        ranks[key] = np.fromiter(
            (missing if v is None else order[v.lower()] for v in values), dtype=np.int32, count=n
        )
    picked = [at[c] for c in CSV_COLUMNS]
    lines = csv_lines([tuple(r[i] for i in picked) for r in rows])
    text = "".join(lines)
    blob = text.encode("utf-8")
    if len(blob) == len(text):  # ASCII: character lengths are byte lengths
        lengths = np.fromiter(map(len, lines), dtype=np.int64, count=n)
    else:
        lengths = np.fromiter((len(s.encode("utf-8")) for s in lines), dtype=np.int64, count=n)
    offsets = np.zeros(n + 1, dtype=np.int64)
    np.cumsum(lengths, out=offsets[1:])
    return Listing(
        ids=np.fromiter(column("id"), dtype=np.int64, count=n),
        compound_ids=np.fromiter(column("compound_id"), dtype=np.int64, count=n),
        retracted=np.fromiter((s == "retracted" for s in column("status")), dtype=bool, count=n),
        numbers=numbers,
        ranks=ranks,
        line_offsets=offsets,
        line_blob=np.frombuffer(blob, dtype=np.uint8),
    )


# ---------------------------------------------------------------- the cache file


def save_listing(listing: Listing, path: Path, state: dict) -> None:
    arrays = {
        "ids": listing.ids,
        "compound_ids": listing.compound_ids,
        "retracted": listing.retracted.astype(np.uint8),
        **{f"number_{k}": v for k, v in listing.numbers.items()},
        **{f"rank_{k}": v for k, v in listing.ranks.items()},
        "line_offsets": listing.line_offsets,
        "line_blob": listing.line_blob,
    }
    header = {"format": FORMAT_VERSION, "state": state}
    cachefile.save_arrays(path, MAGIC, header, arrays)


def read_listing(path: Path) -> tuple[Listing, dict] | None:
    """Map a listing file: (the listing, the state it was built for); None when it is missing,
    damaged or of another format."""
    found = cachefile.read_arrays(path, MAGIC, FORMAT_VERSION)
    if found is None:
        return None
    header, arrays, mapped = found
    try:
        n = arrays["ids"].shape[0]
        listing = Listing(
            ids=arrays["ids"],
            compound_ids=arrays["compound_ids"],
            retracted=arrays["retracted"].view(bool),
            numbers={k: arrays[f"number_{k}"] for k in NUMBER_KEYS},
            ranks={k: arrays[f"rank_{k}"] for k in TEXT_KEYS},
            line_offsets=arrays["line_offsets"],
            line_blob=arrays["line_blob"],
            _keep=mapped,
        )
        state = header["state"]
    except KeyError:
        return None
    sizes = [listing.compound_ids, listing.retracted, *listing.numbers.values()]
    sizes += list(listing.ranks.values())
    if any(a.shape != (n,) for a in sizes) or listing.line_offsets.shape != (n + 1,):
        return None
    if n and int(listing.line_offsets[-1]) != listing.line_blob.shape[0]:
        return None
    return listing, state


def listing_state(conn: Connection) -> dict:
    """The registry state a listing is valid for (see the module docstring).

    The open error findings are summed as (count, sum of ids, sum of measurement ids), which
    changes when the set of flagged measurements does. fluxledger moves the ``listing``
    counter then as well (the status follows the findings); the digest also covers
    retracted rows, whose status stays, and findings changed in plain SQL.
    """
    now = cachefile.state_of(conn, COUNTERS, TABLES)
    digest = conn.first(
        "SELECT count(*), coalesce(sum(id), 0), coalesce(sum(measurement_id), 0) "
        "FROM validation_finding WHERE severity = 'error' AND accepted_by IS NULL"
    ) or (0, 0, 0)
    now["open_errors"] = [int(v) for v in digest]
    return now


def load_listing(database: Database, conn: Connection, *, rebuild: bool = False) -> Listing | None:
    """The listing valid for ``conn``'s snapshot (None for server and in-memory registries):
    held in this process, mapped from its file, or rebuilt from this snapshot and written back
    (a file that cannot be written still serves this search; a note says so)."""
    path = cachefile.path_for(database, SUFFIX)
    if path is None or not database.is_sqlite:
        return None
    now = listing_state(conn)
    key = (database.key, "listing")
    if not rebuild:
        listing = cachefile.held(key, now)
        if listing is not None:
            return listing
        found = read_listing(path)
        if found is not None and found[1] == now:
            return cachefile.hold(key, now, found[0])
    listing = from_rows(conn.rows(f"{LISTING_SELECT} ORDER BY m.id"))
    done = cachefile.write_or_note(
        lambda: save_listing(listing, path, now), path, "listing cache", listing.notes
    )
    if done:
        reread = read_listing(path)
        if reread is not None:  # the mapped form: file-backed pages, not private memory
            reread[0].notes = listing.notes
            listing = reread[0]
    return cachefile.hold(key, now, listing)
