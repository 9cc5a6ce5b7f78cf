"""What the global options chose (database, actor, debug), shared by every command group."""

from __future__ import annotations

import os
from dataclasses import dataclass

import typer

DEFAULT_DB = "fluxledger.sqlite"


@dataclass
class AppState:
    """Global options of one invocation; commands read their database and actor from here."""

    db: str
    actor: str | None = None
    debug: bool = False


def state(ctx: typer.Context) -> AppState:
    """The global options of this invocation (defaults when a group is invoked on its own)."""
    root = ctx.find_root().obj
    if not isinstance(root, AppState):
        root = AppState(db=os.environ.get("FLUXLEDGER_DB") or DEFAULT_DB)
    return root
