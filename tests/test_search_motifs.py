"""The motif library: every built-in motif on its positive and negative examples, user motifs.

Example structures are textbook members (or near misses) of each class; common practice, no
source.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from rdkit import Chem

from registry.errors import FileFormatError, NotFoundError, UsageError
from registry.search import motifs as lib
from registry.search.patterns import PatternError, compile_smarts, needs_ring_info


def _matches(motif: lib.Motif, smiles: str, stereo: bool = False) -> bool:
    mol = Chem.MolFromSmiles(smiles)
    assert mol is not None, smiles
    texts = motif.stereo_smarts if stereo and motif.stereo_smarts else motif.smarts
    return any(mol.HasSubstructMatch(compile_smarts(t), useChirality=stereo) for t in texts)


REQUIRED = {
    "biaryl-ortho", "amide", "thioamide", "carbamate", "urea", "sulfonamide", "enamine",
    "n-aryl-amide", "aryl-carbonyl", "ring6-carbocycle", "ring6-heterocycle", "hexadiene-1,5",
    "divinylcyclopropane", "cp-metal", "pyramidal-np",
}  # fmt: skip


def test_library_has_the_promised_motifs_each_with_examples() -> None:
    names = {m.name for m in lib.BUILTIN}
    assert names >= REQUIRED
    for motif in lib.BUILTIN:
        assert motif.positives and motif.negatives, motif.name
        assert motif.description, motif.name


@pytest.mark.parametrize(
    ("name", "smiles"), [(m.name, s) for m in lib.BUILTIN for s in m.positives]
)
def test_motif_matches_its_positive_examples(name: str, smiles: str) -> None:
    assert _matches(lib.builtin_motifs()[name], smiles)


@pytest.mark.parametrize(
    ("name", "smiles"), [(m.name, s) for m in lib.BUILTIN for s in m.negatives]
)
def test_motif_rejects_its_negative_examples(name: str, smiles: str) -> None:
    assert not _matches(lib.builtin_motifs()[name], smiles)


def test_amide_motif_matches_the_iminol_spelling_of_the_same_amide() -> None:
    amide = lib.builtin_motifs()["amide"]
    # N-methylacetamide as amide and as iminol: the same compound, two spellings
    assert _matches(amide, "CNC(C)=O") and _matches(amide, "CN=C(C)O")
    # an imidate ester C(OR)=N is not an amide
    assert not _matches(amide, "CN=C(C)OC")


def test_divinylcyclopropane_stereo_asks_for_cis() -> None:
    motif = lib.builtin_motifs()["divinylcyclopropane"]
    cis, trans = "C=C[C@H]1C[C@H]1C=C", "C=C[C@H]1C[C@@H]1C=C"  # (1R,2S) meso = cis
    assert _matches(motif, cis) and _matches(motif, trans)
    assert _matches(motif, cis, stereo=True)
    assert not _matches(motif, trans, stereo=True)
    assert not _matches(motif, "C=CC1CC1C=C", stereo=True)  # unspecified stereo


def test_get_motif_names_the_known_ones_when_unknown() -> None:
    with pytest.raises(NotFoundError) as err:
        lib.get_motif("amid")
    assert "no motif named 'amid'" in str(err.value)
    assert "amide" in str(err.value)


def test_user_motif_add_list_remove_with_history(database) -> None:  # type: ignore[no-untyped-def]
    added = lib.add_motif(
        database, "lactam-5", "O=C1CCCN1", description="pyrrolidinone", actor="ann"
    )
    assert added.source == "registry"
    names = [m.name for m in lib.list_motifs(database)]
    assert names[: len(lib.BUILTIN)] == [m.name for m in lib.BUILTIN]
    assert "lactam-5" in names
    assert lib.get_motif("lactam-5", database).smarts == ("O=C1CCCN1",)
    with pytest.raises(UsageError, match="exists already"):
        lib.add_motif(database, "lactam-5", "O=C1CCCN1")
    removed = lib.remove_motif(database, "lactam-5", actor="ann", reason="typo")
    assert removed.smarts == ("O=C1CCCN1",)
    assert "lactam-5" not in [m.name for m in lib.list_motifs(database)]
    with database.read() as conn:
        actions = conn.rows("SELECT action, actor FROM revision WHERE entity = 'motif' ORDER BY id")
    assert [tuple(a) for a in actions] == [("add", "ann"), ("remove", "ann")]


def test_user_motif_refuses_builtin_names_bad_names_and_bad_smarts(database) -> None:  # type: ignore[no-untyped-def]
    with pytest.raises(UsageError, match="built-in"):
        lib.add_motif(database, "amide", "C(=O)N")
    with pytest.raises(UsageError, match="lowercase"):
        lib.add_motif(database, "My Motif", "C(=O)N")
    with pytest.raises(PatternError) as err:
        lib.add_motif(database, "broken", "C(=O")
    assert err.value.position == 2
    with pytest.raises(UsageError, match="built-in"):
        lib.remove_motif(database, "amide")
    with pytest.raises(NotFoundError):
        lib.remove_motif(database, "nothing-here")


def test_motifs_from_a_toml_file(tmp_path: Path) -> None:
    path = tmp_path / "mine.toml"
    path.write_text(
        '[[motif]]\nname = "lactam-5"\nsmarts = "O=C1CCCN1"\ndescription = "γ-lactam"\n\n'
        '[[motif]]\nname = "acyl-x"\nsmarts = ["C(=O)Cl", "C(=O)Br"]\n',
        encoding="utf-8",
    )
    loaded = lib.load_motif_file(path)
    assert [m.name for m in loaded] == ["lactam-5", "acyl-x"]
    assert loaded[1].smarts == ("C(=O)Cl", "C(=O)Br")
    assert lib.get_motif("acyl-x", files=[str(path)]).source == str(path)


@pytest.mark.parametrize(
    ("text", "message"),
    [
        ("not toml [", "not a valid TOML file"),
        ("[other]\nx = 1\n", "no [[motif]] tables"),
        ('[[motif]]\nname = "x"\n', "needs 'name' and 'smarts'"),
        ('[[motif]]\nname = "a"\nsmarts = "C"\n[[motif]]\nname = "a"\nsmarts = "N"\n', "twice"),
        ('[[motif]]\nname = "a"\nsmarts = 5\n', "must be a SMARTS string"),
    ],
)
def test_bad_motif_files_say_what_is_wrong(tmp_path: Path, text: str, message: str) -> None:
    path = tmp_path / "bad.toml"
    path.write_text(text, encoding="utf-8")
    with pytest.raises(FileFormatError) as err:
        lib.load_motif_file(path)
    assert message in str(err.value)
    assert str(path) in str(err.value)


def test_motif_file_with_a_bad_smarts_names_file_and_motif(tmp_path: Path) -> None:
    path = tmp_path / "bad.toml"
    path.write_text('[[motif]]\nname = "oops"\nsmarts = "C1CC"\n', encoding="utf-8")
    with pytest.raises(PatternError) as err:
        lib.load_motif_file(path)
    assert f"{path}: motif 'oops'" in str(err.value)
    assert "unclosed ring" in str(err.value)


# ring primitives as the SMARTS language defines them: '@' ring bond, R ring membership,
# r smallest ring size, x ring connectivity; chirality '@' inside brackets and ring-closure
# digits are not ring tests
@pytest.mark.parametrize(
    ("smarts", "ring"),
    [
        ("[a;D3]:a-!@a:[a;D3]", True),  # ring bond (negated) between the aryls
        ("C@C", True),
        ("[C;R2]", True),
        ("[r6]", True),
        ("[x3]", True),
        ("[CX3](=O)[NX3]", False),
        ("[C@H](F)(Cl)Br", False),  # chirality, not a ring test
        ("[!#6;!#1;!a]1-[!a]-[!a]-[!a]-[!a]-[!a]-1", False),  # ring closure: topology only
    ],
)
def test_queries_that_need_ring_perception_are_recognised(smarts: str, ring: bool) -> None:
    assert needs_ring_info(compile_smarts(smarts)) is ring
