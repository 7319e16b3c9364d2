"""Golden-file comparison shared by the tests of printed output.

The bytes of a printed report are a contract: a change shows up as a diff to read. To accept a
deliberate change, rerun the tests with ``FIELDLOG_UPDATE_GOLDEN=1`` and review ``git diff``.
"""

from __future__ import annotations

import os
from pathlib import Path

GOLDEN = Path(__file__).resolve().parent.parent / "golden"


def assert_golden(name: str, text: str) -> None:
    """Compare ``text`` with ``tests/golden/<name>``; rewrite it when updating is asked for."""
    path = GOLDEN / name
    if os.environ.get("FIELDLOG_UPDATE_GOLDEN") == "1":
        path.parent.mkdir(parents=True, exist_ok=True)
        path.write_bytes(text.encode("utf-8"))
        return
    assert path.exists(), f"{path} missing: run with FIELDLOG_UPDATE_GOLDEN=1 to create it"
    expected = path.read_bytes().decode("utf-8")
    assert text == expected, f"{name} changed; if intended, rerun with FIELDLOG_UPDATE_GOLDEN=1"
