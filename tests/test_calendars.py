"""Working-day calendars checked against outside references.

* numpy's business-day functions (``busday_offset``, ``busday_count``, ``is_busday``) are the
  reference for working-day arithmetic: random weekmasks, holidays, dates and offsets
  (hypothesis) must give the same answers.
* The ``holidays`` package is the reference for public holidays: a calendar that names a region
  must close exactly the days ``holidays.country_holidays`` lists for it.
"""

from __future__ import annotations

from datetime import date, timedelta

import holidays
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from fieldlog.engine.calendars import build_calendar, build_calendars, public_holidays
from fieldlog.errors import CalendarError
from fieldlog.site.model import CalendarSpec
from tests.helpers.engine_helpers import np_calendar, np_date

ORIGIN = date(2023, 1, 1)
END = date(2030, 1, 1)
IN_RANGE = st.dates(min_value=date(2025, 3, 1), max_value=date(2027, 9, 30))

weekday_sets = st.frozensets(st.integers(0, 6), min_size=1)
holiday_sets = st.frozensets(
    st.dates(min_value=ORIGIN, max_value=END - timedelta(days=1)), max_size=40
)


def _npd(d: date) -> np.datetime64:
    return np.datetime64(d, "D")


@settings(max_examples=60, deadline=None)
@given(
    workdays=weekday_sets,
    hols=holiday_sets,
    lost=holiday_sets,
    day=IN_RANGE,
    offset=st.integers(-60, 60),
)
def test_add_working_days_matches_numpy_busday_offset(workdays, hols, lost, day, offset):
    spec = CalendarSpec("c", workdays, hols)
    cal = build_calendar(spec, ORIGIN, END, extra_closed=lost)
    ref = np_calendar(spec, lost)
    # Reference: numpy.busday_offset with roll="forward" (first working day on or after `day`,
    # then `offset` working days on).
    expected = np_date(np.busday_offset(_npd(day), offset, roll="forward", busdaycal=ref))
    assert cal.add_working_days(day, offset) == expected
    # Reference: numpy.is_busday.
    assert cal.is_working(day) == bool(np.is_busday(_npd(day), busdaycal=ref))


@settings(max_examples=60, deadline=None)
@given(workdays=weekday_sets, hols=holiday_sets, a=IN_RANGE, b=IN_RANGE)
def test_count_matches_numpy_busday_count(workdays, hols, a, b):
    spec = CalendarSpec("c", workdays, hols)
    cal = build_calendar(spec, ORIGIN, END)
    ref = np_calendar(spec)
    lo, hi = min(a, b), max(a, b)
    # Reference: numpy.busday_count counts [begin, end). Reversed, fieldlog gives minus the
    # count of [end, begin) (a difference of points), so compare it on the ordered pair.
    forward = int(np.busday_count(_npd(lo), _npd(hi), busdaycal=ref))
    assert cal.count(lo, hi) == forward
    assert cal.count(hi, lo) == -forward
    days = cal.working_days(lo, hi)
    # Reference: numpy.is_busday over every day of [lo, hi].
    expected = [
        lo + timedelta(days=k)
        for k in range((hi - lo).days + 1)
        if np.is_busday(_npd(lo + timedelta(days=k)), busdaycal=ref)
    ]
    assert days == expected


@settings(max_examples=30, deadline=None)
@given(workdays=weekday_sets, day=IN_RANGE)
def test_next_working_and_is_working_outside_the_built_range(workdays, day):
    """Beyond the precomputed range ``is_working`` still answers from the weekday rule."""
    spec = CalendarSpec("c", workdays)
    cal = build_calendar(spec, date(2020, 1, 1), date(2020, 2, 1))
    ref = np_calendar(spec)
    assert cal.is_working(day) == bool(np.is_busday(_npd(day), busdaycal=ref))


def test_next_working_rolls_a_saturday_to_monday():
    # Reference: numpy.busday_offset(2026-03-07, 0, roll="forward") on Mon-Fri = 2026-03-09.
    cal = build_calendar(CalendarSpec("w", frozenset(range(5))), ORIGIN, END)
    expected = np_date(np.busday_offset("2026-03-07", 0, roll="forward", weekmask="1111100"))
    assert cal.next_working(date(2026, 3, 7)) == expected == date(2026, 3, 9)


@pytest.mark.parametrize("region", ["GB-ENG", "US-TX", "DE-BY", "us-tx"])
def test_public_holidays_come_from_the_holidays_package(region):
    country, _, subdiv = region.upper().partition("-")
    # Reference: holidays.country_holidays for the same country, subdivision and years.
    expected = set(holidays.country_holidays(country, subdiv=subdiv, years=range(2026, 2028)))
    assert public_holidays(region, 2026, 2027) == expected


@pytest.mark.parametrize("region", ["GB-ENG", "US-TX"])
def test_calendar_with_a_region_closes_exactly_its_public_holidays(region):
    spec = CalendarSpec("w", frozenset(range(5)), public_holidays=region)
    cal = build_calendar(spec, date(2026, 1, 1), date(2027, 1, 1))
    country, _, subdiv = region.partition("-")
    # Reference: numpy busday calendar Mon-Fri with holidays.country_holidays as its holidays.
    table = holidays.country_holidays(country, subdiv=subdiv, years=2026)
    ref = np.busdaycalendar(weekmask="1111100", holidays=[_npd(d) for d in table])
    days = [date(2026, 1, 1) + timedelta(days=k) for k in range(365)]
    assert [cal.is_working(d) for d in days] == [
        bool(np.is_busday(_npd(d), busdaycal=ref)) for d in days
    ]
    # A known fixed-date public holiday on a weekday in 2026, for a reader's sanity:
    # 25 December 2026 is a Friday in both regions (from memory; checked by the reference above).
    assert not cal.is_working(date(2026, 12, 25))


@pytest.mark.parametrize("region", ["XX", "US-ZZ", ""])
def test_unknown_region_is_a_calendar_error(region):
    spec = CalendarSpec("w", frozenset(range(5)), public_holidays=region or "??")
    with pytest.raises(CalendarError, match="not known"):
        build_calendar(spec, date(2026, 1, 1), date(2027, 1, 1))


def test_a_calendar_without_working_days_is_refused():
    with pytest.raises(CalendarError, match="no working days"):
        build_calendar(CalendarSpec("none", frozenset()), ORIGIN, END)


def test_lost_days_close_only_the_calendars_they_name():
    specs = {
        "w": CalendarSpec("w", frozenset(range(5))),
        "a": CalendarSpec("a", frozenset(range(7))),
    }
    wet = date(2026, 3, 4)
    cals = build_calendars(specs, ORIGIN, END, {"w": [wet]})
    assert not cals["w"].is_working(wet)
    assert cals["a"].is_working(wet)
