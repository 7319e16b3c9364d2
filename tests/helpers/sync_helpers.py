"""Builders for the sync tests: small site folders, journal entries, folder snapshots.

All data here is invented for tests. Journal entries are written with the journal's own
:func:`fieldlog.journal.record_entry`, so every file sync moves is a real, hash-chained journal
file, and a fixed clock and author keep the bytes (and so conflict-copy names) reproducible.
"""

from __future__ import annotations

import hashlib
import os
from datetime import UTC, date, datetime
from pathlib import Path
from typing import Any

from cryptography.hazmat.primitives.asymmetric.ed25519 import Ed25519PrivateKey

from fieldlog.journal import device_id, record_entry
from fieldlog.site.files import load_site
from fieldlog.sync import SyncOptions, SyncSummary, sync_site

TODAY = date(2026, 12, 31)
"""The "real" date the tests record on (entries may not describe a later day)."""
WRITTEN = datetime(2026, 3, 2, 17, 30, tzinfo=UTC)

SITE_TOML = """\
[site]
name = "Test yard (invented)"
start = 2026-03-02
finish_by = 2026-06-30
calendar = "weekdays"

[calendars.weekdays]
workdays = ["mon", "tue", "wed", "thu", "fri"]

[crews.groundworks]
available = 6
"""


def schedule_toml(revision: int, ids: tuple[str, ...] = ("A10", "A20", "A30")) -> str:
    """A chain of activities ``ids`` (5 days each) at ``revision``."""
    parts = [f"revision = {revision}\n"]
    prev = None
    for aid in ids:
        parts.append(f'\n[[activity]]\nid = "{aid}"\nname = "Work {aid}"\nduration = 5\n')
        if prev:
            parts.append(f'after = ["{prev}"]\n')
        prev = aid
    return "".join(parts)


def make_site(
    folder: Path,
    revision: int = 1,
    ids: tuple[str, ...] = ("A10", "A20", "A30"),
) -> Path:
    """Create a valid site folder (site.toml, schedule.toml, empty log/)."""
    folder.mkdir(parents=True, exist_ok=True)
    (folder / "site.toml").write_text(SITE_TOML, encoding="utf-8")
    (folder / "schedule.toml").write_text(schedule_toml(revision, ids), encoding="utf-8")
    (folder / "log").mkdir(exist_ok=True)
    return folder


def journal_name(day: date, device: str) -> str:
    """``YYYY-MM-DD_<device>.toml``."""
    return f"{day.isoformat()}_{device}.toml"


def append_entry(
    site: Path,
    day: date,
    device: str | None,
    note: str,
    *,
    home: Path | None = None,
    kind: str = "note",
    fields: dict[str, Any] | None = None,
) -> Path:
    """Record one entry (a note by default) through the journal; returns the day file.

    ``device`` None takes the device id of the data folder ``home``. Each device signs with a
    key derived from its id, so the files (and the golden summary's conflict-copy names,
    which hash them) are the same on every run.
    """
    device = device or device_id(home)
    entry = record_entry(
        site,
        load_site(site),
        kind,
        day,
        fields or {"text": note},
        today=TODAY,
        author="Test Foreman",
        device=device,
        clock=lambda: WRITTEN,
        home=home,
        key=fixed_key(device),
    )
    return site / "log" / journal_name(day, entry.device)


def fixed_key(device: str) -> Ed25519PrivateKey:
    """A test device's signing key, the same on every run (test data only)."""
    return Ed25519PrivateKey.from_private_bytes(hashlib.sha256(device.encode()).digest())


def tree(folder: Path, *, receipts: bool = True) -> dict[str, bytes | str]:
    """Every file under ``folder`` by relative path: bytes, or ``-> target`` for links.

    ``receipts=False`` leaves out ``receipts/`` (the copies of office receipts a sync keeps in
    the site folder), for tests about the journal and schedule alone.
    """
    out: dict[str, bytes | str] = {}
    for root, dirs, files in os.walk(folder):
        for name in dirs + files:
            path = Path(root) / name
            rel = path.relative_to(folder).as_posix()
            if not receipts and (rel == "receipts" or rel.startswith("receipts/")):
                continue
            if path.is_symlink():
                out[rel] = f"-> {os.readlink(path)}"
            elif path.is_file():
                out[rel] = path.read_bytes()
            else:
                out[rel + "/"] = ""
    return out


def sync(site: Path, target: Path, **options: Any) -> SyncSummary:
    """Run a sync with the given :class:`SyncOptions` fields."""
    return sync_site(site, target, SyncOptions(**options))
