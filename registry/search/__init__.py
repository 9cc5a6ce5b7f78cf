"""Structure search over the registry: which barriers were measured on compounds with a motif.

Map of the package (data flows top to bottom):

- :mod:`.motifs` — the built-in motif library (names of our own, SMARTS, tested examples) and
  user motifs from the ``motif`` table or a TOML file.
- :mod:`.patterns` — SMARTS / SMILES / motif → RDKit query molecules and their pattern
  fingerprints; parse errors with their position.
- :mod:`.filters` — barrier/temperature ranges in any unit, solvent classes, vocabulary filters
  → SQL conditions (also used by ``list``).
- :mod:`.cachefile` — the one cache-file format (mapped numpy arrays) and its exact validity:
  the registry state (change counters kept by triggers, table sizes) each file was built for.
- :mod:`.index` — the screening index (fingerprints, element bits, RDKit forms of every
  compound) in ``<db>.fpindex``; :mod:`.elements` — the element screen.
- :mod:`.matching` — screens and RDKit confirmation: which compounds match.
- :mod:`.similarity` — Morgan fingerprints (``<db>.simindex``) and Tanimoto ranking.
- :mod:`.listing` — every measurement's sort keys and CSV line in ``<db>.listing`` (SQLite).
- :mod:`.result` — :class:`FindResult`, sorting, CSV lines.
- :mod:`.engine` — :func:`find`: filters, matching, rows — on one read snapshot.

The library surface is :mod:`registry.api.search`. RDKit is imported lazily inside these
modules, so importing the package stays cheap.
"""

from __future__ import annotations

from registry.search.engine import brute_force, find, motif_matches
from registry.search.filters import Filters, make_filters, parse_range
from registry.search.motifs import (
    Motif,
    add_motif,
    get_motif,
    list_motifs,
    load_motif_file,
    remove_motif,
)
from registry.search.patterns import PatternError, Query, build_query
from registry.search.result import FindResult

__all__ = [
    "Filters",
    "FindResult",
    "Motif",
    "PatternError",
    "Query",
    "add_motif",
    "brute_force",
    "build_query",
    "find",
    "get_motif",
    "list_motifs",
    "load_motif_file",
    "make_filters",
    "motif_matches",
    "parse_range",
    "remove_motif",
]
