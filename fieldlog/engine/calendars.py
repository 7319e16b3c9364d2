"""Working-day calendars: which days a crew works, and counting working days fast.

A calendar is stored as two lists over a date range, so that every question the CPM passes ask
is one list lookup:

* ``work[i]`` is the ordinal (``date.toordinal()``) of the i-th working day of the range;
* ``before[o - origin]`` is how many working days fall strictly before ordinal ``o``.

The engine works in *points*: integer indices on one calendar. Point ``p`` is the moment at the
start of working day ``work[p]`` (equivalently, the end of working day ``work[p - 1]``). An
activity of duration D starting at point ``s`` finishes at point ``s + D``; its first day is
``work[s]`` and its last day ``work[s + D - 1]`` (inclusive working days).

Non-working days are the weekdays not listed in ``workdays``, the calendar's holidays, optional
public holidays from the ``holidays`` package, and days lost on site (weather and other
stoppages recorded in the journal) for the calendars they affect.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from dataclasses import dataclass
from datetime import date, timedelta
from functools import cached_property, lru_cache

from fieldlog.errors import CalendarError
from fieldlog.site.model import CalendarSpec


class HorizonExceeded(Exception):
    """Internal: a lookup fell outside the precomputed range; the caller widens it and retries."""


@dataclass(frozen=True, eq=False)
class WorkCalendar:
    """A calendar's working days over ``[origin, end)`` (ordinals), ready for fast lookups."""

    name: str
    origin: int
    end: int
    work: tuple[int, ...]
    before: tuple[int, ...]
    weekdays: frozenset[int]
    closed: frozenset[date]

    # -- date <-> point ------------------------------------------------------------------------

    def pos(self, day: date) -> int:
        """Point at the start of ``day``: the number of working days strictly before it."""
        return self.pos_ordinal(day.toordinal())

    def pos_ordinal(self, ordinal: int) -> int:
        """As :meth:`pos`, for an ordinal."""
        k = ordinal - self.origin
        if k < 0 or k >= len(self.before):
            raise HorizonExceeded(self.name)
        return self.before[k]

    def day(self, point: int) -> date:
        """The working day that starts at ``point``."""
        return date.fromordinal(self.day_ordinal(point))

    def day_ordinal(self, point: int) -> int:
        """As :meth:`day`, as an ordinal."""
        if point < 0 or point >= len(self.work):
            raise HorizonExceeded(self.name)
        return self.work[point]

    @cached_property
    def dates(self) -> tuple[date, ...]:
        """``dates[p]`` is :meth:`day` of ``p``, built once: the engine labels every activity."""
        return tuple(map(date.fromordinal, self.work))

    # -- questions a foreman asks ----------------------------------------------------------------

    def is_working(self, day: date) -> bool:
        """True when ``day`` is a working day of this calendar."""
        k = day.toordinal() - self.origin
        if 0 <= k < len(self.before) - 1:
            return self.before[k + 1] != self.before[k]
        return day.weekday() in self.weekdays and day not in self.closed

    def next_working(self, day: date) -> date:
        """``day`` itself when it is worked, else the next working day."""
        return self.day(self.pos(day))

    def add_working_days(self, day: date, n: int) -> date:
        """The working day ``n`` working days after the first working day on or after ``day``.

        Matches ``numpy.busday_offset(day, n, roll="forward")``.
        """
        return self.day(self.pos(day) + n)

    def count(self, begin: date, end: date) -> int:
        """Working days in ``[begin, end)``; minus those in ``[end, begin)`` when reversed.

        It is the difference of points, so "how many working days late" comes out right when a
        required date falls on a non-working day. Matches ``numpy.busday_count(begin, end)`` for
        ``begin <= end`` (numpy counts ``(end, begin]`` when reversed, which differs when an
        end falls on a non-working day).
        """
        return self.pos(end) - self.pos(begin)

    def working_days(self, begin: date, end: date) -> list[date]:
        """Every working day in ``[begin, end]`` (inclusive)."""
        lo, hi = self.pos(begin), self.pos(end + timedelta(days=1))
        return [date.fromordinal(o) for o in self.work[lo:hi]]


def build_calendar(
    spec: CalendarSpec, origin: date, end: date, extra_closed: Iterable[date] = ()
) -> WorkCalendar:
    """Build a :class:`WorkCalendar` for ``spec`` covering ``[origin, end)``.

    Args:
        spec: the calendar as written in site.toml.
        origin: first date covered.
        end: first date not covered.
        extra_closed: more non-working days, e.g. weather days recorded in the journal.

    Raises:
        CalendarError: unknown public-holiday region, or no working weekday at all.
    """
    if not spec.workdays:
        raise CalendarError(
            f"calendar '{spec.name}' has no working days",
            fix="list at least one weekday in workdays",
        )
    closed = set(spec.holidays)
    closed.update(extra_closed)
    if spec.public_holidays:
        closed.update(public_holidays(spec.public_holidays, origin.year, end.year))
    o0, o1 = origin.toordinal(), end.toordinal()
    wd = spec.workdays
    closed_ord = {d.toordinal() for d in closed}
    work: list[int] = []
    before: list[int] = []
    first_weekday = origin.weekday()
    n = 0
    for k, o in enumerate(range(o0, o1)):
        before.append(n)
        if (first_weekday + k) % 7 in wd and o not in closed_ord:
            work.append(o)
            n += 1
    before.append(n)  # position of `end` itself
    return WorkCalendar(spec.name, o0, o1, tuple(work), tuple(before), wd, frozenset(closed))


def public_holidays(region: str, first_year: int, last_year: int) -> set[date]:
    """Public holidays of ``region`` ("US", "GB-ENG", "DE-BY") from the holidays package.

    Raises:
        CalendarError: the country or subdivision is not known to the holidays package.
    """
    import holidays  # lazy: 0.1 s import, needed only by calendars that ask for it

    # ISO 3166 codes are upper case; accept "us-tx" as written by hand.
    country, _, subdiv = region.strip().upper().partition("-")
    try:
        table = holidays.country_holidays(
            country,
            subdiv=subdiv or None,
            years=range(first_year, last_year + 1),
            expand=False,
        )
    except (NotImplementedError, KeyError) as exc:
        raise CalendarError(
            f"public_holidays region '{region}' is not known",
            fix='use a country code with optional subdivision, e.g. "US-TX" or "GB-ENG"',
        ) from exc
    return set(table)


def build_calendars(
    specs: Mapping[str, CalendarSpec],
    origin: date,
    end: date,
    lost_days: Mapping[str, Iterable[date]] | None = None,
) -> dict[str, WorkCalendar]:
    """Build every calendar of a site over the same range, with lost days applied."""
    lost_days = lost_days or {}
    return {
        name: _calendar_for(spec, origin, end, frozenset(lost_days.get(name, ())))
        for name, spec in specs.items()
    }


@lru_cache(maxsize=64)
def _calendar_for(
    spec: CalendarSpec, origin: date, end: date, extra_closed: frozenset[date]
) -> WorkCalendar:
    """:func:`build_calendar`, remembered: a calendar is a value, and the app recomputes the
    same site after every entry (the public-holiday lookup alone takes milliseconds)."""
    return build_calendar(spec, origin, end, extra_closed)
