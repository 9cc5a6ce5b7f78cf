"""The screening index: every compound's pattern fingerprint and RDKit binary, cached on disk.

Substructure search screens first and confirms second (the fingerprint screen of Willett,
Barnard & Downs, J. Chem. Inf. Comput. Sci. 1998; RDKit's pattern fingerprint): a molecule can
contain the query only if it has every fingerprint bit of the query, so ``query ⊆ molecule`` on
packed 64-bit words throws most molecules out with a few numpy operations; RDKit then confirms
the rest on molecules rebuilt from their binary form (about 3× faster than parsing SMILES).

So that a fresh ``fluxledger find`` process does not rebuild anything, the index lives in a file
beside a SQLite registry (``<db>.fpindex``; for server databases in the user cache directory,
keyed by URL). It is memory-mapped on load. Its *signature* (compound count, highest id, total
length of the stored binaries and fingerprints, last audited compound revision) is compared with
the database on every use: new compounds extend the file, anything else rebuilds it. An edit
that keeps every length the same and bypasses the history would go unseen; ``find
--rebuild-index`` (or :func:`load_index` with ``rebuild=True``) starts afresh.

The stored fingerprints were computed by whatever RDKit wrote the compound; the pattern
fingerprint has changed between RDKit releases, and a stale one could screen out a true hit. At
build time a sample of stored fingerprints is recomputed from the molecules; if any differs, the
index recomputes all of them.
"""

from __future__ import annotations

import hashlib
import os
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np

from registry.search import cachefile
from registry.search.cachefile import file_state
from registry.search.patterns import FP_BITS, FP_WORDS

MAGIC = b"FLXSCRN1"
FORMAT_VERSION = 4  # 4: element bits per compound (see .elements)
_SAMPLE = 48  # stored fingerprints re-checked against the running RDKit at build time


@dataclass
class ScreenIndex:
    """Compound ids (ascending), fingerprints (32 × N uint64, word-major so that the screen reads
    only the words a query needs), RDKit binaries (offsets + blob), canonical SMILES (offsets
    + blob; empty where the structure was kept unsanitized) and element bits (:mod:`.elements`)."""

    ids: np.ndarray
    fps: np.ndarray
    offsets: np.ndarray
    blob: np.ndarray
    signature: dict[str, Any]
    rdkit_version: str
    smiles_offsets: np.ndarray | None = None
    smiles_blob: np.ndarray | None = None
    elements: np.ndarray | None = None  # 2 × N uint64: the elements each compound contains
    path: Path | None = None
    notes: list[str] = field(default_factory=list)
    _keep: Any = None  # the mmap the arrays view, kept open while the index lives
    _smiles_text: str | None = None
    _smiles_offsets_list: list[int] = field(default_factory=list)

    def __len__(self) -> int:
        return int(self.ids.shape[0])

    def mol_binary(self, position: int) -> bytes:
        return self.blob[self.offsets[position] : self.offsets[position + 1]].tobytes()

    def trusted_smiles(self, position: int) -> str:
        """RDKit's own canonical SMILES of a sanitized structure ('' when there is none)."""
        return self.trusted_smiles_many([position])[0]

    def trusted_smiles_many(self, positions: Any) -> list[str]:
        """Canonical SMILES of many positions at once (the text is decoded once per process)."""
        if self.smiles_offsets is None or self.smiles_blob is None:
            return ["" for _ in positions]
        if self._smiles_text is None:
            raw = self.smiles_blob.tobytes()
            text = raw.decode("utf-8")
            # SMILES are ASCII, so byte offsets are character offsets; otherwise decode singly
            self._smiles_text = text if len(text) == len(raw) else ""
            self._smiles_offsets_list = self.smiles_offsets.tolist()
        off, text = self._smiles_offsets_list, self._smiles_text
        if text:
            return [text[off[p] : off[p + 1]] for p in positions]
        blob = self.smiles_blob
        return [blob[off[p] : off[p + 1]].tobytes().decode("utf-8") for p in positions]

    def screen(self, query_words: np.ndarray, rows: np.ndarray | None = None) -> np.ndarray:
        """Positions whose fingerprint holds every bit of the query (``rows`` limits the search)."""
        needed = np.flatnonzero(query_words)
        if needed.size == 0:
            return np.arange(len(self)) if rows is None else rows
        if rows is not None and rows.size < len(self) // 4:  # few rows: gather just those
            keep = np.ones(rows.size, dtype=bool)
            for w in needed:
                word = query_words[w]
                keep &= (self.fps[w][rows] & word) == word
            return rows[keep]
        keep = np.ones(len(self), dtype=bool)
        for w in needed:
            word = query_words[w]
            keep &= (self.fps[w] & word) == word
        return np.flatnonzero(keep) if rows is None else rows[keep[rows]]

    def screen_elements(self, masks: list[np.ndarray], rows: np.ndarray) -> np.ndarray:
        """Those of ``rows`` whose compound has at least one element of every mask."""
        if not masks or self.elements is None or rows.size == 0:
            return rows
        low, high = self.elements[0][rows], self.elements[1][rows]
        keep = np.ones(rows.size, dtype=bool)
        for words in masks:
            keep &= ((low & words[0]) | (high & words[1])) != 0
        return rows[keep]


def rdkit_version() -> str:
    from rdkit import rdBase

    return str(rdBase.rdkitVersion)


def index_path_for(database: Any, suffix: str = ".fpindex") -> Path:
    """``<db>.fpindex`` beside a SQLite file; the user cache directory for other databases."""
    if database.is_sqlite and database.path is not None and str(database.path) != ":memory:":
        return Path(f"{database.path}{suffix}")
    base = os.environ.get("FLUXLEDGER_CACHE_DIR") or os.environ.get("XDG_CACHE_HOME")
    root = Path(base) if base else Path.home() / ".cache"
    if not os.environ.get("FLUXLEDGER_CACHE_DIR"):
        root = root / "fluxledger"
    key = hashlib.sha256(database.url.encode("utf-8")).hexdigest()[:24]
    return root / f"{key}{suffix}"


def database_signature(conn: Any, upto_id: int | None = None) -> dict[str, Any]:
    """What the index must agree with: count, highest id, blob lengths, last compound revision."""
    from registry.search.sqlite_read import dialect_name, fetch

    where = "mol_binary IS NOT NULL" + ("" if upto_id is None else " AND id <= :upto")
    total = "total" if dialect_name(conn) == "sqlite" else "sum"
    row = fetch(
        conn,
        f"SELECT count(*), coalesce(max(id), 0), coalesce({total}(length(mol_binary)), 0), "
        f"coalesce({total}(length(pattern_fp)), 0) FROM compound WHERE {where}",
        {} if upto_id is None else {"upto": upto_id},
    )[0]
    last = "SELECT coalesce(max(id), 0) FROM revision WHERE entity = 'compound'"
    revision = fetch(conn, last)[0][0]
    return {
        "count": int(row[0]),
        "max_id": int(row[1]),
        "mol_bytes": int(row[2]),
        "fp_bytes": int(row[3]),
        "compound_revision": int(revision),
    }


# ---------------------------------------------------------------- building from the database


Row = tuple[int, bytes, bytes | None, str]


def _fetch(conn: Any, after_id: int) -> list[Row]:
    from registry.search.sqlite_read import fetch

    result = fetch(
        conn,
        "SELECT id, mol_binary, pattern_fp, smiles_canonical, structure_ok FROM compound "
        "WHERE mol_binary IS NOT NULL AND id > :after ORDER BY id",
        {"after": after_id},
    )
    return [
        (
            int(r[0]),
            bytes(r[1]),
            None if r[2] is None else bytes(r[2]),
            (r[3] or "") if r[4] else "",  # only sanitized structures are parsed as trusted
        )
        for r in result
    ]


def _fresh_fp(binary: bytes) -> np.ndarray:
    """Recompute a pattern fingerprint; all bits set when RDKit cannot (never screened out)."""
    from rdkit import Chem, DataStructs

    try:
        mol = Chem.Mol(binary)
        mol.UpdatePropertyCache(strict=False)
        fp = Chem.PatternFingerprint(mol, fpSize=FP_BITS)
        return np.frombuffer(DataStructs.BitVectToBinaryText(fp), dtype="<u8").copy()
    except Exception:
        return np.full(FP_WORDS, np.uint64(0xFFFFFFFFFFFFFFFF), dtype=np.uint64)


def _arrays(rows: list[Row], recompute: bool) -> dict[str, np.ndarray]:
    n = len(rows)
    ids = np.fromiter((r[0] for r in rows), dtype=np.int64, count=n)
    fps = np.empty((n, FP_WORDS), dtype=np.uint64)
    from registry.search.elements import compound_mask

    elements = np.empty((n, 2), dtype=np.uint64)
    raw, smiles = bytearray(), bytearray()
    offsets = np.zeros(n + 1, dtype=np.int64)
    smiles_offsets = np.zeros(n + 1, dtype=np.int64)
    for i, (_, binary, fp, text) in enumerate(rows):
        if recompute or fp is None or len(fp) != FP_BITS // 8:
            fps[i] = _fresh_fp(binary)
        else:
            fps[i] = np.frombuffer(fp, dtype="<u8")
        raw += binary
        offsets[i + 1] = len(raw)
        smiles += text.encode("utf-8")
        smiles_offsets[i + 1] = len(smiles)
        elements[i] = compound_mask(text, binary)
    return {
        "ids": ids,
        "fps": np.ascontiguousarray(fps.T),
        "offsets": offsets,
        "blob": np.frombuffer(bytes(raw), dtype=np.uint8),
        "smiles_offsets": smiles_offsets,
        "smiles_blob": np.frombuffer(bytes(smiles), dtype=np.uint8),
        "elements": np.ascontiguousarray(elements.T),
    }


def _stored_fps_current(rows: list[Row]) -> bool:
    """Do the stored fingerprints agree with the running RDKit (checked on a spread sample)?"""
    with_fp = [r for r in rows if r[2] is not None]
    if not with_fp:
        return True
    step = max(1, len(with_fp) // _SAMPLE)
    for _, binary, fp, _ in with_fp[::step][:_SAMPLE]:
        if not np.array_equal(_fresh_fp(binary), np.frombuffer(fp, dtype="<u8")):
            return False
    return True


def build_index(database: Any) -> ScreenIndex:
    """Read every compound's binary and fingerprint from the database (one snapshot)."""
    with database.read() as conn:
        signature = database_signature(conn)
        rows = _fetch(conn, 0)
    notes = []
    recompute = not _stored_fps_current(rows)
    if recompute:
        notes.append(
            "stored pattern fingerprints differ from this RDKit's; the index uses recomputed ones"
        )
    signature["recomputed_fps"] = recompute
    return ScreenIndex(**_arrays(rows, recompute), signature=signature,
                       rdkit_version=rdkit_version(), notes=notes)  # fmt: skip


def _extend(index: ScreenIndex, rows: list[Row], sig: dict) -> ScreenIndex:
    new = _arrays(rows, bool(index.signature.get("recomputed_fps")))
    sig["recomputed_fps"] = bool(index.signature.get("recomputed_fps"))
    assert index.smiles_offsets is not None and index.smiles_blob is not None
    return ScreenIndex(
        ids=np.concatenate([index.ids, new["ids"]]),
        fps=np.concatenate([index.fps, new["fps"]], axis=1),
        offsets=np.concatenate([index.offsets, new["offsets"][1:] + int(index.offsets[-1])]),
        blob=np.concatenate([index.blob, new["blob"]]),
        smiles_offsets=np.concatenate(
            [index.smiles_offsets, new["smiles_offsets"][1:] + int(index.smiles_offsets[-1])]
        ),
        smiles_blob=np.concatenate([index.smiles_blob, new["smiles_blob"]]),
        elements=None
        if index.elements is None
        else np.concatenate([index.elements, new["elements"]], axis=1),
        signature=sig,
        rdkit_version=index.rdkit_version,
        notes=["index extended with new compounds"],
    )


# ---------------------------------------------------------------- the cache file


def save_index(index: ScreenIndex, path: Path) -> None:
    """Write atomically (temporary file + rename), so readers never see half a file."""
    arrays = {
        name: getattr(index, name)
        for name in ("ids", "fps", "offsets", "blob", "smiles_offsets", "smiles_blob", "elements")
        if getattr(index, name) is not None
    }
    header = {"format": FORMAT_VERSION, "signature": index.signature, "rdkit": index.rdkit_version}
    cachefile.save_arrays(path, MAGIC, header, arrays)


def read_index(path: Path) -> ScreenIndex | None:
    """Map a cache file; None when it is missing, damaged or of another format."""
    found = cachefile.read_arrays(path, MAGIC, FORMAT_VERSION)
    if found is None:
        return None
    header, arrays, mapped = found
    if not {"ids", "fps", "offsets", "blob"} <= set(arrays):
        return None
    try:
        signature, version = header["signature"], header["rdkit"]
    except KeyError:
        return None
    return ScreenIndex(
        **arrays, signature=signature, rdkit_version=version, path=path, _keep=mapped
    )


#: indexes already checked in this process, with the registry file state they were checked at
_CHECKED: dict[str, tuple[tuple[int, ...], ScreenIndex]] = {}


def load_index(database: Any, *, rebuild: bool = False, persist: bool = True) -> ScreenIndex:
    """The up-to-date index (see :func:`_load`), remembered in-process while the file is unchanged."""
    path = index_path_for(database)
    key = str(path)
    state = cachefile.state_with_cache(database, path)
    if not rebuild and state is not None and key in _CHECKED and _CHECKED[key][0] == state:
        return _CHECKED[key][1]
    before = file_state(database)
    index = _load(database, rebuild=rebuild, persist=persist)
    after = cachefile.state_with_cache(database, path)
    if before is not None and after is not None and after[: len(before)] == before:
        _CHECKED[key] = (after, index)  # nothing was written meanwhile
    return index


def _core(signature: dict[str, Any]) -> dict[str, Any]:
    return {k: v for k, v in signature.items() if k != "recomputed_fps"}


def _load(database: Any, *, rebuild: bool = False, persist: bool = True) -> ScreenIndex:
    """The up-to-date index: the cache file when it agrees with the database, else rebuilt.

    New compounds (ids above the cached highest id, everything below unchanged) extend the file;
    any other difference rebuilds it. A cache that cannot be written (read-only folder) is not an
    error: the index is then rebuilt in memory on each use, and a note says so. When the SQLite
    file (and its WAL) has not changed at all since the signature was last checked, the check
    itself is skipped (the state is taken *before* each check, so a concurrent write only makes
    the next check happen).
    """
    path = index_path_for(database)
    cached = None if rebuild else read_index(path)
    state = file_state(database)
    current_rdkit = rdkit_version()
    if (
        cached is not None
        and state is not None
        and cached.rdkit_version == current_rdkit
        and cachefile.state_matches(path, state, _core(cached.signature))
    ):
        return cached
    with database.read() as conn:
        current = database_signature(conn)
        if cached is not None and cached.rdkit_version == current_rdkit:
            old = _core(cached.signature)
            if old == current:
                cachefile.remember_state(path, state, _core(current))
                return cached
            same_prefix = (
                current["compound_revision"] == old["compound_revision"]
                and current["max_id"] > old["max_id"]
                and database_signature(conn, upto_id=old["max_id"]) == old
            )
            if same_prefix:
                rows = _fetch(conn, old["max_id"])
                index = _extend(cached, rows, dict(current))
                index.path = path
                if not persist:
                    return index
                index = _persist(index, path)
                cachefile.remember_state(path, state, _core(index.signature))
                return index
    index = build_index(database)
    index.path = path
    if not persist:
        return index
    index = _persist(index, path)
    # safe even if the file could not be written: the state also names the signature, which
    # an older file on disk would not have
    cachefile.remember_state(path, state, _core(index.signature))
    return index


def _persist(index: ScreenIndex, path: Path) -> ScreenIndex:
    try:
        save_index(index, path)
    except OSError as exc:
        index.notes.append(f"could not write the screening cache {path}: {exc.strerror or exc}")
        return index
    reread = read_index(path)
    if reread is None:  # pragma: no cover - we just wrote it
        return index
    reread.notes = index.notes
    return reread


def drop_index(database: Any) -> bool:
    """Delete the cache file (the next search rebuilds it); True if there was one."""
    return cachefile.drop(index_path_for(database))
