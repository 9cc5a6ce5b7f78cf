"""The element screen: which elements a compound contains, and which a query needs.

RDKit's pattern fingerprint sets no bits for an atom written as a list (``[Fe,Ru,Os]``), so a
query such as "a cyclopentadienyl ring on a metal" passes the fingerprint screen on most organic
compounds and RDKit has to reject them one by one. Element presence is the oldest screen there
is: every query atom that can only be one of a few elements needs one of them in the molecule.
Each compound's elements are kept as 128 bits (atomic numbers 0–118; 0 is the ``*`` atom) in
the screening index, read from its canonical SMILES; a query's needs are read from RDKit's own
description of each query atom. Anything the reader does not understand counts as "any
element", so the screen can only keep too much, never drop a hit (tests compare it with brute
force and with RDKit's atoms).
"""

from __future__ import annotations

import re
from functools import lru_cache
from typing import Any

import numpy as np

WORDS = 2  # 128 bits

_PARTS = re.compile(r"(\[[^\]]*\])")
_BRACKET = re.compile(r"\[\d*([A-Za-z][a-z]?|\*)")
_ORGANIC = re.compile(r"Cl|Br|[BCNOPSFI]|[bcnops]|\*")


@lru_cache(maxsize=1)
def _symbols() -> dict[str, int]:
    from rdkit import Chem

    table = Chem.GetPeriodicTable()
    return {table.GetElementSymbol(z): z for z in range(1, 119)} | {"*": 0}


def _bracket_element(part: str) -> int | None:
    """The atomic number of a bracket atom (``[nH]``, ``[Sc]``, ``[2H]``, ``[se]``, ``[Fe+2]``)."""
    found = _BRACKET.match(part)
    if found is None:
        return None
    symbols, text = _symbols(), found.group(1)
    if len(text) == 2 and text.capitalize() in symbols:
        return symbols[text.capitalize()]
    return symbols.get(text[0].upper() if text != "*" else "*")


def smiles_elements(smiles: str) -> set[int] | None:
    """Atomic numbers of the atoms written in a SMILES (None when a part cannot be read)."""
    out: set[int] = set()
    symbols = _symbols()
    for i, part in enumerate(_PARTS.split(smiles)):
        if i % 2:  # a bracket atom
            z = _bracket_element(part)
            if z is None:
                return None
            out.add(z)
        else:
            for token in _ORGANIC.findall(part):
                out.add(symbols[token.capitalize()] if token != "*" else 0)
    return out


def _words(numbers: set[int] | frozenset[int]) -> tuple[int, int]:
    bits = 0
    for z in numbers:
        bits |= 1 << z
    return bits & 0xFFFFFFFFFFFFFFFF, bits >> 64


def mask(numbers: set[int] | frozenset[int]) -> np.ndarray:
    """The element bits as two uint64 words (atomic number z is bit z % 64 of word z // 64)."""
    return np.array(_words(numbers), dtype=np.uint64)


ALL = (0xFFFFFFFFFFFFFFFF, 0xFFFFFFFFFFFFFFFF)


def compound_mask(smiles: str, binary: bytes | None = None) -> tuple[int, int]:
    """A compound's element bits (two words), from its SMILES or else its RDKit binary; all
    bits when neither can be read (never screened out)."""
    numbers = smiles_elements(smiles) if smiles else None
    if numbers is None and binary is not None:
        try:
            from rdkit import Chem

            numbers = {a.GetAtomicNum() for a in Chem.Mol(binary).GetAtoms()}
        except Exception:
            numbers = None
    return ALL if numbers is None else _words(numbers)


# ---------------------------------------------------------------- what a query needs


def _node(lines: list[str], start: int) -> tuple[frozenset[int] | None, int]:
    """(elements the description subtree at ``start`` allows or None for any, next line)."""
    line = lines[start]
    depth = len(line) - len(line.lstrip(" "))
    words = line.split()
    end = start + 1
    children: list[frozenset[int] | None] = []
    while end < len(lines) and len(lines[end]) - len(lines[end].lstrip(" ")) > depth:
        child, end = _node(lines, end)
        children.append(child)
    name = words[0] if words else ""
    negated = "!=" in words or "not" in words
    if children:
        if negated:
            return None, end
        if name == "AtomOr":
            if any(c is None for c in children):
                return None, end
            return frozenset().union(*children), end  # type: ignore[arg-type]
        if name == "AtomAnd":
            known = [c for c in children if c is not None]
            return (frozenset.intersection(*known) if known else None), end
        return None, end
    if negated or len(words) < 3 or words[2] != "=":
        return None, end
    if name in ("AtomAtomicNum", "AtomType"):
        try:
            value = int(words[1])
        except ValueError:
            return None, end
        return frozenset({value % 1000}), end  # AtomType: 1000 + Z for aromatic atoms
    return None, end


def atom_elements(atom: Any) -> frozenset[int] | None:
    """The elements a query atom can match; None when it could be any."""
    if not atom.HasQuery():
        z = atom.GetAtomicNum()
        return frozenset({z}) if z else None
    lines = [line for line in atom.DescribeQuery().splitlines() if line.strip()]
    if not lines:
        return None
    allowed, _ = _node(lines, 0)
    return allowed


def query_masks(mol: Any) -> list[np.ndarray]:
    """One element mask per query atom that narrows the elements (duplicates dropped): a
    matching molecule has at least one element of every mask."""
    seen: set[frozenset[int]] = set()
    out = []
    for atom in mol.GetAtoms():
        allowed = atom_elements(atom)
        if allowed is None or allowed in seen:
            continue
        seen.add(allowed)
        out.append(mask(allowed))
    return out
