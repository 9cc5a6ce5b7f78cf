"""find(): screened results equal a brute-force match, filters, no cap, the cached index.

The reference is :func:`registry.search.brute_force`, which parses every stored SMILES afresh
and runs RDKit's ``HasSubstructMatch`` on each compound with no screen at all.
"""

from __future__ import annotations

import sqlite3
from pathlib import Path

import numpy as np
import pytest
from search_data import KNOWN, generated_smiles, write_registry
from sqlalchemy import text

from registry import api
from registry.errors import UsageError
from registry.search import brute_force, build_query, find, get_motif, make_filters, motif_matches
from registry.search import engine as engine_module
from registry.search import index as index_module
from registry.search.motifs import BUILTIN

_BUILT: dict[str, Path] = {}


def _registry(tmp_path: Path, tmp_path_factory: pytest.TempPathFactory, kind: str) -> Path:
    """A copy (per test) of a registry built once per session."""
    if kind not in _BUILT:
        base = tmp_path_factory.mktemp(f"search-{kind}") / "registry.sqlite"
        smiles = generated_smiles() if kind == "big" else generated_smiles()[::15]
        write_registry(base, smiles)
        _BUILT[kind] = base
    target = tmp_path / "registry.sqlite"
    with sqlite3.connect(_BUILT[kind]) as source, sqlite3.connect(target) as copy:
        source.backup(copy)  # a consistent copy whatever the WAL holds
    return target


@pytest.fixture
def small(tmp_path: Path, tmp_path_factory: pytest.TempPathFactory):  # type: ignore[no-untyped-def]
    database = api.open_registry(str(_registry(tmp_path, tmp_path_factory, "small")))
    yield database
    database.dispose()


@pytest.fixture
def medium(tmp_path: Path, tmp_path_factory: pytest.TempPathFactory):  # type: ignore[no-untyped-def]
    database = api.open_registry(str(_registry(tmp_path, tmp_path_factory, "medium")))
    yield database
    database.dispose()


@pytest.fixture
def big(tmp_path: Path, tmp_path_factory: pytest.TempPathFactory):  # type: ignore[no-untyped-def]
    database = api.open_registry(str(_registry(tmp_path, tmp_path_factory, "big")))
    yield database
    database.dispose()


def _compound_ids(result) -> list[int]:  # type: ignore[no-untyped-def]
    return sorted({r["compound_id"] for r in result.rows})


QUERIES = [
    *({"motif": m.name} for m in BUILTIN),
    {"smarts": "c1ccccc1"},
    {"smarts": "[#7]"},
    {"smarts": "[CX4][CX4]"},
    {"smiles": "CC(=O)N"},
    {"smiles": "c1ccncc1"},
]


@pytest.mark.parametrize("spec", QUERIES, ids=[next(iter(q.values())) for q in QUERIES])
def test_screened_search_equals_brute_force(medium, spec) -> None:  # type: ignore[no-untyped-def]
    motif = get_motif(spec["motif"]) if "motif" in spec else None
    query = build_query(smarts=spec.get("smarts"), smiles=spec.get("smiles"), motif=motif)
    result = find(medium, query=query)
    expected = brute_force(medium, query)
    assert _compound_ids(result) == expected
    assert result.stats.matched == len(expected)


def test_threaded_library_path_equals_plain_loop(small, monkeypatch) -> None:  # type: ignore[no-untyped-def]
    query = build_query(motif=get_motif("amide"))
    plain = _compound_ids(find(small, query=query, threads=1))
    monkeypatch.setattr(engine_module, "_SMALL", 0)  # force the SubstructLibrary branch
    threaded = _compound_ids(find(small, query=query, threads=2))
    assert plain == threaded == brute_force(small, query)
    assert len(plain) > 10


def test_a_common_motif_returns_more_than_a_thousand_hits(big) -> None:  # type: ignore[no-untyped-def]
    # RDKit's SubstructLibrary stops at 1000 hits unless told otherwise; we must not
    query = build_query(motif=get_motif("amide"))
    result = find(big, query=query, threads=2)
    assert result.stats.matched > 1000
    assert result.total_rows == len(result.rows) > 1000
    assert _compound_ids(result) == brute_force(big, query)


def test_limit_shortens_rows_but_reports_the_total(small) -> None:  # type: ignore[no-untyped-def]
    result = find(small, query=build_query(smarts="C(=O)N"), limit=3)
    assert len(result.rows) == 3
    assert result.total_rows > 3


@pytest.mark.parametrize("small_limit", [64, 0], ids=["loop", "library"])
def test_stereo_search_needs_matching_chirality(database, monkeypatch, small_limit) -> None:  # type: ignore[no-untyped-def]
    monkeypatch.setattr(engine_module, "_SMALL", small_limit)
    from registry.record.entry import EntryInput

    for i, smi in enumerate(["C=C[C@H]1C[C@H]1C=C", "C=C[C@H]1C[C@@H]1C=C", "C=CC1CC1C=C"]):
        api.add_measurement(
            database,
            EntryInput(method="lineshape", smiles=smi, compound=f"DVCP-{i}", dg="20 kcal/mol"),
        )
    motif = get_motif("divinylcyclopropane")
    loose = find(database, query=build_query(motif=motif))
    strict = find(database, query=build_query(motif=motif, stereo=True))
    assert [r["compound"] for r in loose.rows] == ["DVCP-0", "DVCP-1", "DVCP-2"]
    assert [r["compound"] for r in strict.rows] == ["DVCP-0"]


# ---------------------------------------------------------------- filters


def _known_names(result) -> list[str]:  # type: ignore[no-untyped-def]
    known = {name for _, name, *_ in KNOWN}
    return [r["compound_name"] for r in result.rows if r["compound_name"] in known]


def test_barrier_filter_in_other_units(small) -> None:  # type: ignore[no-untyped-def]
    query = build_query(motif=get_motif("amide"))
    # 20 kcal/mol = 83.68 kJ/mol (thermochemical calorie, NIST SP 811 (2008) B.8): DMF (21.0
    # kcal/mol) and the iminol-spelled N-methylacetamide (88 kJ/mol) stay, DMA (18.1) goes
    result = find(small, query=query, filters=make_filters(barrier=">= 20 kcal/mol"))
    names = _known_names(result)
    assert "N,N-dimethylformamide" in names
    assert "N-methylformamide (iminol spelling)" in names
    assert "N,N-dimethylacetamide" not in names
    assert all(r["dg_kj_mol"] >= 83.68 - 1e-9 for r in result.rows)
    ranged = find(small, query=query, filters=make_filters(barrier="70-80 kJ/mol"))
    assert all(70 <= r["dg_kj_mol"] <= 80 for r in ranged.rows)
    assert "N,N-dimethylacetamide" in _known_names(ranged)  # 18.1 kcal/mol = 75.7 kJ/mol


def test_solvent_class_method_process_and_reference_filters(small) -> None:  # type: ignore[no-untyped-def]
    query = build_query(motif=get_motif("amide"))
    nonpolar = find(small, query=query, filters=make_filters(solvent="nonpolar"))
    assert {r["solvent"] for r in nonpolar.rows} <= {"toluene-d8", "C6D6"}
    assert "N,N-dimethylformamide" in _known_names(nonpolar)
    textbook = find(
        small,
        query=query,
        filters=make_filters(reference="textbook", method="2D EXSY", process="amide rotation"),
    )
    assert _known_names(textbook) == ["N-methylformamide (iminol spelling)"]
    several = find(small, query=query, filters=make_filters(solvent=["CDCl3", "dmso"]))
    assert {r["solvent"] for r in several.rows} == {"CDCl3", "DMSO-d6"}


def test_temperature_filter_and_sorting(small) -> None:  # type: ignore[no-untyped-def]
    query = build_query(smarts="[#6]")
    result = find(
        small, query=query, filters=make_filters(temperature="-20 to 0 °C"), sort="-barrier"
    )
    assert result.rows
    assert all(253.15 - 1e-9 <= r["dg_t_k"] <= 273.15 + 1e-9 for r in result.rows)
    barriers = [r["dg_kj_mol"] for r in result.rows]
    assert barriers == sorted(barriers, reverse=True)
    with pytest.raises(UsageError, match="--sort 'size'"):
        find(small, query=query, sort="size")


def test_retracted_measurements_are_left_out_unless_asked(small) -> None:  # type: ignore[no-untyped-def]
    query = build_query(motif=get_motif("thioamide"))
    before = find(small, query=query)
    target = before.rows[0]["id"]
    small.write(
        lambda conn: conn.execute(
            text("UPDATE measurement SET status = 'retracted' WHERE id = :i"), {"i": target}
        )
    )
    assert target not in [r["id"] for r in find(small, query=query).rows]
    again = find(small, query=query, filters=make_filters(include_retracted=True))
    assert target in [r["id"] for r in again.rows]


def test_broad_pattern_warns_with_the_count(small) -> None:  # type: ignore[no-untyped-def]
    result = find(small, query=build_query(smarts="[#6]"))
    assert len(result.warnings) == 1
    searched = result.stats.searched
    assert f"matches {searched:,} of {searched:,} compounds" in result.warnings[0]
    assert not find(small, query=build_query(motif=get_motif("urea"))).warnings


def test_match_atoms_for_highlighting(small) -> None:  # type: ignore[no-untyped-def]
    query = build_query(smarts="[CX3](=O)[NX3]")
    result = find(small, query=query, atoms=True, filters=make_filters(reference="textbook"))
    dma = next(r for r in result.rows if r["compound_name"] == "N,N-dimethylacetamide")
    # canonical SMILES CC(=O)N(C)C: atoms 1 (C), 2 (O), 3 (N)
    assert dma["smiles"] == "CC(=O)N(C)C"
    assert dma["match_atoms"] == [[1, 2, 3]]


def test_similarity_search_ranks_and_thresholds(small) -> None:  # type: ignore[no-untyped-def]
    result = find(small, similar="CC(=O)N(C)C", min_similarity=0.3)
    assert result.rows[0]["compound_name"] == "N,N-dimethylacetamide"
    assert result.rows[0]["similarity"] == pytest.approx(1.0)
    scores = [r["similarity"] for r in result.rows]
    assert scores == sorted(scores, reverse=True)
    assert min(scores) >= 0.3
    path = index_module.index_path_for(small, ".simindex")
    assert path.exists()


def test_tanimoto_on_packed_words() -> None:
    a = np.array([[0b1011], [0]], dtype=np.uint64)  # word-major: 2 words × 1 molecule
    q = np.array([0b0011, 0], dtype=np.uint64)
    # |a∧q| = 2, |a∨q| = 3 (Jaccard 1901 / Tanimoto index)
    assert engine_module.tanimoto(a, q)[0] == pytest.approx(2 / 3)


def test_motif_matches_groups_compounds_by_motif(small) -> None:  # type: ignore[no-untyped-def]
    groups = motif_matches(small, ["amide", "urea"])
    for name in ("amide", "urea"):
        assert groups[name] == brute_force(small, build_query(motif=get_motif(name)))


# ---------------------------------------------------------------- the cache file


def test_index_is_cached_and_reused_by_a_new_process(small, monkeypatch) -> None:  # type: ignore[no-untyped-def]
    first = index_module.load_index(small)
    path = index_module.index_path_for(small)
    assert path.exists() and path.name.endswith(".sqlite.fpindex")

    def no_build(_db):  # type: ignore[no-untyped-def]
        raise AssertionError("index rebuilt although nothing changed")

    monkeypatch.setattr(index_module, "build_index", no_build)
    again = index_module.load_index(small)
    assert np.array_equal(again.ids, first.ids)
    assert again.path == path


def test_unchanged_registry_file_skips_the_signature_query(small, monkeypatch) -> None:  # type: ignore[no-untyped-def]
    index_module.load_index(small)
    index_module._CHECKED.clear()  # as in a new process

    def no_query(*_args, **_kwargs):  # type: ignore[no-untyped-def]
        raise AssertionError("signature queried although the registry file is unchanged")

    monkeypatch.setattr(index_module, "database_signature", no_query)
    assert len(index_module.load_index(small)) > 0
    monkeypatch.undo()
    # any write changes the file state: the next load checks the signature again
    small.write(lambda conn: conn.execute(text("UPDATE measurement SET label = 'x' WHERE id = 1")))
    index_module._CHECKED.clear()
    calls = []
    real = index_module.database_signature
    monkeypatch.setattr(
        index_module, "database_signature", lambda *a, **k: calls.append(1) or real(*a, **k)
    )
    index_module.load_index(small)
    assert calls


def test_index_extends_with_new_compounds_and_finds_them(small, monkeypatch) -> None:  # type: ignore[no-untyped-def]
    from registry.record.entry import EntryInput

    query = build_query(motif=get_motif("sulfonamide"))
    before = find(small, query=query)
    n = len(index_module.load_index(small))
    api.add_measurement(
        small,
        EntryInput(method="lineshape", smiles="CN(C)S(=O)(=O)c1ccccc1", compound="NEW-1",
                   dg="15 kcal/mol"),
    )  # fmt: skip
    monkeypatch.setattr(index_module, "build_index", lambda _db: pytest.fail("full rebuild"))
    after = find(small, query=query)
    assert len(index_module.load_index(small)) == n + 1
    assert "NEW-1" in [r["compound"] for r in after.rows]
    assert after.stats.matched == before.stats.matched + 1


def _replace_structure(database, old: str, new: str) -> None:  # type: ignore[no-untyped-def]
    from registry.record.chem import read_structure

    s = read_structure(new)
    database.write(
        lambda conn: conn.execute(
            text(
                "UPDATE compound SET smiles_canonical = :smi, mol_binary = :b, pattern_fp = :f "
                "WHERE smiles_canonical = :old"
            ),
            {"smi": s.smiles_canonical, "b": s.mol_binary, "f": s.pattern_fp, "old": old},
        )
    )


def test_index_rebuilds_when_a_structure_changes(small) -> None:  # type: ignore[no-untyped-def]
    query = build_query(motif=get_motif("thioamide"))
    find(small, query=query)
    # DMA becomes N,N-diethylthioacetamide in place: same id, a binary of another length
    _replace_structure(small, "CC(=O)N(C)C", "CCN(CC)C(C)=S")
    result = find(small, query=query)
    assert _compound_ids(result) == brute_force(small, query)
    assert "N,N-dimethylacetamide" in [r["compound_name"] for r in result.rows]


def test_same_size_edit_is_seen_through_the_history(small) -> None:  # type: ignore[no-untyped-def]
    from registry.storage import audit

    query = build_query(motif=get_motif("thioamide"))
    find(small, query=query)
    # O → S keeps every stored length; the audited edit is what tells the index
    _replace_structure(small, "CC(=O)N(C)C", "CC(=S)N(C)C")
    small.write(
        lambda conn: audit.record(
            conn, entity="compound", entity_id=1, action="edit", actor="ann", before={}, after={}
        )
    )
    result = find(small, query=query)
    assert _compound_ids(result) == brute_force(small, query)
    assert "N,N-dimethylacetamide" in [r["compound_name"] for r in result.rows]


def test_stale_stored_fingerprints_are_detected_and_recomputed(small) -> None:  # type: ignore[no-untyped-def]
    # fingerprints from "another RDKit": all bits cleared, so the screen would drop every hit
    small.write(lambda conn: conn.execute(text("UPDATE compound SET pattern_fp = zeroblob(256)")))
    query = build_query(motif=get_motif("urea"))
    result = find(small, query=query, rebuild_index=True)
    assert _compound_ids(result) == brute_force(small, query)
    assert result.stats.matched > 0
    assert any("recomputed" in w for w in result.warnings)


def test_damaged_cache_file_is_rebuilt(small) -> None:  # type: ignore[no-untyped-def]
    query = build_query(motif=get_motif("urea"))
    expected = _compound_ids(find(small, query=query))
    path = index_module.index_path_for(small)
    path.write_bytes(b"not an index")
    assert _compound_ids(find(small, query=query)) == expected
    assert path.read_bytes().startswith(index_module.MAGIC)


def test_unwritable_cache_still_answers(small, monkeypatch) -> None:  # type: ignore[no-untyped-def]
    def refuse(_index, _path):  # type: ignore[no-untyped-def]
        raise PermissionError(13, "Permission denied")

    monkeypatch.setattr(index_module, "save_index", refuse)
    query = build_query(motif=get_motif("urea"))
    result = find(small, query=query, rebuild_index=True)
    assert _compound_ids(result) == brute_force(small, query)
    assert any("could not write the screening cache" in w for w in result.warnings)


def test_server_databases_cache_in_the_user_cache_dir(monkeypatch, tmp_path: Path) -> None:
    from registry.storage.database import Database

    monkeypatch.setenv("FLUXLEDGER_CACHE_DIR", str(tmp_path))
    fake = Database(url="postgresql://ann@db.example/registry", engine=None, is_sqlite=False)  # type: ignore[arg-type]
    path = index_module.index_path_for(fake)
    assert path.parent == tmp_path and path.suffix == ".fpindex"
    other = Database(url="postgresql://ann@db.example/other", engine=None, is_sqlite=False)  # type: ignore[arg-type]
    assert index_module.index_path_for(other) != path
