"""Result rows (:class:`~fieldlog.engine.result.ActivityResult`) from the engine's arrays.

The passes end with one array per column (points, floats, flags). Turning 10,000 activities
into dated row objects costs about as much as the passes themselves, and a caller that only
wants the finish or the driving path does not need them. So the engine hands
:meth:`Columns.rows` to :meth:`ScheduleResult.deferred
<fieldlog.engine.result.ScheduleResult.deferred>`, which calls it the first time someone
reads ``activities`` or ``by_id``.

Every value put in a row is a plain Python value (``int``, ``bool``, ``date``, ``None``), never
a numpy scalar: results are compared, hashed and written to JSON downstream.
"""

from __future__ import annotations

import gc
from collections.abc import Iterator, Sequence
from contextlib import contextmanager
from dataclasses import dataclass
from datetime import date

import numpy as np

from fieldlog.engine.calendar_tables import CalendarTables
from fieldlog.engine.network_arrays import NetworkArrays
from fieldlog.engine.progress import Progress, Status
from fieldlog.engine.result import ActivityResult
from fieldlog.site.model import Link, Site

REASONS = ("site start", "data date", "start not before", "readiness", "actual dates")
"""What sets an early start when no link does, by code (the engine's ``reason`` array)."""
SITE_START, DATA_DATE, START_NOT_BEFORE, READINESS, ACTUAL_DATES = range(len(REASONS))


@dataclass(frozen=True, eq=False)
class Columns:
    """Everything a row needs, one array (or list) per column, positions as ``site.activities``.

    Points are on each activity's own calendar; values of finished work other than its
    progress are not used.
    """

    site: Site
    net: NetworkArrays
    tables: CalendarTables
    progress: Sequence[tuple[int, Progress]]
    """(position, progress) of every activity the field reported on."""
    finished: np.ndarray
    remaining: np.ndarray
    early_start: np.ndarray
    early_finish: np.ndarray
    late_start: np.ndarray
    late_finish: np.ndarray
    total_float: np.ndarray
    free_float: np.ndarray
    critical: np.ndarray
    on_driving_path: np.ndarray
    driver: np.ndarray
    """Index in ``site.links`` of the driving link, or -1."""
    reason: np.ndarray
    """Code into :data:`REASONS` where no link drives."""
    overdue: np.ndarray
    end_after: np.ndarray

    def rows(self) -> tuple[ActivityResult, ...]:
        """One result per activity, in the order of ``site.activities``."""
        n, fin = self.net.size, self.finished
        names, calendars, durations, links, link_preds = _site_columns(self.site)
        dur = self.remaining
        after = self.end_after & (dur == 0) & ~fin  # a milestone at the end of its work
        # A milestone's dates are the day of its point (the day before, after work).
        # Finished work reads position 0 here and gets its actual dates below.
        point = fin | (dur == 0)
        e_first = np.where(fin, 0, self.early_start - after)
        e_last = np.where(point, e_first, self.early_finish - 1)
        l_first = np.where(fin, 0, self.late_start - after)
        l_last = np.where(point, l_first, self.late_finish - 1)
        days, cal = self.tables.dates, self.net.calendar
        early_start, early_finish = days[cal, e_first], days[cal, e_last]
        late_start, late_finish = days[cal, l_first], days[cal, l_last]
        total_float = self.total_float.astype(object)
        free_float = self.free_float.astype(object)
        driving = np.full(n, None, dtype=object)
        driven_by = np.array(REASONS, dtype=object)[self.reason]
        linked = np.flatnonzero(self.driver >= 0)
        driving[linked] = links[self.driver[linked]]
        driven_by[linked] = link_preds[self.driver[linked]]
        for column in (late_start, late_finish, total_float, free_float):
            column[fin] = None

        status = [Status.NOT_STARTED] * n
        actual_start: list[date | None] = [None] * n
        actual_finish: list[date | None] = [None] * n
        percent: list[float | None] = [None] * n
        for k, p in self.progress:
            status[k] = p.status
            actual_start[k] = p.actual_start
            percent[k] = p.percent
            if p.actual_finish is not None:
                early_start[k] = p.actual_start or p.actual_finish
                early_finish[k] = actual_finish[k] = p.actual_finish
        with _collector_paused():
            return tuple(
                map(
                    _row,
                    self.net.ids,
                    names,
                    calendars,
                    durations,
                    status,
                    early_start.tolist(),
                    early_finish.tolist(),
                    late_start.tolist(),
                    late_finish.tolist(),
                    total_float.tolist(),
                    free_float.tolist(),
                    self.critical.tolist(),
                    self.on_driving_path.tolist(),
                    actual_start,
                    actual_finish,
                    np.where(fin, 0, dur).tolist(),
                    percent,
                    driving.tolist(),
                    driven_by.tolist(),
                    self.overdue.tolist(),
                    after.tolist(),
                )
            )


def _row(
    id: str,
    name: str,
    calendar: str,
    duration: int,
    status: Status,
    early_start: date | None,
    early_finish: date | None,
    late_start: date | None,
    late_finish: date | None,
    total_float: int | None,
    free_float: int | None,
    critical: bool,
    on_driving_path: bool,
    actual_start: date | None,
    actual_finish: date | None,
    remaining: int,
    percent: float | None,
    driving: Link | None,
    driven_by: str,
    overdue: bool,
    after_work: bool,
) -> ActivityResult:
    """An :class:`ActivityResult` from every field, without the generated ``__init__``.

    The frozen ``__init__`` sets each field through ``object.__setattr__``; a dict display
    handed over as the instance dict is several times faster, and the result is the same
    value (tests compare both ways of building).
    """
    result = _new(ActivityResult)
    _set(
        result,
        "__dict__",
        {
            "id": id,
            "name": name,
            "calendar": calendar,
            "duration": duration,
            "status": status,
            "early_start": early_start,
            "early_finish": early_finish,
            "late_start": late_start,
            "late_finish": late_finish,
            "total_float": total_float,
            "free_float": free_float,
            "critical": critical,
            "on_driving_path": on_driving_path,
            "actual_start": actual_start,
            "actual_finish": actual_finish,
            "remaining": remaining,
            "percent": percent,
            "driving": driving,
            "driven_by": driven_by,
            "overdue": overdue,
            "after_work": after_work,
        },
    )
    return result


_new = object.__new__
_set = object.__setattr__


@contextmanager
def _collector_paused() -> Iterator[None]:
    """Pause Python's cyclic garbage collector while the rows are allocated.

    A collection starts every few hundred allocations, and some of them walk every object of
    the process (a 10,000-activity site alone holds over 10**5): for 50,000 rows that more than
    doubles the time. Rows hold no reference cycles, so the collector would find nothing; it
    is switched back on (if it was on) as soon as they exist.
    """
    if not gc.isenabled():
        yield
        return
    gc.disable()
    try:
        yield
    finally:
        gc.enable()


def _site_columns(site: Site) -> tuple[list[str], list[str], list[int], np.ndarray, np.ndarray]:
    """Names, calendars, durations, links and link predecessors of ``site``, cached on it."""
    cached = site.__dict__.get("_cpm_row_columns")
    if cached is None:
        links = np.empty(len(site.links), dtype=object)
        links[:] = site.links
        preds = np.array([lk.pred for lk in site.links], dtype=object)
        cached = (
            [a.name for a in site.activities],
            [a.calendar for a in site.activities],
            [a.duration for a in site.activities],
            links,
            preds,
        )
        object.__setattr__(site, "_cpm_row_columns", cached)
    return cached
