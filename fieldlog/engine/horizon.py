"""How far the engine may widen its calendars: never past the dates fieldlog accepts.

The engine builds working-day calendars over a date range and, when a pass runs off either
end, doubles the range and runs again (:func:`fieldlog.engine.cpm.compute_schedule`, the
history's scheduler). Every date a person or a file can give lies within 50 years of the site
start and between 1900 and 2199 (:mod:`fieldlog.bounds`), but durations and lags of up to
3,650 working days each can still chain into a path of thousands of years: a schedule.toml of
a few kilobytes once doubled the range past the year 9999 and crashed. The range now stops
at the site's window, and work that needs more is a mistake in the schedule, said so in one
line (exit 2) rather than a traceback or a very long wait.
"""

from __future__ import annotations

from datetime import date
from pathlib import Path

from fieldlog.bounds import SITE_SPAN_YEARS, site_window
from fieldlog.errors import SiteError


class ScheduleTooLong(SiteError):
    """The network's work runs outside the dates fieldlog schedules for this site.

    The engine knows no folders, so it names a bare ``schedule.toml``; the caller that read
    the file names it as the user finds it with :meth:`naming` (the site folder + the file).
    """

    def naming(self, path: Path | str) -> ScheduleTooLong:
        """The same error naming ``path`` (e.g. ``sites/yard/schedule.toml``) as its file."""
        return ScheduleTooLong(self.problem, file=Path(path), fix=self.fix)


def widened(site_start: date, lo: date, hi: date) -> tuple[date, date]:
    """The range ``lo``..``hi`` doubled on both sides, but kept inside the site's window.

    Raises:
        ScheduleTooLong: the range is the whole window already, and the work still runs past it.
    """
    floor, ceiling = site_window(site_start)
    span = hi - lo
    new_lo = min(lo, max(floor, lo - span))
    new_hi = max(hi, min(ceiling, hi + span))
    if (new_lo, new_hi) == (lo, hi):
        raise ScheduleTooLong(
            f"the work runs outside {floor.isoformat()} to {ceiling.isoformat()}, more than "
            f"{SITE_SPAN_YEARS} years from the site start {site_start.isoformat()}: some chain "
            "of durations and lags is far too long to be a real job",
            file="schedule.toml",
            fix="check the durations and lags (working days, each at most 3,650) of the longest "
            "chain of activities, and the required finish in site.toml",
        )
    return new_lo, new_hi
