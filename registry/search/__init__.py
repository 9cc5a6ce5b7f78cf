"""Structure search over the registry: which barriers were measured on compounds with a motif.

Map of the package (data flows top to bottom):

- :mod:`.motifs` — the built-in motif library (names of our own, SMARTS, tested examples) and
  user motifs from the ``motif`` table or a TOML file.
- :mod:`.patterns` — SMARTS / SMILES / motif → RDKit query molecules and their pattern
  fingerprints; parse errors with their position.
- :mod:`.filters` — barrier/temperature ranges in any unit, solvent classes, vocabulary filters
  → SQL conditions.
- :mod:`.index` — the screening index (fingerprints + RDKit binaries of every compound) cached
  beside the registry and kept in step with it.
- :mod:`.elements` — the element screen: elements per compound (in the index) and per query atom.
- :mod:`.listing` — every measurement's search row (ids, sort keys, a ready CSV line) kept
  beside a SQLite registry, so that a search picks its rows with numpy.
- :mod:`.cachefile` — the two cache files' I/O (mapped numpy arrays) and file-state notes.
- :mod:`.engine` — :func:`find`: SQL filters, fingerprint screen, RDKit confirmation, rows.

RDKit is imported lazily inside these modules, so importing the package stays cheap.
"""

from __future__ import annotations

from registry.search.engine import FindResult, brute_force, find, motif_matches
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
