"""Several writers on one SQLite file: nothing fails, nothing is lost, nothing is half-written.

Real processes throughout: library writers forked with ``multiprocessing`` (fork start method,
so each starts in milliseconds with the libraries already loaded, and opens its own engine),
processes killed with SIGKILL in the middle of their work, and the installed ``fluxledger``
command run several times at once.
"""

from __future__ import annotations

import gc
import json
import multiprocessing
import os
import random
import signal
import sqlite3
import subprocess
import sys
import time
from dataclasses import replace
from pathlib import Path
from typing import Any

import pytest

from registry import api
from registry.errors import DatabaseError
from registry.record.entry import EntryInput, NormalizedEntry, normalize_entry
from registry.storage import database as store
from registry.storage import schema as filecheck
from registry.storage.connection import Connection
from registry.storage.writer import write_entries

FORK = multiprocessing.get_context("fork")
#: the command installed beside the Python that runs the tests
FLUXLEDGER = Path(sys.executable).with_name("fluxledger")

#: real structures, shared by all writers so that they race to register the same compounds
SMILES = ["CC(=O)N(C)C", "CN(C)C=O", "CN(C)C(=O)c1ccccc1", "C1CCCCC1", "Cc1ccccc1-c1ccccc1C"]


def _entry(label: str, i: int, smiles: str | None = None) -> EntryInput:
    return EntryInput(
        method="coalescence",
        label=label,
        name=None if smiles else f"compound of {label}",
        compound=None if smiles else label,
        smiles=smiles,
        process="bond-rotation" if smiles else None,
        tc=f"{250 + i % 50} K",
        dnu=f"{20 + i % 30} Hz",
        dg=f"{50 + (i % 100) / 10:.1f} kJ/mol",
        solvent="CDCl3",
    )


def _normalized(prefix: str, size: int) -> list[NormalizedEntry]:
    out = []
    for i in range(size):
        entry, problems = normalize_entry(_entry(f"{prefix}-{i}", i))
        assert entry is not None, problems
        out.append(entry)
    return out


def write_batch(
    database: store.Database,
    prefix: str,
    size: int,
    template: list[NormalizedEntry] | None = None,
) -> list[int]:
    """One import-like batch: an import_batch row and ``size`` measurements, in one transaction.

    With a ``template`` (entries normalized once) only the labels change, so the process spends
    nearly all its time inside write transactions: where a kill is most likely to hurt.
    """
    if template is None:
        normalized = _normalized(prefix, size)
    else:
        normalized = [
            replace(e, measurement={**e.measurement, "label": f"{prefix}-{i}"})
            for i, e in enumerate(template)
        ]

    def work(conn: Connection) -> list[int]:
        batch_id = conn.insert(
            "import_batch",
            {
                "file_name": prefix,
                "sha256": "0" * 64,
                "sheet": None,
                "actor": "test",
                "started_at": _now(),
                "rows_total": size,
                "rows_added": size,
            },
            returning="id",
        )
        result = write_entries(
            conn, normalized, [None] * size, actor=prefix.split("-")[0], batch_id=batch_id
        )
        return result.measurement_ids

    return database.write(work)


def _now() -> Any:
    from datetime import UTC, datetime

    return datetime.now(UTC)


IMPORT_ROWS = 20


def _import_file(folder: Path, worker: int) -> Path:
    """A small CSV as a group member would import it (bare numbers, units in the headers)."""
    lines = [
        "Compound name,Process,Solvent,Spectrometer,T_c/K,delta nu (Hz),dG# / kJ mol-1,Method,"
        "Measurement"
    ]
    for i in range(IMPORT_ROWS):
        lines.append(
            f"imported compound {worker}-{i},amide rotation,CDCl3,400 MHz,{300 + i},{30 + i},"
            f"{60 + i / 10:.1f},coalescence,imp{worker}-{i}"
        )
    path = folder / f"import-{worker}.csv"
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    return path


def _writer(
    db: str, worker: int, singles: int, batches: int, size: int, go: float, csv: Path | None = None
) -> None:
    """Child process: single adds (some racing on shared structures), batches and an import."""
    try:
        from registry.io.importer import import_table

        database = api.open_registry(db)
        while time.time() < go:  # start together, after every child has set up
            time.sleep(0.005)
        if csv is not None:
            summary = import_table(database, csv, workers=1, actor=f"w{worker}")
            assert summary["added"] == IMPORT_ROWS, summary
        done = 0
        for i in range(singles):
            smiles = SMILES[(worker + i) % len(SMILES)] if i % 3 == 0 else None
            api.add_measurement(database, _entry(f"w{worker}-s{i}", i, smiles), actor=f"w{worker}")
            if i % 2 == 0 and done < batches:  # imports interleaved with single adds
                write_batch(database, f"w{worker}-b{done}", size)
                done += 1
            rows = api.list_measurements(database, limit=3)  # reads never fail
            assert rows
        for b in range(done, batches):
            write_batch(database, f"w{worker}-b{b}", size)
        database.dispose()
    except BaseException as exc:  # report and fail the child
        print(f"worker {worker}: {type(exc).__name__}: {exc}", flush=True)
        os._exit(1)
    os._exit(0)


def _nothing_open(db_path: Path) -> None:
    """Before a fork: this process must hold no connection to the registry.

    SQLite keeps per-process bookkeeping of its file locks (and of the WAL index mapping); a
    child forked while the parent has the file open inherits that bookkeeping without the locks
    themselves and can then corrupt the file (sqlite.org/howtocorrupt.html, section 2.6). Engines
    that went out of scope may still hold pooled connections until the garbage collector runs.
    """
    gc.collect()
    names = {str(db_path), f"{db_path}-wal", f"{db_path}-shm"}
    fd_dir = Path("/proc/self/fd")
    if not fd_dir.exists():  # pragma: no cover - not Linux
        return
    held = []
    for fd in fd_dir.iterdir():
        try:
            if os.readlink(fd) in names:
                held.append(os.readlink(fd))
        except OSError:
            continue
    assert held == [], f"the test process still has the registry open: {held}"


def _fork_all(target: Any, args_list: list[tuple[Any, ...]]) -> list[Any]:
    _nothing_open(Path(args_list[0][0]))
    procs = [FORK.Process(target=target, args=args) for args in args_list]
    for p in procs:
        p.start()
    return procs


def _labels(db_path: Path) -> list[str]:
    conn = sqlite3.connect(db_path)
    try:
        return [r[0] for r in conn.execute("SELECT label FROM measurement")]
    finally:
        conn.close()


def test_eight_processes_writing_at_once_lose_nothing(db_path: Path, tmp_path: Path) -> None:
    workers, singles, batches, size, importers = 8, 6, 3, 25, 2
    files = [_import_file(tmp_path, w) if w < importers else None for w in range(workers)]
    go = time.time() + 1.0
    procs = _fork_all(
        _writer,
        [(str(db_path), w, singles, batches, size, go, files[w]) for w in range(workers)],
    )
    for p in procs:
        p.join(timeout=120)
    assert [p.exitcode for p in procs] == [0] * workers
    labels = _labels(db_path)
    expected = {f"w{w}-s{i}" for w in range(workers) for i in range(singles)}
    for w in range(workers):
        prefixes = [f"w{w}-b{k}" for k in range(batches)]
        expected |= {f"{p}-{i}" for p in prefixes for i in range(size)}
    expected |= {f"imp{w}-{i}" for w in range(importers) for i in range(IMPORT_ROWS)}
    assert len(expected) == workers * (singles + batches * size) + importers * IMPORT_ROWS
    assert len(labels) == len(expected)
    assert set(labels) == expected
    conn = sqlite3.connect(db_path)
    try:
        keys = conn.execute(
            "SELECT inchikey, count(*) FROM compound WHERE inchikey IS NOT NULL GROUP BY inchikey"
        ).fetchall()
        revisions = conn.execute(
            "SELECT count(*) FROM revision WHERE action NOT IN ('flag', 'unflag')"
        ).fetchone()[0]
        # the status rule: each measurement its check flagged has one 'flag' revision
        flags, flagged = conn.execute(
            "SELECT (SELECT count(*) FROM revision WHERE action = 'flag'), "
            "(SELECT count(*) FROM measurement WHERE status = 'flagged')"
        ).fetchone()
    finally:
        conn.close()
    assert len(keys) == len(SMILES)  # racing writers registered each structure once
    assert all(count == 1 for _key, count in keys)
    assert revisions == len(expected)
    assert flags == flagged
    report = api.verify(str(db_path))
    assert report["ok"], report


def _endless_batches(db: str, worker: int, size: int) -> None:
    """Child process: write batches until killed."""
    database = api.open_registry(db)
    template = _normalized(f"k{worker}", 1) * size  # ready in milliseconds: kills land in writes
    b = 0
    while True:
        write_batch(database, f"k{worker}-b{b}", size, template)
        b += 1


def _endless_batches_marked(db: str, worker: int, size: int, inside: Any) -> None:
    """As :func:`_endless_batches`, with ``inside`` set to 1 while a write transaction is open."""
    plain = store.Database._write_once

    def marked(self: store.Database, work: Any) -> Any:
        def inner(conn: Connection) -> Any:
            inside.value = 1
            return work(conn)

        result = plain(self, inner)
        inside.value = 0  # after COMMIT returned
        return result

    store.Database._write_once = marked  # type: ignore[method-assign]
    _endless_batches(db, worker, size)


def _batches_whole(db_path: Path, size: int) -> tuple[int, list[str]]:
    """How many batches are stored, and those stored incompletely (must be none).

    Counted per table with one GROUP BY each (the batch columns have no index: a join per
    batch would be quadratic in the thousands of batches a fast writer leaves).
    """
    conn = sqlite3.connect(db_path)
    try:
        batches = conn.execute("SELECT id, file_name FROM import_batch").fetchall()
        rows = dict(conn.execute("SELECT batch_id, count(*) FROM measurement GROUP BY batch_id"))
        revisions = dict(conn.execute("SELECT batch_id, count(*) FROM revision GROUP BY batch_id"))
    finally:
        conn.close()
    broken = [
        name for bid, name in batches if rows.get(bid, 0) != size or revisions.get(bid, 0) != size
    ]
    return len(batches), broken


def test_writers_killed_at_random_moments_leave_whole_batches(db_path: Path) -> None:
    rng = random.Random()
    size, trials = 150, 24
    mid_transaction = 0
    for trial in range(trials):
        # no lock: a child killed while holding it would block every later read of the value
        inside = FORK.Value("i", 0, lock=False)
        _nothing_open(db_path)
        proc = FORK.Process(
            target=_endless_batches_marked, args=(str(db_path), trial, size, inside)
        )
        proc.start()
        time.sleep(rng.uniform(0.05, 0.6))
        os.kill(proc.pid, signal.SIGKILL)
        proc.join(timeout=10)
        assert proc.exitcode == -signal.SIGKILL
        mid_transaction += inside.value
        conn = sqlite3.connect(db_path)  # recovery of the WAL happens on this open
        try:
            assert conn.execute("PRAGMA quick_check").fetchone() == ("ok",), f"trial {trial}"
        finally:
            conn.close()
        stored, broken = _batches_whole(db_path, size)
        assert broken == [], f"trial {trial}: half-written batches {broken}"
    assert stored > 0  # the kills did not all land before the first commit
    # most kills must hit an open write transaction (BEGIN IMMEDIATE … COMMIT), or this test
    # would prove little; about 19 in 20 do
    assert mid_transaction >= trials // 3, mid_transaction
    report = api.verify(str(db_path))
    assert report["ok"], report


def test_backup_under_concurrent_writes_restores_to_a_clean_registry(
    db_path: Path, tmp_path: Path
) -> None:
    size = 40
    procs = _fork_all(_endless_batches, [(str(db_path), w, size) for w in range(3)])
    try:
        backups = []
        database = store.open_database(str(db_path))
        seen = 0
        for k in range(3):
            seen = _wait_for_batches(db_path, seen)  # a busy machine may start writers slowly
            made = api.backup(database, tmp_path / f"b{k}.sqlite")
            backups.append(Path(made["backup"]))
        database.dispose()
        # restore the first backup into the live registry while the writers keep writing
        restored = api.restore(str(db_path), backups[0], force=True)
        assert restored["safety_backup"]
        _wait_for_batches(db_path, _batches_whole(db_path, size)[0])
    finally:
        for p in procs:
            os.kill(p.pid, signal.SIGKILL)
            p.join(timeout=10)
    counts = []
    for path in backups:
        report = api.verify(str(path))
        assert report["ok"], report
        stored, broken = _batches_whole(path, size)
        assert broken == []
        counts.append(stored)
    assert counts == sorted(counts) and counts[-1] > 0
    fresh = tmp_path / "fresh.sqlite"
    api.restore(str(fresh), backups[-1])
    assert api.verify(str(fresh))["ok"]
    assert _batches_whole(fresh, size) == (counts[-1], [])
    # the live registry: the restored content plus what the writers added after it, all whole
    assert api.verify(str(db_path))["ok"]
    assert _batches_whole(db_path, size)[1] == []


def _wait_for_batches(db_path: Path, more_than: int, timeout: float = 60.0) -> int:
    """Wait until the registry holds more than ``more_than`` import batches; returns how many."""
    deadline = time.monotonic() + timeout
    while True:
        conn = sqlite3.connect(db_path, timeout=30)
        try:
            count = conn.execute("SELECT count(*) FROM import_batch").fetchone()[0]
        finally:
            conn.close()
        if count > more_than or time.monotonic() > deadline:
            return count
        time.sleep(0.05)


def _editor(db: str, field: str, values: list[str], go: float) -> None:
    try:
        database = api.open_registry(db)
        while time.time() < go:
            time.sleep(0.005)
        for value in values:
            api.edit_measurement(database, 1, {field: value}, actor=f"editor-{field}")
        database.dispose()
    except BaseException as exc:
        print(f"editor {field}: {type(exc).__name__}: {exc}", flush=True)
        os._exit(1)
    os._exit(0)


def test_two_people_editing_one_measurement_lose_neither_change(database, db_path: Path) -> None:  # type: ignore[no-untyped-def]
    api.add_measurement(database, _entry("shared", 0))
    database.dispose()
    n = 12
    go = time.time() + 0.5
    procs = _fork_all(
        _editor,
        [
            (str(db_path), "reference", [f"notebook page {i}" for i in range(n)], go),
            (str(db_path), "dh", [f"{50 + i} kJ/mol" for i in range(n)], go),
        ],
    )
    for p in procs:
        p.join(timeout=120)
    assert [p.exitcode for p in procs] == [0, 0]
    handle = api.open_registry(str(db_path))
    try:
        record = api.get_measurement(handle, 1)
        history = api.history(handle, 1, limit=None)
    finally:
        handle.dispose()
    assert record["reference"] == f"notebook page {n - 1}"
    assert record["dh_text"] == f"{50 + n - 1} kJ/mol"
    # the add and both people's edits (the status rule may add flag/unflag revisions)
    assert len([h for h in history if h["action"] in ("add", "edit")]) == 1 + 2 * n
    # each edit's "before" is the state the previous edit left: no update was lost
    refs = [h for h in history if h["actor"] == "editor-reference"]
    assert [h["before"]["reference"] for h in refs[1:]] == [
        h["after"]["reference"] for h in refs[:-1]
    ]
    assert api.verify(str(db_path))["ok"]


def test_the_installed_command_run_five_times_at_once(db_path: Path) -> None:
    env = {**os.environ, "FLUXLEDGER_DB": str(db_path)}
    base = [str(FLUXLEDGER)]
    commands = [
        [*base, "--as", f"user{i}", "add", "--method", "coalescence", "--compound", f"CLI-{i}",
         "--tc", "-12 °C", "--dnu", "24 Hz", "--dg", "55 kJ/mol", "--solvent", "toluene-d8"]
        for i in range(3)
    ] + [[*base, "list", "--json"], [*base, "history", "--json"]]  # fmt: skip
    procs = [
        subprocess.Popen(c, env=env, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
        for c in commands
    ]
    outs = [p.communicate(timeout=180) for p in procs]
    assert [p.returncode for p in procs] == [0] * len(procs), [o[1] for o in outs]
    assert all(err == "" for _out, err in outs)
    json.loads(outs[3][0])
    json.loads(outs[4][0])
    assert sorted(_labels_of_compounds(db_path)) == [f"CLI-{i}" for i in range(3)]
    assert api.verify(str(db_path))["ok"]


def _labels_of_compounds(db_path: Path) -> list[str]:
    conn = sqlite3.connect(db_path)
    try:
        return [r[0] for r in conn.execute("SELECT label FROM compound")]
    finally:
        conn.close()


def test_reads_go_on_while_another_process_holds_the_write_lock(database, db_path: Path) -> None:  # type: ignore[no-untyped-def]
    api.add_measurement(database, _entry("r1", 1))
    blocker = sqlite3.connect(db_path, isolation_level=None)
    blocker.execute("BEGIN IMMEDIATE")
    blocker.execute("UPDATE measurement SET reference = 'uncommitted' WHERE id = 1")
    try:
        started = time.perf_counter()
        rows = api.list_measurements(database)
        assert time.perf_counter() - started < 2.0
        assert rows[0]["reference"] is None  # the committed snapshot, not the pending change
    finally:
        blocker.execute("ROLLBACK")
        blocker.close()


def _hold_write_lock(db: str, seconds: float, locked: Any) -> None:
    """Child process: take the write lock, signal, hold it, then commit."""
    conn = sqlite3.connect(db, isolation_level=None)
    conn.execute("BEGIN IMMEDIATE")
    locked.set()
    time.sleep(seconds)
    conn.execute("COMMIT")
    conn.close()
    os._exit(0)


def test_a_writer_waits_for_the_lock_instead_of_failing(database, db_path: Path) -> None:  # type: ignore[no-untyped-def]
    database.dispose()
    locked = FORK.Event()
    _nothing_open(db_path)
    holder = FORK.Process(target=_hold_write_lock, args=(str(db_path), 1.0, locked))
    holder.start()
    assert locked.wait(30)
    started = time.perf_counter()
    result = database.write(
        lambda conn: conn.execute(
            "INSERT INTO process_kind (name, description) VALUES ('queued', '')"
        )
    )
    waited = time.perf_counter() - started
    holder.join(timeout=30)
    assert result == 1
    assert waited >= 0.5  # it queued behind the other process's lock, then succeeded


def _locked() -> sqlite3.OperationalError:
    return sqlite3.OperationalError("database is locked")


def test_write_retries_a_locked_transaction_from_the_start(database) -> None:  # type: ignore[no-untyped-def]
    calls = []

    def work(conn: Connection) -> int:
        conn.execute("INSERT INTO process_kind (name, description) VALUES ('t-kind', '')")
        calls.append(1)
        if len(calls) < 3:
            raise _locked()  # as SQLite reports a busy state it does not wait in
        return len(calls)

    assert database.write(work) == 3
    with database.read() as conn:
        count = conn.scalar("SELECT count(*) FROM process_kind WHERE name = 't-kind'")
    assert count == 1  # the two failed attempts were rolled back


def test_a_lock_that_never_clears_becomes_a_clear_error(database, monkeypatch) -> None:  # type: ignore[no-untyped-def]
    monkeypatch.setattr(store, "WRITE_RETRIES", 3)
    monkeypatch.setattr(store.time, "sleep", lambda _s: None)

    def work(conn: Connection) -> None:
        raise _locked()

    with pytest.raises(DatabaseError) as info:
        database.write(work)
    assert str(info.value).endswith(
        "stayed locked by another writer for too long (3 attempts); try again, or find the "
        "process that holds it"
    )


def test_other_operational_errors_are_not_retried(database) -> None:  # type: ignore[no-untyped-def]
    calls = []

    def work(conn: Connection) -> None:
        calls.append(1)
        conn.execute("SELECT * FROM no_such_table")

    with pytest.raises(sqlite3.OperationalError):
        database.write(work)
    assert calls == [1]


def test_each_connection_uses_wal_foreign_keys_and_a_busy_timeout(database) -> None:  # type: ignore[no-untyped-def]
    with database.read() as conn:
        assert conn.scalar("PRAGMA journal_mode") == "wal"
        assert conn.scalar("PRAGMA foreign_keys") == 1
        assert conn.scalar("PRAGMA busy_timeout") == store.BUSY_TIMEOUT_MS


MOUNTS = """\
/dev/sda1 / ext4 rw,relatime 0 0
server:/export/chem /mnt/chem nfs4 rw,relatime 0 0
//nas/share /mnt/chem\\040lab cifs rw 0 0
/dev/sdb1 /mnt/chemistry ext4 rw 0 0
"""


@pytest.mark.parametrize(
    ("path", "fstype"),
    [
        ("/mnt/chem/registry.sqlite", "nfs4"),
        ("/mnt/chem/sub/dir/registry.sqlite", "nfs4"),
        ("/mnt/chemistry/registry.sqlite", "ext4"),  # a name that merely starts the same
        ("/mnt/chem lab/registry.sqlite", "cifs"),  # /proc/mounts writes the space as \040
        ("/home/x/registry.sqlite", "ext4"),
    ],
)
def test_the_mount_holding_a_file_is_found(path: str, fstype: str) -> None:
    assert filecheck.mount_fstype(Path(path).parent, MOUNTS) == fstype


def test_network_file_system_warning(tmp_path: Path) -> None:
    mounts = tmp_path / "mounts"
    mounts.write_text(f"/dev/sda1 / ext4 rw 0 0\nsrv:/x {tmp_path} nfs rw 0 0\n")
    warning = filecheck.network_fs_warning(tmp_path / "r.sqlite", str(mounts))
    assert warning == (
        "the registry file is on a network file system (nfs) where SQLite's locking is "
        "unreliable; keep it on a local disk or move the registry to a PostgreSQL server"
    )
    mounts.write_text(f"/dev/sda1 / ext4 rw 0 0\n/dev/sdb {tmp_path} xfs rw 0 0\n")
    assert filecheck.network_fs_warning(tmp_path / "r.sqlite", str(mounts)) is None


def test_the_cli_prints_the_warning_once_per_command(cli, monkeypatch) -> None:  # type: ignore[no-untyped-def]
    monkeypatch.setattr(store, "network_fs_warning", lambda _path: "on NFS, careful")
    for args in (["info"], ["verify"], ["list", "--json"]):
        result = cli(*args)
        assert result.exit_code == 0, result.stderr
        assert result.stderr == "warning: on NFS, careful\n", args
