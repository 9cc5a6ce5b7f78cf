"""Rows from the database as numpy columns, and per-group sums, means and extremes over them.

What the rules need from a data-frame library is small: columns of floats (NaN = missing) and
of objects (None = missing), positions of ids in a sorted id column, and sums/means/extremes
per measurement. Written here with numpy, one check of one row costs microseconds instead of
the milliseconds a data frame's set-up costs, and one check of 10⁵ rows stays vectorized.

Group sums are compensated (Kahan) sums taken in row order, skipping NaN, because that is how
the row digests stored in registries were computed (see :mod:`.digest`): the sum of the rate
points' values is hashed, so it must come out to the same bits.
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

import numpy as np
from numpy.typing import NDArray

Floats = NDArray[np.float64]
Ints = NDArray[np.int64]


def to_floats(values: Sequence[Any]) -> Floats:
    """Floats from database values; None, and anything that is not a number, become NaN."""
    try:
        return np.array(values, dtype=np.float64)
    except (TypeError, ValueError):  # a text in a number column (SQLite does not forbid it)
        return np.array([_float_or_nan(v) for v in values], dtype=np.float64)


def _float_or_nan(value: Any) -> float:
    try:
        return float(value)
    except (TypeError, ValueError):
        return float("nan")


def to_objects(values: Sequence[Any]) -> NDArray[np.object_]:
    return np.fromiter(values, dtype=object, count=len(values))


def columns_of(
    rows: list[tuple[Any, ...]], names: Sequence[str], floats: set[str]
) -> dict[str, Any]:
    """Rows (tuples) → one numpy column per name: float64 for ``floats``, object otherwise."""
    raw = list(zip(*rows, strict=True)) if rows else [()] * len(names)
    return {
        name: to_floats(values) if name in floats else to_objects(values)
        for name, values in zip(names, raw, strict=True)
    }


def present(values: NDArray[np.object_]) -> NDArray[np.bool_]:
    """Which entries of an object column hold a value (neither None nor NaN)."""
    return np.array(
        [v is not None and not (isinstance(v, float) and v != v) for v in values.tolist()],
        dtype=bool,
    )


def take(columns: dict[str, Any], order: Ints) -> dict[str, Any]:
    return {name: values[order] for name, values in columns.items()}


def positions_in(sorted_ids: Ints, keys: Ints) -> Ints:
    """Position of each key in ``sorted_ids`` (ascending, unique); -1 where it is not there."""
    keys = np.asarray(keys, dtype=np.int64)
    if sorted_ids.size == 0:
        return np.full(keys.size, -1, dtype=np.int64)
    at = np.searchsorted(sorted_ids, keys)
    at_clipped = np.minimum(at, sorted_ids.size - 1)
    return np.where(sorted_ids[at_clipped] == keys, at_clipped, -1).astype(np.int64)


def group_sums(group: Ints, values: Floats, n: int) -> tuple[Floats, Ints]:
    """Per group: the compensated (Kahan) sum of its non-NaN values in row order, and their count.

    Each step of the loop takes the k-th value of every group at once, so the loop runs as
    many times as the largest group has values, each step vectorized over the groups.
    """
    valid = ~np.isnan(values)
    g, v = group[valid], values[valid]
    sums, comp = np.zeros(n), np.zeros(n)
    counts = np.bincount(g, minlength=n).astype(np.int64)
    if g.size == 0:
        return sums, counts
    order = np.argsort(g, kind="stable")  # stable: row order kept inside each group
    g, v = g[order], v[order]
    starts = np.flatnonzero(np.r_[True, g[1:] != g[:-1]])
    sizes = np.diff(np.r_[starts, g.size])
    rank = np.arange(g.size) - np.repeat(starts, sizes)
    by_rank = np.argsort(rank, kind="stable")
    offset = 0
    with np.errstate(invalid="ignore", over="ignore"):
        for count in np.bincount(rank).tolist():
            step = by_rank[offset : offset + count]
            offset += count
            gi, vi = g[step], v[step]
            y = vi - comp[gi]
            t = sums[gi] + y
            c = (t - sums[gi]) - y
            c[np.isnan(c)] = 0.0  # an infinite value: keep ±inf rather than NaN
            comp[gi] = c
            sums[gi] = t
    return sums, counts


def group_extremes(group: Ints, values: Floats, n: int) -> tuple[Floats, Floats]:
    """Per group: the smallest and largest non-NaN value (NaN for a group without one)."""
    valid = ~np.isnan(values)
    g, v = group[valid], values[valid]
    low, high = np.full(n, np.inf), np.full(n, -np.inf)
    np.minimum.at(low, g, v)
    np.maximum.at(high, g, v)
    empty = np.bincount(g, minlength=n) == 0
    low[empty] = np.nan
    high[empty] = np.nan
    return low, high
