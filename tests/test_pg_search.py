"""Server-side motif screening with the RDKit cartridge: a superset of the client's answer.

The expected hits are computed here with the client's RDKit on the stored molecules; the server
screen (an older RDKit inside PostgreSQL) must return every one of them, plus the compounds the
server cannot read, and nothing else for these ordinary structures.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from typer.testing import CliRunner

from registry import api
from registry.pg import cartridge
from registry.record.entry import EntryInput
from registry.storage.database import open_database

pytest_plugins = ("conftest_pg",)

# Real, public structures of the kind the registry holds (amides, biaryls, rings, N inversion …);
# the measurements attached to them are invented demo values.
STRUCTURES = {
    "DMF": "CN(C)C=O",
    "DMA": "CN(C)C(C)=O",
    "DMBA": "CN(C)C(=O)c1ccccc1",
    "thio-DMA": "CN(C)C(C)=S",
    "carbamate": "COC(=O)N(C)C",
    "urea": "CN(C)C(=O)N(C)C",
    "NDMA": "CN(C)N=O",
    "dimethylbiphenyl": "Cc1ccccc1-c1ccccc1C",
    "binaphthyl": "c1ccc2c(c1)ccc(c2)-c1ccc2ccccc2c1",
    "biphenyl": "c1ccc(cc1)-c1ccccc1",
    "cyclohexane": "C1CCCCC1",
    "methylcyclohexane": "CC1CCCCC1",
    "cyclooctatetraene": "C1=CC=CC=CC=C1",
    "N-methylpiperidine": "CN1CCCCC1",
    "aziridine": "C1CN1C",
    "pyridine-amide": "CN(C)C(=O)c1ccccn1",
    "indole": "c1ccc2[nH]ccc2c1",
    "thiophene-amide": "CN(C)C(=O)c1cccs1",
    "furfural": "O=Cc1ccco1",
    "acetanilide": "CC(=O)Nc1ccccc1",
    "iminol": "CN=C(O)C",
    "pentavalent": "CC(C)(C)(C)(C)C",  # RDKit parses it only unsanitized
}

MOTIFS = [
    "C(=O)N",
    "[NX3][CX3]=[OX1]",
    "c1ccccc1",
    "c-!@c",
    "[n]",
    "C=S",
    "N=O",
    "[r8]",
    "[CH3]N",
    "[$(C=O)]N",
    "a1aaaa1",
    "[#6]1~[#6]~[#6]~[#6]~[#6]~[#6]1",
    "[Cl]",
]


def _fill(db: str) -> None:
    api.init_registry(db)
    database = api.open_registry(db)
    try:
        for label, smiles in STRUCTURES.items():
            api.add_measurement(
                database,
                EntryInput(
                    method="lineshape", compound=label, smiles=smiles, dg="60 kJ/mol", dg_t="298 K"
                ),
                actor="tester",
            )
    finally:
        database.close()


def _client_hits(db: str, smarts: str) -> list[int]:
    """What the client's RDKit finds in the stored molecules (the answer on SQLite)."""
    from rdkit import Chem

    query = Chem.MolFromSmarts(smarts)
    database = open_database(db)
    try:
        with database.read() as conn:
            rows = conn.rows("SELECT id, mol_binary FROM compound ORDER BY id")
    finally:
        database.close()
    return [cid for cid, blob in rows if blob and Chem.Mol(bytes(blob)).HasSubstructMatch(query)]


def test_no_server_screen_on_sqlite(db_path: Path) -> None:
    database = open_database(str(db_path))
    try:
        with database.read() as conn:
            assert cartridge.server_screen(conn, "C(=O)N") is None
            assert cartridge.status(conn).active is False
            columns = {r[1] for r in conn.rows("PRAGMA table_info(compound)")}
        assert "mol" not in columns  # migration 0002 leaves SQLite alone
    finally:
        database.close()


@pytest.mark.postgres
def test_server_screen_agrees_with_client_rdkit(pg_cartridge: str, tmp_path: Path) -> None:
    sqlite_db = str(tmp_path / "r.sqlite")
    _fill(sqlite_db)
    _fill(pg_cartridge)
    database = open_database(pg_cartridge)
    try:
        with database.read() as conn:
            unreadable = set(conn.column("SELECT id FROM compound WHERE mol IS NULL"))
            screens = {smarts: cartridge.server_screen(conn, smarts) for smarts in MOTIFS}
    finally:
        database.close()
    pentavalent = list(STRUCTURES).index("pentavalent") + 1
    assert unreadable == {pentavalent}
    for smarts, candidates in screens.items():
        assert candidates is not None, smarts
        expected = _client_hits(sqlite_db, smarts)
        assert expected == _client_hits(pg_cartridge, smarts), smarts  # same data both sides
        assert set(expected) <= set(candidates), smarts  # the screen never loses a hit
        assert set(candidates) - unreadable == set(expected) - unreadable, smarts
        assert pentavalent in candidates  # the client must judge what the server cannot read
    assert len(screens["c1ccccc1"]) < len(STRUCTURES)  # a screen, not "everything"


@pytest.mark.postgres
def test_trigger_fills_and_refreshes_the_molecule(pg_cartridge: str) -> None:
    _fill(pg_cartridge)
    database = open_database(pg_cartridge)
    try:
        database.write(
            lambda conn: conn.execute(
                "UPDATE compound SET smiles_canonical = 'ClC1CCCCC1' WHERE label = 'cyclohexane'"
            )
        )
        with database.read() as conn:
            hits = cartridge.server_screen(conn, "[Cl]")
            cid = conn.scalar("SELECT id FROM compound WHERE label = 'cyclohexane'")
            assert cartridge.server_screen(conn, "C(=O") is None  # unreadable SMARTS: fall back
    finally:
        database.close()
    assert hits is not None and cid in hits


@pytest.mark.postgres
def test_server_search_command_reports_and_enables(pg_cartridge: str) -> None:
    from registry.cli.main import app

    _fill(pg_cartridge)
    runner = CliRunner()
    shown = runner.invoke(app, ["--db", pg_cartridge, "server-search"])
    assert shown.exit_code == 0, shown.stderr
    assert shown.stdout.splitlines()[0] == "motif search screens on the server (RDKit cartridge)"
    database = open_database(pg_cartridge)
    database.write(cartridge.remove_mol_column)
    with database.read() as conn:
        assert cartridge.server_screen(conn, "C(=O)N") is None
    database.close()
    off = runner.invoke(app, ["--db", pg_cartridge, "server-search"])
    assert off.stdout.splitlines()[0] == "motif search screens in the client"
    on = runner.invoke(app, ["--db", pg_cartridge, "server-search", "--enable", "--json"])
    assert on.exit_code == 0, on.stderr
    assert '"server_search_active": true' in on.stdout
    assert f'"molecules_indexed": {len(STRUCTURES) - 1}' in on.stdout


def test_server_search_enable_refuses_sqlite(cli) -> None:  # type: ignore[no-untyped-def]
    result = cli("server-search", "--enable")
    assert result.exit_code == 2
    assert (
        result.stderr == "error: server-side search needs a PostgreSQL registry; this is SQLite\n"
    )


@pytest.mark.postgres
def test_server_setting_for_chiral_matching_cannot_drop_hits(pg_cartridge: str) -> None:
    """A server told to match chirality would miss L-alanine for a D-drawn query; ours ignores
    stereo in the screen (the client checks it when asked), so the hit stays a candidate."""
    from sqlalchemy import make_url

    url = make_url(pg_cartridge)
    options = url.query["options"] + " -crdkit.do_chiral_sss=on"
    chiral = url.update_query_dict({"options": options}).render_as_string(hide_password=False)
    api.init_registry(chiral)
    database = api.open_registry(chiral)
    try:
        api.add_measurement(
            database,
            EntryInput(
                method="lineshape", compound="L-Ala", smiles="C[C@H](N)C(=O)O", dg="60 kJ/mol"
            ),
        )
        with database.read() as conn:
            assert conn.scalar("SHOW rdkit.do_chiral_sss") == "on"
            hits = cartridge.server_screen(conn, "C[C@@H](N)C(=O)O")
    finally:
        database.close()
    assert hits == [1]


@pytest.mark.postgres
def test_find_gives_the_same_rows_on_sqlite_and_postgresql(
    pg_cartridge: str, tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    """``find`` end to end: server-screened on PostgreSQL, client-screened on SQLite."""
    from registry.search import build_query, find

    monkeypatch.setenv("FLUXLEDGER_CACHE_DIR", str(tmp_path / "cache"))
    sqlite_db = str(tmp_path / "r.sqlite")
    _fill(sqlite_db)
    _fill(pg_cartridge)
    calls: list[str] = []
    real = cartridge.server_screen

    def counting(conn, pattern, *, smiles=False):  # type: ignore[no-untyped-def]
        found = real(conn, pattern, smiles=smiles)
        calls.append(pattern if found is not None else f"fallback:{pattern}")
        return found

    monkeypatch.setattr(cartridge, "server_screen", counting)
    lite, pg = api.open_registry(sqlite_db), api.open_registry(pg_cartridge)
    try:
        for query in [build_query(smarts=s) for s in MOTIFS] + [build_query(smiles="CN(C)C=O")]:
            on_sqlite = find(lite, query=query)
            on_pg = find(pg, query=query)
            assert on_pg.rows == on_sqlite.rows, query.text
            assert on_pg.stats.matched == on_sqlite.stats.matched, query.text
    finally:
        lite.close()
        pg.close()
    assert calls == [*MOTIFS, "CN(C)C=O"]  # every pattern went to the server, none fell back


@pytest.mark.postgres
def test_filters_give_the_same_rows_on_sqlite_and_postgresql(
    pg_cartridge: str, tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    """The plain-SQL filters (ILIKE on PostgreSQL, lower() LIKE on SQLite, IN lists, the
    process join) select the same measurements on both databases."""
    from registry.search import build_query, find, make_filters

    monkeypatch.setenv("FLUXLEDGER_CACHE_DIR", str(tmp_path / "cache"))
    extra = [  # invented demo values on real structures
        ("DEF", "CCN(CC)C=O", "20.5 kcal/mol", "toluene-d8", "Textbook A", "bond-rotation"),
        ("DEA", "CCN(CC)C(C)=O", "18.0 kcal/mol", "CDCl3", "paper B", "bond-rotation"),
        ("DMCH", "CC1CCCCC1C", "10.5 kcal/mol", "CS2", "textbook C", "ring-inversion"),
    ]
    lite_db = str(tmp_path / "f.sqlite")
    for db in (lite_db, pg_cartridge):
        _fill(db)
        database = api.open_registry(db)
        try:
            for label, smiles, dg, solvent, reference, process in extra:
                api.add_measurement(
                    database,
                    EntryInput(
                        method="lineshape",
                        compound=label,
                        smiles=smiles,
                        dg=dg,
                        dg_t="298 K",
                        solvent=solvent,
                        reference=reference,
                        process=process,
                        nucleus="1H",
                    ),
                    actor="tester",
                )
        finally:
            database.close()
    specs = [
        {"reference": "TEXTBOOK"},
        {"solvent": ["nonpolar", "chloroform"]},
        {"solvent": "CS"},
        {"process": "rotation", "nucleus": "1H"},
        {"barrier": "70-90 kJ/mol"},
    ]
    lite, pg = api.open_registry(lite_db), api.open_registry(pg_cartridge)
    try:
        query = build_query(smarts="[#6]")
        for spec in specs:
            on_sqlite = find(lite, query=query, filters=make_filters(**spec))
            on_pg = find(pg, query=query, filters=make_filters(**spec))
            assert on_sqlite.rows, spec
            assert on_pg.rows == on_sqlite.rows, spec
    finally:
        lite.close()
        pg.close()


@pytest.mark.postgres
def test_plain_sql_edits_on_postgresql_reach_the_client_caches(
    pg_url: str, tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    """The statement-level triggers of migration 0003 count plain-SQL edits on the server too:
    a screening index cached in the user cache directory is rebuilt for them, in this process
    and in a new one."""
    from registry.record.chem import read_structure
    from registry.search import build_query, cachefile, find

    monkeypatch.setenv("FLUXLEDGER_CACHE_DIR", str(tmp_path / "cache"))
    monkeypatch.setenv("FLUXLEDGER_SERVER_SCREEN", "off")  # the client's cached screen
    _fill(pg_url)
    query = build_query(smarts="C=S")
    database = api.open_registry(pg_url)
    try:
        before = {r["compound"] for r in find(database, query=query).rows}
        assert before == {"thio-DMA"}
        assert list((tmp_path / "cache").glob("*.fpindex"))
        thio = read_structure("CN(C)C(C)=S")  # DMA's O becomes S: every length stays the same
        database.write(
            lambda conn: conn.execute(
                "UPDATE compound SET smiles_canonical = :s, mol_binary = :b, pattern_fp = :f "
                "WHERE label = 'DMA'",
                {"s": thio.smiles_canonical, "b": thio.mol_binary, "f": thio.pattern_fp},
            )
        )
        assert {r["compound"] for r in find(database, query=query).rows} == {"thio-DMA", "DMA"}
        database.write(lambda conn: conn.execute("DELETE FROM measurement WHERE id = 1"))
        cachefile.forget()  # as a new process
        assert {r["compound"] for r in find(database, query=query).rows} == {"thio-DMA", "DMA"}
        with database.read() as conn:
            counters = dict(conn.rows("SELECT name, n FROM change_counter"))
        assert counters["structure"] >= 1 and counters["listing"] >= 2
    finally:
        database.close()
