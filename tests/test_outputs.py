"""Files a command writes: the registry, a symlink, a folder or a bad path is refused before
anything happens, a full disk leaves the previous file, and odd stored values never crash an
output (issue 17: export/rejects/simulate/report over the registry, the symlinked report
index, rejects checked after the transaction, ``-o .``/``-o ""``/dangling links, ``\\x01`` in
an xlsx export, ``Infinity`` in a JSON export).

Real files and real SQLite registries throughout. A full disk is simulated in-process: either
``os.fsync`` raises ENOSPC (what a full disk raises when the data reach it) or SQLite's own
page limit (``PRAGMA max_page_count``) makes SQLite raise exactly its "database or disk is full".
Tests run as root in CI, where permissions stop nothing, so an unwritable folder is simulated
through ``os.access``.
"""

from __future__ import annotations

import errno
import json
import math
import os
import sqlite3
from pathlib import Path
from typing import Any

import pytest
from scipy import constants

from registry import api
from registry.errors import UsageError
from registry.outputs import OutputError, check_target, write_atomically, write_file
from registry.record.entry import EntryInput

#: a rate point set that lies on an Eyring line (ΔH‡ 60 kJ/mol, ΔS‡ −20 J/(mol·K)), made with
#: the Eyring equation k = (k_B T / h) exp(ΔS‡/R) exp(−ΔH‡/RT) from CODATA constants
TEMPS_K = (300.0, 310.0, 320.0, 330.0)


def _eyring_k(t_k: float, dh_j: float = 60_000.0, ds: float = -20.0) -> float:
    return constants.k * t_k / constants.h * math.exp(ds / constants.R - dh_j / (constants.R * t_k))


def _fill(database: Any) -> int:
    """Two measurements, one with rate points (an Eyring plot in the report); returns its id."""
    api.add_measurement(
        database,
        EntryInput(method="coalescence", compound="OUT-1", smiles="CC(=O)N(C)C",
                   solvent="CDCl3", dg="70.1 kJ/mol", dg_t="330 K"),
        check=False,
    )  # fmt: skip
    rates = [(f"{t:g} K", f"{_eyring_k(t):.8g} s-1") for t in TEMPS_K]
    return api.add_measurement(
        database,
        EntryInput(method="lineshape", compound="OUT-2", smiles="CN(C)C=O", solvent="DMSO-d6",
                   dg="66.0 kJ/mol", dg_t="298.15 K", rates=rates, process="bond-rotation"),
        check=False,
    )  # fmt: skip


@pytest.fixture
def filled(database, db_path: Path) -> Path:  # type: ignore[no-untyped-def]
    _fill(database)
    return db_path


def _full_disk(monkeypatch: pytest.MonkeyPatch, after: int = 0) -> None:
    """``os.fsync`` raises ENOSPC from its ``after``-th call on (the earlier ones succeed)."""
    real = os.fsync
    calls = {"n": 0}

    def fsync(fd: int) -> None:
        calls["n"] += 1
        if calls["n"] > after:
            raise OSError(errno.ENOSPC, "No space left on device")
        real(fd)

    monkeypatch.setattr(os, "fsync", fsync)


def _files(folder: Path) -> list[str]:
    """What a folder holds besides the registry (and the files SQLite keeps beside it)."""
    return sorted(p.name for p in folder.iterdir() if not p.name.startswith("registry.sqlite"))


def _count(db_path: Path) -> int:
    with sqlite3.connect(db_path) as conn:
        return int(conn.execute("SELECT count(*) FROM measurement").fetchone()[0])


# ---------------------------------------------------------------- check_target


def test_check_target_refuses_each_bad_place(tmp_path: Path, db_path: Path) -> None:
    (tmp_path / "victim.txt").write_text("keep")
    (tmp_path / "linked.csv").symlink_to(tmp_path / "victim.txt")
    (tmp_path / "dangling.csv").symlink_to(tmp_path / "nowhere.csv")
    other = tmp_path / "other.db"
    sqlite3.connect(other).execute("CREATE TABLE t (x)").connection.close()
    (tmp_path / "plain.txt").write_text("a file, not a folder")
    cases = {
        "": "out: give a file name",
        "  ": "out: give a file name",
        str(tmp_path): f"out {tmp_path}: is a folder; name a file in it",
        str(tmp_path / "linked.csv"): (
            f"out {tmp_path / 'linked.csv'}: is a symbolic link (fluxledger never writes through a link); remove the link or choose another name"
        ),
        str(tmp_path / "dangling.csv"): (
            f"out {tmp_path / 'dangling.csv'}: is a symbolic link (fluxledger never writes through a link); remove the link or choose another name"
        ),
        str(db_path): f"out {db_path}: is the registry itself; choose another file",
        f"{db_path}-wal": (
            f"out {db_path}-wal: SQLite keeps this file beside the registry; choose another file"
        ),
        str(other): f"out {other}: is a SQLite database; choose another file",
        "/dev/null": "out /dev/null: is not a regular file (a device, pipe or socket)",
        str(tmp_path / "no" / "x.csv"): (
            f"out {tmp_path / 'no' / 'x.csv'}: folder {tmp_path / 'no'} does not exist"
        ),
        str(tmp_path / "plain.txt" / "x.csv"): (
            f"out {tmp_path / 'plain.txt' / 'x.csv'}: folder {tmp_path / 'plain.txt'} is not a "
            "folder"
        ),
    }
    for target, message in cases.items():
        with pytest.raises(UsageError) as raised:
            check_target(target, what="out", protect=db_path)
        assert str(raised.value) == message, target
    assert (tmp_path / "victim.txt").read_text() == "keep"
    source = tmp_path / "plain.txt"
    with pytest.raises(UsageError, match="is a file this command reads; choose another file"):
        check_target(source, what="rejects", inputs=[source])
    with pytest.raises(UsageError, match=r"exists; choose another name, or allow replacing it"):
        check_target(source, overwrite=False)
    # a backup may replace an earlier backup (a SQLite file) — never the registry
    assert check_target(other, database_output=True) == other
    with pytest.raises(UsageError, match="is the registry itself"):
        check_target(db_path, protect=db_path, database_output=True)


def test_a_hard_link_to_the_registry_is_the_registry(tmp_path: Path, db_path: Path) -> None:
    alias = tmp_path / "alias.csv"
    os.link(db_path, alias)
    with pytest.raises(UsageError, match="is the registry itself"):
        check_target(alias, protect=db_path)


def test_an_unwritable_folder_is_named(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setattr(os, "access", lambda path, mode: Path(path) != tmp_path)
    with pytest.raises(UsageError) as raised:
        check_target(tmp_path / "x.csv", what="export")
    assert str(raised.value) == f"export {tmp_path / 'x.csv'}: folder {tmp_path} is not writable"


def test_a_full_disk_leaves_the_previous_file(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    target = tmp_path / "out.csv"
    target.write_text("previous\n")
    _full_disk(monkeypatch)
    with pytest.raises(OutputError) as raised, write_atomically(target) as fh:
        fh.write("new content that never arrives\n")
    assert str(raised.value) == (
        f"cannot write {target}: the disk is full; the previous file (if any) is unchanged"
    )
    with pytest.raises(OutputError, match="the disk is full"):
        write_file(target, lambda tmp: tmp.write_text("also new"))
    assert target.read_text() == "previous\n"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["out.csv"]


def test_a_symlink_put_in_place_after_the_check_is_replaced_never_followed(
    tmp_path: Path,
) -> None:
    victim = tmp_path / "victim.txt"
    victim.write_text("keep")
    target = tmp_path / "out.csv"
    path = check_target(target)
    target.symlink_to(victim)  # someone is quicker than us
    with write_atomically(path) as fh:
        fh.write("ours")
    assert victim.read_text() == "keep"
    assert not target.is_symlink() and target.read_text() == "ours"


# ---------------------------------------------------------------- the registry is never overwritten


@pytest.mark.parametrize(
    "args",
    [
        ["export", "-o", "{db}", "--format", "csv"],
        ["export", "-o", "{db}", "--format", "xlsx"],
        ["export", "-o", "{db}", "--format", "json"],
        ["export", "-o", "{db}", "--format", "markdown"],
        ["export", "-o", "{db}-wal", "--format", "csv"],
        ["plot", "overview", "-o", "{db}"],
        ["plot", "eyring", "--point", "300 K, 1 s-1", "--point", "310 K, 3 s-1", "-o", "{db}"],
        ["lineshape", "simulate", "--sites", "0,100 Hz", "--k", "10", "--out", "{db}"],
        ["backup", "{db}"],
        ["report", "-o", "{db}"],
    ],
)
def test_no_command_writes_over_the_registry(cli, filled: Path, args: list[str]) -> None:  # type: ignore[no-untyped-def]
    before = filled.read_bytes()
    result = cli(*[a.replace("{db}", str(filled)) for a in args])
    assert result.exit_code == 2, result.stdout
    assert result.exception is None or isinstance(result.exception, SystemExit)
    assert result.stderr.startswith("error: ")
    assert str(filled) in result.stderr
    assert filled.read_bytes() == before
    assert cli("verify").exit_code == 0


def test_a_report_page_that_is_the_registry_is_refused(cli, filled: Path, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    site = tmp_path / "site"
    assert cli("report", "-o", str(site), "--no-plots").exit_code == 0
    (site / "index.html").unlink()
    os.link(filled, site / "index.html")  # a hard link: the same file under a page's name
    before = filled.read_bytes()
    result = cli("report", "-o", str(site), "--no-plots")
    assert (result.exit_code, result.stderr) == (
        2,
        f"error: report page {site / 'index.html'}: is the registry itself; choose another file\n",
    )
    assert filled.read_bytes() == before


def test_rejects_onto_the_registry_or_a_missing_folder_commits_nothing(
    cli, filled: Path, tmp_path: Path
) -> None:  # type: ignore[no-untyped-def]
    sheet = tmp_path / "values.csv"
    rows = [f"R{i},computed,{50 + i} kJ/mol" for i in range(8)] + ["RBAD,computed,lots"]
    sheet.write_text("compound,method,ΔG‡\n" + "\n".join(rows) + "\n", encoding="utf-8")
    count, before = _count(filled), filled.read_bytes()
    for rejects, message in (
        (str(filled), f"rejects {filled}: is the registry itself; choose another file"),
        (
            str(tmp_path / "nope" / "x.csv"),
            f"rejects {tmp_path / 'nope' / 'x.csv'}: folder {tmp_path / 'nope'} does not exist",
        ),
        (str(sheet), f"rejects {sheet}: is a file this command reads; choose another file"),
    ):
        result = cli("import", str(sheet), "--skip-bad", "--rejects", rejects)
        assert (result.exit_code, result.stderr) == (2, f"error: {message}\n")
        assert _count(filled) == count
    assert filled.read_bytes() == before
    good = tmp_path / "rejected.csv"
    result = cli("import", str(sheet), "--skip-bad", "--rejects", str(good))
    assert result.exit_code == 0, result.stderr
    assert _count(filled) == count + 8
    assert "RBAD" in good.read_text(encoding="utf-8")


def test_a_rejects_file_that_cannot_be_written_after_the_import_says_the_import_stands(
    cli, filled: Path, tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:  # type: ignore[no-untyped-def]
    sheet = tmp_path / "values.csv"
    sheet.write_text("compound,method,ΔG‡\nS1,computed,51 kJ/mol\nS2,computed,lots\n")
    rejects = tmp_path / "values.rejected.csv"
    rejects.write_text("earlier rejects\n")
    count = _count(filled)
    _full_disk(monkeypatch)
    result = cli("import", str(sheet), "--skip-bad")
    assert result.exit_code == 1
    assert result.stderr == (
        f"error: cannot write {rejects}: the disk is full; the previous file (if any) is "
        "unchanged; the import itself was written\n"
    )
    assert "1 added" in result.stdout and "1 problem(s):" in result.stdout
    assert _count(filled) == count + 1
    assert rejects.read_text() == "earlier rejects\n"


# ---------------------------------------------------------------- bad output paths


def test_bad_export_paths_get_a_message_and_exit_2(cli, filled: Path, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    (tmp_path / "dangling.csv").symlink_to(tmp_path / "nowhere.csv")
    cases = {
        ".": "error: export .: is a folder; name a file in it\n",
        "": "error: export: give a file name\n",
        str(tmp_path / "dangling.csv"): (
            f"error: export {tmp_path / 'dangling.csv'}: is a symbolic link (fluxledger never writes through a link); remove the link or choose another name\n"
        ),
        str(tmp_path / "no" / "x.csv"): (
            f"error: export {tmp_path / 'no' / 'x.csv'}: folder {tmp_path / 'no'} does not exist\n"
        ),
    }
    for target, message in cases.items():
        for fmt in ("csv", "xlsx", "json", "markdown"):
            result = cli("export", "-o", target, "--format", fmt)
            assert (result.exit_code, result.stderr) == (2, message), (target, fmt)
    assert not (tmp_path / "nowhere.csv").exists()
    assert cli("report", "-o", "").stderr == "error: report: give a folder name\n"
    assert cli("plot", "overview", "-o", ".").stderr == "error: plot .: is a folder; name a file in it\n"  # fmt: skip


def test_an_unwritable_folder_is_refused_before_the_export(
    cli, filled: Path, tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:  # type: ignore[no-untyped-def]
    folder = tmp_path / "locked"
    folder.mkdir()
    monkeypatch.setattr(os, "access", lambda path, mode: Path(path) != folder)
    result = cli("export", "-o", str(folder / "x.csv"))
    assert (result.exit_code, result.stderr) == (
        2,
        f"error: export {folder / 'x.csv'}: folder {folder} is not writable\n",
    )


# ---------------------------------------------------------------- a full disk


@pytest.mark.parametrize("name", ["x.csv", "x.xlsx", "x.json", "x.md", "x.tex"])
def test_a_full_disk_during_export_keeps_the_previous_file(
    cli, filled: Path, tmp_path: Path, monkeypatch: pytest.MonkeyPatch, name: str
) -> None:  # type: ignore[no-untyped-def]
    out = tmp_path / name
    assert cli("export", "-o", str(out)).exit_code == 0
    before = out.read_bytes()
    _full_disk(monkeypatch)
    result = cli("export", "-o", str(out))
    assert (result.exit_code, result.stderr) == (
        1,
        f"error: cannot write {out}: the disk is full; the previous file (if any) is unchanged\n",
    )
    assert out.read_bytes() == before
    assert _files(tmp_path) == [name]


def test_a_full_disk_during_a_plot_keeps_the_previous_figure(
    cli, filled: Path, tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:  # type: ignore[no-untyped-def]
    out = tmp_path / "overview.png"
    assert cli("plot", "overview", "-o", str(out)).exit_code == 0
    before = out.read_bytes()
    _full_disk(monkeypatch)
    result = cli("plot", "overview", "-o", str(out))
    assert result.exit_code == 1
    assert result.stderr == f"error: cannot write {out}: the disk is full; the previous file (if any) is unchanged\n"  # fmt: skip
    assert out.read_bytes() == before
    assert _files(tmp_path) == ["overview.png"]


def test_a_full_disk_during_a_report_keeps_the_previous_report(
    cli, filled: Path, tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:  # type: ignore[no-untyped-def]
    site = tmp_path / "site"
    assert cli("report", "-o", str(site)).exit_code == 0
    before = {p.relative_to(site): p.read_bytes() for p in site.rglob("*") if p.is_file()}
    assert any(p.parts[0] == "plots" for p in before) and any(
        p.parts[0] == "compounds" for p in before
    )
    _full_disk(monkeypatch, after=1)  # the marker is written; the first plot is not
    result = cli("report", "-o", str(site))
    assert result.exit_code == 1
    assert result.stderr.startswith("error: cannot write ")
    assert "the disk is full" in result.stderr
    after = {p.relative_to(site): p.read_bytes() for p in site.rglob("*") if p.is_file()}
    assert after == before  # the previous report as it was; no staging folder left
    assert sorted(p.name for p in site.iterdir()) == [
        ".fluxledger-report", "compounds", "index.html", "plots"
    ]  # fmt: skip


def test_a_full_disk_during_backup_leaves_no_partial_backup(
    cli, filled: Path, tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:  # type: ignore[no-untyped-def]
    from registry.admin import backup as backups

    earlier = tmp_path / "earlier.sqlite"
    assert cli("backup", str(earlier)).exit_code == 0
    before = earlier.read_bytes()
    plain = backups._connect

    def small_disk(path: Path, *, readonly: bool = False) -> sqlite3.Connection:
        conn = plain(path, readonly=readonly)
        if not readonly and Path(path).name.startswith("."):  # the copy being written
            conn.execute("PRAGMA max_page_count = 3").fetchall()
        return conn

    monkeypatch.setattr(backups, "_connect", small_disk)
    for dest, extra in ((tmp_path / "new.sqlite", []), (earlier, ["--force"])):
        result = cli("backup", str(dest), *extra)
        assert (result.exit_code, result.stderr) == (
            1,
            f"error: cannot write {dest}: the disk is full; the previous file (if any) is "
            "unchanged\n",
        )
    assert not (tmp_path / "new.sqlite").exists()
    assert earlier.read_bytes() == before
    assert _files(tmp_path) == ["earlier.sqlite"]


# ---------------------------------------------------------------- the report folder


def test_a_symlinked_report_page_or_folder_is_refused_never_followed(
    cli, filled: Path, tmp_path: Path
) -> None:  # type: ignore[no-untyped-def]
    site = tmp_path / "rep"
    assert cli("report", "-o", str(site), "--no-plots").exit_code == 0
    victim = tmp_path / "victim.txt"
    victim.write_text("keep")
    (site / "index.html").unlink()
    (site / "index.html").symlink_to(victim)
    result = cli("report", "-o", str(site), "--no-plots")
    assert (result.exit_code, result.stderr) == (
        2,
        f"error: report page {site / 'index.html'}: is a symbolic link (fluxledger never writes through a link); remove the link or choose another name\n",
    )
    assert victim.read_text() == "keep"
    (site / "index.html").unlink()
    elsewhere = tmp_path / "elsewhere"
    elsewhere.mkdir()
    (elsewhere / "thesis.html").write_text("mine")
    (site / "compounds").rename(tmp_path / "old-compounds")
    (site / "compounds").symlink_to(elsewhere)
    result = cli("report", "-o", str(site), "--no-plots")
    assert result.exit_code == 2
    assert result.stderr == (
        f"error: report {site / 'compounds'}: is a symbolic link or not a folder; the report "
        "replaces this folder, so it must be a plain folder (or absent)\n"
    )
    assert sorted(p.name for p in elsewhere.iterdir()) == ["thesis.html"]


def test_a_rebuilt_report_replaces_its_pages_whole(cli, filled: Path, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    site = tmp_path / "rep"
    assert cli("report", "-o", str(site)).exit_code == 0
    (site / "compounds" / "c999.html").write_text("a page of a compound deleted since")
    (site / ".building-left-by-a-killed-run").mkdir()
    assert cli("report", "-o", str(site)).exit_code == 0
    assert not (site / "compounds" / "c999.html").exists()
    assert sorted(p.name for p in site.iterdir()) == [
        ".fluxledger-report", "compounds", "index.html", "plots"
    ]  # fmt: skip
    assert len(list((site / "compounds").iterdir())) == 2
    assert {p.name for p in (site / "plots").iterdir()} >= {"overview.svg"}


# ---------------------------------------------------------------- odd stored values


def _odd_registry(filled: Path) -> None:
    """Values written behind fluxledger's back: inf, -inf, a control character, an empty
    label, a very long reference and a literal workbook escape."""
    with sqlite3.connect(filled) as conn:
        conn.execute("UPDATE measurement SET dg_kj_mol = 9e999, dg_text = '1e308 kcal/mol' "
                     "WHERE id = 1")  # fmt: skip
        conn.execute("UPDATE measurement SET dh_kj_mol = -9e999, reference = ? WHERE id = 2",
                     ("x" * 100_000,))  # fmt: skip
        conn.execute("UPDATE rate_point SET k_per_s = 9e999 WHERE id = "
                     "(SELECT min(id) FROM rate_point)")  # fmt: skip
        conn.execute("UPDATE compound SET name = 'Caf' || char(1) || 'e _x0041_', label = '' "
                     "WHERE id = 1")  # fmt: skip


def test_json_export_has_no_infinity_and_keeps_the_reported_text(
    cli, filled: Path, tmp_path: Path
) -> None:  # type: ignore[no-untyped-def]
    _odd_registry(filled)
    out = tmp_path / "x.json"
    result = cli("export", "-o", str(out))
    assert result.exit_code == 0, result.stderr

    def refuse(constant: str) -> Any:
        raise AssertionError(f"{constant} is not JSON")

    records = json.loads(out.read_text(encoding="utf-8"), parse_constant=refuse)
    first = records[0]
    assert first["normalized"]["dg_kj_mol"] is None
    assert first["reported"]["dg"] == "1e308 kcal/mol"
    assert records[1]["rate_points"][0]["k_per_s"] is None
    assert first["compound"]["name"] == "Caf\x01e _x0041_"
    assert result.stdout.splitlines()[1:] == [
        "note: 2 stored number(s) are not finite (inf or nan; measurement 1: dg_kj_mol "
        "(normalized), measurement 2: dh_kj_mol (normalized)): written as null (JSON has no inf "
        "or nan; the reported texts are kept); 'fluxledger verify' lists them",
        "note: 1 text(s) hold control characters (measurement 1: name): kept (written as "
        "\\u0001 and the like)",
    ]


def test_odd_values_in_csv_xlsx_tables_report_and_plots_never_crash(
    cli, filled: Path, tmp_path: Path
) -> None:  # type: ignore[no-untyped-def]
    _odd_registry(filled)
    for name in ("x.csv", "x.xlsx", "x.md", "x.tex"):
        result = cli("export", "-o", str(tmp_path / name), "--include-flagged")
        assert result.exit_code == 0, (name, result.stderr)
        assert "note: " in result.stdout
    csv_text = (tmp_path / "x.csv").read_text(encoding="utf-8")
    assert ",inf," in csv_text and ",-inf," in csv_text and "Caf\x01e" in csv_text
    md = (tmp_path / "x.md").read_text(encoding="utf-8")
    assert "inf" not in md and "\x01" not in md
    tex = (tmp_path / "x.tex").read_text(encoding="utf-8")
    assert "\x01" not in tex and "inf" not in tex
    report = cli("report", "-o", str(tmp_path / "site"), "--include-flagged")
    assert report.exit_code == 0, report.stderr
    assert "stored number(s) are not finite" in report.stdout
    page = (tmp_path / "site" / "compounds" / "c1.html").read_text(encoding="utf-8")
    assert "Caf\u2401e _x0041_" in page and "\x01" not in page
    assert "ΔG‡ from" not in page and "ΔG‡ from  to" not in page
    overview = cli("plot", "overview", "-o", str(tmp_path / "o.png"), "--include-flagged")
    assert overview.exit_code == 0, overview.stderr
    assert "note: 1 stored ΔG‡ value(s) are not finite (inf or nan) and were left out" in (
        overview.stdout
    )
    eyring = cli("plot", "eyring", "2", "-o", str(tmp_path / "e.png"))
    assert (eyring.exit_code, eyring.stderr) == (
        1,
        "error: measurement 2: rate point(s) 1 (by temperature) hold a number that is not "
        "finite (inf or nan); no Eyring fit is drawn. 'fluxledger verify' lists such values\n",
    )
    page = (tmp_path / "site" / "compounds" / "c2.html").read_text(encoding="utf-8")
    assert "No Eyring plot: rate point(s) 1 (by temperature) hold a number" in page


def test_control_characters_survive_an_xlsx_round_trip(cli, tmp_path: Path, db_path: Path) -> None:  # type: ignore[no-untyped-def]
    """A name with \\x01 (as a CSV import can bring) goes out as _x0001_ and comes back as \\x01;
    a literal '_x0041_' stays literal."""
    sheet = tmp_path / "in.csv"
    sheet.write_text(
        "compound,name,method,ΔG‡\nCC-1,Caf\x01e _x0041_ A\x1fB,computed,55 kJ/mol\n",
        encoding="utf-8",
    )
    assert cli("import", str(sheet)).exit_code == 0
    out = tmp_path / "out.xlsx"
    result = cli("export", "-o", str(out))
    assert result.exit_code == 0, result.stderr
    assert "written as _x0001_ and the like" in result.stdout
    import zipfile

    xml = zipfile.ZipFile(out).read("xl/worksheets/sheet1.xml").decode("utf-8")
    assert "Caf_x0001_e _x005F_x0041_ A_x001F_B" in xml
    fresh = tmp_path / "fresh.sqlite"
    api.init_registry(str(fresh))
    database = api.open_registry(str(fresh))
    try:
        api.import_table(database, out)
        names = [api.get_measurement(database, r["id"])["compound"]["name"]
                 for r in api.list_measurements(database)]  # fmt: skip
    finally:
        database.close()
    assert names == ["Caf\x01e _x0041_ A\x1fB"]
