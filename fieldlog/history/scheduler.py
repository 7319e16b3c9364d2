"""The schedule as of many days, reusing the calendars and the network between them.

:func:`fieldlog.engine.cpm.compute_schedule` sizes its calendars around each status date, so asking
it for every day of a two-year log rebuilds them every day. Here the calendars are built once
over a range wide enough for the whole history and rebuilt only when the set of lost days
changes (a handful of times a season), and the site is compiled once
(:mod:`fieldlog.engine.compiled`). Asking only for the finish runs just the forward pass.

The dates do not depend on the range, only on the days inside it, so the results are the
same as ``compute_schedule``'s (tests/test_history_differential.py).
"""

from __future__ import annotations

from collections import OrderedDict
from collections.abc import Callable, Mapping
from datetime import date, timedelta
from typing import TypeVar

from fieldlog.engine.calendars import HorizonExceeded, WorkCalendar, build_calendars
from fieldlog.engine.compiled import compile_site
from fieldlog.engine.cpm import forecast_finish_on_calendars, schedule_on_calendars
from fieldlog.engine.horizon import widened
from fieldlog.engine.progress import Progress
from fieldlog.engine.result import ScheduleResult
from fieldlog.site.model import Site

LostDays = Mapping[str, frozenset[date]]
T = TypeVar("T")

_KEEP = 8
"""Calendar sets kept: a day's steps ask for three or four lost-day sets at most."""


class DayScheduler:
    """Schedules one site as of any day in ``[first, last]`` (and beyond, by widening)."""

    def __init__(self, site: Site, first: date, last: date) -> None:
        self.site = site
        self.compiled = compile_site(site)
        ahead = min(self.compiled.net.total_work * 2, 365 * 6) + 400
        self._lo = min(first, site.start) - timedelta(days=400)
        self._hi = max(last, site.finish_by or last, site.start) + timedelta(days=ahead)
        self._sets: OrderedDict[tuple, dict[str, WorkCalendar]] = OrderedDict()
        self.runs = 0
        """How many passes were run (the benchmark reports it)."""

    def calendars(self, lost: LostDays) -> dict[str, WorkCalendar]:
        """The site's calendars with ``lost`` applied, built once per distinct set."""
        key = tuple(sorted((name, days) for name, days in lost.items() if days))
        found = self._sets.get(key)
        if found is None:
            found = build_calendars(self.site.calendars, self._lo, self._hi, dict(key))
            self._sets[key] = found
            while len(self._sets) > _KEEP:
                self._sets.popitem(last=False)
        else:
            self._sets.move_to_end(key)
        return found

    def schedule(
        self,
        status: date,
        progress: Mapping[str, Progress],
        lost: LostDays,
        holds: Mapping[str, date],
    ) -> ScheduleResult:
        """The full schedule (dates, floats, driving path) as of the end of ``status``."""
        return self._widened(schedule_on_calendars, status, progress, lost, holds)

    def finish(
        self,
        status: date,
        progress: Mapping[str, Progress],
        lost: LostDays,
        holds: Mapping[str, date],
    ) -> date:
        """Only the forecast finish (forward pass) as of the end of ``status``."""
        return self._widened(forecast_finish_on_calendars, status, progress, lost, holds)

    def _widened(
        self,
        run: Callable[..., T],
        status: date,
        progress: Mapping[str, Progress],
        lost: LostDays,
        holds: Mapping[str, date],
    ) -> T:
        """``run`` on the calendars, widening their range until the work fits in it."""
        while True:
            try:
                self.runs += 1
                return run(self.compiled, status, progress, holds, self.calendars(lost))
            except HorizonExceeded:
                self._widen()

    def _widen(self) -> None:
        self._lo, self._hi = widened(self.site.start, self._lo, self._hi)
        self._sets.clear()
