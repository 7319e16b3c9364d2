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
from tests.helpers.site_builder import (
    WEEKDAYS_AND_ALL_WEEK,
    Act,
    schedule_toml,
    site_toml,
    write_site,
)

SITE_TOML = site_toml(
    "Pump house groundworks (test site)",
    date(2026, 9, 7),
    finish_by=date(2026, 10, 16),
    calendars=WEEKDAYS_AND_ALL_WEEK,
    crews={"groundworks": 6},
)

SCHEDULE_TOML = schedule_toml(
    3,
    [
        Act("EXC-010", "Excavate base", 4),
        Act("BLD-010", "Blinding and rebar", 3, after=("EXC-010",)),
        Act("CON-010", "Pour base slab", 1, after=("BLD-010",)),
        Act("CUR-010", "Cure base slab", 7, calendar="allweek", after=("CON-010",)),
        Act("WAL-010", "Wall formwork and pour", 6, after=("CUR-010",)),
        Act("BFL-010", "Backfill and compact", 3, after=("WAL-010",)),
    ],
)

DEVICE = "test-laptop-1"
OTHER = "test-tablet-2"
AUTHOR = "P. Tester"
TODAY = date(2026, 9, 25)
ROOT = Path(__file__).resolve().parents[2]


def make_site(folder: Path) -> Path:
    """Write the test site into ``folder`` (created) and return it."""
    return write_site(folder, SITE_TOML, SCHEDULE_TOML)


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
