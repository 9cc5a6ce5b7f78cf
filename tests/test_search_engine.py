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

from registry import api
from registry.errors import UsageError
from registry.search import (
    brute_force,
    build_query,
    cachefile,
    find,
    get_motif,
    make_filters,
    matching,
    motif_matches,
    similarity,
)
from registry.search import index as index_module
from registry.search.motifs import BUILTIN
from registry.search.result import SORT_KEYS

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
    database.close()


@pytest.fixture
def medium(tmp_path: Path, tmp_path_factory: pytest.TempPathFactory):  # type: ignore[no-untyped-def]
    database = api.open_registry(str(_registry(tmp_path, tmp_path_factory, "medium")))
    yield database
    database.close()


@pytest.fixture
def big(tmp_path: Path, tmp_path_factory: pytest.TempPathFactory):  # type: ignore[no-untyped-def]
    database = api.open_registry(str(_registry(tmp_path, tmp_path_factory, "big")))
    yield database
    database.close()


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
    monkeypatch.setattr(matching, "_SMALL", 0)  # force the SubstructLibrary branch
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
    monkeypatch.setattr(matching, "_SMALL", small_limit)
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
    with pytest.raises(UsageError, match="sort 'size': choose one of id, barrier"):
        find(small, query=query, sort="size")
    assert "barrier" in SORT_KEYS


def test_retracted_measurements_are_left_out_unless_asked(small) -> None:  # type: ignore[no-untyped-def]
    query = build_query(motif=get_motif("thioamide"))
    before = find(small, query=query)
    target = before.rows[0]["id"]
    small.write(
        lambda conn: conn.execute(
            "UPDATE measurement SET status = 'retracted' WHERE id = :i", {"i": target}
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
    assert cachefile.path_for(small, similarity.SUFFIX).exists()


def test_tanimoto_on_packed_words() -> None:
    a = np.array([[0b1011], [0]], dtype=np.uint64)  # word-major: 2 words × 1 molecule
    q = np.array([0b0011, 0], dtype=np.uint64)
    # |a∧q| = 2, |a∨q| = 3 (Jaccard 1901 / Tanimoto index)
    assert similarity.tanimoto(a, q)[0] == pytest.approx(2 / 3)


def test_motif_matches_groups_compounds_by_motif(small) -> None:  # type: ignore[no-untyped-def]
    groups = motif_matches(small, ["amide", "urea"])
    for name in ("amide", "urea"):
        assert groups[name] == brute_force(small, build_query(motif=get_motif(name)))


# ---------------------------------------------------------------- the cache file


def _load(database):  # type: ignore[no-untyped-def]
    with database.read() as conn:
        return index_module.load_index(database, conn)


def test_index_is_cached_and_reused_by_a_new_process(small, monkeypatch) -> None:  # type: ignore[no-untyped-def]
    first = _load(small)
    path = cachefile.path_for(small, index_module.SUFFIX)
    assert path.exists() and path.name.endswith(".sqlite.fpindex")
    cachefile.forget()  # as in a new process

    def no_build(_conn):  # type: ignore[no-untyped-def]
        raise AssertionError("index rebuilt although nothing changed")

    monkeypatch.setattr(index_module, "build_index", no_build)
    again = _load(small)
    assert np.array_equal(again.ids, first.ids)
    assert again._keep is not None  # mapped from the file


def test_index_extends_with_new_compounds_and_finds_them(small, monkeypatch) -> None:  # type: ignore[no-untyped-def]
    from registry.record.entry import EntryInput

    query = build_query(motif=get_motif("sulfonamide"))
    before = find(small, query=query)
    n = len(_load(small))
    api.add_measurement(
        small,
        EntryInput(method="lineshape", smiles="CN(C)S(=O)(=O)c1ccccc1", compound="NEW-1",
                   dg="15 kcal/mol"),
    )  # fmt: skip
    cachefile.forget()  # a new process: the file must be extended, not rebuilt
    monkeypatch.setattr(index_module, "build_index", lambda _c: pytest.fail("full rebuild"))
    after = find(small, query=query)
    assert len(_load(small)) == n + 1
    assert "NEW-1" in [r["compound"] for r in after.rows]
    assert after.stats.matched == before.stats.matched + 1


def _replace_structure(database, old: str, new: str) -> None:  # type: ignore[no-untyped-def]
    """Change a structure in place with plain SQL (no history, as a script behind our back)."""
    import sqlite3

    from registry.record.chem import read_structure

    s = read_structure(new)
    with sqlite3.connect(database.path) as conn:
        conn.execute(
            "UPDATE compound SET smiles_canonical = ?, mol_binary = ?, pattern_fp = ? "
            "WHERE smiles_canonical = ?",
            (s.smiles_canonical, s.mol_binary, s.pattern_fp, old),
        )


@pytest.mark.parametrize("new_process", [False, True], ids=["same-process", "new-process"])
def test_plain_sql_structure_edits_are_seen(small, new_process) -> None:  # type: ignore[no-untyped-def]
    query = build_query(motif=get_motif("thioamide"))
    find(small, query=query)
    # DMA becomes its thio analogue in place: O → S keeps every stored length the same, and no
    # revision is written; the trigger-kept change counter is what tells the index
    _replace_structure(small, "CC(=O)N(C)C", "CC(=S)N(C)C")
    if new_process:
        cachefile.forget()
    result = find(small, query=query)
    assert _compound_ids(result) == brute_force(small, query)
    assert "N,N-dimethylacetamide" in [r["compound_name"] for r in result.rows]


def test_a_deleted_compound_leaves_the_index(small) -> None:  # type: ignore[no-untyped-def]
    query = build_query(motif=get_motif("urea"))
    hits = _compound_ids(find(small, query=query))
    victim = hits[-1]

    def delete(conn) -> None:  # type: ignore[no-untyped-def]
        of = {"c": victim}
        measured = "SELECT id FROM measurement WHERE compound_id = :c"
        for table in ("validation_finding", "coalescence", "rate_point"):
            conn.execute(f"DELETE FROM {table} WHERE measurement_id IN ({measured})", of)
        conn.execute("DELETE FROM measurement WHERE compound_id = :c", of)
        conn.execute("DELETE FROM process WHERE compound_id = :c", of)
        conn.execute("DELETE FROM compound WHERE id = :c", of)

    small.write(delete)
    assert victim not in _load(small).ids.tolist()
    assert _compound_ids(find(small, query=query)) == hits[:-1] == brute_force(small, query)


def test_stale_stored_fingerprints_are_detected_and_recomputed(small) -> None:  # type: ignore[no-untyped-def]
    # fingerprints from "another RDKit": all bits cleared, so the screen would drop every hit
    small.write(lambda conn: conn.execute("UPDATE compound SET pattern_fp = zeroblob(256)"))
    query = build_query(motif=get_motif("urea"))
    result = find(small, query=query)
    assert _compound_ids(result) == brute_force(small, query)
    assert result.stats.matched > 0
    assert any("recomputed" in w for w in result.warnings)


def test_damaged_cache_file_is_rebuilt(small) -> None:  # type: ignore[no-untyped-def]
    query = build_query(motif=get_motif("urea"))
    expected = _compound_ids(find(small, query=query))
    path = cachefile.path_for(small, index_module.SUFFIX)
    path.write_bytes(b"not an index")
    cachefile.forget()
    assert _compound_ids(find(small, query=query)) == expected
    assert path.read_bytes().startswith(index_module.MAGIC)


def test_unwritable_cache_still_answers(small, monkeypatch) -> None:  # type: ignore[no-untyped-def]
    def refuse(_index, _path, _state):  # type: ignore[no-untyped-def]
        raise PermissionError(13, "Permission denied")

    monkeypatch.setattr(index_module, "save_index", refuse)
    query = build_query(motif=get_motif("urea"))
    result = find(small, query=query, rebuild_index=True)
    assert _compound_ids(result) == brute_force(small, query)
    assert any("could not write the screening cache" in w for w in result.warnings)


def test_server_databases_cache_in_the_user_cache_dir(monkeypatch, tmp_path: Path) -> None:
    from registry.storage.database import Database

    monkeypatch.setenv("FLUXLEDGER_CACHE_DIR", str(tmp_path))
    fake = Database(url="postgresql+psycopg://ann@db.example/registry", backend="postgresql")
    path = cachefile.path_for(fake, index_module.SUFFIX)
    assert path is not None and path.parent == tmp_path and path.suffix == ".fpindex"
    other = Database(url="postgresql+psycopg://ann@db.example/other", backend="postgresql")
    assert cachefile.path_for(other, index_module.SUFFIX) != path


# ---------------------------------------------------------------- the library surface


def test_api_find_takes_texts_and_speaks_of_fields(small) -> None:  # type: ignore[no-untyped-def]
    from registry.errors import UnitError

    result = api.find(small, motif="amide", barrier=">= 20 kcal/mol", sort="-barrier")
    # 20 kcal/mol = 83.68 kJ/mol (thermochemical calorie, NIST SP 811 (2008) B.8)
    assert result.rows and all(r["dg_kj_mol"] >= 83.68 - 1e-9 for r in result.rows)
    assert _compound_ids(result) == sorted(
        {r["compound_id"] for r in find(small, query=build_query(motif=get_motif("amide")),
                                        filters=make_filters(barrier=">= 20 kcal/mol")).rows}
    )  # fmt: skip
    with pytest.raises(UsageError) as err:
        api.find(small, smarts="C", sort="size")
    assert str(err.value).startswith("sort 'size': choose one of id, barrier, -barrier")
    with pytest.raises(UnitError) as bad:
        api.find(small, smarts="C", barrier="90 kJ/mol")
    assert str(bad.value).startswith("barrier: cannot read '90 kJ/mol'")
    with pytest.raises(UsageError, match="give exactly one of smarts, smiles, motif, similar"):
        api.find(small, smarts="C", motif="amide")
    with pytest.raises(UsageError, match=r"^stereo applies to substructure searches"):
        api.find(small, similar="CC", stereo=True)
    assert "--" not in str(err.value) + str(bad.value)


def test_results_convert_to_a_data_frame(small) -> None:  # type: ignore[no-untyped-def]
    result = api.find(small, motif="urea", sort="-barrier")
    frame = result.to_frame()
    assert list(frame.columns) == list(result.columns)
    assert frame["id"].tolist() == [r["id"] for r in result.rows]
    assert frame["dg_kj_mol"].tolist() == pytest.approx([r["dg_kj_mol"] for r in result.rows])
    lines = api.find(small, motif="urea", sort="-barrier", output="csv")
    assert lines.csv_body is not None and lines.table == []
    from_lines = lines.to_frame()  # from the ready CSV lines: the CSV columns
    assert from_lines["id"].tolist() == frame["id"].tolist()
    assert list(from_lines.columns) == list(lines.csv_columns())


def test_motif_library_through_the_api(small) -> None:  # type: ignore[no-untyped-def]
    added = api.add_motif(small, "dimethylamide", "CC(=O)N(C)C", description="DMA unit")
    assert added.source == "registry"
    assert api.get_motif("dimethylamide", small).smarts == ("CC(=O)N(C)C",)
    groups = api.motif_matches(small, ["dimethylamide", "urea"])
    assert groups["dimethylamide"] == brute_force(small, build_query(smarts="CC(=O)N(C)C"))
    assert api.remove_motif(small, "dimethylamide", reason="demo").name == "dimethylamide"
    assert "dimethylamide" not in [m.name for m in api.list_motifs(small)]
