"""A site open in the app: load it, and recompute schedule and lookahead after every entry.

Pure Python (no Textual) so that ``fieldlog open`` can load the site, and fail with the CLI's
message, before the terminal is taken over; and so that the recompute can run in a worker
thread while the screen stays responsive.

The app's "today" is the shift being recorded. The status date is the end of today, so the
data date (first day of the forecast and of the lookahead) is tomorrow: what the foreman
reads after recording the day is tomorrow's plan.

A recompute comes in two steps so the view the foreman is looking at repaints first:

1. :meth:`SiteSession.recompute` rereads the log and runs the CPM passes, picks the
   end-of-shift list and classifies only those activities for tomorrow (a lookahead of a few
   dozen activities: well under a millisecond);
2. :meth:`SiteSession.complete` adds the full two-week lookahead (every activity, crew load,
   levelling suggestion), which only the lookahead view needs.
"""

from __future__ import annotations

import dataclasses
import threading
from collections.abc import Mapping
from dataclasses import dataclass
from datetime import date
from pathlib import Path

from fieldlog.app.shift import ShiftRow, shift_rows
from fieldlog.journal import read_journal
from fieldlog.lookahead import Cell, Lookahead, build_lookahead
from fieldlog.lookahead.build import LOOKAHEAD_DAYS
from fieldlog.site.files import load_site
from fieldlog.site.model import Site
from fieldlog.workspace import SiteState, state_for


@dataclass(frozen=True)
class Snapshot:
    """Everything the screens show, computed as of the end of ``today``."""

    version: int
    """Increases with every recompute; views repaint when theirs is older."""
    today: date
    state: SiteState
    shift: tuple[ShiftRow, ...]
    """The end-of-shift list (:func:`fieldlog.app.shift.shift_rows`)."""
    tomorrow: Mapping[str, Cell]
    """For the activities of :attr:`shift`, their class on the data date (tomorrow)."""
    lookahead: Lookahead | None = None
    """The full two-week lookahead; None until :meth:`SiteSession.complete` adds it."""

    @property
    def site(self) -> Site:
        """The site (from site.toml and schedule.toml)."""
        return self.state.site


class SiteSession:
    """One site folder and the app's today; hands out fresh :class:`Snapshot` values.

    The site files are read by :meth:`load` only (the office's schedule does not change while
    the foreman types); :meth:`recompute` rereads the log, which is what every entry changes.
    All methods are safe to call from a worker thread: they build new frozen values and swap
    one reference under a lock.

    Args:
        folder: the site folder.
        today: the shift being recorded (end of this day is the status date).
    """

    def __init__(self, folder: Path | str, today: date) -> None:
        self.folder = Path(folder)
        self.today = today
        self._site: Site | None = None
        self._lock = threading.Lock()
        self._version = 0
        self._latest: Snapshot | None = None

    @property
    def site(self) -> Site:
        """The loaded site (loads it on first use)."""
        if self._site is None:
            self._site = load_site(self.folder)
        return self._site

    @property
    def latest(self) -> Snapshot | None:
        """The most recent complete snapshot, or None before the first load."""
        return self._latest

    def load(self) -> Snapshot:
        """Read the site files and the log from disk and compute everything.

        Raises:
            SiteError: the site files are wrong (the same message as the command line).
            JournalError: the log cannot be read.
        """
        self._site = load_site(self.folder)
        return self.complete(self.recompute())

    def reread_site(self) -> None:
        """Read site.toml and schedule.toml again (a sync brought a new revision, F5).

        Raises:
            SiteError: the files are wrong now; the session keeps the site it had.
        """
        self._site = load_site(self.folder)

    def recompute(self) -> Snapshot:
        """Step 1: reread the log, run the CPM, classify the end-of-shift list for tomorrow.

        The version is taken before reading, so of two overlapping recomputes the one that
        started later (and so read the newer log) always carries the higher version.
        """
        with self._lock:
            self._version += 1
            version = self._version
        site = self.site
        state = state_for(self.folder, site, read_journal(self.folder), self.today)
        rows = tuple(shift_rows(state.schedule, self.today))
        subset = dataclasses.replace(state.schedule, activities=tuple(r.result for r in rows))
        first = build_lookahead(
            subset, state.replay.readiness, days=1, suggest_levelling=False, suggest_fewest=False
        )
        tomorrow = {row.id: row.cells[0] for row in first.rows}
        return Snapshot(version, self.today, state, rows, tomorrow)

    def complete(self, snap: Snapshot) -> Snapshot:
        """Step 2: add the full two-week lookahead (same version: same schedule)."""
        state = snap.state
        look = build_lookahead(state.schedule, state.replay.readiness, days=LOOKAHEAD_DAYS)
        done = dataclasses.replace(snap, lookahead=look)
        with self._lock:
            if self._latest is None or done.version > self._latest.version:
                self._latest = done
        return done
