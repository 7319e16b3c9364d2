"""A site's working-day calendars as 2-D numpy tables, for converting many points at once.

:class:`~fieldlog.engine.calendars.WorkCalendar` answers one question at a time from two lists (see
:mod:`fieldlog.engine.calendars` for points). The array passes ask the same questions for a whole
level of links at once, so the lists of every calendar of the site are stacked into tables
indexed by (calendar number, position):

* ``work[c, p]``: the date ordinal of working day ``p`` of calendar ``c`` (rows are padded to
  the longest calendar; ``length[c]`` says where the real days end);
* ``before[c, o - origin]``: the point of calendar ``c`` at the start of ordinal ``o``.

Every lookup checks its range and raises :class:`~fieldlog.engine.calendars.HorizonExceeded` like
the scalar methods, so the engine widens the range and tries again exactly when it did before.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from functools import cached_property, lru_cache

import numpy as np

from fieldlog.engine.calendars import HorizonExceeded, WorkCalendar


@dataclass(frozen=True, eq=False)
class CalendarTables:
    """The calendars of one site over one date range, stacked (see module docstring)."""

    calendars: tuple[WorkCalendar, ...]
    origin: int
    work: np.ndarray
    length: np.ndarray
    """Working days per calendar (unsigned, see :func:`_check`)."""
    before: np.ndarray

    def points(self, cal: np.ndarray, ordinals: np.ndarray) -> np.ndarray:
        """Point at the start of each ordinal on each calendar (``WorkCalendar.pos``)."""
        k = ordinals - self.origin
        _check(k, self.before.shape[1])
        return self.before[cal, k]

    def ordinals(self, cal: np.ndarray, points: np.ndarray) -> np.ndarray:
        """Ordinal of the working day that starts at each point (``WorkCalendar.day``)."""
        _check(points, self.length[cal])
        return self.work[cal, points]

    def move(
        self, points: np.ndarray, after: np.ndarray, frm: np.ndarray, to: np.ndarray
    ) -> np.ndarray:
        """Points of calendars ``frm`` as points of calendars ``to``, by the date they mean.

        ``after`` (bool per point): the point stands for "after the working day before it" (a
        finish); otherwise for "at its working day" (a start). The date is rolled forward.
        """
        day = self.ordinals(frm, points - after) + after
        return self.before[to, day - self.origin]

    def move_back(
        self, points: np.ndarray, after: np.ndarray, frm: np.ndarray, to: np.ndarray
    ) -> np.ndarray:
        """Inverse of :meth:`move`: the latest point of ``to`` that moves to ``<=`` the point."""
        at = ~after
        day = self.ordinals(frm, points) + at
        return self.before[to, day - self.origin] - at

    @cached_property
    def dates(self) -> np.ndarray:
        """``dates[c, p]``: the :class:`~datetime.date` of working day ``p`` of calendar ``c``.

        Built on first use (only when result rows are built), then kept with the tables.
        """
        out = np.full(self.work.shape, None, dtype=object)
        for c, cal in enumerate(self.calendars):
            out[c, : len(cal.work)] = cal.dates
        return out


def _check(index: np.ndarray, limit: np.ndarray | int) -> None:
    """Raise :class:`HorizonExceeded` unless ``0 <= index < limit`` everywhere.

    Read as unsigned, a negative index is huge, so one comparison checks both ends.
    """
    if (index.view(np.uint64) >= limit).any():
        raise HorizonExceeded("calendar tables")


def calendar_tables(
    calendars: Mapping[str, WorkCalendar], names: tuple[str, ...]
) -> CalendarTables:
    """The tables for ``calendars`` in the order of ``names`` (remembered per calendar set)."""
    return _tables(tuple(calendars[name] for name in names))


@lru_cache(maxsize=16)
def _tables(calendars: tuple[WorkCalendar, ...]) -> CalendarTables:
    # Calendars are remembered values (fieldlog.engine.calendars._calendar_for), so the app's
    # recompute after each entry finds the same tuple and reuses its tables.
    origins = {c.origin for c in calendars}
    spans = {len(c.before) for c in calendars}
    assert len(origins) == 1 and len(spans) == 1, "calendars of one site share their range"
    width = max((len(c.work) for c in calendars), default=0)
    work = np.zeros((len(calendars), width), dtype=np.int64)
    for k, c in enumerate(calendars):
        work[k, : len(c.work)] = c.work
    return CalendarTables(
        calendars=calendars,
        origin=origins.pop(),
        work=work,
        length=np.array([len(c.work) for c in calendars], dtype=np.uint64),
        before=np.array([c.before for c in calendars], dtype=np.int64).reshape(
            len(calendars), spans.pop()
        ),
    )
