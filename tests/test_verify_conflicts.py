"""`fieldlog verify` counts sync conflict copies as problems (exit 1), naming each copy."""

from __future__ import annotations

import hashlib
import shutil
from pathlib import Path

import pytest

from fieldlog.cli import main
from fieldlog.sync.conflicts import conflicts_folder, copy_name


def test_conflict_copy_makes_verify_fail(
    sample_site: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    assert main(["verify", str(sample_site)]) == 0
    original = sorted((sample_site / "log").glob("*.toml"))[0]
    data = original.read_bytes() + b"\n# a different copy\n"
    folder = conflicts_folder(sample_site)
    folder.mkdir()
    name = copy_name(original.name, hashlib.sha256(data).hexdigest())
    shutil.copyfile(original, folder / name)
    capsys.readouterr()
    assert main(["verify", str(sample_site)]) == 1
    out = capsys.readouterr().out
    assert name in out and original.name in out and "1 sync conflict(s)" in out
