"""Files a command writes: checked before anything happens, and written whole or not at all.

Every output (an export, a rejected-rows file, a simulated spectrum, a plot, a report page, a
backup) goes through :func:`check_target` before the work that produces it — and before any
transaction that would commit rows — and is written by :func:`write_atomically` or
:func:`write_file`: into a temporary file beside the target, renamed into place only when
complete. So a registry (or any SQLite database), a symlink, a folder, a device or an
unwritable place is never overwritten, and a full disk leaves the previous file as it was.

Stored values an output cannot show as they are — numbers that are not finite (written into a
registry behind fluxledger's back) and texts with control characters — are found by
:class:`OddValues`, which words the note the command prints.
"""

from __future__ import annotations

import contextlib
import errno
import math
import os
import re
import stat
import tempfile
from collections.abc import Callable, Iterator, Mapping, Sequence
from dataclasses import dataclass, field
from pathlib import Path
from typing import IO, Any

from registry.errors import FluxledgerError, UsageError

SQLITE_MAGIC = b"SQLite format 3\x00"

#: files SQLite keeps beside a database; writing one of them damages the database too
SQLITE_COMPANIONS = ("-wal", "-shm", "-journal")


class OutputError(FluxledgerError):
    """An output file could not be written (a full disk, a vanished folder …)."""

    exit_code = 1


def check_target(
    target: str | Path,
    *,
    what: str = "output",
    protect: Path | None = None,
    inputs: Sequence[str | Path] = (),
    overwrite: bool = True,
    database_output: bool = False,
) -> Path:
    """The path an output may be written to, or a clear refusal (a :class:`UsageError`).

    Refused: an empty name, a folder, a symlink (even a dangling one: it would be followed
    or replaced), the registry ``protect`` and the files SQLite keeps beside it, a file the
    command reads (``inputs``), anything but a regular file (a device, a pipe), a SQLite
    database (unless the output is one: ``database_output``, a backup), an existing file when
    ``overwrite`` is False, a folder that does not exist or cannot be written.
    """
    text = str(target)
    if not text.strip():
        raise UsageError(f"{what}: give a file name")
    path = Path(text).expanduser()
    if path.is_symlink():
        raise UsageError(
            f"{what} {path}: is a symbolic link (fluxledger never writes through a link); "
            "remove the link or choose another name"
        )
    if path.is_dir():
        raise UsageError(f"{what} {path}: is a folder; name a file in it")
    if protect is not None:
        if _same(path, protect):
            raise UsageError(f"{what} {path}: is the registry itself; choose another file")
        if any(_same(path, Path(f"{protect}{end}")) for end in SQLITE_COMPANIONS):
            raise UsageError(
                f"{what} {path}: SQLite keeps this file beside the registry; choose another file"
            )
    if any(_same(path, Path(source)) for source in inputs):
        raise UsageError(f"{what} {path}: is a file this command reads; choose another file")
    if path.exists():
        _check_existing(path, what=what, overwrite=overwrite, database_output=database_output)
    folder = path.resolve().parent
    if not folder.is_dir():
        state = "is not a folder" if folder.exists() else "does not exist"
        raise UsageError(f"{what} {path}: folder {folder} {state}")
    if not os.access(folder, os.W_OK):
        raise UsageError(f"{what} {path}: folder {folder} is not writable")
    return path


def _check_existing(path: Path, *, what: str, overwrite: bool, database_output: bool) -> None:
    if not stat.S_ISREG(path.stat().st_mode):
        raise UsageError(f"{what} {path}: is not a regular file (a device, pipe or socket)")
    if _is_sqlite(path) and not database_output:
        raise UsageError(f"{what} {path}: is a SQLite database; choose another file")
    if not overwrite:
        raise UsageError(
            f"{what} {path}: exists; choose another name, or allow replacing it (overwrite)"
        )


def _same(a: Path, b: Path) -> bool:
    """Whether two names mean one file: the same file (hard links too) or the same place."""
    with contextlib.suppress(OSError):
        if a.exists() and b.exists():
            return os.path.samefile(a, b)
    return a.expanduser().resolve() == b.expanduser().resolve()


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
    fd, tmp = _temporary(path, ".tmp")
    try:
        with os.fdopen(
            fd, mode, encoding=None if binary else encoding, newline=None if binary else newline
        ) as handle:
            yield handle
            handle.flush()
            os.fsync(handle.fileno())
        _put_in_place(tmp, path)
    except OSError as exc:
        Path(tmp).unlink(missing_ok=True)
        raise OutputError(explain(path, exc)) from exc
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise


def write_file(target: str | Path, produce: Callable[[Path], Any]) -> None:
    """Let ``produce(temporary_path)`` write a file (a library that wants a path: matplotlib,
    openpyxl, SQLite's backup), then rename it onto ``target``; on any error ``target`` is
    left as it was. The temporary file keeps the target's suffix, which some libraries read."""
    path = Path(target)
    fd, tmp = _temporary(path, path.suffix)
    os.close(fd)
    try:
        produce(Path(tmp))
        _fsync(tmp)
        _put_in_place(tmp, path)
    except OSError as exc:
        Path(tmp).unlink(missing_ok=True)
        raise OutputError(explain(path, exc)) from exc
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise


def _temporary(path: Path, suffix: str) -> tuple[int, str]:
    """A new file beside ``path`` (the same file system, so the rename is atomic)."""
    try:
        return tempfile.mkstemp(prefix=f".{path.name[:80]}.", suffix=suffix, dir=path.parent)
    except OSError as exc:
        raise OutputError(explain(path, exc)) from exc


def _put_in_place(tmp: str, path: Path) -> None:
    os.chmod(tmp, 0o644)
    os.replace(tmp, path)  # replaces a symlink put there meanwhile; never follows it
    with contextlib.suppress(OSError):  # not every platform can sync a folder
        _fsync(path.parent)


def _fsync(path: str | Path) -> None:
    fd = os.open(path, os.O_RDONLY)
    try:
        os.fsync(fd)
    finally:
        os.close(fd)


def make_folder(path: Path, *, what: str = "output") -> Path:
    """Create the folder ``path`` (and its parents) unless it is there; a clear error if not."""
    try:
        path.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        if exc.errno in (errno.ENOTDIR, errno.EEXIST, errno.EACCES, errno.EPERM, errno.EROFS):
            raise UsageError(f"{what} {path}: cannot create the folder: {exc.strerror}") from exc
        raise OutputError(explain(path, exc)) from exc
    return path


def explain(path: Path, exc: OSError) -> str:
    """What went wrong writing ``path``, in a user's words (a full disk says so)."""
    if exc.errno in (errno.ENOSPC, errno.EDQUOT):
        return f"cannot write {path}: the disk is full; the previous file (if any) is unchanged"
    if exc.errno in (errno.EACCES, errno.EPERM, errno.EROFS):
        return f"cannot write {path}: permission denied"
    return f"cannot write {path}: {exc.strerror or exc}"


# --- stored values an output cannot show as they are ------------------------------------------

#: characters XML 1.0 cannot hold (C0 controls but tab, LF and CR; U+FFFE, U+FFFF): a workbook
#: cannot carry them as they are, a page shows them as nothing, LaTeX stops at them
CONTROL_CHARACTERS = re.compile("[\x00-\x08\x0b\x0c\x0e-\x1f\ufffe\uffff]")


def visible_controls(text: str) -> str:
    """Each control character as its Unicode control picture (``\\x01`` → ``␁``), for pages a
    person reads: the stray character shows where it is instead of hiding."""
    return CONTROL_CHARACTERS.sub(_picture, text)


def _picture(match: re.Match[str]) -> str:
    code = ord(match.group())
    return chr(0x2400 + code) if code < 0x20 else "\ufffd"


def without_controls(text: str) -> str:
    """The text without control characters (for a table in a paper, which must compile)."""
    return CONTROL_CHARACTERS.sub("", text)


def not_finite(value: Any) -> bool:
    """A float that is inf or nan (None and texts are not)."""
    return isinstance(value, float) and not math.isfinite(value)


@dataclass
class OddValues:
    """Where an output met stored values it cannot show as they are (``'measurement 3:
    dg_kj_mol'``), and the notes that say what was done with them."""

    not_finite: list[str] = field(default_factory=list)
    controls: list[str] = field(default_factory=list)

    def scan(self, values: Mapping[str, Any], where: str) -> None:
        """Note every non-finite number and every text with control characters in ``values``."""
        for key, value in values.items():
            if not_finite(value):
                self.not_finite.append(f"{where}: {key}")
            elif isinstance(value, str) and CONTROL_CHARACTERS.search(value):
                self.controls.append(f"{where}: {key}")

    def notes(self, numbers: str, texts: str) -> list[str]:
        """One note per kind met: how many, where first, and what the output did with them
        (``numbers``, ``texts``)."""
        notes = []
        if self.not_finite:
            notes.append(
                f"{len(self.not_finite)} stored number(s) are not finite (inf or nan; "
                f"{_first(self.not_finite)}): {numbers}; 'fluxledger verify' lists them"
            )
        if self.controls:
            notes.append(
                f"{len(self.controls)} text(s) hold control characters ({_first(self.controls)})"
                f": {texts}"
            )
        return notes


def _first(places: Sequence[str], shown: int = 3) -> str:
    more = ", …" if len(places) > shown else ""
    return ", ".join(places[:shown]) + more
