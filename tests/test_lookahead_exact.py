"""The must / may / cannot rule is exact: proved against brute-force enumeration.

DEVELOPERS.md, Rules of the trade: an activity works on day d in every schedule that keeps the
logic and meets the late dates iff LS <= d <= EF (MUST), in some such schedule iff ES <= d <= LF
(MAY), and in none otherwise (CANNOT). The outside oracle (:mod:`test_lookahead_oracle`)
enumerates every integer schedule of small random networks (every link type, leads and lags, one
or two calendars with holidays, lags on either calendar, work finished and in progress, retained
logic and progress override, start-not-before, finish-not-after, readiness holds, a required
finish that may be missed) using numpy's busday functions for the calendars, and counts the
schedules each activity runs in on each day. Milestones take no working time and are checked
apart (``test_lookahead_facts.py``).
"""

from __future__ import annotations

from datetime import date, timedelta

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from test_lookahead_oracle import (
    OracleCalendar,
    Problem,
    act,
    enumerate_schedules,
    make_site,
)

from fieldlog.engine.cpm import compute_schedule
from fieldlog.engine.progress import Progress
from fieldlog.engine.readiness import OpenItem
from fieldlog.lookahead import Cell, build_lookahead
from fieldlog.site.model import CalendarSpec, LagCalendar, Link, LinkType

MONDAY = date(2026, 3, 2)
CALENDARS = (
    CalendarSpec("weekdays", frozenset({0, 1, 2, 3, 4}), frozenset({date(2026, 3, 11)})),
    CalendarSpec("sixday", frozenset({0, 1, 2, 3, 4, 5})),
    CalendarSpec("allweek", frozenset(range(7))),
    CalendarSpec("tuesat", frozenset({1, 2, 3, 4, 5}), frozenset({date(2026, 3, 13)})),
)


@st.composite
def problems(draw) -> Problem:
    """A random small network with everything the rule has to survive."""
    n = draw(st.integers(2, 4))
    cals = [CALENDARS[0]]
    if draw(st.booleans()):
        cals.append(draw(st.sampled_from(CALENDARS[1:])))
    names = [c.name for c in cals]
    data_date = MONDAY + timedelta(days=draw(st.integers(0, 6)))
    status = data_date - timedelta(days=1)
    oracle = {c.name: OracleCalendar(c) for c in cals}
    activities, progress, holds = [], {}, {}
    for k in range(n):
        aid = f"A{k}"
        cal = draw(st.sampled_from(names))
        state = draw(st.sampled_from(["new", "new", "new", "running", "done"]))
        dur = draw(st.integers(1, 3))
        snb = fna = None
        if state == "new" and draw(st.integers(0, 3)) == 0:
            snb = data_date + timedelta(days=draw(st.integers(-3, 8)))
        if state != "done" and draw(st.integers(0, 4)) == 0:
            fna = data_date + timedelta(days=draw(st.integers(2, 20)))
        activities.append(act(aid, dur, calendar=cal, start_not_before=snb, finish_not_after=fna))
        past = [
            d
            for d in (status - timedelta(days=j) for j in range(10))
            if oracle[cal].is_working(d.toordinal())
        ]
        if state == "running":
            started = draw(st.sampled_from(past))
            progress[aid] = Progress(
                actual_start=started, remaining=draw(st.integers(1, 3)), remaining_as_of=status
            )
        elif state == "done":
            a, b = sorted(draw(st.lists(st.sampled_from(past), min_size=2, max_size=2)))
            progress[aid] = Progress(actual_start=a, actual_finish=b)
        elif draw(st.integers(0, 4)) == 0:
            holds[aid] = data_date + timedelta(days=draw(st.integers(1, 8)))
    links = []
    for j in range(n):
        for i in range(j):
            if draw(st.integers(0, 2)) == 0:
                continue
            kind = draw(st.sampled_from(list(LinkType)))
            links.append(Link(f"A{i}", f"A{j}", kind, draw(st.integers(-2, 3))))
    finish_by = None
    if draw(st.integers(0, 2)) == 0:
        finish_by = data_date + timedelta(days=draw(st.integers(0, 20)))
    site = make_site(
        activities,
        links,
        calendars=cals,
        start=data_date - timedelta(days=draw(st.integers(-3, 10))),
        finish_by=finish_by,
        lag_calendar=draw(st.sampled_from(list(LagCalendar))),
        override=draw(st.booleans()),
    )
    return Problem(site, status, progress, holds)


def _readiness(p: Problem) -> list[OpenItem]:
    """Open readiness items that hold the activities as ``p.holds`` says."""
    return [
        OpenItem(aid, "drawings", "drawings", until - timedelta(days=1), p.status)
        for aid, until in p.holds.items()
    ]


@settings(
    max_examples=200, deadline=None, derandomize=True, suppress_health_check=[HealthCheck.too_slow]
)
@given(problems())
def test_classes_equal_all_some_none_of_the_enumerated_schedules(p: Problem) -> None:
    """Brute force (outside oracle): MUST = runs in all schedules, MAY = in some, CANNOT =
    in none; with negative float no schedule meets the late dates and the late activity's
    MUST days are exactly its earliest possible days."""
    items = _readiness(p)
    result = compute_schedule(
        p.site,
        p.status,
        p.progress,
        holds={i.activity: i.expected + timedelta(days=1) for i in items},
    )
    found = enumerate_schedules(p)
    # The oracle and the engine agree on the job's earliest finish.
    assert found.finish == result.finish.toordinal()

    first = p.data_date - timedelta(days=2)  # two past days: always CANNOT or off
    last = date.fromordinal(
        max(found.finish, p.site.finish_by.toordinal() if p.site.finish_by else 0)
    ) + timedelta(days=3)
    la = build_lookahead(
        result, items, first, max((last - first).days + 1, 7), suggest_levelling=False
    )
    cals = {c: OracleCalendar(spec) for c, spec in p.site.calendars.items()}
    any_late = any(row.late for row in la.rows)
    assert any_late == (found.total == 0)
    for row in la.rows:
        cal = cals[row.calendar]
        runs = found.runs[row.id]
        early = found.early[row.id]
        for day, cell in zip(la.days, row.cells, strict=True):
            o = day.toordinal()
            if not cal.is_working(o):
                expected = Cell.OFF
            elif o < p.data_date.toordinal():
                expected = Cell.CANNOT
            elif found.total == 0:
                if not row.late:
                    continue  # no schedule meets the late dates: nothing to compare with
                expected = (
                    Cell.MUST
                    if early.first <= o <= early.last
                    else Cell.DONE
                    if o > early.last
                    else Cell.CANNOT
                )
            elif runs[o] == found.total:
                expected = Cell.MUST
            elif runs[o] > 0:
                expected = Cell.MAY
            elif o > early.last:  # after the earliest run and in no run: after every run
                expected = Cell.DONE
            else:
                expected = Cell.CANNOT
            assert cell is expected, (row.id, day, cell, expected, runs[o], found.total)


@settings(
    max_examples=100, deadline=None, derandomize=True, suppress_health_check=[HealthCheck.too_slow]
)
@given(problems())
def test_every_may_and_cannot_day_has_a_reason(p: Problem) -> None:
    """A reason for every MAY and CANNOT cell (a rule of the lookahead), none for days off."""
    items = _readiness(p)
    result = compute_schedule(
        p.site,
        p.status,
        p.progress,
        holds={i.activity: i.expected + timedelta(days=1) for i in items},
    )
    la = build_lookahead(result, items, p.data_date - timedelta(days=1), 30)
    for row in la.rows:
        for cell, k in zip(row.cells, row.why, strict=True):
            if cell in (Cell.MAY, Cell.CANNOT, Cell.DONE) or row.late and cell is Cell.MUST:
                assert k is not None and row.reasons[k], (row.id, cell)
            if cell is Cell.OFF:
                assert k is None
