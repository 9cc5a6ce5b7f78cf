"""What a search returns (:class:`FindResult`), how its rows are sorted, and its CSV form.

The rows are the measurement listing's columns (:data:`registry.record.fields.LISTING_COLUMNS`,
the one list ``list`` and ``find`` share); the CSV columns are ``TABLE_COLUMNS["find_csv"]``.
"""

from __future__ import annotations

import csv
import math
from collections.abc import Sequence
from dataclasses import dataclass
from functools import cached_property
from itertools import repeat
from operator import itemgetter
from typing import TYPE_CHECKING, Any, BinaryIO

import numpy as np

from registry.errors import UsageError
from registry.record.fields import LISTING_COLUMNS, TABLE_COLUMNS
from registry.search.matching import SearchStats

if TYPE_CHECKING:  # pandas only when a caller asks for a frame
    import pandas

#: the columns of every search row, in order
ROW_COLUMNS: tuple[str, ...] = tuple(LISTING_COLUMNS)
#: the columns of ``find --csv`` (a similarity search adds ``similarity`` third)
CSV_COLUMNS: tuple[str, ...] = TABLE_COLUMNS["find_csv"]

#: the columns ΔG‡ at a common temperature adds (see registry.search.at_temperature.SHOWN)
AT_SHOWN = ("dg_at_kj_mol", "dg_at_err_kj_mol", "at_t_k", "dg_at_from", "extrapolated")

#: sort names → (column, descending)
SORT_KEYS = {
    "id": ("id", False),
    "barrier": ("dg_kj_mol", False),
    "-barrier": ("dg_kj_mol", True),
    "temperature": ("dg_t_k", False),
    "-temperature": ("dg_t_k", True),
    "compound": ("compound", False),
    "solvent": ("solvent", False),
    "method": ("method", False),
    "similarity": ("similarity", True),
}


@dataclass
class FindResult:
    """Measurements on matching compounds, the compounds themselves, and how the search went.

    The measurements are kept as a table (``columns`` + one tuple per row); :attr:`rows` gives
    them as dicts, built on first use, and :meth:`to_frame` as a pandas DataFrame. A search run
    for CSV output (``output="csv"``) may carry its rows as ready CSV lines instead
    (:attr:`csv_body`; ``table`` is then empty and ``returned`` counts the lines).
    :meth:`compound_table` sums the rows up per compound; flagged values (``flagged`` 1: an
    open error finding) stay out of its barrier ranges unless ``include_flagged``.
    """

    query: dict[str, Any]
    columns: tuple[str, ...]
    table: list[tuple[Any, ...]]
    compounds: list[dict[str, Any]]
    stats: SearchStats
    warnings: list[str]
    total_rows: int  # before ``limit``
    returned: int = -1  # rows after ``limit`` (len(table) unless the rows are CSV lines)
    csv_body: bytes | None = None
    include_flagged: bool = False  # the default of :meth:`compound_table`

    def __post_init__(self) -> None:
        if self.returned < 0:
            self.returned = len(self.table)

    @cached_property
    def rows(self) -> list[dict[str, Any]]:
        """One dict per measurement (column name → value)."""
        # every tuple has len(columns) values (built so); map/zip keep the loop in C
        return list(map(dict, map(zip, repeat(self.columns), self.table)))

    def to_frame(self) -> pandas.DataFrame:
        """The measurements as a pandas DataFrame (one row per measurement, these columns)."""
        import pandas

        if self.csv_body is not None:
            import io

            out = io.BytesIO()
            self.write_csv(out)
            out.seek(0)
            return pandas.read_csv(out)
        return pandas.DataFrame.from_records(self.table, columns=list(self.columns))

    def column_values(self, names: Sequence[str]) -> list[tuple[Any, ...]]:
        """The table cut to these columns, in this order (None for a column it lacks)."""
        where = {c: i for i, c in enumerate(self.columns)}
        if names and all(n in where for n in names):
            if len(names) == 1:
                at = where[names[0]]
                return [(t[at],) for t in self.table]
            return list(map(itemgetter(*(where[n] for n in names)), self.table))
        return [tuple(t[where[n]] if n in where else None for n in names) for t in self.table]

    def csv_columns(self) -> list[str]:
        """The columns of :meth:`write_csv` (a similarity search adds ``similarity`` third)."""
        columns = list(CSV_COLUMNS)
        if "similarity" in self.columns:
            columns.insert(2, "similarity")
        if "dg_at_kj_mol" in self.columns:  # ΔG‡ at a common temperature, after its own T
            at = columns.index("dg_t_k") + 1
            columns[at:at] = [c for c in AT_SHOWN if c in self.columns]
        return columns

    def write_csv(self, out: BinaryIO) -> None:
        """The measurements as CSV (UTF-8, ``\\n`` line ends, a header line; a value that is
        not a finite number is written empty)."""
        columns = self.csv_columns()
        out.write(header_line(columns).encode("utf-8"))
        if self.csv_body is not None:
            out.write(self.csv_body)
        else:
            out.write("".join(csv_lines(self.column_values(columns))).encode("utf-8"))

    def compound_table(self, include_flagged: bool | None = None) -> list[dict[str, Any]]:
        """One row per compound with measurements, in the order the rows first name it:
        ``compound_id``, ``compound`` (label, else name), ``smiles``, ``measurements``,
        ``flagged`` (how many of them are flagged), the ΔG‡ range ``dg_min_kj_mol`` …
        ``dg_max_kj_mol`` and ``values_in_range`` (how many ΔG‡ values it spans), plus
        ``similarity`` and ``match_atoms`` when the search has them.

        A flagged value (an error finding nobody accepted) does not set a range unless
        ``include_flagged`` (default: the search's own ``include_flagged``); a compound whose
        only values are flagged then has no range.
        """
        if self.csv_body is not None:
            raise UsageError("compound_table: run the search with output='rows'")
        with_flagged = self.include_flagged if include_flagged is None else include_flagged
        by_id: dict[int, dict[str, Any]] = {}
        for row in self.rows:
            entry = by_id.get(row["compound_id"])
            if entry is None:
                entry = by_id[row["compound_id"]] = {
                    "compound_id": row["compound_id"],
                    "compound": row["compound"] or row.get("compound_name"),
                    "smiles": row["smiles"],
                    "measurements": 0,
                    "flagged": 0,
                    "dg_min_kj_mol": None,
                    "dg_max_kj_mol": None,
                    "values_in_range": 0,
                }
            entry["measurements"] += 1
            flagged = bool(row.get("flagged"))
            entry["flagged"] += flagged
            dg = row.get("dg_kj_mol")
            if dg is not None and math.isfinite(dg) and (with_flagged or not flagged):
                low, high = entry["dg_min_kj_mol"], entry["dg_max_kj_mol"]
                entry["dg_min_kj_mol"] = dg if low is None else min(low, dg)
                entry["dg_max_kj_mol"] = dg if high is None else max(high, dg)
                entry["values_in_range"] += 1
            if "similarity" in row:
                entry["similarity"] = row["similarity"]
        for c in self.compounds:
            if "atoms" in c and c["compound_id"] in by_id:
                by_id[c["compound_id"]]["match_atoms"] = c["atoms"]
        return list(by_id.values())

    def as_dict(self) -> dict[str, Any]:
        return {
            "query": self.query,
            "counts": {
                "measurements": self.total_rows,
                "returned": self.returned,
                "compounds_matched": self.stats.matched,
                "compounds_with_measurements": self.stats.with_rows,
                "compounds_searched": self.stats.searched,
                "compounds_after_screen": self.stats.screened,
                "compounds_indexed": self.stats.indexed,
            },
            "warnings": self.warnings,
            "measurements": self.rows,
            "compounds": self.compounds,
        }


# ---------------------------------------------------------------- sorting


def sort_key(sort: str | None, similar: bool) -> tuple[str, bool]:
    """(column, descending) of a sort name; the default is id (similarity for a similarity
    search)."""
    key_name = (sort or ("similarity" if similar else "id")).strip().lower()
    if key_name not in SORT_KEYS:
        raise UsageError(f"sort {sort!r}: choose one of {', '.join(SORT_KEYS)}")
    return SORT_KEYS[key_name]


def listing_order(sort: str | None, at: bool) -> tuple[str, bool]:
    """(column, descending) of a listing's sort name; with a common temperature (``at``) the
    barrier sort is by ΔG‡ at it (``dg_at_kj_mol``). Similarity is for similarity searches."""
    column, descending = sort_key(sort, False)
    if column == "similarity":
        raise UsageError("sort 'similarity': only a similarity search (find --similar) has it")
    if at and column == "dg_kj_mol":
        column = "dg_at_kj_mol"
    return column, descending


def sort_rows(
    table: list[tuple[Any, ...]], columns: Sequence[str], column: str, descending: bool
) -> None:
    """Sort in place; rows without the value go last, ties keep measurement-id order."""
    table.sort(key=itemgetter(columns.index("id")))  # never NULL; nearly sorted already
    if column == "id" or column not in columns:  # a column the rows lack: all 'missing'
        return
    at = columns.index(column)
    present = [t for t in table if t[at] is not None]
    missing = [t for t in table if t[at] is None]

    def value(row: tuple[Any, ...]) -> Any:
        v = row[at]
        return v.lower() if isinstance(v, str) else v

    present.sort(key=value, reverse=descending)  # stable: equal values stay in id order
    table[:] = present + missing


def first_seen_counts(compound_ids: np.ndarray) -> list[tuple[int, int]]:
    """(compound id, rows) per distinct id, in order of first appearance (as a Counter would
    count the rows, without a Python step per row)."""
    if compound_ids.size == 0:
        return []
    order = np.argsort(compound_ids, kind="stable")
    ordered = compound_ids[order]
    starts = np.flatnonzero(np.concatenate(([True], ordered[1:] != ordered[:-1])))
    sizes = np.diff(np.concatenate((starts, [ordered.size])))
    sequence = np.argsort(order[starts], kind="stable")
    return list(zip(ordered[starts][sequence].tolist(), sizes[sequence].tolist(), strict=True))


def unique(values: np.ndarray) -> np.ndarray:
    """Sorted distinct values (np.unique would pull in numpy.ma, ~0.1 s of a cold run)."""
    if values.size == 0:
        return values
    ordered = np.sort(values)
    return ordered[np.concatenate(([True], ordered[1:] != ordered[:-1]))]


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
