"""All use of RDKit lives here, imported lazily so that commands without chemistry start fast.

Structures are stored as entered and as RDKit reads them. A SMILES that RDKit can parse but not
sanitize (some organometallics: η⁵-rings, dative bonds, unusual valences) is kept with a flag and
the reason; only text that cannot be read as SMILES at all is refused.

Standardization on entry is deliberately light: RDKit's canonical SMILES and the standard InChI
already unify aromatic/Kekulé forms and tautomer-free spelling differences; we do not neutralise,
strip salts or rewrite tautomers (an iminol written ``N=C(O)`` stays an iminol), because the
registry must show the structure the group reported.
"""

from __future__ import annotations

import contextlib
from dataclasses import dataclass
from functools import cache, lru_cache
from typing import Any

from registry.errors import MolfileError, StructureError


@dataclass(frozen=True)
class Structure:
    """What RDKit makes of one SMILES; ``ok`` is False when it parsed only unsanitized."""

    smiles_input: str
    smiles_canonical: str | None
    inchi: str | None
    inchikey: str | None
    formula: str | None
    net_charge: int | None
    ok: bool
    problem: str | None
    mol_binary: bytes | None
    pattern_fp: bytes | None


@cache
def _rdkit() -> Any:
    from rdkit import Chem, RDLogger

    RDLogger.DisableLog("rdApp.*")
    return Chem


def pattern_fingerprint_bytes(mol: Any) -> bytes:
    """RDKit's substructure-screening (pattern) fingerprint, 2048 bits, as raw bytes."""
    Chem = _rdkit()
    from rdkit import DataStructs

    fp = Chem.PatternFingerprint(mol, fpSize=2048)
    return DataStructs.BitVectToBinaryText(fp)


#: the largest molecules kept (heavy atoms, and characters of SMILES): cages, rotaxanes and
#: foldamers fit; far larger inputs are slips, and RDKit's writers can crash on them
MAX_ATOMS = 1000
MAX_SMILES_CHARACTERS = 10_000


def read_structure(smiles: str, *, with_fingerprint: bool = True) -> Structure:
    """Parse, canonicalize and identify one SMILES; raise :class:`StructureError` if unreadable.

    Results are cached per process (a group enters the same compounds again and again).
    """
    return _read_structure_cached(smiles, with_fingerprint)


@lru_cache(maxsize=4096)
def _read_structure_cached(smiles: str, with_fingerprint: bool) -> Structure:
    Chem = _rdkit()
    text = (smiles or "").strip()
    if not text:
        raise StructureError(smiles, "empty SMILES")
    if len(text) > MAX_SMILES_CHARACTERS:
        raise StructureError(
            text[:40] + "…",
            f"{len(text):,} characters; a molecule of this registry is written in at most "
            f"{MAX_SMILES_CHARACTERS:,}",
        )
    mol = Chem.MolFromSmiles(text)
    if mol is not None and mol.GetNumAtoms() > MAX_ATOMS:
        raise StructureError(
            text[:40] + "…", f"{mol.GetNumAtoms():,} atoms; at most {MAX_ATOMS:,} are kept"
        )
    if mol is not None:
        return _describe(text, mol, ok=True, problem=None, with_fingerprint=with_fingerprint)
    raw = Chem.MolFromSmiles(text, sanitize=False)
    if raw is None:
        raise StructureError(smiles, "not a readable SMILES (syntax error)")
    if raw.GetNumAtoms() > MAX_ATOMS:
        raise StructureError(
            text[:40] + "…", f"{raw.GetNumAtoms():,} atoms; at most {MAX_ATOMS:,} are kept"
        )
    problem = _sanitize_problem(raw)
    raw.UpdatePropertyCache(strict=False)
    with contextlib.suppress(Exception):  # partial sanitization is best effort only
        Chem.SanitizeMol(
            raw,
            Chem.SanitizeFlags.SANITIZE_ALL
            ^ Chem.SanitizeFlags.SANITIZE_PROPERTIES
            ^ Chem.SanitizeFlags.SANITIZE_KEKULIZE
            ^ Chem.SanitizeFlags.SANITIZE_SETAROMATICITY,
            catchErrors=True,
        )
    return _describe(text, raw, ok=False, problem=problem, with_fingerprint=with_fingerprint)


def _sanitize_problem(mol: Any) -> str:
    Chem = _rdkit()
    probe = Chem.Mol(mol)
    try:
        Chem.SanitizeMol(probe)
    except Exception as exc:  # RDKit raises several sanitization exception classes
        return f"RDKit cannot sanitize: {exc}"
    return "RDKit cannot sanitize this structure"


def _describe(
    text: str, mol: Any, *, ok: bool, problem: str | None, with_fingerprint: bool
) -> Structure:
    Chem = _rdkit()
    from rdkit.Chem import rdMolDescriptors

    try:
        canonical = Chem.MolToSmiles(mol)
    except Exception:
        canonical = None
    inchi = inchikey = None
    try:
        inchi = Chem.MolToInchi(mol) or None
        inchikey = Chem.InchiToInchiKey(inchi) if inchi else None
    except Exception:
        inchi = inchikey = None
    try:
        formula = rdMolDescriptors.CalcMolFormula(mol)
    except Exception:
        formula = None
    try:
        charge = Chem.GetFormalCharge(mol)
    except Exception:
        charge = None
    fp = None
    if with_fingerprint:
        try:
            fp = pattern_fingerprint_bytes(mol)
        except Exception:
            fp = None
    return Structure(
        smiles_input=text,
        smiles_canonical=canonical,
        inchi=inchi,
        inchikey=inchikey,
        formula=formula,
        net_charge=charge,
        ok=ok,
        problem=problem,
        mol_binary=mol.ToBinary(),
        pattern_fp=fp,
    )


def structure_for(smiles: str | None) -> Structure | None:
    """The structure of a SMILES as stored (None when there is none)."""
    return read_structure(smiles) if smiles else None


#: a Molfile of MAX_ATOMS atoms is well under this; far larger input is not one molecule
MAX_MOLFILE_CHARACTERS = 1_000_000


def smiles_from_molfile(text: str, source: str = "Molfile") -> str:
    """The SMILES a Molfile (V2000 or V3000) stands for: what the registry stores.

    The connection table is what a structure editor drew, so it decides the structure; RDKit
    writes dative bonds as ``->`` (organometallics keep them), stereo from wedges and 2D
    coordinates, explicit hydrogens folded in. A table RDKit reads but cannot sanitize is kept
    unsanitized, as for SMILES; an empty table gives ``""`` (no structure).
    """
    Chem = _rdkit()
    if len(text) > MAX_MOLFILE_CHARACTERS:
        raise MolfileError(source, f"{len(text):,} characters; not one molecule's Molfile")
    if "M  END" not in text:
        raise MolfileError(source, "not a Molfile (no 'M  END' line ends a connection table)")
    mol = Chem.MolFromMolBlock(text, sanitize=True, removeHs=True)
    if mol is None:
        mol = Chem.MolFromMolBlock(text, sanitize=False, removeHs=False)
    if mol is None:
        raise MolfileError(
            source, "not a readable Molfile (its counts line, atom or bond block is malformed)"
        )
    if mol.GetNumAtoms() > MAX_ATOMS:
        raise MolfileError(source, f"{mol.GetNumAtoms():,} atoms; at most {MAX_ATOMS:,} are kept")
    if mol.GetNumAtoms() == 0:
        return ""
    try:
        return Chem.MolToSmiles(mol)
    except Exception as exc:  # RDKit raises several exception classes for odd valences
        raise MolfileError(source, f"RDKit cannot write this structure as SMILES: {exc}") from None


def molfile_from_smiles(smiles: str | None, title: str = "") -> str:
    """A Molfile with 2D coordinates for a stored SMILES (V3000 where V2000 cannot say it, e.g.
    dative bonds); an empty connection table when there is no structure."""
    Chem = _rdkit()
    from rdkit.Chem import rdDepictor

    mol = None
    if smiles:
        mol = Chem.MolFromSmiles(smiles)
        if mol is None:  # stored unsanitized (organometallics): write what RDKit can read
            mol = Chem.MolFromSmiles(smiles, sanitize=False)
            if mol is not None:
                mol.UpdatePropertyCache(strict=False)
    if mol is None:
        mol = Chem.Mol()
    with contextlib.suppress(Exception):  # coordinates are a courtesy, not the structure
        rdDepictor.Compute2DCoords(mol)
    block = Chem.MolToMolBlock(mol, kekulize=mol.GetNumAtoms() > 0 and _kekulizable(mol))
    lines = block.split("\n")
    lines[0] = " ".join((title or "").split())[:80]  # the Molfile's name line: one line of text
    return "\n".join(lines)


def _kekulizable(mol: Any) -> bool:
    Chem = _rdkit()
    try:
        Chem.Kekulize(Chem.Mol(mol), clearAromaticFlags=True)
    except Exception:  # RDKit's KekulizeException and friends
        return False
    return True
