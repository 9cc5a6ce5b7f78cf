"""The import/export code keeps to its layer: the storage layer below, the api above, the CLI on top."""

from __future__ import annotations

import ast
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent


def _imports(path: Path) -> set[str]:
    """Every module a file imports (at the top or inside functions)."""
    out: set[str] = set()
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        if isinstance(node, ast.Import):
            out.update(a.name for a in node.names)
        elif isinstance(node, ast.ImportFrom) and node.module:
            out.add(node.module)
            out.update(f"{node.module}.{a.name}" for a in node.names)
    return out


def test_io_uses_the_storage_layer_only() -> None:
    for path in sorted((ROOT / "registry" / "io").glob("*.py")):
        found = _imports(path)
        banned = {
            m
            for m in found
            if m.startswith(("sqlalchemy", "registry.api", "registry.storage.models"))
        }
        assert not banned, f"{path.name} imports {sorted(banned)}"


def test_io_commands_import_only_the_api_the_errors_and_the_cli() -> None:
    found = _imports(ROOT / "registry" / "cli" / "io_commands.py")
    ours = {m for m in found if m.startswith("registry")}
    allowed = ("registry.api", "registry.errors", "registry.cli")
    assert all(m.startswith(allowed) or m == "registry" for m in ours), sorted(ours)
    assert "registry" not in found or "registry.api" in found  # `from registry import api`


def test_importing_the_io_package_loads_nothing_heavy() -> None:
    import subprocess
    import sys

    code = (
        "import sys, registry.io, registry.api; "
        "print(','.join(m for m in ('pandas', 'pint', 'rdkit', 'sqlalchemy') if m in sys.modules))"
    )
    out = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, timeout=120, check=True
    )
    assert out.stdout.strip() == ""
