"""What the global options chose (database, actor, debug), shared by every command group."""

from __future__ import annotations

import os
from dataclasses import dataclass
from typing import Any

import typer
from typer.core import TyperGroup

from registry import api
from registry.errors import FluxledgerError

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


class ErrorBoundaryGroup(TyperGroup):
    """Turn a :class:`FluxledgerError` below into ``error: …`` on stderr and its exit code.

    The main app uses it, and so do the command groups that may also be run on their own, so a
    user error never shows a traceback however the group is invoked. ``--debug`` re-raises.
    """

    def invoke(self, ctx: typer.Context) -> Any:
        try:
            return super().invoke(ctx)
        except FluxledgerError as exc:
            root = ctx.find_root().obj
            if isinstance(root, AppState) and root.debug:
                raise
            typer.echo(f"error: {exc}", err=True)
            ctx.exit(exc.exit_code)
        except KeyboardInterrupt:
            typer.echo("interrupted; nothing half-written was kept", err=True)
            ctx.exit(130)


def read_id(text: str, what: str = "measurement") -> int:
    """An id as typed: a whole number from 1 up (:func:`registry.api.as_id`), or a usage error."""
    return api.as_id(text, what)
