"""Cache files beside a registry: named numpy arrays in one memory-mapped file, and a note of
the registry file's state at which a cache was last found current.

The search keeps two such caches (the screening index, :mod:`.index`, and the measurement
listing, :mod:`.listing`) so that a fresh ``fluxledger find`` process maps them instead of
rebuilding them. Both are written atomically (temporary file + rename: a reader never sees half
a file) and both skip their signature query when the SQLite file and its WAL look exactly as
they did when the cache was last checked.
"""

from __future__ import annotations

import json
import mmap
import os
import tempfile
from pathlib import Path
from typing import Any

import numpy as np

_ALIGN = 64


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


# ---------------------------------------------------------------- registry file state


def file_state(database: Any) -> tuple[int, ...] | None:
    """Size and mtime of a SQLite registry and its WAL: any commit changes one of them.

    Lets a search skip a cache's signature query while nothing was written; None for server
    databases (always checked).
    """
    if not database.is_sqlite or database.path is None or str(database.path) == ":memory:":
        return None
    state: list[int] = []
    for suffix in ("", "-wal"):
        try:
            st = os.stat(f"{database.path}{suffix}")
        except OSError:
            st = None
        if st is None or (suffix and st.st_size == 0):
            # an empty WAL holds nothing: every opening connection creates one afresh (new
            # inode and time) and the last one to close deletes it, so counting it would make
            # each new process re-check the signature; emptying a WAL that held commits means
            # a checkpoint wrote them into the main file, whose size or time then changed
            state += [-1, -1, -1]
        else:
            state += [st.st_size, st.st_mtime_ns, st.st_ino]
    return tuple(state)


def state_with_cache(database: Any, path: Path) -> tuple[int, ...] | None:
    """:func:`file_state` plus the cache file's own size, time and inode."""
    state = file_state(database)
    if state is None:
        return None
    try:
        st = path.stat()
        return (*state, st.st_size, st.st_mtime_ns, st.st_ino)
    except OSError:
        return (*state, -1, -1, -1)


def _state_path(path: Path) -> Path:
    return Path(f"{path}.state")


def state_matches(path: Path, state: tuple[int, ...], signature: dict[str, Any]) -> bool:
    """Was the cache last found current while the registry file looked exactly like now?"""
    try:
        seen = json.loads(_state_path(path).read_text(encoding="utf-8"))
    except (OSError, ValueError):
        return False
    return seen.get("file_state") == list(state) and seen.get("signature") == signature


def remember_state(path: Path, state: tuple[int, ...] | None, signature: dict[str, Any]) -> None:
    """Note the registry file state at which the signature was last checked (best effort)."""
    if state is None:
        return
    target = _state_path(path)
    try:
        tmp = target.with_name(target.name + f".{os.getpid()}.tmp")
        tmp.write_text(json.dumps({"file_state": list(state), "signature": signature}))
        os.replace(tmp, target)
    except OSError:
        pass


def drop(path: Path) -> bool:
    """Delete a cache file and its state note; True if there was a cache file."""
    existed = path.exists()
    path.unlink(missing_ok=True)
    _state_path(path).unlink(missing_ok=True)
    return existed
