"""The last-sync record: when this device last synced a site, with what, and how it went.

Kept in the device's own data folder (``fieldlog_home()``, where the device id lives), never in
the site or office folder: the log folder belongs to the journal, and a sync that found nothing
to do must leave both folders byte for byte as they were. The app reads it to say "last synced
3 days ago".
"""

from __future__ import annotations

import hashlib
from dataclasses import dataclass
from datetime import datetime
from pathlib import Path

import tomli_w

from fieldlog.errors import FieldlogError, SyncError
from fieldlog.guarded_read import loads, read_capped
from fieldlog.home import fieldlog_home
from fieldlog.sync.revision import RevisionStatus
from fieldlog.sync.summary import SyncSummary
from fieldlog.sync.transfer import write_atomic

RECORDS_DIR = "sync"


@dataclass(frozen=True)
class SyncRecord:
    """One sync of one site, as this device saw it."""

    site: str
    target: str
    when: datetime
    sent: int
    received: int
    conflicts: int
    refused: int
    revision: int
    """The site's schedule revision after the sync."""

    @classmethod
    def of(cls, site: Path, target: Path | str, summary: SyncSummary, when: datetime) -> SyncRecord:
        """The record of a finished sync (``fieldlog sync`` and the app both save this).

        ``target`` is a folder, or the text of a git target (kept as given).
        """
        change = summary.revision
        revision = change.site_revision
        if change.status is RevisionStatus.BROUGHT_IN:
            # A revision is brought in only after its file was read, so its number is known.
            assert change.target_revision is not None
            revision = change.target_revision
        return cls(
            site=str(site.resolve()),
            target=str(target.resolve()) if isinstance(target, Path) else target,
            when=when,
            sent=len(summary.sent),
            received=len(summary.received),
            conflicts=len(summary.conflicts),
            refused=len(summary.refused),
            revision=revision,
        )


def record_path(home: Path, site_folder: Path) -> Path:
    """Where the record for ``site_folder`` lives (one file per site folder on this device)."""
    key = hashlib.sha256(str(site_folder.resolve()).encode("utf-8")).hexdigest()[:16]
    return home / RECORDS_DIR / f"{key}.toml"


def save_record(record: SyncRecord, home: Path | None = None) -> Path:
    """Write ``record`` atomically into ``home`` (default: this device's data folder)."""
    path = record_path(home or fieldlog_home(), Path(record.site))
    path.parent.mkdir(parents=True, exist_ok=True)
    data = {
        "site": record.site,
        "target": record.target,
        "when": record.when,
        "sent": record.sent,
        "received": record.received,
        "conflicts": record.conflicts,
        "refused": record.refused,
        "revision": record.revision,
    }
    write_atomic(path, tomli_w.dumps(data).encode("utf-8"))
    return path


def last_sync(site_folder: Path, home: Path | None = None) -> SyncRecord | None:
    """The last recorded sync of ``site_folder`` on this device, or None when it never synced.

    Raises:
        SyncError: the record exists but cannot be read (it can safely be deleted).
    """
    path = record_path(home or fieldlog_home(), site_folder)
    if not path.exists():
        return None
    try:
        data = loads(read_capped(path, "settings"), "settings", path.name)
        return SyncRecord(
            site=data["site"],
            target=data["target"],
            when=data["when"],
            sent=data["sent"],
            received=data["received"],
            conflicts=data["conflicts"],
            refused=data["refused"],
            revision=data["revision"],
        )
    except (OSError, FieldlogError, KeyError) as exc:
        raise SyncError(
            f"the last-sync record cannot be read ({exc})",
            file=path,
            fix="delete this file; the next sync writes a new one",
        ) from exc
