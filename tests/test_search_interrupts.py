"""A search stops whole or not at all: the time limit, and Ctrl-C while RDKit confirms.

RDKit's threaded matching catches SIGINT itself and hands back part of the hits as if they were
all (``registry.search.interrupts``). These tests send a real SIGINT to a real process and
check that the search ends with ``KeyboardInterrupt`` — exit status 130 from the CLI, nothing
on standard output — and never with a thinned list. Every subprocess has a timeout.
"""

from __future__ import annotations

import math
import os
import signal
import subprocess
import sys
import textwrap
import time

import pytest
from test_search_engine import _compound_ids, small  # noqa: F401  (fixture)

from registry import api
from registry.errors import UsageError
from registry.search import brute_force, build_query, find, get_motif, matching
from registry.search.interrupts import SearchTimeLimit

pytestmark = pytest.mark.skipif(os.name != "posix", reason="signals as on Linux")


def test_a_chunked_confirmation_finds_every_hit(small, monkeypatch) -> None:  # type: ignore[no-untyped-def]  # noqa: F811
    query = build_query(motif=get_motif("amide"))
    monkeypatch.setattr(matching, "_SMALL", 0)  # the SubstructLibrary branch …
    monkeypatch.setattr(matching, "CONFIRM_CHUNK", 7)  # … in many short calls
    assert _compound_ids(find(small, query=query, threads=2)) == brute_force(small, query)


def test_a_search_past_its_time_limit_stops_with_a_clear_error(small, monkeypatch) -> None:  # type: ignore[no-untyped-def]  # noqa: F811
    monkeypatch.setattr(matching, "_SMALL", 0)
    with pytest.raises(SearchTimeLimit, match=r"time limit \(1e-09 s\)"):
        api.find(small, motif="amide", threads=2, time_limit=1e-9)
    everything = _compound_ids(api.find(small, motif="amide", threads=2))
    assert _compound_ids(api.find(small, motif="amide", threads=2, time_limit=600)) == everything
    for bad in (0, -1, math.nan, math.inf):
        with pytest.raises(UsageError, match="positive number of seconds"):
            api.find(small, motif="amide", time_limit=bad)


def test_cli_time_limit(cli) -> None:  # type: ignore[no-untyped-def]
    refused = cli("find", "--motif", "amide", "--time-limit", "0")
    assert refused.exit_code == 2 and "positive number of seconds" in refused.stderr


# A SubstructLibrary big enough to take seconds; each call is checked for every hit.
_LIBRARY_CHILD = textwrap.dedent(
    """
    import sys, time
    import numpy  # starts BLAS threads that do not block SIGINT, as in a notebook
    from rdkit import Chem
    from rdkit.Chem import rdSubstructLibrary
    from registry.search.interrupts import rdkit_matching

    holder = rdSubstructLibrary.CachedTrustedSmilesMolHolder()
    n = 150_000
    for i in range(n):
        holder.AddSmiles("c1ccccc1" + "C" * (i % 30) + "N(C)C(=O)C")
    library = rdSubstructLibrary.SubstructLibrary(holder)
    query = Chem.MolFromSmarts("[#6]~[#6]~[#6]~[#6]~[#6]~[#6]~[#7]C(=O)")
    guarded = sys.argv[1] == "guarded"
    print("ready", flush=True)
    try:
        for _ in range(40):
            if guarded:
                with rdkit_matching():
                    hits = library.GetMatches(query, numThreads=2, maxResults=n)
            else:
                hits = library.GetMatches(query, numThreads=2, maxResults=n)
            if len(hits) != n:
                print(f"partial {len(hits)} of {n}", flush=True)
                sys.exit(3)
        print("never interrupted", flush=True)
    except KeyboardInterrupt:
        print("interrupted", flush=True)
    """
)


def _interrupt(args: list[str], env: dict[str, str], delay: float | None) -> tuple[int, str, str]:
    """Start a process, wait for its 'ready' line, SIGINT it after ``delay`` s (None: it
    signals itself); its exit status and output."""
    proc = subprocess.Popen(
        args, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True, env=env
    )
    try:
        assert proc.stdout is not None
        ready = proc.stdout.readline()
        assert ready.strip() == "ready", proc.stderr.read() if proc.stderr else ready
        if delay is not None:
            time.sleep(delay)
            proc.send_signal(signal.SIGINT)
        out, err = proc.communicate(timeout=120)
    finally:
        if proc.poll() is None:
            proc.kill()
            proc.communicate(timeout=30)
    return proc.returncode, out, err


@pytest.mark.parametrize("blas_threads", ["1", None], ids=["one BLAS thread", "BLAS threads"])
def test_ctrl_c_never_thins_rdkit_matches(blas_threads: str | None) -> None:
    """With one BLAS thread (the CLI) every Ctrl-C interrupts. With numpy's BLAS threads (a
    notebook) one of them may take the signal into RDKit's handler: the registry sees RDKit's
    warning and interrupts, or RDKit had no molecule in hand and the signal is lost — the
    search then completes. A thinned list is a failure either way."""
    env = {k: v for k, v in os.environ.items() if k != "OPENBLAS_NUM_THREADS"}
    if blas_threads:
        env["OPENBLAS_NUM_THREADS"] = blas_threads
    allowed = {"interrupted"} if blas_threads else {"interrupted", "never interrupted"}
    for delay in (0.3, 0.8):
        code, out, err = _interrupt([sys.executable, "-c", _LIBRARY_CHILD, "guarded"], env, delay)
        assert code == 0 and out.strip() in allowed, (code, out, err)


_CLI_CHILD = textwrap.dedent(
    """
    import os, signal, sys
    from rdkit.Chem import rdSubstructLibrary
    from registry.search import matching
    from registry.cli.main import run

    matching._SMALL = 0
    matching.CONFIRM_CHUNK = 5
    original = rdSubstructLibrary.SubstructLibrary.GetMatches
    calls = []

    def get_matches(self, *args, **kwargs):
        calls.append(1)
        if len(calls) == 3:  # a Ctrl-C while RDKit confirms the third chunk
            os.kill(os.getpid(), signal.SIGINT)
        return original(self, *args, **kwargs)

    rdSubstructLibrary.SubstructLibrary.GetMatches = get_matches
    print("ready", flush=True)
    sys.argv = ["fluxledger", "--db", sys.argv[1], "find", "--motif", "amide", "--threads", "2"]
    run()
    """
)


def test_ctrl_c_during_find_exits_130_with_nothing_printed(small) -> None:  # type: ignore[no-untyped-def]  # noqa: F811
    args = [sys.executable, "-c", _CLI_CHILD, str(small.path)]
    code, out, err = _interrupt(args, dict(os.environ), None)  # the child signals itself
    assert code == 130, err
    assert out == ""
    assert err.strip().endswith("interrupted; nothing half-written was kept")
    assert "Traceback" not in err
