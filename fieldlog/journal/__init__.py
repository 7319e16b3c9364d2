"""The field journal: append-only daily log files in the site's ``log/`` folder.

STUB: the journal issue replaces this with the real store, entries, verify and replay.
The names below are the contract the rest of fieldlog codes against.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from datetime import date
from pathlib import Path

from fieldlog.model import Site
from fieldlog.progress import Progress
from fieldlog.readiness import OpenItem


@dataclass(frozen=True)
class Problem:
    """A contradiction found while replaying (never dropped: both entries are named)."""

    message: str
    entry_ids: tuple[str, ...] = ()


@dataclass(frozen=True)
class Replay:
    """Everything the journal says as of the end of a status date."""

    progress: Mapping[str, Progress] = field(default_factory=dict)
    lost_days: Mapping[str, frozenset[date]] = field(default_factory=dict)
    """Per calendar name, days lost on site (non-working days for that calendar)."""
    readiness: tuple[OpenItem, ...] = ()
    problems: tuple[Problem, ...] = ()


@dataclass(frozen=True)
class Journal:
    """Every entry read from a site's log folder, in replay order."""

    entries: tuple = ()

    @property
    def last_day(self) -> date | None:
        """The latest day any entry describes."""
        return None


def read_journal(folder: Path) -> Journal:
    """Read every journal file of the site folder ``folder``."""
    return Journal()


def replay(site: Site, entries: Sequence, status_date: date) -> Replay:
    """Fold entries dated on or before ``status_date`` into progress and lost days."""
    return Replay()
