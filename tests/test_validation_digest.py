"""The numpy-only row digest and group sums against independent implementations.

* SipHash-2-4 against the published test vectors (J.-P. Aumasson, D. J. Bernstein, "SipHash:
  a fast short-input PRF", INDOCRYPT 2012, Appendix A);
* whole row digests against ``pandas.util.hash_pandas_object(frame, index=False)``, the function
  registries' stored digests were made with (pandas is an independent implementation here);
* compensated per-group sums and means against ``pandas.DataFrame.groupby(...).sum()/.mean()``.
"""

from __future__ import annotations

import math

import numpy as np
import pandas as pd
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from registry.validation import digest
from registry.validation.columns import group_extremes, group_sums, to_floats

KEY_00_0F = bytes(range(16))


def test_siphash_published_vectors() -> None:
    # the paper's worked example: key 00…0f, message 00…0e (15 bytes)
    assert int(digest.siphash24([bytes(range(15))], KEY_00_0F)[0]) == 0xA129CA6149BE45E5
    # the empty message under the same key: first line of the reference vectors (from memory)
    assert int(digest.siphash24([b""], KEY_00_0F)[0]) == 0x726FDB47DD0E0E31


def test_siphash_many_lengths_at_once_equal_one_at_a_time() -> None:
    messages = [bytes(range(n)) for n in range(40)]
    together = digest.siphash24(messages, KEY_00_0F)
    alone = [int(digest.siphash24([m], KEY_00_0F)[0]) for m in messages]
    assert together.tolist() == alone
    assert len(set(alone)) == len(alone)


_texts = st.one_of(st.none(), st.text(max_size=40))
_floats = st.one_of(
    st.floats(allow_nan=True, allow_infinity=True),
    st.sampled_from([0.0, -0.0, math.nan, -math.nan, 1.5, 298.15]),
)


@given(
    rows=st.lists(
        st.tuples(_texts, _floats, st.integers(-(2**63), 2**63 - 1), st.booleans(), _texts),
        min_size=1,
        max_size=30,
    )
)
@settings(max_examples=150, deadline=None)
def test_row_digest_equals_pandas_row_hash(rows: list[tuple[object, ...]]) -> None:
    texts, floats, ints, flags, more = (list(c) for c in zip(*rows, strict=True))
    frame = pd.DataFrame(
        {
            "t": pd.Series(texts, dtype=object),
            "f": np.array(floats, dtype=float),
            "i": np.array(ints, dtype=np.int64),
            "b": np.array(flags, dtype=bool),
            "m": pd.Series(more, dtype=object),
        }
    )
    expected = pd.util.hash_pandas_object(frame, index=False).to_numpy()
    ours = digest.combine(
        [
            digest.hash_texts(texts),
            digest.hash_floats(np.array(floats, dtype=float)),
            digest.hash_integers(np.array(ints, dtype=np.int64)),
            digest.hash_flags(flags),
            digest.hash_texts(more),
        ],
        len(rows),
    )
    assert ours.tolist() == expected.tolist()


def test_missing_texts_and_text_columns_of_pandas_strings() -> None:
    values = ["kJ/mol", None, "kJ/mol", "ΔG‡ 15,2 kcal/mol", ""]
    frame = pd.DataFrame({"t": values})  # pandas' own string column type
    expected = pd.util.hash_pandas_object(frame, index=False).to_numpy()
    assert digest.combine([digest.hash_texts(values)], 5).tolist() == expected.tolist()
    # a boolean column with a missing value is an object column: pandas hashes its texts
    flags = [True, None, False]
    expected = pd.util.hash_pandas_object(pd.DataFrame({"b": flags}), index=False).to_numpy()
    assert digest.combine([digest.hash_flags(flags)], 3).tolist() == expected.tolist()


@given(
    groups=st.lists(st.integers(0, 6), min_size=1, max_size=80),
    data=st.data(),
)
@settings(max_examples=150, deadline=None)
def test_group_sums_and_means_equal_pandas(groups: list[int], data: st.DataObject) -> None:
    values = data.draw(
        st.lists(
            st.one_of(
                st.floats(-1e17, 1e17),
                st.sampled_from([math.nan, math.inf, -math.inf, 1e16, -1e16, 0.1, 1.0]),
            ),
            min_size=len(groups),
            max_size=len(groups),
        )
    )
    g = np.array(groups, dtype=np.int64)
    v = np.array(values, dtype=float)
    sums, counts = group_sums(g, v, 7)
    frame = pd.DataFrame({"g": g, "v": v}).groupby("g")["v"]
    # both sum with Kahan compensation, but may round the last step differently where a sum
    # passes 2^53 (hypothesis found 1 + 9007199254740994 + 0: …994 here, …996 in pandas, both
    # one unit in the last place from the exact 9007199254740995): allowed is what any
    # compensated sum may be off by, 2·eps·Σ|v| of the group (Higham, Accuracy and Stability
    # of Numerical Algorithms, 2002, §4.3)
    finite = np.where(np.isfinite(v), np.abs(v), 0.0)
    bound = 2 * np.finfo(float).eps * np.bincount(g, weights=finite, minlength=7)
    for name, ours in (("sum", sums), ("mean", _mean(sums, counts))):
        theirs = getattr(frame, name)()
        for group, expected in theirs.items():
            got, k = ours[int(group)], int(group)
            room = bound[k] if name == "sum" else bound[k] / max(int(counts[k]), 1)
            same = got == expected or (math.isnan(got) and math.isnan(expected))
            assert same or abs(got - expected) <= room, (name, group, got, expected)
    low, high = group_extremes(g, v, 7)
    for group, expected in frame.min().items():
        assert low[int(group)] == expected or (math.isnan(low[group]) and math.isnan(expected))
    for group, expected in frame.max().items():
        assert high[int(group)] == expected or (math.isnan(high[group]) and math.isnan(expected))


def _mean(sums: np.ndarray, counts: np.ndarray) -> np.ndarray:
    with np.errstate(invalid="ignore", divide="ignore"):
        return sums / counts


@pytest.mark.parametrize(
    ("values", "expected"),
    [
        ((1.5, None, 2), [1.5, math.nan, 2.0]),
        ((1.5, "abc", "2.5"), [1.5, math.nan, 2.5]),  # a text in a number column (SQLite)
        ((), []),
    ],
)
def test_database_values_to_floats(values: tuple[object, ...], expected: list[float]) -> None:
    got = to_floats(values)
    assert got.dtype == np.float64
    assert [x if x == x else "nan" for x in got.tolist()] == [
        x if x == x else "nan" for x in expected
    ]
