"""Checks on a registry's files that need neither SQLAlchemy nor Alembic (fast to import).

Both the full store (:mod:`registry.storage.database`, :mod:`registry.storage.migrate`) and the plain-``sqlite3``
search path (:mod:`registry.search.sqlite_read`) use these, so one copy gives both the same
answer and the same wording.
"""

from __future__ import annotations

import re
from functools import cache
from pathlib import Path

_REVISION_RE = re.compile(r"^revision(?::\s*str)?\s*=\s*[\"']([^\"']+)[\"']", re.M)
_DOWN_RE = re.compile(r"^down_revision(?::[^=]+)?=\s*(?:None|[\"']([^\"']+)[\"'])", re.M)

_NETWORK_FS = ("nfs", "cifs", "smb", "fuse.sshfs", "9p", "afs", "ceph", "glusterfs", "lustre")


def script_location() -> str:
    """Where the migration scripts are, installed or in a checkout.

    A source checkout's own scripts win (its ``pyproject.toml`` beside ``migrations/``): an
    editable install maps ``registry._migrations`` to the tree it was installed from, which
    is not the tree a second working copy runs from.
    """
    root = Path(__file__).resolve().parents[2]
    if (root / "pyproject.toml").is_file() and (root / "migrations" / "versions").is_dir():
        return str(root / "migrations")
    try:
        import registry._migrations as pkg  # type: ignore[import-not-found]

        return str(Path(pkg.__file__).parent)
    except ImportError:
        return str(Path(__file__).resolve().parents[2] / "migrations")


@cache
def scripts_head() -> str | None:
    """The newest revision, read from the scripts' own ``revision``/``down_revision`` lines.

    Opening a registry checks its schema against this on every command; reading the small
    scripts as text avoids loading Alembic. None when the scripts do not have exactly one head
    (branches, or none at all): Alembic must decide then.
    """
    revisions: set[str] = set()
    parents: set[str] = set()
    for script in (Path(script_location()) / "versions").glob("*.py"):
        body = script.read_text(encoding="utf-8")
        rev = _REVISION_RE.search(body)
        if not rev:
            continue
        revisions.add(rev.group(1))
        down = _DOWN_RE.search(body)
        if down and down.group(1):
            parents.add(down.group(1))
    heads = sorted(revisions - parents)
    return heads[0] if len(heads) == 1 else None


def mount_fstype(path: Path, mounts_text: str) -> str:
    """The file-system type of the mount holding ``path`` (longest mount point that contains it)."""
    target = path.resolve()
    best_len, fstype = -1, ""
    for line in mounts_text.splitlines():
        parts = line.split()
        if len(parts) < 3:
            continue
        mount_point = parts[1].replace("\\040", " ")  # /proc/mounts escapes spaces
        mount = Path(mount_point)
        if (target == mount or mount in target.parents) and len(mount_point) > best_len:
            best_len, fstype = len(mount_point), parts[2]
    return fstype


def network_fs_warning(path: Path, mounts_file: str = "/proc/mounts") -> str | None:
    """SQLite's locking is unreliable on NFS/SMB; say so rather than risk a corrupt file."""
    try:
        with open(mounts_file, encoding="utf-8") as mounts:
            fstype = mount_fstype(path.parent, mounts.read())
    except OSError:
        return None
    if fstype.startswith(_NETWORK_FS):
        return (
            f"the registry file is on a network file system ({fstype}) where SQLite's locking is "
            "unreliable; keep it on a local disk or move the registry to a PostgreSQL server"
        )
    return None
