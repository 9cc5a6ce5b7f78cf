"""The search's cache files: named numpy arrays in one memory-mapped file, valid for one state.

The search keeps what is costly to rebuild in files beside a SQLite registry (``<db>.fpindex``,
``<db>.simindex``, ``<db>.listing``; for a server registry in the user cache directory, keyed by
its URL), so that a fresh ``fluxledger find`` process maps them instead of rebuilding them. Each
file records the registry :class:`~registry.storage.changes.State` it was built from: the
change counters that the schema's triggers keep (every update and delete, plain SQL included)
and the row count and largest id of each table it reads (new rows). A cache is used only when
the state it records equals the state read in the search's own transaction — exact, whoever
wrote. Files are written atomically (temporary file + rename), so a reader never sees half of
one; one a process has mapped is held (:func:`held`) while the state stays the same.
"""

from __future__ import annotations

import hashlib
import json
import mmap
import os
import tempfile
from collections.abc import Callable
from pathlib import Path
from typing import Any, TypeVar

import numpy as np

from registry.storage import changes
from registry.storage.connection import Connection
from registry.storage.database import Database

T = TypeVar("T")

_ALIGN = 64


def path_for(database: Database, suffix: str) -> Path | None:
    """``<db><suffix>`` beside a SQLite file; the user cache directory for a server registry;
    None for an in-memory registry (its caches live only in the process)."""
    if database.is_sqlite:
        return None if database.path is None else Path(f"{database.path}{suffix}")
    base = os.environ.get("FLUXLEDGER_CACHE_DIR") or os.environ.get("XDG_CACHE_HOME")
    root = Path(base) if base else Path.home() / ".cache"
    if not os.environ.get("FLUXLEDGER_CACHE_DIR"):
        root = root / "fluxledger"
    key = hashlib.sha256(database.url.encode("utf-8")).hexdigest()[:24]
    return root / f"{key}{suffix}"


def state_of(conn: Connection, counters: tuple[str, ...], tables: tuple[str, ...]) -> dict:
    """The registry state a cache depends on, as the JSON its file header keeps."""
    return changes.state(conn, counters, tables).as_json()


def save_arrays(
    path: Path, magic: bytes, header: dict[str, Any], arrays: dict[str, np.ndarray]
) -> None:
    """Write ``magic``, a JSON header (with the arrays' layout added) and the arrays, each
    aligned to 64 bytes so that they can be viewed in place once mapped."""
    layout: dict[str, Any] = {}
    offset = 0
    for name, arr in arrays.items():
        layout[name] = {"offset": offset, "dtype": arr.dtype.str, "shape": list(arr.shape)}
        offset += (arr.nbytes + _ALIGN - 1) // _ALIGN * _ALIGN
    text = json.dumps({**header, "arrays": layout}).encode("utf-8")
    head_len = (len(magic) + 8 + len(text) + _ALIGN - 1) // _ALIGN * _ALIGN
    path.parent.mkdir(parents=True, exist_ok=True)
    fd, tmp = tempfile.mkstemp(prefix=path.name + ".", suffix=".tmp", dir=path.parent)
    try:
        with os.fdopen(fd, "wb") as out:
            out.write(magic + np.uint64(head_len).tobytes() + text)
            out.write(b"\0" * (head_len - len(magic) - 8 - len(text)))
            for arr in arrays.values():
                data = np.ascontiguousarray(arr).tobytes()
                out.write(data)
                out.write(b"\0" * ((-len(data)) % _ALIGN))
        os.chmod(tmp, _file_mode(path))
        os.replace(tmp, path)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise


def _file_mode(path: Path) -> int:
    """Readable by whoever can read the registry beside it (mkstemp would make it 0600)."""
    registry_file = Path(str(path)[: -len(path.suffix)]) if path.suffix else path
    try:
        return registry_file.stat().st_mode & 0o666
    except OSError:
        return 0o644


def read_arrays(
    path: Path, magic: bytes, version: int
) -> tuple[dict[str, Any], dict[str, np.ndarray], mmap.mmap] | None:
    """Map a cache file: (header, arrays viewing the map, the map); None when the file is
    missing, damaged, or of another kind or format version."""
    try:
        with open(path, "rb") as handle:
            mapped = mmap.mmap(handle.fileno(), 0, access=mmap.ACCESS_READ)
    except (OSError, ValueError):
        return None
    try:
        if mapped[: len(magic)] != magic:
            return None
        start = len(magic)
        head_len = int(np.frombuffer(mapped[start : start + 8], dtype=np.uint64)[0])
        header = json.loads(bytes(mapped[start + 8 : head_len]).rstrip(b"\0"))
        if header.get("format") != version:
            return None
        arrays = {}
        for name, spec in header["arrays"].items():
            dtype = np.dtype(spec["dtype"])
            count = int(np.prod(spec["shape"])) if spec["shape"] else 0
            arrays[name] = np.frombuffer(
                mapped, dtype=dtype, count=count, offset=head_len + spec["offset"]
            ).reshape(spec["shape"])
    except (ValueError, KeyError, TypeError, json.JSONDecodeError, IndexError):
        return None
    return header, arrays, mapped


def write_or_note(save: Callable[[], None], path: Path, what: str, notes: list[str]) -> bool:
    """Run ``save()``; a cache that cannot be written (a read-only folder) is no error, only a
    note that the search shows. True when written."""
    try:
        save()
    except OSError as exc:
        notes.append(f"could not write the {what} {path}: {exc.strerror or exc}")
        return False
    return True


def drop(path: Path | None) -> bool:
    """Delete a cache file; True if there was one."""
    if path is None:
        return False
    existed = path.exists()
    path.unlink(missing_ok=True)
    return existed


# ---------------------------------------------------------------- held in this process

#: caches this process has loaded: (registry key, kind) → (the state they are valid for, cache)
_HELD: dict[tuple[str, str], tuple[dict, Any]] = {}


def held(key: tuple[str, str], state: dict) -> Any:
    """The cache this process holds under ``key`` if it was valid for exactly ``state``."""
    found = _HELD.get(key)
    return found[1] if found is not None and found[0] == state else None


def hold(key: tuple[str, str], state: dict, cache: T) -> T:
    """Keep ``cache`` in this process for ``state`` (replacing what was held under ``key``)."""
    _HELD[key] = (state, cache)
    return cache


def forget() -> None:
    """Drop everything held in this process (as in a new process; tests use it)."""
    _HELD.clear()
