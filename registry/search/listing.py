"""The measurement listing: every measurement's search row, kept beside a SQLite registry.

A motif search ends by listing the measurements of the compounds it matched; for a common
motif that is tens of thousands of rows. Reading them through SQL costs more than the search
itself (SQLite joins three tables and Python builds a tuple of ~20 values per row, 4–7 µs a
row), and writing them as CSV costs as much again. So the listing is kept ready:

- ``<db>.listing``, memory-mapped: measurement ids (ascending), their compound ids, a
  retracted flag, the sort keys (ΔG‡, its temperature, and the rank of the compound label,
  solvent and method in case-insensitive order) and each measurement's CSV line
  (:data:`CSV_COLUMNS`). A search picks its rows with numpy and a cold ``fluxledger find
  --csv`` writes the picked lines as they are.
- in the searching process, the rows themselves as tuples (:data:`ROW_COLUMNS`), read once
  and kept while the registry file is unchanged, so that repeated library calls
  (:func:`registry.search.find` in a notebook or a service) pick tuples instead of reading SQL.
  This costs memory, about 1 KB per measurement.

The file is rebuilt when its *signature* differs from the database's: the newest revision id
(every change made through fluxledger records one) and id-weighted sums over the values and
text lengths the listing shows. A change made behind fluxledger's back (plain SQL) that keeps
every value and every text length would go unseen until ``find --rebuild-index``. When the SQLite file and its WAL look exactly as when the signature
was last checked, the check is skipped (:mod:`.cachefile`). Server databases have no listing:
their rows are read through SQL on every search.
"""

from __future__ import annotations

import csv
import math
from collections.abc import Sequence
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np

from registry.search import cachefile

MAGIC = b"FLXLIST1"
FORMAT_VERSION = 1

#: the measurement listing columns (as ``registry.api.LIST_COLUMNS``, which a test compares)
#: plus what search filters and highlights need; m = measurement, c = compound, p = process
ROW_COLUMNS: dict[str, str] = {
    "id": "m.id",
    "label": "m.label",
    "compound": "c.label",
    "compound_name": "c.name",
    "smiles": "c.smiles_canonical",
    "process": "p.kind",
    "nucleus": "p.nucleus",
    "method": "m.method",
    "solvent": "m.solvent_text",
    "field_mhz": "m.field_mhz",
    "dg_kj_mol": "m.dg_kj_mol",
    "dg_err_kj_mol": "m.dg_err_kj_mol",
    "dg_t_k": "m.dg_t_k",
    "dh_kj_mol": "m.dh_kj_mol",
    "ds_j_mol_k": "m.ds_j_mol_k",
    "status": "m.status",
    "reference": "m.reference",
    "compound_id": "m.compound_id",
    "t_min_k": "m.t_min_k",
    "t_max_k": "m.t_max_k",
}
ROWS_SQL = (
    f"SELECT {', '.join(ROW_COLUMNS.values())} FROM measurement m "
    "JOIN compound c ON c.id = m.compound_id LEFT OUTER JOIN process p ON p.id = m.process_id"
)

#: the columns of ``fluxledger find --csv`` (a similarity search adds ``similarity`` third)
CSV_COLUMNS: tuple[str, ...] = (
    "id",
    "compound_id",
    "compound",
    "process",
    "nucleus",
    "method",
    "solvent",
    "dg_kj_mol",
    "dg_t_k",
    "status",
    "reference",
    "smiles",
    "dg_err_kj_mol",
)
#: text sort keys: column → rank array name in the file
TEXT_KEYS = ("compound", "solvent", "method")
#: numeric sort keys
NUMBER_KEYS = ("dg_kj_mol", "dg_t_k")


# ---------------------------------------------------------------- CSV lines


def csv_lines(table: Sequence[Sequence[Any]]) -> list[str]:
    """One CSV line per row (``\\n`` ended), as Python's csv module writes them; a value that is
    not a finite number is written empty (checked per column first, which is cheap)."""
    if not _all_finite(table):
        table = [tuple(_plain(v) for v in t) for t in table]
    lines: list[str] = []
    sink = _Sink(lines.append)
    csv.writer(sink, lineterminator="\n").writerows(table)  # one write() per row
    return lines


@dataclass
class _Sink:
    write: Any


def _plain(value: Any) -> Any:
    return None if isinstance(value, float) and not math.isfinite(value) else value


def _all_finite(table: Sequence[Sequence[Any]]) -> bool:
    """No NaN or infinity in any numeric column (an exact sum of a column is finite then)."""
    for column in zip(*table, strict=True):
        try:
            total = math.fsum([v for v in column if v is not None])
        except TypeError:  # a column of text: nothing to check
            continue
        except OverflowError:
            return False
        if not math.isfinite(total):
            return False
    return True


def header_line(columns: Sequence[str]) -> str:
    return ",".join(columns) + "\n"


# ---------------------------------------------------------------- the listing


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
    signature: dict[str, Any]
    rows: list[tuple[Any, ...]] | None = None  # ROW_COLUMNS tuples, when read in this process
    notes: list[str] = field(default_factory=list)
    _keep: Any = None  # the mmap the arrays view

    def __len__(self) -> int:
        return int(self.ids.shape[0])

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
        the value go last (as :func:`registry.search.engine._sort` sorts tuples)."""
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

    def table(self, positions: np.ndarray, conn: Any = None) -> list[tuple[Any, ...]]:
        """The ROW_COLUMNS tuples of these positions, in this order: picked from :attr:`rows`
        when they are kept, else read by measurement id through ``conn``."""
        if self.rows is not None:
            rows = self.rows
            return [rows[p] for p in positions.tolist()]
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


#: id-weighted sums over what the listing shows, one scan per table (~0.1 s per 100k rows, and
#: only after the registry file changed): an edit made behind fluxledger's back that changes a
#: value or a text's length moves them even without a revision
_CONTENT_SQL = (
    "SELECT count(*), coalesce(max(id), 0), total(id * (length(coalesce(label, '')) "
    "+ 3 * length(coalesce(method, '')) + 5 * length(coalesce(solvent_text, '')) "
    "+ 7 * length(coalesce(status, '')) + 11 * length(coalesce(reference, '')))), "
    "total(id * dg_kj_mol), total(id * dg_err_kj_mol), total(id * dg_t_k), total(id * dh_kj_mol), "
    "total(id * ds_j_mol_k), total(id * field_mhz), total(id * t_min_k), total(id * t_max_k), "
    "total(id * compound_id), total(id * process_id) FROM measurement",
    "SELECT count(*), total(id * (length(coalesce(label, '')) + 3 * length(coalesce(name, '')) "
    "+ 5 * length(coalesce(smiles_canonical, '')))) FROM compound",
    "SELECT count(*), total(id * (length(coalesce(kind, '')) "
    "+ 3 * length(coalesce(nucleus, '')))) FROM process",
)


def signature(conn: Any) -> dict[str, Any]:
    """What the listing must agree with: the newest revision (every change made through
    fluxledger records one) and content sums of the three tables it reads."""
    from registry.search.sqlite_read import fetch

    revision = fetch(conn, "SELECT coalesce(max(id), 0) FROM revision")[0][0]
    sums = [[float(v) for v in fetch(conn, sql)[0]] for sql in _CONTENT_SQL]
    return {"revision": int(revision), "measurement": sums[0], "compound": sums[1],
            "process": sums[2]}  # fmt: skip


def read_rows(conn: Any) -> list[tuple[Any, ...]]:
    """Every measurement's ROW_COLUMNS tuple, in id order."""
    from registry.search.sqlite_read import fetch

    return [tuple(r) for r in fetch(conn, f"{ROWS_SQL} ORDER BY m.id")]


def rows_by_id(conn: Any, ids: list[int]) -> list[tuple[Any, ...]]:
    """The ROW_COLUMNS tuples of these measurement ids, in this order."""
    from registry.search.sqlite_read import fetch_with_ids

    at = list(ROW_COLUMNS).index("id")
    by_id = {r[at]: tuple(r) for r in fetch_with_ids(conn, f"{ROWS_SQL} WHERE 1 = 1", "m.id", ids)}
    return [by_id[i] for i in ids]


def from_rows(rows: list[tuple[Any, ...]], sig: dict[str, Any]) -> Listing:
    """Build the listing from every measurement's tuple (id order)."""
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
        signature=sig,
        rows=rows,
    )


# ---------------------------------------------------------------- the cache file


def listing_path(database: Any) -> Path | None:
    """``<db>.listing`` beside a SQLite file; None for other databases (no listing)."""
    if not database.is_sqlite or database.path is None or str(database.path) == ":memory:":
        return None
    return Path(f"{database.path}.listing")


def save_listing(listing: Listing, path: Path) -> None:
    arrays = {
        "ids": listing.ids,
        "compound_ids": listing.compound_ids,
        "retracted": listing.retracted.astype(np.uint8),
        **{f"number_{k}": v for k, v in listing.numbers.items()},
        **{f"rank_{k}": v for k, v in listing.ranks.items()},
        "line_offsets": listing.line_offsets,
        "line_blob": listing.line_blob,
    }
    header = {"format": FORMAT_VERSION, "signature": listing.signature}
    cachefile.save_arrays(path, MAGIC, header, arrays)


def read_listing(path: Path) -> Listing | None:
    """Map a listing file; None when it is missing, damaged or of another format."""
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
            signature=header["signature"],
            _keep=mapped,
        )
    except KeyError:
        return None
    sizes = [listing.compound_ids, listing.retracted, *listing.numbers.values()]
    sizes += list(listing.ranks.values())
    if any(a.shape != (n,) for a in sizes) or listing.line_offsets.shape != (n + 1,):
        return None
    if n and int(listing.line_offsets[-1]) != listing.line_blob.shape[0]:
        return None
    return listing


#: above this many measurements the rows are not kept in memory (~1.2 KB each), only read by id
KEEP_ROWS_MAX = 500_000

#: listings already checked in this process, with the registry file state they were checked at
_LOADED: dict[str, tuple[tuple[int, ...], Listing]] = {}


def load_listing(
    database: Any,
    conn: Any,
    state: tuple[int, ...] | None,
    *,
    keep_rows: bool,
    rebuild: bool = False,
) -> Listing | None:
    """The current listing of a SQLite registry (None for server databases).

    ``conn`` is the search's read transaction: a listing that must be checked or rebuilt is
    checked against, or read from, that snapshot. ``state`` is :func:`.cachefile.file_state`
    taken *before* that transaction began, so that a write racing the search only makes the
    next search check again (never marks an old listing current for a newer file). With
    ``keep_rows`` every measurement's tuple is read too and kept with the listing while the file
    is unchanged (for a process that searches again; a one-off search reads only its rows), up
    to :data:`KEEP_ROWS_MAX` measurements. A listing that cannot be written (a
    read-only folder) still serves this search; a note says so.
    """
    path = listing_path(database)
    if path is None:
        return None
    key = str(path)
    if state is None:  # pragma: no cover - listing_path already refused
        return None
    known = _LOADED.get(key)
    if not rebuild and known is not None and known[0] == state:
        listing = known[1]
        if not keep_rows or listing.rows is not None:
            return listing
    else:
        listing = None if rebuild else read_listing(path)
        if listing is not None and not cachefile.state_matches(path, state, listing.signature):
            current = signature(conn)
            if current == listing.signature:
                cachefile.remember_state(path, state, current)
            else:
                listing = None
    keep_rows = keep_rows and (listing is None or len(listing) <= KEEP_ROWS_MAX)
    if listing is not None and keep_rows and listing.rows is None:
        rows = read_rows(conn)
        at = list(ROW_COLUMNS).index("id")
        ids = np.fromiter((r[at] for r in rows), dtype=np.int64, count=len(rows))
        if np.array_equal(ids, listing.ids):
            listing.rows = rows
        else:  # written meanwhile: rebuild from the rows just read
            listing = _build(path, from_rows(rows, signature(conn)), state)
    if listing is None:
        listing = _build(path, from_rows(read_rows(conn), signature(conn)), state)
        if not keep_rows or len(listing) > KEEP_ROWS_MAX:
            listing.rows = None  # read for the build; kept only where asked and small enough
    _LOADED[key] = (state, listing)
    return listing


def _build(path: Path, listing: Listing, state: tuple[int, ...]) -> Listing:
    try:
        save_listing(listing, path)
    except OSError as exc:
        listing.notes.append(f"could not write the listing cache {path}: {exc.strerror or exc}")
        return listing
    cachefile.remember_state(path, state, listing.signature)
    return listing
