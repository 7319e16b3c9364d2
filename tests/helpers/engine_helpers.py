"""Small builders shared by the engine tests: sites from a few tuples, points from dates.

The CPM engine is tested through its public entry, :func:`fieldlog.engine.cpm.compute_schedule`, on
sites built here straight from the model's dataclasses (no TOML), so each test reads like the
network it checks::

    site = make_site([("A", 3), ("B", 2)], [("A", "B")])

All data here is invented for tests.
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from datetime import date, timedelta
from types import MappingProxyType

import numpy as np

from fieldlog.engine.result import ScheduleResult
from fieldlog.site.model import (
    Activity,
    CalendarSpec,
    Crew,
    LagCalendar,
    Link,
    LinkType,
    Site,
)

MONDAY = date(2026, 3, 2)
"""A Monday used as the default site start."""

ALLWEEK = CalendarSpec("allweek", frozenset(range(7)))
"""Seven working days a week: points are plain days, handy for textbook examples."""

WEEKDAYS = CalendarSpec("weekdays", frozenset(range(5)))
"""Monday to Friday."""

ActivityRow = tuple  # (id, duration) or (id, duration, calendar) or (..., {extra fields})
LinkRow = tuple  # (pred, succ) or (pred, succ, type) or (pred, succ, type, lag)


def make_site(
    activities: Iterable[ActivityRow],
    links: Iterable[LinkRow] = (),
    *,
    start: date = MONDAY,
    calendar: str = "allweek",
    calendars: Sequence[CalendarSpec] = (ALLWEEK, WEEKDAYS),
    finish_by: date | None = None,
    progress_override: bool = False,
    lag_calendar: LagCalendar = LagCalendar.SUCCESSOR,
) -> Site:
    """A :class:`Site` from short rows.

    Args:
        activities: ``(id, duration)``, ``(id, duration, calendar)`` or with a fourth item, a
            dict of extra :class:`Activity` fields (``start_not_before`` ...).
        links: ``(pred, succ)``, ``(pred, succ, "SS")`` or ``(pred, succ, "SS", lag)``.
        start: the site start.
        calendar: the default calendar, used when a row names none.
        calendars: the calendar specs of the site.
        finish_by: the required finish, if any.
        progress_override: the out-of-sequence setting.
        lag_calendar: which calendar lags count on.
    """
    acts = []
    for row in activities:
        aid, duration = row[0], row[1]
        cal = row[2] if len(row) > 2 and row[2] else calendar
        extra = row[3] if len(row) > 3 else {}
        acts.append(
            Activity(id=aid, name=f"Activity {aid}", duration=duration, calendar=cal, **extra)
        )
    made_links = []
    for row in links:
        pred, succ = row[0], row[1]
        kind = LinkType(row[2]) if len(row) > 2 else LinkType.FS
        lag = row[3] if len(row) > 3 else 0
        made_links.append(Link(pred, succ, kind, lag))
    return Site(
        name="Test yard",
        start=start,
        calendar=calendar,
        calendars=MappingProxyType({c.name: c for c in calendars}),
        crews=MappingProxyType({"groundworks": Crew("groundworks", 6)}),
        revision=1,
        activities=tuple(acts),
        links=tuple(made_links),
        finish_by=finish_by,
        progress_override=progress_override,
        lag_calendar=lag_calendar,
    )


def before_start(site: Site) -> date:
    """The status date for "nothing recorded yet": the day before the site start."""
    return site.start - timedelta(days=1)


def day_number(start: date, day: date) -> int:
    """Zero-based day number of ``day`` counted from ``start`` (seven-day calendar)."""
    return (day - start).days


def table(result: ScheduleResult, start: date) -> dict[str, tuple[int, int, int, int, int]]:
    """Zero-based ``(ES, EF, LS, LF, TF)`` per activity on a seven-day calendar.

    Dates are inclusive working days: the first day is ``start + ES`` and the last day is
    ``start + EF - 1``, which is how textbook day numbers (zero-based, point in time) map onto
    the dates fieldlog prints.
    """
    out = {}
    for r in result.activities:
        assert r.early_start and r.early_finish and r.late_start and r.late_finish
        out[r.id] = (
            day_number(start, r.early_start),
            day_number(start, r.early_finish) + 1,
            day_number(start, r.late_start),
            day_number(start, r.late_finish) + 1,
            r.total_float,
        )
    return out


def weekmask(spec: CalendarSpec) -> str:
    """numpy's weekmask string (``"1111100"``) for a calendar spec."""
    return "".join("1" if d in spec.workdays else "0" for d in range(7))


def np_calendar(spec: CalendarSpec, extra: Iterable[date] = ()) -> np.busdaycalendar:
    """The same calendar as a numpy busdaycalendar (the outside reference)."""
    hol = sorted({*spec.holidays, *extra})
    return np.busdaycalendar(weekmask=weekmask(spec), holidays=[np.datetime64(d, "D") for d in hol])


def np_date(value: np.datetime64) -> date:
    """A numpy day as a :class:`date`."""
    return value.astype("datetime64[D]").astype(object)
