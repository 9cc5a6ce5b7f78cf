"""Structures in and out as Molfiles and SD files.

The reference for every structure here is RDKit reading the original SMILES directly (its
InChIKey and its bond types), which does not pass through the code under test; the SD files
are written by hand in the test (the V2000/V3000 layouts of the published CTfile format) or
read back with RDKit's own SD reader.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from rdkit import Chem

from registry import api
from registry.errors import FileFormatError, MolfileError
from registry.io.sdfile import read_sd, write_sd
from registry.storage.database import Database

#: real molecules of the kinds the registry holds (amide, hindered biaryl, cyclohexane ring,
#: an organometallic with dative bonds, a charged species); common practice, no source
SMILES = [
    "CN(C)C(=O)c1ccc(Cl)cc1",
    "Cc1cccc(C)c1-c1c(C)cccc1C(=O)O",
    "C[C@H]1CC[C@@H](C)CC1",
    "[NH3]->[Pt](<-[NH3])(Cl)Cl",
    "C[N+](C)(C)Cc1ccccc1",
]

#: ethanol as a V3000 connection table, laid out by hand after the CTfile specification
ETHANOL_V3000 = """ethanol
  hand-written

  0  0  0     0  0            999 V3000
M  V30 BEGIN CTAB
M  V30 COUNTS 3 2 0 0 0
M  V30 BEGIN ATOM
M  V30 1 C 0 0 0 0
M  V30 2 C 1.3 0.75 0 0
M  V30 3 O 2.6 0 0 0
M  V30 END ATOM
M  V30 BEGIN BOND
M  V30 1 1 1 2
M  V30 2 1 2 3
M  V30 END BOND
M  V30 END CTAB
M  END
"""

#: N-methylacetamide as a V2000 table, written by hand (heavy atoms only)
NMA_V2000 = """N-methylacetamide
  hand-written

  5  4  0  0  0  0  0  0  0  0999 V2000
    0.0000    0.0000    0.0000 C   0  0  0  0  0  0  0  0  0  0  0  0
    1.3000    0.7500    0.0000 C   0  0  0  0  0  0  0  0  0  0  0  0
    1.3000    2.2500    0.0000 O   0  0  0  0  0  0  0  0  0  0  0  0
    2.6000    0.0000    0.0000 N   0  0  0  0  0  0  0  0  0  0  0  0
    3.9000    0.7500    0.0000 C   0  0  0  0  0  0  0  0  0  0  0  0
  1  2  1  0
  2  3  2  0
  2  4  1  0
  4  5  1  0
M  END
"""


def _key(smiles: str) -> str:
    return Chem.MolToInchiKey(Chem.MolFromSmiles(smiles))


@pytest.mark.parametrize("smiles", SMILES)
def test_a_molfile_reads_as_the_same_molecule(smiles: str) -> None:
    block = Chem.MolToMolBlock(Chem.MolFromSmiles(smiles))  # RDKit's writer, not ours
    assert _key(api.smiles_from_molfile(block)) == _key(smiles)


def test_hand_written_v2000_and_v3000_tables() -> None:
    assert _key(api.smiles_from_molfile(ETHANOL_V3000)) == _key("CCO")
    assert _key(api.smiles_from_molfile(NMA_V2000)) == _key("CC(=O)NC")


def test_dative_bonds_are_kept() -> None:
    smiles = api.smiles_from_molfile(Chem.MolToMolBlock(Chem.MolFromSmiles(SMILES[3])))
    bonds = {b.GetBondType() for b in Chem.MolFromSmiles(smiles).GetBonds()}
    assert Chem.BondType.DATIVE in bonds


@pytest.mark.parametrize(
    ("text", "reason"),
    [
        ("just a line\n", "not a Molfile (no 'M  END' line"),
        ("x\n\n\n  2  1  0  0  0  0  0  0  0  0999 V2000\nM  END\n", "not a readable Molfile"),
        ("x\n" * 600_000 + "M  END\n", "1,200,007 characters; not one molecule's Molfile"),
    ],
)
def test_a_bad_molfile_is_named(text: str, reason: str) -> None:
    with pytest.raises(MolfileError, match="^Molfile: " + reason.replace("(", r"\(")):
        api.smiles_from_molfile(text)


def test_a_molfile_path_missing_or_a_folder(tmp_path: Path) -> None:
    with pytest.raises(FileFormatError, match="no such file"):
        api.smiles_from_molfile(str(tmp_path / "none.mol"))
    with pytest.raises(FileFormatError, match="is a folder"):
        api.smiles_from_molfile(str(tmp_path))


def test_add_takes_a_molfile(cli, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    mol = tmp_path / "biaryl.mol"
    mol.write_text(Chem.MolToMolBlock(Chem.MolFromSmiles(SMILES[1])), encoding="utf-8")
    added = cli(
        "add", "--method", "computed", "--compound", "BA-2", "--molfile", str(mol),
        "--dg", "24.0 kcal/mol", "--dg-t", "298.15 K", "--json",
    )  # fmt: skip
    assert added.exit_code == 0, added.stderr
    assert '"inchikey": "' + _key(SMILES[1]) + '"' in added.stdout
    both = cli("add", "--method", "computed", "--molfile", str(mol), "--smiles", "C", "--dg", "1")
    assert both.exit_code == 2
    assert "--smiles or --molfile, not both" in both.stderr
    bad = tmp_path / "bad.mol"
    bad.write_text("not a structure\n", encoding="utf-8")
    refused = cli("add", "--method", "computed", "--molfile", str(bad), "--dg", "20 kcal/mol")
    assert refused.exit_code == 1
    assert (
        refused.stderr
        == f"error: {bad}: not a Molfile (no 'M  END' line ends a connection table)\n"
    )


def _sd_record(block: str, items: dict[str, str]) -> str:
    body = "".join(f">  <{k}>\n{v}\n\n" for k, v in items.items())
    return block.rstrip("\n") + "\n" + body + "$$$$\n"


def _group_sd(tmp_path: Path) -> Path:
    """An SD file as a structure editor writes one: title lines as names, group headers."""
    path = tmp_path / "amides.sdf"
    dma = Chem.MolToMolBlock(Chem.MolFromSmiles("CC(=O)N(C)C"))
    path.write_text(
        _sd_record(
            "DMA" + dma[dma.index("\n") :],
            {
                "method": "coalescence",
                "Solvent": "CDCl3",
                "Tc (°C)": "52",
                "dnu (Hz)": "8.9",
                "Freq / MHz": "60",
                "dG (kcal/mol)": "17.8",
                "operator": "invented demo value",
            },
        )
        + _sd_record(
            "\n  empty table\n\n  0  0  0  0  0  0  0  0  0  0999 V2000\nM  END",
            {"SMILES": "CN(C)C=O", "name": "DMF", "method": "computed", "dG (kJ/mol)": "88"},
        ),
        encoding="utf-8",
    )
    return path


def test_an_sd_file_imports_like_a_sheet(database: Database, tmp_path: Path) -> None:
    summary = api.import_table(database, str(_group_sd(tmp_path)))
    assert summary["added"] == 2
    rows = {r["compound_name"]: r for r in api.list_measurements(database)}
    assert set(rows) == {"DMA", "DMF"}
    dma = api.get_measurement(database, rows["DMA"]["id"])
    assert dma["compound"]["inchikey"] == _key("CC(=O)N(C)C")
    assert dma["dg_kj_mol"] == pytest.approx(17.8 * 4.184)  # thermochemical calorie, NIST SP 811
    assert dma["coalescence"][0]["tc_k"] == pytest.approx(52 + 273.15)
    assert dma["coalescence"][0]["field_mhz"] == pytest.approx(60)
    assert dma["extra"] == {"operator": "invented demo value"}
    # the second record has no drawn structure: its SMILES data item is the structure
    dmf = api.get_measurement(database, rows["DMF"]["id"])
    assert dmf["compound"]["inchikey"] == _key("CN(C)C=O")


def test_an_unreadable_record_names_itself_and_nothing_is_written(
    database: Database, tmp_path: Path
) -> None:
    path = _group_sd(tmp_path)
    broken = "\n\n\n  2  1  0  0  0  0  0  0  0  0999 V2000\nM  END"
    path.write_text(
        path.read_text(encoding="utf-8") + _sd_record("B-7" + broken, {"method": "computed"}),
        encoding="utf-8",
    )
    with pytest.raises(FileFormatError) as caught:
        api.import_table(database, str(path))
    assert "1 record(s) with a Molfile that cannot be read; nothing was written" in str(
        caught.value
    )
    assert "record 3 (B-7): not a readable Molfile" in str(caught.value)
    assert api.list_measurements(database) == []


def test_an_empty_sd_file_and_sheets_are_refused(database: Database, tmp_path: Path) -> None:
    path = tmp_path / "empty.sdf"
    path.write_text("\n\n", encoding="utf-8")
    with pytest.raises(FileFormatError, match="the file is empty"):
        api.import_table(database, str(path))
    with pytest.raises(FileFormatError, match="an SD file has no sheets"):
        api.import_table(database, str(_group_sd(tmp_path)), sheet="Sheet1")


def test_export_and_import_round_trip(database: Database, tmp_path: Path) -> None:
    for i, smiles in enumerate(SMILES):
        api.add_measurement(
            database,
            {"method": "computed", "smiles": smiles, "compound": f"C-{i}",
             "dg": f"{80 + i} kJ/mol", "dg_t": "298.15 K"},
        )  # fmt: skip
    api.add_measurement(
        database, {"method": "computed", "compound": "'=1+1", "dg": "90 kJ/mol", "dg_t": "300 K"}
    )
    out = tmp_path / "all.sdf"
    result = api.export_measurements(database, str(out))
    assert (result["format"], result["measurements"]) == ("sdf", 6)
    # RDKit's own SD reader sees every structure and its data items
    read = list(Chem.SDMolSupplier(str(out), sanitize=False))
    assert len(read) == 6
    assert [m.GetProp("compound") for m in read] == [f"C-{i}" for i in range(5)] + ["''=1+1"]
    assert read[5].GetNumAtoms() == 0
    for mol, smiles in zip(read, SMILES, strict=False):
        assert Chem.MolToInchiKey(Chem.MolFromSmiles(Chem.MolToSmiles(mol))) == _key(smiles)
    # importing the file into the same registry changes nothing; into a new one, all come back
    again = api.import_table(database, str(out))
    assert (again["added"], again["updated"], again["unchanged"]) == (0, 0, 6)
    fresh_path = tmp_path / "fresh.sqlite"
    api.init_registry(str(fresh_path))
    fresh = api.open_registry(str(fresh_path))
    try:
        api.import_table(fresh, str(out))
        before = {r["compound"]: r["dg_kj_mol"] for r in api.list_measurements(database)}
        after = {r["compound"]: r["dg_kj_mol"] for r in api.list_measurements(fresh)}
        assert after == before
        assert "'=1+1" in after  # what the user typed, apostrophe and all
        pt = api.find(fresh, smarts="[NH3]->[Pt]").rows
        assert [r["compound"] for r in pt] == ["C-3"]
    finally:
        fresh.close()


def test_export_sdf_from_the_cli(cli, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    assert cli("add", "--method", "computed", "--smiles", "CCO", "--dg", "70 kJ/mol").exit_code == 0
    out = tmp_path / "x.data"
    result = cli("export", "-o", str(out), "--format", "sdf")
    assert result.exit_code == 0, result.stderr
    assert "(sdf)" in result.stdout
    assert out.read_text(encoding="utf-8").count("$$$$") == 1


_ITEM_TEXT = (
    st.text(alphabet=st.characters(blacklist_categories=("Cs", "Cc", "Zl", "Zp")), max_size=40)
    .map(str.strip)
    .filter(lambda t: t and t != "$$$$" and not t.startswith(">"))
)


@settings(max_examples=60, deadline=None)
@given(values=st.lists(_ITEM_TEXT, min_size=1, max_size=4))
def test_data_items_round_trip(tmp_path_factory, values: list[str]) -> None:  # type: ignore[no-untyped-def]
    path = tmp_path_factory.mktemp("sd") / "x.sdf"
    columns = ["smiles"] + [f"item {i}" for i in range(len(values))]
    row = {f"item {i}": v for i, v in enumerate(values)}
    write_sd(path, [("CCO", "t")], [row], columns)
    rows, _ = read_sd(path, path.read_text(encoding="utf-8"))
    header, cells = rows[0], rows[1]
    assert dict(zip(header, cells, strict=True)) == {
        "smiles": "CCO", "name": "t", **row
    }  # fmt: skip


def test_a_structure_with_dative_bonds_is_drawn() -> None:
    from registry.record.chem import read_structure
    from registry.reports.drawing import structure_svg

    stored = read_structure(
        api.smiles_from_molfile(Chem.MolToMolBlock(Chem.MolFromSmiles(SMILES[3])))
    )
    svg = structure_svg({"structure_ok": stored.ok, "mol_binary": stored.mol_binary})
    assert svg is not None and svg.startswith("<svg")
    import re

    # RDKit marks each drawn bond with a class bond-N: all four bonds, the dative ones too
    assert set(re.findall(r"bond-(\d+)", svg)) == {"0", "1", "2", "3"}


def test_one_quantity_in_different_units_across_records(database: Database, tmp_path: Path) -> None:
    """Records gathered from two sources: ΔG‡ in kcal/mol in one, kJ/mol in the other."""
    block = Chem.MolToMolBlock(Chem.MolFromSmiles("CC(=O)N(C)C"))
    other = Chem.MolToMolBlock(Chem.MolFromSmiles("CC(=S)N(C)C"))
    path = tmp_path / "mixed.sdf"
    path.write_text(
        _sd_record(block, {"compound": "A", "method": "computed", "ΔG‡ (kcal/mol)": "18.0"})
        + _sd_record(other, {"compound": "B", "method": "computed", "ΔG‡ (kJ/mol)": "75.0"}),
        encoding="utf-8",
    )
    api.import_table(database, str(path))
    got = {r["compound"]: r["dg_kj_mol"] for r in api.list_measurements(database)}
    assert got == pytest.approx({"A": 18.0 * 4.184, "B": 75.0})  # thermochemical calorie
    # both units in one record: nothing is guessed, the second column stays an extra attribute
    path.write_text(
        _sd_record(
            Chem.MolToMolBlock(Chem.MolFromSmiles("CC(=O)N(CC)CC")),
            {"compound": "C", "method": "computed", "ΔG‡ (kcal/mol)": "18", "ΔG‡ (kJ/mol)": "80"},
        ),
        encoding="utf-8",
    )
    api.import_table(database, str(path))
    c = next(r for r in api.list_measurements(database) if r["compound"] == "C")
    assert c["dg_kj_mol"] == pytest.approx(18 * 4.184)


def test_the_title_line_is_the_name_unless_it_is_only_the_label(
    database: Database, tmp_path: Path
) -> None:
    def titled(smiles: str, title: str) -> str:
        block = Chem.MolToMolBlock(Chem.MolFromSmiles(smiles))
        return title + block[block.index("\n") :]

    path = tmp_path / "titles.sdf"
    path.write_text(
        _sd_record(titled("CC(=O)N(C)C", "N,N-dimethylacetamide"), {"compound": "AM-1",
                   "method": "computed"})
        + _sd_record(titled("CC(=S)N(C)C", "AM-2"), {"compound": "AM-2", "method": "computed"}),
        encoding="utf-8",
    )  # fmt: skip
    api.import_table(database, str(path))
    names = {r["compound"]: r["compound_name"] for r in api.list_measurements(database)}
    assert names == {"AM-1": "N,N-dimethylacetamide", "AM-2": None}
