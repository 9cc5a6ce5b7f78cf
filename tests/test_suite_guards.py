"""The suite cannot hang CI: every test runs under a time limit that really ends it."""

from __future__ import annotations

import subprocess
import sys
import tomllib
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent


def test_every_test_has_a_time_limit() -> None:
    options = tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))
    pytest_options = options["tool"]["pytest"]["ini_options"]
    assert 0 < int(pytest_options["timeout"]) <= 600
    assert "pytest-timeout" in " ".join(options["project"]["optional-dependencies"]["dev"])


def test_the_time_limit_ends_a_test_that_would_hang(tmp_path: Path) -> None:
    (tmp_path / "test_hang.py").write_text(
        "import threading\n\ndef test_waits_for_ever():\n    threading.Event().wait()\n",
        encoding="utf-8",
    )
    done = subprocess.run(
        [sys.executable, "-m", "pytest", "-p", "no:cacheprovider", "-q", "--timeout=2",
         str(tmp_path / "test_hang.py")],
        capture_output=True, text=True, timeout=120, cwd=tmp_path,
    )  # fmt: skip
    assert done.returncode == 1, done.stdout
    assert "Timeout" in done.stdout
