"""Shared pieces for the journal tests (this module holds no tests of its own).

A small invented site (groundworks for a pump house) is written to a temporary folder; entries
are recorded through :func:`fieldlog.journal.record_entry` with a fixed device, author and
clock, so every file these tests write is byte-for-byte reproducible. ``FIELDLOG_HOME`` points
at a temporary folder so no test ever touches the real device id.
"""

from __future__ import annotations

import os
import subprocess
import sys
from datetime import UTC, date, datetime, timedelta
from pathlib import Path

from fieldlog.journal import Entry, record_entry
from fieldlog.site.files import load_site

SITE_TOML = """\
[site]
name = "Pump house groundworks (test site)"
start = 2026-09-07
finish_by = 2026-10-16
calendar = "weekdays"

[calendars.weekdays]
workdays = ["mon", "tue", "wed", "thu", "fri"]

[calendars.allweek]
workdays = ["mon", "tue", "wed", "thu", "fri", "sat", "sun"]

[crews.groundworks]
available = 6
"""

SCHEDULE_TOML = """\
revision = 3

[[activity]]
id = "EXC-010"
name = "Excavate base"
duration = 4

[[activity]]
id = "BLD-010"
name = "Blinding and rebar"
duration = 3
after = ["EXC-010"]

[[activity]]
id = "CON-010"
name = "Pour base slab"
duration = 1
after = ["BLD-010"]

[[activity]]
id = "CUR-010"
name = "Cure base slab"
duration = 7
calendar = "allweek"
after = ["CON-010"]

[[activity]]
id = "WAL-010"
name = "Wall formwork and pour"
duration = 6
after = ["CUR-010"]

[[activity]]
id = "BFL-010"
name = "Backfill and compact"
duration = 3
after = ["WAL-010"]
"""

DEVICE = "test-laptop-1"
OTHER = "test-tablet-2"
AUTHOR = "P. Tester"
TODAY = date(2026, 9, 25)
ROOT = Path(__file__).resolve().parents[2]


def make_site(folder: Path) -> Path:
    """Write the test site into ``folder`` (created) and return it."""
    folder.mkdir(parents=True, exist_ok=True)
    (folder / "site.toml").write_text(SITE_TOML, encoding="utf-8")
    (folder / "schedule.toml").write_text(SCHEDULE_TOML, encoding="utf-8")
    return folder


class FixedClock:
    """A clock that moves one minute per call from a fixed start (reproducible stamps)."""

    def __init__(self, start: datetime | None = None) -> None:
        self.now = start or datetime(2026, 9, 7, 16, 0, tzinfo=UTC)

    def __call__(self) -> datetime:
        self.now += timedelta(minutes=1)
        return self.now


def rec(
    folder: Path,
    kind: str,
    day: date | None,
    device: str = DEVICE,
    clock=None,
    today: date = TODAY,
    **fields,
) -> Entry:
    """Record one entry on the test site the way the app does."""
    site = load_site(folder)
    return record_entry(
        folder,
        site,
        kind,
        day,
        fields,
        today=today,
        author=AUTHOR,
        device=device,
        clock=clock or FixedClock(),
    )


def run_cli(*args: str, home: Path, timeout: float = 30) -> subprocess.CompletedProcess:
    """Run ``python -m fieldlog ARGS`` with ``FIELDLOG_HOME=home``."""
    env = {**os.environ, "FIELDLOG_HOME": str(home)}
    return subprocess.run(
        [sys.executable, "-m", "fieldlog", *args],
        capture_output=True,
        text=True,
        env=env,
        cwd=ROOT,
        timeout=timeout,
    )


def log_bytes(folder: Path) -> dict[str, bytes]:
    """Every journal file of the site (working files excepted), name -> bytes."""
    log = folder / "log"
    if not log.exists():
        return {}
    return {p.name: p.read_bytes() for p in sorted(log.iterdir()) if not p.name.startswith(".")}
