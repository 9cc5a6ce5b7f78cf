"""The screening index: every compound's pattern fingerprint, element bits and RDKit forms.

Substructure search screens first and confirms second (the fingerprint screen of Willett,
Barnard & Downs, J. Chem. Inf. Comput. Sci. 1998; RDKit's pattern fingerprint): a molecule can
contain the query only if it has every fingerprint bit of the query, so ``query ⊆ molecule`` on
packed 64-bit words throws most molecules out with a few numpy operations; RDKit then confirms
the rest (from RDKit's canonical SMILES parsed as trusted, or the stored binary form).

Building the index reads every compound's binary and fingerprint and works out its elements
(seconds at 100,000 compounds); mapping it from ``<db>.fpindex`` (:mod:`.cachefile`) takes
milliseconds, so the file stays. It records the registry state it was built from: the
``structure`` change counter (any update of a structure or delete of a compound, plain SQL
included) and the compound table's row count and largest id. New compounds only (count and
largest id grew by the same rows, counter unchanged) extend the file; any other difference
rebuilds it.

The stored fingerprints were computed by whatever RDKit wrote the compound; the pattern
fingerprint has changed between RDKit releases, and a stale one could screen out a true hit. At
build time a sample of stored fingerprints is recomputed from the molecules; if any differs, the
index recomputes all of them.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

import numpy as np

from registry.search import cachefile
from registry.search.patterns import FP_BITS, FP_WORDS
from registry.storage import changes
from registry.storage.connection import Connection
from registry.storage.database import Database

MAGIC = b"FLXSCRN1"
FORMAT_VERSION = 5  # 5: valid for a change-counter state
SUFFIX = ".fpindex"
_SAMPLE = 48  # stored fingerprints re-checked against the running RDKit at build time
#: what the index depends on (see the module docstring)
COUNTERS = ("structure",)
TABLES = ("compound",)


@dataclass
class ScreenIndex:
    """Compound ids (ascending), fingerprints (32 × N uint64, word-major so that the screen reads
    only the words a query needs), RDKit binaries (offsets + blob), canonical SMILES (offsets
    + blob; empty where the structure was kept unsanitized) and element bits (:mod:`.elements`)."""

    ids: np.ndarray
    fps: np.ndarray
    offsets: np.ndarray
    blob: np.ndarray
    smiles_offsets: np.ndarray
    smiles_blob: np.ndarray
    elements: np.ndarray  # 2 × N uint64: the elements each compound contains
    recomputed_fps: bool = False
    rdkit: str = ""
    notes: list[str] = field(default_factory=list)
    _keep: Any = None  # the mmap the arrays view, kept open while the index lives
    _smiles_text: str | None = None
    _smiles_offsets_list: list[int] = field(default_factory=list)

    def __len__(self) -> int:
        return int(self.ids.shape[0])

    def take_notes(self) -> list[str]:
        """What the search should tell the user about this index, once."""
        notes, self.notes = self.notes, []
        return notes

    def mol_binary(self, position: int) -> bytes:
        return self.blob[self.offsets[position] : self.offsets[position + 1]].tobytes()

    def trusted_smiles_many(self, positions: Any) -> list[str]:
        """RDKit's canonical SMILES of these positions ('' where the structure was kept
        unsanitized); the text is decoded once per process."""
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
        if not masks or rows.size == 0:
            return rows
        low, high = self.elements[0][rows], self.elements[1][rows]
        keep = np.ones(rows.size, dtype=bool)
        for words in masks:
            keep &= ((low & words[0]) | (high & words[1])) != 0
        return rows[keep]

    def positions_of(self, compound_ids: np.ndarray) -> np.ndarray:
        """Index positions of those compound ids the index holds (compounds with a structure)."""
        if compound_ids.size == 0 or len(self) == 0:
            return np.empty(0, dtype=np.int64)
        ids = np.sort(compound_ids)
        positions = np.searchsorted(self.ids, ids)
        inside = positions < len(self)
        positions, ids = positions[inside], ids[inside]
        return positions[self.ids[positions] == ids].astype(np.int64)


def rdkit_version() -> str:
    from rdkit import rdBase

    return str(rdBase.rdkitVersion)


# ---------------------------------------------------------------- building from the database


Row = tuple[int, bytes, bytes | None, str]


def _fetch(conn: Connection, after_id: int) -> list[Row]:
    result = conn.rows(
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
    from registry.search.elements import compound_mask

    n = len(rows)
    ids = np.fromiter((r[0] for r in rows), dtype=np.int64, count=n)
    fps = np.empty((n, FP_WORDS), dtype=np.uint64)
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


def build_index(conn: Connection) -> ScreenIndex:
    """Read every compound's binary and fingerprint in this transaction."""
    rows = _fetch(conn, 0)
    recompute = not _stored_fps_current(rows)
    notes = []
    if recompute:
        notes.append(
            "stored pattern fingerprints differ from this RDKit's; the index uses recomputed ones"
        )
    return ScreenIndex(
        **_arrays(rows, recompute), recomputed_fps=recompute, rdkit=rdkit_version(), notes=notes
    )


def _extend(index: ScreenIndex, rows: list[Row]) -> ScreenIndex:
    new = _arrays(rows, index.recomputed_fps)

    def joined(name: str, offsets: bool = False) -> np.ndarray:
        old, more = getattr(index, name), new[name]
        if offsets:
            return np.concatenate([old, more[1:] + int(old[-1])])
        return np.concatenate([old, more], axis=1 if old.ndim == 2 else 0)

    return ScreenIndex(
        ids=joined("ids"),
        fps=joined("fps"),
        offsets=joined("offsets", True),
        blob=joined("blob"),
        smiles_offsets=joined("smiles_offsets", True),
        smiles_blob=joined("smiles_blob"),
        elements=joined("elements"),
        recomputed_fps=index.recomputed_fps,
        rdkit=index.rdkit,
    )


# ---------------------------------------------------------------- the cache file

_ARRAYS = ("ids", "fps", "offsets", "blob", "smiles_offsets", "smiles_blob", "elements")


def save_index(index: ScreenIndex, path: Any, state: dict) -> None:
    header = {
        "format": FORMAT_VERSION,
        "state": state,
        "rdkit": index.rdkit,
        "recomputed_fps": index.recomputed_fps,
    }
    cachefile.save_arrays(path, MAGIC, header, {n: getattr(index, n) for n in _ARRAYS})


def read_index(path: Any) -> tuple[ScreenIndex, dict] | None:
    """Map a cache file: (the index, the state it was built for); None when it is missing,
    damaged or of another format."""
    found = cachefile.read_arrays(path, MAGIC, FORMAT_VERSION)
    if found is None:
        return None
    header, arrays, mapped = found
    if set(arrays) != set(_ARRAYS) or "state" not in header:
        return None
    index = ScreenIndex(
        **arrays,
        recomputed_fps=bool(header.get("recomputed_fps")),
        rdkit=str(header.get("rdkit", "")),
        _keep=mapped,
    )
    return index, header["state"]


def _appended(conn: Connection, before: dict, now: dict) -> bool:
    """Only new compounds since ``before``: same counters, rows and largest id grown alike."""
    if before.get("counters") != now["counters"]:
        return False
    try:
        old = changes.TableState(*before["tables"]["compound"])
    except (KeyError, TypeError):
        return False
    current = changes.TableState(*now["tables"]["compound"])
    if current.max_id <= old.max_id:
        return False
    newer = int(conn.scalar("SELECT count(*) FROM compound WHERE id > :m", {"m": old.max_id}))
    return changes.only_appended(old, current, newer)


def index_state(conn: Connection) -> dict:
    """The registry state the screening index (and the similarity index) depend on."""
    return cachefile.state_of(conn, COUNTERS, TABLES)


def load_index(database: Database, conn: Connection, *, rebuild: bool = False) -> ScreenIndex:
    """The index valid for ``conn``'s snapshot: held in this process, mapped from its file,
    extended by new compounds, or rebuilt (and written back; a file that cannot be written is
    no error, the search notes it)."""
    now = index_state(conn)
    key = (database.key, "index")
    current = rdkit_version()
    if not rebuild:
        index = cachefile.held(key, now)
        if index is not None:
            return index
    path = cachefile.path_for(database, SUFFIX)
    found = None if rebuild or path is None else read_index(path)
    if found is not None and found[0].rdkit == current and found[1] == now:
        return cachefile.hold(key, now, found[0])
    if found is not None and found[0].rdkit == current and _appended(conn, found[1], now):
        old_max = int(found[0].ids[-1]) if len(found[0]) else 0
        old_max = max(old_max, int(found[1]["tables"]["compound"][1]))
        index = _extend(found[0], _fetch(conn, old_max))
    else:
        index = build_index(conn)
    if path is not None:
        done = cachefile.write_or_note(
            lambda: save_index(index, path, now), path, "screening cache", index.notes
        )
        if done:
            reread = read_index(path)
            if reread is not None:  # the mapped form: file-backed pages, not private memory
                reread[0].notes = index.notes
                index = reread[0]
    return cachefile.hold(key, now, index)


def drop_index(database: Database) -> bool:
    """Delete the cache file (the next search rebuilds it); True if there was one."""
    cachefile.forget()
    return cachefile.drop(cachefile.path_for(database, SUFFIX))
