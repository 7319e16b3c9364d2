"""Journal entries built straight from values for the history tests (no files).

Every name here is invented for tests.
"""

from __future__ import annotations

from datetime import UTC, date, datetime
from types import MappingProxyType
from typing import Any

from fieldlog.journal.entries import Entry

DEVICE = "site-laptop-1"


class Log:
    """Entries in the order they were written, numbered like one device's journal."""

    def __init__(self) -> None:
        self.entries: list[Entry] = []

    def add(self, kind: str, day: date, **fields: Any) -> Entry:
        n = len(self.entries) + 1
        e = Entry(
            id=f"{DEVICE}.{n}",
            seq=n,
            kind=kind,
            day=day,
            written=datetime(day.year, day.month, day.day, 17, 0, tzinfo=UTC),
            author="T. Foreman",
            device=DEVICE,
            fields=MappingProxyType({k: v for k, v in fields.items() if v is not None}),
            position=n,
        )
        self.entries.append(e)
        return e

    def sorted(self) -> list[Entry]:
        """Replay order, as the journal reader returns them."""
        return sorted(self.entries, key=Entry.sort_key)
