"""The element screen: elements read from SMILES agree with RDKit's atoms, a query atom's allowed
elements always include every element RDKit lets it match, and searches with the screen give
exactly what brute force gives, metal compounds included."""

from __future__ import annotations

from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from rdkit import Chem
from search_data import generated_smiles, write_registry

from registry import api
from registry.search import brute_force, build_query, find, get_motif
from registry.search import elements as el

TRICKY = [
    "[nH]1cccc1",
    "c1cc[se]c1",
    "[2H]C([2H])([2H])Cl",
    "[Cs+].[Cl-]",
    "[Sc+3]",
    "[Co+2]",
    "Br[Hg]Br",
    "[Fe+2].c1cc[cH-]c1.c1cc[cH-]c1",  # ferrocene, the ionic spelling
    "C[Si](C)(C)[H]",
    "[H][H]",
    "*C(=O)O",
    "FC(F)(F)I",
    "B1OCCO1",
    "O=P(O)(O)O",
    "c1ccc2[nH]ccc2c1",
    "C%10CCCCC%10",
    "[13CH4]",
    "[te]1cccc1",
    "[Ru]",
    "Cl/C=C/Br",
]


def _rdkit_elements(smiles: str) -> set[int]:
    mol = Chem.MolFromSmiles(smiles, sanitize=False)
    return {a.GetAtomicNum() for a in mol.GetAtoms()}


@pytest.mark.parametrize("smiles", TRICKY)
def test_elements_read_from_smiles_agree_with_rdkit(smiles: str) -> None:
    assert el.smiles_elements(smiles) == _rdkit_elements(smiles)


def test_elements_of_every_canonical_smiles_of_the_test_set() -> None:
    for smiles in generated_smiles()[::7]:
        canonical = Chem.MolToSmiles(Chem.MolFromSmiles(smiles))
        assert el.smiles_elements(canonical) == _rdkit_elements(canonical), canonical


# atomic numbers as in the IUPAC periodic table (C 6, N 7, Se 34, Fe 26, Ru 44, Os 76); the
# query readings follow the SMARTS language itself (',' = or, '&' and ';' = and, '!' = not)
@pytest.mark.parametrize(
    ("smarts", "allowed"),
    [
        ("C", {6}),
        ("c", {6}),
        ("[#7]", {7}),
        ("[Fe,Ru,Os]", {26, 44, 76}),
        ("[C,N;X3]", {6, 7}),
        ("[#6&!#7]", {6}),
        ("[se]", {34}),
        ("[#6-;a]", {6}),
        ("[#6&#7]", set()),  # nothing can be both
        ("*", None),
        ("a", None),
        ("[!C]", None),
        ("[!#6;!#1;!a]", None),
        ("[$(C=O)]", None),
        ("[!C,N]", None),
    ],
)
def test_allowed_elements_of_query_atoms(smarts: str, allowed: set[int] | None) -> None:
    atom = Chem.MolFromSmarts(smarts).GetAtomWithIdx(0)
    assert el.atom_elements(atom) == (None if allowed is None else frozenset(allowed))


PROBES = [Chem.MolFromSmiles(s) for s in [*TRICKY[:-1], "CC(=O)N(C)C", "c1ccncc1", "CSC#N"]]
_PRIMITIVE = st.sampled_from(
    ["C", "c", "N", "n", "O", "S", "s", "#6", "#7", "#8", "#16", "#26", "Fe", "Cl", "#1",
     "#0", "H1", "X3", "D2", "a", "A", "R", "+0", "-", "+", "Se", "se", "$(C=O)", "$(cn)"]
)  # fmt: skip


@st.composite
def _atom_smarts(draw) -> str:  # type: ignore[no-untyped-def]
    def term() -> str:
        return ("!" if draw(st.booleans()) else "") + draw(_PRIMITIVE)

    groups = [
        ",".join(term() for _ in range(draw(st.integers(1, 3))))
        for _ in range(draw(st.integers(1, 3)))
    ]
    return "[" + ";".join(groups) + "]"


@settings(max_examples=300, deadline=None)
@given(_atom_smarts())
def test_an_atom_rdkit_matches_is_always_allowed(smarts: str) -> None:
    """Soundness: the screen may keep too much, never drop an atom RDKit would match."""
    query = Chem.MolFromSmarts(smarts)
    allowed = el.atom_elements(query.GetAtomWithIdx(0))
    for probe in PROBES:
        for (index,) in probe.GetSubstructMatches(query, uniquify=False, maxMatches=1000):
            z = probe.GetAtomWithIdx(index).GetAtomicNum()
            assert allowed is None or z in allowed, (smarts, Chem.MolToSmiles(probe), z)


@pytest.fixture
def with_metals(tmp_path: Path):  # type: ignore[no-untyped-def]
    """A small registry with organic compounds and a few metal complexes."""
    path = tmp_path / "registry.sqlite"
    write_registry(path, generated_smiles()[::40])
    database = api.open_registry(str(path))
    from registry.record.entry import EntryInput

    for smiles in (
        "[Fe+2].c1cc[cH-]c1.c1cc[cH-]c1",
        "C[Si](C)(C)C1C=CC=C1[Fe]",
        "[Ru]C1C=CC=C1",
        "Br[Hg]Br",
    ):
        api.add_measurement(database, EntryInput(method="lineshape", smiles=smiles, dg="50 kJ/mol"))
    yield database
    database.dispose()


@pytest.mark.parametrize(
    "smarts", ["[Fe,Ru,Os]", "[Hg]Br", "[#26]~[#6]", "[Fe,Ru]~[#6]1~[#6]~[#6]~[#6]~[#6]~1"]
)
def test_metal_searches_equal_brute_force(with_metals, smarts: str) -> None:  # type: ignore[no-untyped-def]
    query = build_query(smarts=smarts)
    result = find(with_metals, query=query)
    assert sorted({r["compound_id"] for r in result.rows}) == brute_force(with_metals, query)
    assert result.rows  # the metal compounds are found


def test_the_element_screen_narrows_a_metal_motif(with_metals) -> None:  # type: ignore[no-untyped-def]
    query = build_query(motif=get_motif("cp-metal"))
    result = find(with_metals, query=query)
    assert sorted({r["compound_id"] for r in result.rows}) == brute_force(with_metals, query)
    assert result.stats.matched >= 2
    assert result.stats.screened <= 4  # only the metal compounds are left to confirm
