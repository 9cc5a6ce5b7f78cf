"""The ``fluxledger`` command: global options, the error boundary, and the mounted command groups.

Commands only parse, call :mod:`registry.api` and render. Heavy libraries are imported
inside command bodies so that ``fluxledger --help`` starts fast.
"""

from __future__ import annotations

import os
import sys
from typing import Any

import typer

from registry.cli.context import DEFAULT_DB, AppState, ErrorBoundaryGroup


class BoundaryGroup(ErrorBoundaryGroup):
    """The main app's boundary: user errors as ``error: …``, plus database warnings once."""

    def main(self, args: Any = None, *rest: Any, **kwargs: Any) -> Any:
        """Refuse arguments that are not text before anything reads them (a byte sequence that
        is not UTF-8 reaches Python as lone surrogates, which no file or database can take)."""
        given = list(sys.argv[1:] if args is None else args)
        bad = next((a for a in given if isinstance(a, str) and _undecodable(a)), None)
        if bad is not None:
            shown = bad.encode("utf-8", "surrogateescape").decode("utf-8", "replace")
            typer.echo(
                f"error: argument {shown!r} is not valid UTF-8 text; set the terminal (or the "
                "script) to UTF-8, or retype the characters shown as �",
                err=True,
            )
            sys.exit(2)
        return super().main(args, *rest, **kwargs)

    def invoke(self, ctx: typer.Context) -> Any:
        _print_database_warnings(discard=True)  # left over from an earlier in-process call
        try:
            return super().invoke(ctx)
        finally:
            _print_database_warnings()


def _undecodable(text: str) -> bool:
    return any("\udc80" <= ch <= "\udcff" for ch in text)


def _print_database_warnings(discard: bool = False) -> None:
    """Each warning about an opened database (e.g. on a network file system) once, on stderr."""
    api = sys.modules.get("registry.api")  # not imported: no database was opened
    if api is not None:
        for warning in api.take_warnings():
            if not discard:
                typer.echo(f"warning: {warning}", err=True)


app = typer.Typer(
    cls=BoundaryGroup,
    no_args_is_help=True,
    pretty_exceptions_show_locals=False,
    add_completion=False,
    help="fluxledger: a shared registry of measured barriers of dynamic molecular processes.",
)


@app.callback()
def main(
    ctx: typer.Context,
    db: str = typer.Option(
        None,
        "--db",
        envvar="FLUXLEDGER_DB",
        help="Database: a SQLite file path or a SQLAlchemy URL. Default ./fluxledger.sqlite.",
    ),
    actor: str = typer.Option(
        None, "--as", help="Name recorded in the history (default: the OS user)."
    ),
    debug: bool = typer.Option(False, "--debug", help="Show tracebacks for user errors too."),
) -> None:
    """fluxledger: a shared registry of measured barriers of dynamic molecular processes."""
    ctx.obj = AppState(
        db=db or os.environ.get("FLUXLEDGER_DB") or DEFAULT_DB, actor=actor, debug=debug
    )


def _mount() -> None:
    """Attach the command groups; each lives in its own module under ``registry.cli``."""
    from registry.cli import commands_core

    commands_core.register(app)
    for name in _GROUPS:
        module = __import__(f"registry.cli.{name}", fromlist=["app", "register"])
        if hasattr(module, "register"):
            module.register(app)
        else:
            app.add_typer(module.app, name=getattr(module, "NAME", name))


#: command-group modules; each has ``register(app)`` (top-level commands) or ``app`` (+ ``NAME``)
_GROUPS: tuple[str, ...] = (
    "io_commands",
    "check",
    "find",
    "history",
    "maintenance",
    "calc",
    "compare",
    "estimate",
    "lineshape",
    "plot",
    "report",
    "pg",
    "vocabulary",
)

_mount()


def run() -> None:
    """Console-script entry point."""
    # One BLAS thread: OpenBLAS's extra threads only busy-wait in our fits (half the CPU for
    # the same wall time, benchmarks/bench_lineshape.py), and a thread that does not block
    # SIGINT can hand a Ctrl-C to RDKit's own handler (see registry.search.interrupts)
    os.environ.setdefault("OPENBLAS_NUM_THREADS", "1")
    sys.exit(app(prog_name="fluxledger"))
