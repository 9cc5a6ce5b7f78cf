"""``fluxledger find`` and ``fluxledger motifs``: exit codes, exact messages, JSON/CSV, no cap."""

from __future__ import annotations

import csv
import io
import json
import subprocess
import sys
from pathlib import Path

import pytest

ADD = [
    # (SMILES, label, process, ΔG‡ text, solvent, method) — sizes as reported in textbooks; from memory
    ("CC(=O)N(C)C", "DMA", "bond-rotation", "18.1 kcal/mol", "CDCl3", "coalescence"),
    ("O=CN(C)C", "DMF", "bond-rotation", "21.0 kcal/mol", "toluene-d8", "lineshape"),
    ("CC(O)=NC", "NMA-iminol", "bond-rotation", "88 kJ/mol", "C6D6", "2d-exchange"),
    ("C1CCCCC1", "CHX", "ring-inversion", "10.3 kcal/mol", "CS2", "lineshape"),
    ("Cc1ccccc1-c1ccccc1C", "DMBP", "bond-rotation", "74 kJ/mol", "toluene-d8", "lineshape"),
]


@pytest.fixture
def filled(cli):  # type: ignore[no-untyped-def]
    for smiles, label, process, dg, solvent, method in ADD:
        result = cli(
            "add", "--method", method, "--smiles", smiles, "--compound", label,
            "--process", process, "--nucleus", "1H", "--solvent", solvent, "--dg", dg,
            "--dg-t", "298 K", "--reference", "textbook",
        )  # fmt: skip
        assert result.exit_code == 0, result.stderr
    return cli


def test_find_motif_with_barrier_in_kcal(filled) -> None:  # type: ignore[no-untyped-def]
    result = filled("find", "--motif", "amide", "--barrier", ">= 20 kcal/mol")
    assert result.exit_code == 0, result.stderr
    lines = result.stdout.splitlines()
    assert lines[0].split() == [
        "id", "compound", "process", "nucleus", "method", "solvent", "dg_kj_mol", "dg_t_k",
        "status", "flagged", "reference",
    ]  # fmt: skip
    labels = [line.split()[1] for line in lines[2:]]
    # 20 kcal/mol = 83.68 kJ/mol (NIST SP 811 B.8): DMF (87.9) and the iminol NMA (88) stay
    assert labels == ["DMF", "NMA-iminol"]
    assert result.stderr.startswith(
        "2 measurement(s) on 2 compound(s); 2 of 2 compound(s) searched match"
    )


def test_find_json_has_counts_filters_and_match_atoms(filled) -> None:  # type: ignore[no-untyped-def]
    result = filled("find", "--smarts", "[CX3](=O)[NX3]", "--solvent", "chloroform", "--json")
    assert result.exit_code == 0, result.stderr
    data = json.loads(result.stdout)
    assert data["query"]["kind"] == "smarts"
    assert data["query"]["filters"] == {"solvent": ["chloroform"]}
    assert data["counts"]["measurements"] == 1
    row = data["measurements"][0]
    assert row["compound"] == "DMA" and row["smiles"] == "CC(=O)N(C)C"
    assert row["match_atoms"] == [[1, 2, 3]]  # C, O, N of the canonical SMILES
    assert data["compounds"] == [{"compound_id": row["compound_id"], "measurements": 1,
                                  "atoms": [[1, 2, 3]]}]  # fmt: skip


def test_no_atoms_leaves_them_out(filled) -> None:  # type: ignore[no-untyped-def]
    data = json.loads(filled("find", "--motif", "amide", "--json", "--no-atoms").stdout)
    assert data["counts"]["measurements"] == 3
    assert all("match_atoms" not in r for r in data["measurements"])


def test_find_csv_and_sorting(filled) -> None:  # type: ignore[no-untyped-def]
    result = filled("find", "--smarts", "[#6]", "--csv", "--sort", "-barrier")
    assert result.exit_code == 0, result.stderr
    rows = list(csv.DictReader(io.StringIO(result.stdout)))
    # 88 kJ/mol, 21.0 kcal/mol = 87.86, 18.1 kcal/mol = 75.73, 74 kJ/mol, 10.3 kcal/mol = 43.10
    assert [r["compound"] for r in rows] == ["NMA-iminol", "DMF", "DMA", "DMBP", "CHX"]
    assert "smiles" in rows[0] and "compound_id" in rows[0]


def test_nonpolar_solvents_and_process_filter(filled) -> None:  # type: ignore[no-untyped-def]
    result = filled(
        "find", "--motif", "biaryl-ortho", "--solvent", "nonpolar", "--process", "rotation",
        "--barrier", "60-80 kJ/mol", "--csv",
    )  # fmt: skip
    assert result.exit_code == 0, result.stderr
    assert [r["compound"] for r in csv.DictReader(io.StringIO(result.stdout))] == ["DMBP"]


def test_limit_says_how_many_there_were(filled) -> None:  # type: ignore[no-untyped-def]
    result = filled("find", "--smarts", "[#6]", "--limit", "2")
    assert result.exit_code == 0
    assert len(result.stdout.splitlines()) == 4
    assert "showing 2 of 5 measurements (drop --limit to see all)" in result.stderr


def test_compounds_view(filled) -> None:  # type: ignore[no-untyped-def]
    result = filled("find", "--motif", "amide", "--compounds", "--json")
    data = json.loads(result.stdout)
    assert data["compounds_matched"] == 3
    assert {c["compound"] for c in data["compounds"]} == {"DMA", "DMF", "NMA-iminol"}
    assert all("match_atoms" in c for c in data["compounds"])


def test_similar_search(filled) -> None:  # type: ignore[no-untyped-def]
    result = filled("find", "--similar", "CC(=O)N(C)C", "--min-similarity", "0.99", "--csv")
    rows = list(csv.DictReader(io.StringIO(result.stdout)))
    assert [(r["compound"], r["similarity"]) for r in rows] == [("DMA", "1.0")]


def test_invalid_smarts_shows_position_and_exits_2(filled) -> None:  # type: ignore[no-untyped-def]
    result = filled("find", "--smarts", "C(=O")
    assert result.exit_code == 2
    assert result.stderr == (
        "error: smarts: 'C(=O' is not a valid SMARTS at position 2: extra open parentheses\n"
        "  C(=O\n"
        "   ^\n"
    )
    assert result.stdout == ""


def test_invalid_smiles_query(filled) -> None:  # type: ignore[no-untyped-def]
    result = filled("find", "--smiles", "C1CC")
    assert result.exit_code == 2
    assert result.stderr == "error: smiles: 'C1CC' is not a valid SMILES: unclosed ring\n"


def test_broad_pattern_warns_on_stderr(cli, db_path: Path) -> None:  # type: ignore[no-untyped-def]
    from search_data import entries_for

    from registry import api
    from registry.storage.writer import write_entries

    database = api.open_registry(str(db_path))

    def work(conn):  # type: ignore[no-untyped-def]
        entries, structures = entries_for(["C" * (i + 1) for i in range(60)], conn)
        write_entries(conn, entries, structures, actor="tester")

    database.write(work)
    database.dispose()
    result = cli("find", "--smarts", "C", "--csv")
    assert result.exit_code == 0
    assert "warning: the pattern matches 60 of 60 compounds searched (100%)" in result.stderr
    assert len(list(csv.DictReader(io.StringIO(result.stdout)))) == 60


@pytest.mark.parametrize(
    ("args", "message"),
    [
        ((), "give exactly one of --smarts, --smiles, --motif, --similar"),
        (("--smarts", "C", "--motif", "amide"), "give exactly one of"),
        (("--smarts", "C", "--json", "--csv"), "choose one of --json and --csv"),
        (("--smarts", "C", "--sort", "size"), "error: sort 'size': choose one of"),
        (("--similar", "CC", "--stereo"), "--stereo applies to substructure searches"),
    ],
)
def test_usage_errors(filled, args, message) -> None:  # type: ignore[no-untyped-def]
    result = filled("find", *args)
    assert result.exit_code == 2
    assert result.stderr.startswith("error: ")
    assert message in result.stderr


def test_bad_barrier_and_unknown_motif_are_data_errors(filled) -> None:  # type: ignore[no-untyped-def]
    result = filled("find", "--motif", "amide", "--barrier", "90 kJ/mol")
    assert result.exit_code == 1
    assert result.stderr.startswith("error: barrier: cannot read '90 kJ/mol': write a comparison")
    result = filled("find", "--motif", "amid")
    assert result.exit_code == 1
    assert result.stderr.startswith("error: no motif named 'amid'; known motifs: biaryl-ortho, ")


def test_motifs_list_show_add_remove(filled) -> None:  # type: ignore[no-untyped-def]
    listed = json.loads(filled("motifs", "list", "--json").stdout)
    assert listed[0]["name"] == "biaryl-ortho" and listed[0]["source"] == "built-in"
    shown = filled("motifs", "show", "amide")
    assert shown.exit_code == 0 and "CC(O)=NC" in shown.stdout
    added = filled("motifs", "add", "dimethylamino", "[CH3]N[CH3]", "--description", "NMe2")
    assert added.exit_code == 0, added.stderr
    assert added.stdout == "added motif dimethylamino: [CH3]N[CH3]\n"
    found = filled("find", "--motif", "dimethylamino", "--csv")
    assert [r["compound"] for r in csv.DictReader(io.StringIO(found.stdout))] == ["DMA", "DMF"]
    again = filled("motifs", "add", "dimethylamino", "C")
    assert again.exit_code == 2 and "exists already" in again.stderr
    assert filled("motifs", "remove", "dimethylamino").stdout == "removed motif dimethylamino\n"
    assert filled("motifs", "remove", "amide").exit_code == 2


def test_motif_file_for_find_and_for_adding(filled, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    path = tmp_path / "mine.toml"
    path.write_text('[[motif]]\nname = "formyl-n"\nsmarts = "[CH1](=O)N"\n', encoding="utf-8")
    found = filled("find", "--motif", "formyl-n", "--motif-file", str(path), "--csv")
    assert found.exit_code == 0, found.stderr
    assert [r["compound"] for r in csv.DictReader(io.StringIO(found.stdout))] == ["DMF"]
    added = filled("motifs", "add", "--file", str(path), "--json")
    assert json.loads(added.stdout)[0]["name"] == "formyl-n"
    assert filled("motifs", "add", "x", "C", "--file", str(path)).exit_code == 2


def test_stereo_option(cli) -> None:  # type: ignore[no-untyped-def]
    for label, smiles in (("CIS", "C=C[C@H]1C[C@H]1C=C"), ("TRANS", "C=C[C@H]1C[C@@H]1C=C")):
        assert cli("add", "--method", "lineshape", "--smiles", smiles, "--compound", label,
                   "--dg", "20 kcal/mol").exit_code == 0  # fmt: skip
    loose = cli("find", "--motif", "divinylcyclopropane", "--csv")
    strict = cli("find", "--motif", "divinylcyclopropane", "--stereo", "--csv")
    assert [r["compound"] for r in csv.DictReader(io.StringIO(loose.stdout))] == ["CIS", "TRANS"]
    assert [r["compound"] for r in csv.DictReader(io.StringIO(strict.stdout))] == ["CIS"]


def test_help_does_not_import_rdkit() -> None:
    code = (
        "import sys; from registry.cli.main import app; "
        "print('rdkit' in sys.modules, 'registry.search' in sys.modules)"
    )
    out = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, check=True, timeout=120
    )
    assert out.stdout.split() == ["False", "False"]


def test_real_process_uses_the_cache_file(filled, db_path: Path) -> None:  # type: ignore[no-untyped-def]
    exe = Path(sys.executable).with_name("fluxledger")
    run = [str(exe), "--db", str(db_path), "find", "--motif", "amide", "--csv"]
    first = subprocess.run(run, capture_output=True, text=True, check=True, timeout=120)
    cache = Path(f"{db_path}.fpindex")
    assert cache.exists()
    stamp = cache.stat().st_mtime_ns
    second = subprocess.run(run, capture_output=True, text=True, check=True, timeout=120)
    assert second.stdout == first.stdout
    assert cache.stat().st_mtime_ns == stamp  # reused, not rewritten


def test_cli_find_on_sqlite_does_not_load_sqlalchemy(filled, db_path: Path) -> None:  # type: ignore[no-untyped-def]
    """A SQLite file is searched through Python's sqlite3 alone (SQLAlchemy costs ~0.4 s)."""
    code = (
        "import sys\n"
        "from registry.cli.main import run\n"
        f"sys.argv = ['fluxledger', '--db', {str(db_path)!r}, 'find', '--motif', 'amide',"
        " '--csv', '--barrier', '>= 60 kJ/mol', '--solvent', 'nonpolar']\n"
        "try:\n    run()\nexcept SystemExit as exc:\n    assert not exc.code, exc.code\n"
        "loaded = sorted(m for m in ('sqlalchemy', 'registry.storage.models', 'pandas')"
        " if m in sys.modules)\n"
        "print('LOADED', loaded, file=sys.stderr)\n"
    )
    out = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, check=True, timeout=120
    )
    assert "LOADED []" in out.stderr
    assert out.stdout.splitlines()[1:] and out.stdout.startswith("id,compound_id,compound,")


def test_csv_writes_non_finite_numbers_empty() -> None:
    from registry.search.result import csv_lines

    lines = csv_lines([(1, "a", 2.5, None), (2, "b", float("inf"), 3), (3, "c", float("nan"), 4)])
    assert "".join(lines) == "1,a,2.5,\n2,b,,3\n3,c,,4\n"
    assert csv_lines([(1, "a, b", 2.5)]) == ['1,"a, b",2.5\n']  # one line per row, quoted
