"""The layout holds: the CLI talks only to the api, nothing below the api imports it, modules
and functions stay readable in one sitting, and DEVELOPERS.md names what exists."""

from __future__ import annotations

import ast
import re
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
PACKAGE = ROOT / "registry"
#: a module may be longer than this, or a function longer than that, with a reason beside it
MODULE_LINES, FUNCTION_LINES = 500, 80
MODULE_REASON = re.compile(r"^# size: \S", re.M)
FUNCTION_REASON = "# long: "


def _modules() -> list[Path]:
    return sorted(p for p in PACKAGE.rglob("*.py") if "__pycache__" not in p.parts)


def _imported(path: Path) -> set[str]:
    """Every module an import statement in ``path`` names (also inside functions)."""
    names: set[str] = set()
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        if isinstance(node, ast.Import):
            names.update(alias.name for alias in node.names)
        elif isinstance(node, ast.ImportFrom) and node.module and node.level == 0:
            if node.module == "registry":  # from registry import api: the module named
                names.update(f"registry.{alias.name}" for alias in node.names)
            else:
                names.add(node.module)
    return names


def _dotted(path: Path) -> str:
    return ".".join(path.relative_to(ROOT).with_suffix("").parts).removesuffix(".__init__")


def test_the_cli_imports_only_the_api_the_errors_and_itself() -> None:
    allowed = ("registry.api", "registry.errors", "registry.cli")
    wrong = {
        _dotted(p): sorted(
            n for n in _imported(p) if n.startswith("registry") and not n.startswith(allowed)
        )
        for p in (PACKAGE / "cli").glob("*.py")
    }
    assert {k: v for k, v in wrong.items() if v} == {}


def test_nothing_below_the_api_imports_it() -> None:
    below = [p for p in _modules() if p.parent.name not in ("api", "cli")]
    wrong = [
        _dotted(p)
        for p in below
        if any(n == "registry.api" or n.startswith("registry.api.") for n in _imported(p))
        or "from registry import api" in p.read_text(encoding="utf-8")
    ]
    assert wrong == []


def test_modules_and_functions_are_readable_in_one_sitting() -> None:
    long_modules = []
    long_functions = []
    for path in _modules():
        text = path.read_text(encoding="utf-8")
        lines = text.splitlines()
        if len(lines) > MODULE_LINES and not MODULE_REASON.search(text):
            long_modules.append(f"{_dotted(path)} ({len(lines)} lines)")
        for node in ast.walk(ast.parse(text)):
            if not isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef)):
                continue
            length = (node.end_lineno or node.lineno) - node.lineno + 1
            body = "\n".join(lines[node.lineno - 1 : node.end_lineno])
            if length > FUNCTION_LINES and FUNCTION_REASON not in body:
                long_functions.append(f"{_dotted(path)}.{node.name} ({length} lines)")
    assert long_modules == []
    assert long_functions == []


def test_developers_guide_names_every_package_and_only_modules_that_exist() -> None:
    guide = (ROOT / "DEVELOPERS.md").read_text(encoding="utf-8")
    packages = sorted(
        _dotted(p.parent) for p in PACKAGE.rglob("__init__.py") if "_migrations" not in str(p)
    )
    unnamed = [
        name
        for name in packages
        if f"{name.replace('.', '/')}/" not in guide and f"`{name}`" not in guide
    ]
    assert unnamed == []
    named_paths = set(re.findall(r"\bregistry/[\w/]+\.py\b", guide))
    named_dotted = set(re.findall(r"\bregistry(?:\.[a-z_0-9]+)+", guide))
    missing = sorted(p for p in named_paths if not (ROOT / p).exists())
    missing += sorted(d for d in named_dotted if not _resolves(d))
    assert missing == []


def _resolves(dotted: str) -> bool:
    """A dotted name is a module or package of ours, or a name one defines or re-exports."""
    if dotted == "registry._migrations" or dotted.startswith("registry._migrations."):
        return (ROOT / "migrations").is_dir()  # the top-level folder, installed under this name
    parts = dotted.split(".")
    for cut in range(len(parts), 1, -1):
        base = ROOT.joinpath(*parts[:cut])
        source = (
            base.with_suffix(".py") if base.with_suffix(".py").exists() else base / "__init__.py"
        )
        if not source.exists():
            continue
        if cut == len(parts):
            return True
        name = re.escape(parts[cut])
        text = source.read_text(encoding="utf-8")
        defined = rf"^(?:def|class)\s+{name}\b|^{name}\b\s*[:=]|^\s+{name}\b\s*[:=]"
        exported = rf"^from \S+ import .*\b{name}\b|^\s+{name},$"
        return re.search(f"{defined}|{exported}", text, re.M) is not None
    return False
