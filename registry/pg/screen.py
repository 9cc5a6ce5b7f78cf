"""The bridge between the server screen and the client search (:mod:`registry.search.matching`).

``find`` screens each pattern with :func:`server_positions` first; on PostgreSQL with the RDKit
cartridge the server's candidates replace the client's fingerprint screen, and the client's
RDKit still confirms every candidate, so answers equal those of the SQLite path. Anywhere else
this returns None at the cost of one dialect check, and the client screen runs as before.
"""

from __future__ import annotations

import os

import numpy as np

from registry.pg import cartridge
from registry.storage.connection import Connection


def server_screen_wanted() -> bool:
    """False when ``FLUXLEDGER_SERVER_SCREEN`` is off/0/no/false: screen in the client instead.

    Which screen is faster depends on the pattern (see benchmarks/bench_pg.py), so a department
    can choose; the answers are the same either way.
    """
    value = os.environ.get("FLUXLEDGER_SERVER_SCREEN", "on").strip().lower()
    return value not in {"off", "0", "no", "false"}


def server_positions(
    conn: Connection, ids: np.ndarray, rows: np.ndarray | None, pattern: str, kind: str
) -> np.ndarray | None:
    """Positions (into the ascending compound ``ids`` of the client's index) that the server
    kept for ``pattern``, limited to ``rows`` when given; None when there is no server screen.

    ``kind`` is the query kind of :class:`registry.search.patterns.Query`: SMILES queries are
    sent as molecules, SMARTS and motif patterns as query molecules.
    """
    if conn.dialect != "postgresql" or not server_screen_wanted():
        return None
    found = cartridge.server_screen(conn, pattern, smiles=kind == "smiles")
    if found is None:
        return None
    candidates = np.asarray(found, dtype=np.int64)
    if candidates.size == 0 or ids.size == 0:
        return np.empty(0, dtype=np.int64)
    positions = np.searchsorted(ids, candidates)
    inside = positions < ids.size
    positions, candidates = positions[inside], candidates[inside]
    positions = positions[ids[positions] == candidates].astype(np.int64)
    if rows is not None:
        allowed = np.zeros(ids.size, dtype=bool)
        allowed[rows] = True
        positions = positions[allowed[positions]]
    return positions
