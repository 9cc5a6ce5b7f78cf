"""Shared fixtures: registries on real temporary SQLite files, engines disposed after each test."""

from __future__ import annotations

import os
import shutil
from collections.abc import Iterator
from pathlib import Path

import pytest
from typer.testing import CliRunner

from registry import api
from registry.storage.database import Database

os.environ.setdefault("FLUXLEDGER_USER", "tester")
os.environ.setdefault("OPENBLAS_NUM_THREADS", "1")

_OPEN: list[Database] = []


@pytest.fixture(scope="session")
def _template_registry(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """One registry made by ``init`` (all migrations) per session; tests get copies of it."""
    path = tmp_path_factory.mktemp("template") / "registry.sqlite"
    api.init_registry(str(path))
    return path


@pytest.fixture
def db_path(tmp_path: Path, _template_registry: Path) -> Path:
    """A freshly initialised registry file (a copy of the session's template: the same bytes
    ``init`` writes, without running every migration again for each test)."""
    path = tmp_path / "registry.sqlite"
    shutil.copyfile(_template_registry, path)
    return path


@pytest.fixture
def database(db_path: Path) -> Iterator[Database]:
    """An open registry on a real temporary file."""
    handle = api.open_registry(str(db_path))
    _OPEN.append(handle)
    yield handle


@pytest.fixture(autouse=True)
def _dispose_engines() -> Iterator[None]:
    yield
    while _OPEN:
        _OPEN.pop().dispose()


@pytest.fixture
def runner() -> CliRunner:
    return CliRunner()


@pytest.fixture
def cli(runner: CliRunner, db_path: Path):  # type: ignore[no-untyped-def]
    """Run ``fluxledger --db <temp registry> ARGS``; returns the typer Result (stdout, stderr apart)."""
    from registry.cli.main import app

    def invoke(*args: str, input: str | None = None):  # type: ignore[no-untyped-def]
        return runner.invoke(app, ["--db", str(db_path), *args], input=input)

    return invoke
