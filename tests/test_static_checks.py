"""The code stays lint-clean and type-checks: both are part of the normal run, so CI gates them.

ruff takes milliseconds; mypy about 8 s from a cold cache (the cache goes to a temp folder so
the run never writes into the checkout).
"""

from __future__ import annotations

import shutil
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent


def _tool(name: str) -> str:
    path = shutil.which(name, path=str(Path(sys.executable).parent))
    if path is None:
        pytest.fail(f"{name} is not installed: pip install -e '.[test]'")
    return path


def test_ruff_is_clean() -> None:
    proc = subprocess.run(
        [_tool("ruff"), "check", "fieldlog", "tests", "sample_sites"],
        cwd=ROOT,
        capture_output=True,
        text=True,
    )
    assert proc.returncode == 0, proc.stdout + proc.stderr


def test_ruff_format_is_applied() -> None:
    """One layout for every file (`ruff format fieldlog tests sample_sites` rewrites it)."""
    proc = subprocess.run(
        [_tool("ruff"), "format", "--check", "fieldlog", "tests", "sample_sites"],
        cwd=ROOT,
        capture_output=True,
        text=True,
    )
    assert proc.returncode == 0, proc.stdout + proc.stderr


def test_mypy_is_clean(tmp_path: Path) -> None:
    proc = subprocess.run(
        [_tool("mypy"), "fieldlog", "--cache-dir", str(tmp_path)],
        cwd=ROOT,
        capture_output=True,
        text=True,
    )
    assert proc.returncode == 0, proc.stdout + proc.stderr
