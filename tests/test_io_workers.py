"""The structure-reading pool: a crash is pinned on its row, and workers end with their parent."""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import textwrap
import time
from pathlib import Path

import pytest

from registry import api
from registry.errors import ImportRowError
from registry.io import parallel
from registry.storage.database import Database

CRASHER = "C" * 17  # heptadecane: an ordinary structure that the stand-in below "crashes" on


def _crashing_read(text: str, **kwargs: object):  # type: ignore[no-untyped-def]
    if text == CRASHER:
        os._exit(139)  # what a segmentation fault in RDKit's writer looks like to the pool
    return _real_read(text, **kwargs)


_real_read = parallel.read_structure


def test_a_crash_while_reading_a_structure_is_a_problem_of_its_row(
    database: Database, tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    monkeypatch.setattr(parallel, "read_structure", _crashing_read)  # forked workers inherit it
    monkeypatch.setattr(parallel, "PARALLEL_MIN_ROWS", 30)  # a pool for a small file
    lines = ["compound,SMILES,method,ΔG‡ (kJ/mol)"]
    lines += [f"A{n},{'C' * n},computed,{40 + n}" for n in range(1, 41)]
    path = tmp_path / "alkanes.csv"
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    with pytest.raises(ImportRowError) as info:
        api.import_table(database, path, workers=2)
    assert [(p.row, p.column, p.text, p.reason) for p in info.value.problems] == [
        (18, "SMILES", CRASHER, f"unreadable SMILES: {parallel.CRASHED}")
    ]
    assert api.list_measurements(database) == []


def _children(pid: int) -> set[int]:
    found = set()
    for entry in Path("/proc").iterdir():
        if not entry.name.isdigit():
            continue
        try:
            stat = (entry / "stat").read_text()
        except OSError:
            continue
        if int(stat.rsplit(")", 1)[1].split()[1]) == pid:
            found.add(int(entry.name))
    return found


def _alive(pid: int) -> bool:
    try:
        state = Path(f"/proc/{pid}/stat").read_text().rsplit(")", 1)[1].split()[0]
    except OSError:
        return False
    return state != "Z"


@pytest.mark.skipif(not Path("/proc").is_dir(), reason="reads the process table from /proc")
def test_workers_end_when_their_parent_is_killed(tmp_path: Path) -> None:
    script = tmp_path / "parent.py"
    script.write_text(
        textwrap.dedent(
            """
            import sys, time
            from registry.io.parallel import Workers
            workers = Workers(2)
            pool = workers.pool(10, 1)
            for _ in range(2):
                pool.submit(time.sleep, 60)
            while len(pool._processes) < 2:
                time.sleep(0.05)
            print("ready", flush=True)
            time.sleep(60)
            """
        ),
        encoding="utf-8",
    )
    parent = subprocess.Popen([sys.executable, str(script)], stdout=subprocess.PIPE, text=True)
    try:
        assert parent.stdout is not None and parent.stdout.readline().strip() == "ready"
        workers = _children(parent.pid)
        assert len(workers) >= 2
        os.kill(parent.pid, signal.SIGKILL)
        parent.wait(timeout=30)
        deadline = time.monotonic() + 15
        while any(_alive(w) for w in workers) and time.monotonic() < deadline:
            time.sleep(0.1)
        assert not any(_alive(w) for w in workers), "workers outlived the killed import"
    finally:
        if parent.poll() is None:
            parent.kill()
            parent.wait(timeout=30)
