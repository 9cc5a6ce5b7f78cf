"""Similarity search: Tanimoto similarity of Morgan fingerprints (radius 2, 2048 bits; Rogers &
Hahn, J. Chem. Inf. Model. 2010) between a query molecule and every indexed compound.

Computing the fingerprints takes RDKit a few seconds per 10,000 compounds, comparing them with
numpy milliseconds, so they are kept in ``<db>.simindex`` (:mod:`.cachefile`), in the order of
the screening index and valid for the same registry state. New compounds (the screening index
grew, no structure changed) extend it; anything else rebuilds it on the next similarity search.
"""

from __future__ import annotations

from typing import Any

import numpy as np

from registry.search import cachefile
from registry.search.index import ScreenIndex
from registry.storage.database import Database

MAGIC = b"FLXSIMI1"
FORMAT_VERSION = 1
SUFFIX = ".simindex"
WORDS = 32  # 2048 bits


def morgan_words(binary: bytes, generator: Any) -> np.ndarray:
    """One molecule's Morgan fingerprint as 32 little-endian uint64 words."""
    from rdkit import Chem

    mol = Chem.Mol(binary)
    mol.UpdatePropertyCache(strict=False)
    bits = generator.GetFingerprintAsNumPy(mol).astype(bool)
    return np.packbits(bits, bitorder="little").view("<u8")


def morgan_generator() -> Any:
    from rdkit.Chem import rdFingerprintGenerator

    return rdFingerprintGenerator.GetMorganGenerator(radius=2, fpSize=2048)


def _fingerprints(screen: ScreenIndex, start: int) -> np.ndarray:
    """Word-major fingerprints (32 × n) of the index positions from ``start`` on."""
    generator = morgan_generator()
    rows = np.zeros((len(screen) - start, WORDS), dtype=np.uint64)
    for i in range(start, len(screen)):
        try:
            rows[i - start] = morgan_words(screen.mol_binary(i), generator)
        except Exception:  # a molecule RDKit cannot fingerprint is simply not similar
            rows[i - start] = 0
    return np.ascontiguousarray(rows.T)


def similarity_index(database: Database, screen: ScreenIndex, state: dict) -> np.ndarray:
    """Morgan fingerprints (32 × N uint64, word-major) in screening-index order, for the
    registry ``state`` the screening index was loaded for."""
    key = (database.key, "similarity")
    held = cachefile.held(key, state)
    if held is not None:
        return held
    path = cachefile.path_for(database, SUFFIX)
    found = None if path is None else cachefile.read_arrays(path, MAGIC, FORMAT_VERSION)
    fps = None
    if found is not None:
        header, arrays, _mapped = found
        ids, old = arrays.get("ids"), arrays.get("fps")
        k = 0 if ids is None else int(ids.shape[0])
        same_start = (
            old is not None
            and header.get("rdkit") == screen.rdkit
            and header.get("state", {}).get("counters") == state["counters"]
            and k <= len(screen)
            and np.array_equal(ids, screen.ids[:k])
        )
        if same_start and k == len(screen):
            fps = old
        elif same_start:
            fps = np.concatenate([old, _fingerprints(screen, k)], axis=1)
    if fps is None:
        fps = _fingerprints(screen, 0)
    if path is not None and (found is None or fps is not found[1].get("fps")):
        header = {"format": FORMAT_VERSION, "state": state, "rdkit": screen.rdkit}
        arrays = {"ids": np.asarray(screen.ids), "fps": fps}
        cachefile.write_or_note(
            lambda: cachefile.save_arrays(path, MAGIC, header, arrays), path, "cache", []
        )
    return cachefile.hold(key, state, fps)


def tanimoto(fps: np.ndarray, query: np.ndarray) -> np.ndarray:
    """Tanimoto (Jaccard) similarity of each column (word-major fingerprints) with the query:
    |a∧b| / |a∨b|."""
    both = np.bitwise_count(fps & query[:, None]).sum(axis=0, dtype=np.int64)
    either = np.bitwise_count(fps | query[:, None]).sum(axis=0, dtype=np.int64)
    with np.errstate(invalid="ignore", divide="ignore"):
        return np.where(either > 0, both / np.maximum(either, 1), 0.0)
