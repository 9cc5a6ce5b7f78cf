"""Flagged values on the command line: the options every command shares, and the mark tables show.

A measurement is *flagged* while one of its error findings is open (not resolved, not accepted).
``list``, ``find`` and ``export`` select clean or flagged rows with ``--clean`` / ``--flagged``;
commands that sum values up (``find --compounds``, ``plot overview``, ``report``, paper tables
from ``export``) leave flagged values out unless ``--include-flagged``. Parsing and rendering
only; what "flagged" means is decided in the library.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from typing import Any

import typer

from registry.errors import UsageError

FLAGGED = typer.Option(
    False, "--flagged", help="Only flagged measurements (an error finding nobody accepted)."
)
CLEAN = typer.Option(False, "--clean", help="Only clean measurements (no open error finding).")


def include_option(what: str) -> Any:
    """``--include-flagged`` for a command whose aggregates leave flagged values out."""
    return typer.Option(False, "--include-flagged", help=f"Include flagged values in {what}.")


#: how a flagged row is marked in a printed table
MARK = "yes"


def choice(flagged: bool, clean: bool) -> bool | None:
    """``--flagged`` → True, ``--clean`` → False, neither → None (both kinds of rows)."""
    if flagged and clean:
        raise UsageError("choose one of --flagged and --clean")
    return True if flagged else (False if clean else None)


def marked(rows: Sequence[Mapping[str, Any]]) -> list[dict[str, Any]]:
    """Rows for a printed table: ``flagged`` shows as ``yes`` or stays empty."""
    return [{**r, "flagged": MARK if r.get("flagged") else ""} for r in rows]
