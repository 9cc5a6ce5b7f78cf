"""Files a command writes: checked before anything happens, and written whole or not at all.

Every output (an export, a rejected-rows file, a simulated spectrum, a plot, a report page) goes
through :func:`check_target` before the work that produces it — and before any transaction that
would commit rows — and is written by :func:`write_atomically`: into a temporary file beside the
target, renamed into place only when complete. So a registry (or any SQLite database), a
symlink, a folder or an unwritable place is never overwritten, and a full disk leaves the
previous file as it was.
"""

from __future__ import annotations

import contextlib
import errno
import os
import tempfile
from collections.abc import Callable, Iterator
from pathlib import Path
from typing import IO, Any

from registry.errors import FluxledgerError, UsageError

SQLITE_MAGIC = b"SQLite format 3\x00"


class OutputError(FluxledgerError):
    """An output file could not be written (a full disk, a vanished folder …)."""

    exit_code = 1


def check_target(
    target: str | Path, *, what: str = "output", protect: Path | None = None, overwrite: bool = True
) -> Path:
    """The path an output may be written to, or a clear refusal.

    Refused: an empty name, a folder, a symlink (even a dangling one), a SQLite database (the
    registry ``protect`` above all), an existing file when ``overwrite`` is False, a folder
    that does not exist or cannot be written.
    """
    text = str(target)
    if not text.strip():
        raise UsageError(f"{what}: give a file name")
    path = Path(text).expanduser()
    if path.is_symlink():
        raise UsageError(f"{what} {path}: is a symbolic link; name the file itself")
    if path.is_dir():
        raise UsageError(f"{what} {path}: is a folder; name a file in it")
    resolved = path.resolve()
    if protect is not None and _same(resolved, protect):
        raise UsageError(f"{what} {path}: is the registry itself; choose another file")
    if path.exists():
        if _is_sqlite(path):
            raise UsageError(f"{what} {path}: is a SQLite database; choose another file")
        if not overwrite:
            raise UsageError(f"{what} {path}: exists; choose another name")
    folder = resolved.parent
    if not folder.is_dir():
        raise UsageError(f"{what} {path}: folder {folder} does not exist")
    if not os.access(folder, os.W_OK):
        raise UsageError(f"{what} {path}: folder {folder} is not writable")
    return path


def _same(a: Path, b: Path) -> bool:
    try:
        return a.exists() and b.exists() and os.path.samefile(a, b)
    except OSError:
        return a == b.resolve()


def _is_sqlite(path: Path) -> bool:
    try:
        with open(path, "rb") as handle:
            return handle.read(len(SQLITE_MAGIC)) == SQLITE_MAGIC
    except OSError:
        return False


@contextlib.contextmanager
def write_atomically(
    target: str | Path,
    mode: str = "w",
    *,
    encoding: str | None = "utf-8",
    newline: str | None = None,
) -> Iterator[IO[Any]]:
    """An open temporary file beside ``target``, renamed onto it when the block ends normally.

    On any error (a full disk included) the temporary file is removed and ``target`` keeps its
    previous content; an OS error becomes an :class:`OutputError` naming the file.
    """
    path = Path(target)
    binary = "b" in mode
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=path.parent)
    try:
        with os.fdopen(
            fd, mode, encoding=None if binary else encoding, newline=None if binary else newline
        ) as handle:
            yield handle
            handle.flush()
            os.fsync(handle.fileno())
        os.chmod(tmp, 0o644)
        os.replace(tmp, path)
    except OSError as exc:
        Path(tmp).unlink(missing_ok=True)
        raise OutputError(_explain(path, exc)) from exc
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise


def write_file(target: str | Path, produce: Callable[[Path], None]) -> None:
    """Let ``produce(temporary_path)`` write a file (e.g. a library that wants a path), then
    rename it onto ``target``; on any error ``target`` is left as it was."""
    path = Path(target)
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=path.suffix, dir=path.parent)
    os.close(fd)
    try:
        produce(Path(tmp))
        os.chmod(tmp, 0o644)
        os.replace(tmp, path)
    except OSError as exc:
        Path(tmp).unlink(missing_ok=True)
        raise OutputError(_explain(path, exc)) from exc
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise


def _explain(path: Path, exc: OSError) -> str:
    if exc.errno == errno.ENOSPC:
        return f"cannot write {path}: the disk is full; the previous file (if any) is unchanged"
    if exc.errno in (errno.EACCES, errno.EPERM, errno.EROFS):
        return f"cannot write {path}: permission denied"
    return f"cannot write {path}: {exc.strerror or exc}"
