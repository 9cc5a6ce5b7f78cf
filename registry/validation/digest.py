"""A 64-bit digest of a measurement's checked values, computed with numpy alone.

Stored findings carry ``inputs_hash`` = sha256(…, this digest, …), and keep their date and
acceptance only while it is unchanged, so the digest must stay what registries have stored:
the row hash ``pandas.util.hash_pandas_object(frame, index=False)`` gave for the frame the
checker used to build. That hash is written out here so that one row costs microseconds and
no data-frame library (tests compare both on varied values):

* a float: its IEEE-754 bits as an unsigned integer (every NaN as the one canonical quiet NaN,
  −0.0 as 0.0), an integer: its two's-complement bits, a boolean: 0 or 1;
* a text: SipHash-2-4 of its UTF-8 bytes under the fixed 16-byte key ``0123456789123456``
  (J.-P. Aumasson, D. J. Bernstein, "SipHash: a fast short-input PRF", INDOCRYPT 2012);
* a missing text (or boolean): 2⁶⁴ − 1;
* every value but a missing text is then mixed by the 64-bit finalizer of SplitMix64
  (S. Vigna's variant of D. Stafford's "Mix13"), and the columns of a row are folded in order
  like CPython's tuple hash (x = (x ^ h)·m, m += 82520 + 2·(columns left), + 97531 at the end).
"""

from __future__ import annotations

from collections.abc import Sequence
from functools import lru_cache

import numpy as np
from numpy.typing import NDArray

U64 = NDArray[np.uint64]

#: the key of the text hash (fixed, so digests are the same in every process)
TEXT_KEY = b"0123456789123456"
#: what a missing text or boolean hashes to
MISSING = np.uint64(0xFFFFFFFFFFFFFFFF)

_CANONICAL_NAN = np.array(np.nan).view(np.uint64)


def _rotl(x: U64, bits: int) -> U64:
    return (x << np.uint64(bits)) | (x >> np.uint64(64 - bits))


def _sip_round(v0: U64, v1: U64, v2: U64, v3: U64) -> tuple[U64, U64, U64, U64]:
    v0 += v1
    v1 = _rotl(v1, 13)
    v1 ^= v0
    v0 = _rotl(v0, 32)
    v2 += v3
    v3 = _rotl(v3, 16)
    v3 ^= v2
    v0 += v3
    v3 = _rotl(v3, 21)
    v3 ^= v0
    v2 += v1
    v1 = _rotl(v1, 17)
    v1 ^= v2
    v2 = _rotl(v2, 32)
    return v0, v1, v2, v3


def siphash24(messages: Sequence[bytes], key: bytes = TEXT_KEY) -> U64:
    """SipHash-2-4 of each message, for all of them at once (block by block, in lockstep).

    Messages are sorted longest first, so the ones still being read at block ``j`` are a
    leading slice and every step is one numpy operation over that slice.
    """
    n = len(messages)
    if n == 0:
        return np.zeros(0, dtype=np.uint64)
    k0, k1 = (np.uint64(int.from_bytes(key[i : i + 8], "little")) for i in (0, 8))
    blocks = np.array([len(m) // 8 + 1 for m in messages], dtype=np.int64)
    order = np.argsort(-blocks, kind="stable")
    width = int(blocks[order[0]])
    buffer = bytearray(n * width * 8)
    for row, i in enumerate(order.tolist()):
        m = messages[i]
        start = row * width * 8
        buffer[start : start + len(m)] = m
        # the last block of a message carries its length (mod 256) in the top byte
        buffer[start + (int(blocks[i]) - 1) * 8 + 7] = len(m) & 0xFF
    words = np.frombuffer(bytes(buffer), dtype="<u8").reshape(n, width).astype(np.uint64)
    sorted_blocks = blocks[order]
    v0 = np.full(n, k0 ^ np.uint64(0x736F6D6570736575))
    v1 = np.full(n, k1 ^ np.uint64(0x646F72616E646F6D))
    v2 = np.full(n, k0 ^ np.uint64(0x6C7967656E657261))
    v3 = np.full(n, k1 ^ np.uint64(0x7465646279746573))
    with np.errstate(over="ignore"):
        for j in range(width):
            live = int(np.count_nonzero(sorted_blocks > j))  # a leading slice (sorted)
            m = words[:live, j]
            a, b, c, d = v0[:live], v1[:live], v2[:live], v3[:live]
            d = d ^ m
            for _ in range(2):
                a, b, c, d = _sip_round(a, b, c, d)
            a = a ^ m
            v0[:live], v1[:live], v2[:live], v3[:live] = a, b, c, d
        v2 ^= np.uint64(0xFF)
        for _ in range(4):
            v0, v1, v2, v3 = _sip_round(v0, v1, v2, v3)
    out = np.empty(n, dtype=np.uint64)
    out[order] = v0 ^ v1 ^ v2 ^ v3
    return out


def mix(values: U64) -> U64:
    """Spread 64-bit values over the whole range (the SplitMix64 finalizer)."""
    v = values.astype(np.uint64, copy=True)
    with np.errstate(over="ignore"):
        v ^= v >> np.uint64(30)
        v *= np.uint64(0xBF58476D1CE4E5B9)
        v ^= v >> np.uint64(27)
        v *= np.uint64(0x94D049BB133111EB)
        v ^= v >> np.uint64(31)
    return v


def hash_floats(values: NDArray[np.float64]) -> U64:
    """Each float by its bits (NaN and −0.0 canonical), mixed."""
    v = np.asarray(values, dtype=np.float64)
    bits = v.view(np.uint64).copy()
    bits[np.isnan(v)] = _CANONICAL_NAN
    bits[bits == np.uint64(0x8000000000000000)] = np.uint64(0)
    return mix(bits)


def hash_integers(values: NDArray[np.int64]) -> U64:
    """Each 64-bit integer by its two's-complement bits, mixed."""
    return mix(np.asarray(values, dtype=np.int64).view(np.uint64))


def hash_flags(values: Sequence[object]) -> U64:
    """Each boolean as 0 or 1, mixed. A column with a missing value was an object column to
    pandas, which hashed its values as the texts 'True'/'False' (missing: :data:`MISSING`)."""
    if any(is_missing(v) for v in values):
        return hash_texts([None if is_missing(v) else str(bool(v)) for v in values])
    return mix(np.array([1 if v else 0 for v in values], dtype=np.uint64))


def _text_bytes(value: object) -> bytes:
    if isinstance(value, bytes):
        return value
    return (value if isinstance(value, str) else str(value)).encode("utf-8")


def is_missing(value: object) -> bool:
    return value is None or (isinstance(value, float) and value != value)


def hash_texts(values: Sequence[object]) -> U64:
    """Each text by SipHash of its UTF-8 bytes, mixed; a missing one as :data:`MISSING`.

    Each distinct text is hashed once. A value that is not text is hashed as its ``str``.
    """
    out = np.full(len(values), MISSING, dtype=np.uint64)
    distinct: dict[tuple[type, object], list[int]] = {}  # by type too: 1, 1.0 and True differ
    for i, v in enumerate(values):
        if not is_missing(v):
            distinct.setdefault((type(v), v), []).append(i)
    if distinct:
        hashed = mix(siphash24([_text_bytes(v) for _, v in distinct]))
        for h, rows in zip(hashed.tolist(), distinct.values(), strict=True):
            out[rows] = h
    return out


def combine(columns: Sequence[U64], rows: int) -> U64:
    """Fold per-column hashes into one hash per row, in column order (CPython tuple style)."""
    out = np.full(rows, np.uint64(0x345678), dtype=np.uint64)
    with np.errstate(over="ignore"):
        for column, mult in zip(columns, _multipliers(len(columns)), strict=True):
            out ^= column
            out *= mult
        out += np.uint64(97531)
    return out


@lru_cache(maxsize=8)
def _multipliers(count: int) -> list[np.uint64]:
    """The multiplier of each column in :func:`combine` (1000003, then + 82520 + 2·left)."""
    out, mult = [], 1000003
    for i in range(count):
        out.append(np.uint64(mult % 2**64))
        mult += 82520 + 2 * (count - i)
    return out
