"""Turn what the user typed (SMARTS, a SMILES substructure, a motif name) into RDKit queries.

RDKit reports *where* a SMARTS fails to parse only in its log ("check for mistakes around
position N"), so parsing runs with RDKit's error log switched on and routed to a captured
Python stream; the position and reason go into :class:`PatternError`. The pattern fingerprint of
each query (RDKit's substructure-screening fingerprint, the same 2048 bits that
:func:`registry.record.chem.pattern_fingerprint_bytes` stores per compound) is kept as 32 little-endian
64-bit words for the numpy screen.
"""

from __future__ import annotations

import contextlib
import io
import re
from dataclasses import dataclass
from functools import cache
from typing import Any

import numpy as np

from registry.errors import UsageError

FP_BITS = 2048
FP_WORDS = FP_BITS // 64


class PatternError(UsageError):
    """A SMARTS or SMILES query that RDKit cannot read; says why and where."""

    def __init__(
        self, field: str, text: str, reason: str, position: int | None = None, kind: str = "SMARTS"
    ) -> None:
        super().__init__(field, text, reason, position)
        self.field = field
        self.text = text
        self.reason = reason
        self.position = position  # 1-based character position, as RDKit reports it
        self.kind = kind

    def __str__(self) -> str:
        where = f" at position {self.position}" if self.position else ""
        head = f"{self.field}: {self.text!r} is not a valid {self.kind}{where}: {self.reason}"
        if self.position and 0 < self.position <= len(self.text) + 1:
            head += f"\n  {self.text}\n  {' ' * (self.position - 1)}^"
        return head


@cache
def _rdkit() -> Any:
    from rdkit import Chem, RDLogger, rdBase

    rdBase.LogToPythonStderr()  # so that parse errors can be captured (see _parse_logged)
    RDLogger.DisableLog("rdApp.*")
    return Chem


def _parse_logged(parse: Any, text: str) -> tuple[Any, str]:
    """Run an RDKit parser with its error log captured; returns (mol or None, log text)."""
    from rdkit import rdBase

    _rdkit()
    buffer = io.StringIO()
    with contextlib.redirect_stderr(buffer):
        rdBase.EnableLog("rdApp.error")
        try:
            mol = parse(text)
        finally:
            rdBase.DisableLog("rdApp.error")
    return mol, buffer.getvalue()


_POSITION = re.compile(r"around position (\d+)")
_REASON = re.compile(r"Parse Error: (.+?)(?: while parsing| for input|$)", re.M)


def _error_from_log(field: str, text: str, log: str, kind: str) -> PatternError:
    position = _POSITION.search(log)
    reason = _REASON.search(log)
    why = reason.group(1).strip() if reason else "RDKit cannot parse it"
    return PatternError(field, text, why, int(position.group(1)) if position else None, kind)


def compile_smarts(text: str, field: str = "smarts") -> Any:
    """An RDKit query molecule from SMARTS; :class:`PatternError` with the position if invalid."""
    Chem = _rdkit()
    clean = (text or "").strip()
    if not clean:
        raise PatternError(field, text or "", "empty pattern")
    mol, log = _parse_logged(Chem.MolFromSmarts, clean)
    if mol is None:
        raise _error_from_log(field, clean, log, "SMARTS")
    if mol.GetNumAtoms() == 0:
        raise PatternError(field, clean, "the pattern has no atoms")
    mol.UpdatePropertyCache(strict=False)
    Chem.FastFindRings(mol)
    return mol


def compile_smiles(text: str, field: str = "smiles") -> Any:
    """A SMILES read as a substructure query: atoms and bonds as written, hydrogens free."""
    Chem = _rdkit()
    clean = (text or "").strip()
    if not clean:
        raise PatternError(field, text or "", "empty SMILES", kind="SMILES")
    mol, log = _parse_logged(Chem.MolFromSmiles, clean)
    if mol is None:
        raise _error_from_log(field, clean, log, "SMILES")
    return mol


def query_fingerprint(mol: Any) -> np.ndarray:
    """The pattern fingerprint of a query as 32 uint64 words (bit order as stored per compound)."""
    from rdkit import DataStructs

    Chem = _rdkit()
    fp = Chem.PatternFingerprint(mol, fpSize=FP_BITS)
    return np.frombuffer(DataStructs.BitVectToBinaryText(fp), dtype="<u8").copy()


def needs_ring_info(mol: Any) -> bool:
    """Does the query test ring membership, ring size or ring bonds (``@``, ``R``, ``r``,
    ``x``)? Molecules parsed from SMILES without sanitization must then have their rings
    perceived one by one; the stored binary form carries them."""
    parts = [a.DescribeQuery() for a in mol.GetAtoms()]
    parts += [b.DescribeQuery() for b in mol.GetBonds()]
    return any("Ring" in part for part in parts)


def words_from_bytes(raw: bytes | None) -> np.ndarray | None:
    """A stored fingerprint (``BitVectToBinaryText`` of 2048 bits) as 32 uint64 words."""
    if raw is None or len(raw) != FP_BITS // 8:
        return None
    return np.frombuffer(raw, dtype="<u8")


@dataclass(frozen=True)
class Query:
    """One compiled search: the RDKit queries (any of them may match) and their fingerprints."""

    kind: str  # "smarts", "smiles" or "motif"
    text: str  # the pattern or motif name as the user gave it
    pattern_texts: tuple[str, ...]
    mols: tuple[Any, ...]
    fingerprints: tuple[np.ndarray, ...]
    stereo: bool = False

    @property
    def label(self) -> str:
        return f"{self.kind} {self.text}"


def build_query(
    *,
    smarts: str | None = None,
    smiles: str | None = None,
    motif: Any | None = None,
    stereo: bool = False,
) -> Query:
    """Compile exactly one of SMARTS, SMILES or a :class:`~registry.search.motifs.Motif`."""
    given = [x for x in (smarts, smiles, motif) if x is not None]
    if len(given) != 1:
        raise UsageError("give exactly one of smarts, smiles, motif (or similar)")
    if smarts is not None:
        mols: tuple[Any, ...] = (compile_smarts(smarts),)
        kind, text, texts = "smarts", smarts.strip(), (smarts.strip(),)
    elif smiles is not None:
        mols = (compile_smiles(smiles),)
        kind, text, texts = "smiles", smiles.strip(), (smiles.strip(),)
    else:
        texts = tuple(motif.stereo_smarts) if stereo and motif.stereo_smarts else motif.smarts
        mols = tuple(compile_smarts(t, field=f"motif {motif.name!r}") for t in texts)
        kind, text = "motif", motif.name
    return Query(kind, text, texts, mols, tuple(query_fingerprint(m) for m in mols), stereo)
