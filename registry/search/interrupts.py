"""A search stops whole or not at all: its time limit, and Ctrl-C while RDKit confirms.

RDKit's threaded matching (``SubstructLibrary.GetMatches``) installs a SIGINT handler of its
own while it runs. A Ctrl-C it catches makes it give up on the molecules being matched at that
moment and return the others as if they were every hit, with no more than a logged warning —
a search the user meant to stop would print a list that silently lacks hits. So each call into
it is wrapped in :func:`rdkit_matching`:

* SIGINT is blocked in the calling thread, and so in the threads RDKit starts for the call
  (they inherit the mask); it stays pending and is delivered, as ``KeyboardInterrupt``, once
  the call has returned and Python's handler is back in place;
* a thread started earlier (numpy's BLAS starts one on import) does not block it and may take
  the signal into RDKit's handler instead: RDKit's warning is routed to this module while the
  call runs, and its "interrupted" raises ``KeyboardInterrupt`` — the partial hits are dropped.
"""

from __future__ import annotations

import logging
import signal
import threading
import time
from collections.abc import Iterator
from contextlib import contextmanager
from contextvars import ContextVar

from registry.errors import FluxledgerError, UsageError

#: (monotonic deadline, the seconds asked for) of the searches in this context
_deadline: ContextVar[tuple[float, float] | None] = ContextVar("search_deadline", default=None)


class SearchTimeLimit(FluxledgerError):
    """The search ran past the time limit given; nothing was returned."""

    exit_code = 1


@contextmanager
def time_limit(seconds: float | None) -> Iterator[None]:
    """Searches inside this block stop (with :class:`SearchTimeLimit`) after ``seconds``."""
    if seconds is not None and not (0 < seconds < float("inf")):
        raise UsageError(f"time_limit {seconds!r}: give a positive number of seconds")
    token = _deadline.set(None if seconds is None else (time.monotonic() + seconds, seconds))
    try:
        yield
    finally:
        _deadline.reset(token)


def check_deadline() -> None:
    """Raise :class:`SearchTimeLimit` once the time limit of this context has passed."""
    limit = _deadline.get()
    if limit is not None and time.monotonic() > limit[0]:
        raise SearchTimeLimit(
            f"the search stopped at its time limit ({limit[1]:g} s) before every candidate was "
            "confirmed; a more specific pattern, or filters, narrow it"
        )


class _InterruptSeen(logging.Handler):
    """Notes RDKit's warning that a matching was interrupted (and swallows RDKit's log)."""

    def __init__(self) -> None:
        super().__init__(logging.WARNING)
        self.seen = False

    def emit(self, record: logging.LogRecord) -> None:
        if "interrupted" in record.getMessage():
            self.seen = True


@contextmanager
def rdkit_matching() -> Iterator[None]:
    """Around one threaded RDKit matching call: a Ctrl-C ends the search instead of thinning
    it (module docstring). Outside the main thread (no signals there) it does nothing."""
    if threading.current_thread() is not threading.main_thread() or not hasattr(
        signal, "pthread_sigmask"
    ):
        yield
        return
    from rdkit import rdBase

    handler = signal.getsignal(signal.SIGINT)
    listener = _InterruptSeen()
    logger = logging.getLogger("rdkit")
    propagate = logger.propagate
    logger.addHandler(listener)
    logger.propagate = False
    rdBase.LogToPythonLogger()
    rdBase.EnableLog("rdApp.warning")
    previous = signal.pthread_sigmask(signal.SIG_BLOCK, {signal.SIGINT})
    try:
        yield
    finally:
        rdBase.DisableLog("rdApp.warning")
        rdBase.LogToPythonStderr()  # what the pattern parser captures its errors from
        logger.removeHandler(listener)
        logger.propagate = propagate
        # RDKit's threads install and restore its handler each and can leave it in place:
        # put Python's back before the held signal is delivered
        signal.signal(signal.SIGINT, handler)
        signal.pthread_sigmask(signal.SIG_SETMASK, previous)
    if listener.seen:
        raise KeyboardInterrupt
