"""Brute-force oracle for the lookahead tests, and small invented test sites.

The oracle knows nothing of fieldlog's CPM passes. It states the schedule rules in plain words
on *instants* (the end of a calendar day) and counts working days with numpy's busday functions
(the outside reference for calendar arithmetic):

* day d covers the interval from the end of day d-1 to the end of day d (common practice), so
  work starting on day F starts at the end of F-1 and work whose last day is L ends at the end
  of L;
* a link from P to S with lag n holds when S's start (FS, SS) or finish (FF, SF) comes no
  earlier than n working days after P's finish (FS, FF) or start (SS, SF); the n days are
  counted on the successor's calendar, or on the predecessor's when the site says so (then a
  finish lands at the end of a working day, a start at the beginning of one; a milestone that
  marks the end of work is at the end of a day for both);
* open work runs whole working days of its own calendar, starting no earlier than the data
  date, the site start, its start-not-before date and its open readiness items' dates;
  in-progress work has its remaining days still to do, and its start (for SS and SF links) is
  its actual start; links into it from finished work are history, and with progress override
  so are all links into it;
* a schedule "meets the late dates" when no activity finishes after the required finish (or,
  without one, the earliest finish any schedule can reach) or after its own finish-not-after.

:func:`enumerate_schedules` walks every integer schedule that keeps the links, and reports for
each activity and day in how many of them the activity runs.

The test sites built here are invented for the tests; no real company, person or place.
"""

from __future__ import annotations

import contextlib
from collections import Counter
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from datetime import date, timedelta
from types import MappingProxyType

import numpy as np

from fieldlog.engine.progress import Progress, Status
from fieldlog.site.model import Activity, CalendarSpec, Crew, LagCalendar, Link, LinkType, Site

ORIGIN = date(2025, 1, 1)
END = date(2028, 1, 1)
FINISH_TYPES = (LinkType.FS, LinkType.FF)


class OracleCalendar:
    """Working days of one calendar, counted by ``numpy.busday_count`` / ``busday_offset``."""

    def __init__(self, spec: CalendarSpec) -> None:
        mask = "".join("1" if k in spec.workdays else "0" for k in range(7))
        self.np_cal = np.busdaycalendar(weekmask=mask, holidays=sorted(spec.holidays))
        days = np.arange(np.datetime64(ORIGIN, "D"), np.datetime64(END, "D"))
        # done[k]: working days from ORIGIN up to and including day ORIGIN + k
        counts = np.busday_count(np.datetime64(ORIGIN, "D"), days + 1, busdaycal=self.np_cal)
        self._base = ORIGIN.toordinal()
        self._done = counts.tolist()
        self.working = np.is_busday(days, busdaycal=self.np_cal).tolist()

    def is_working(self, ordinal: int) -> bool:
        return self.working[ordinal - self._base]

    def done(self, ordinal: int) -> int:
        """Working days completed by the end of the day ``ordinal``."""
        return self._done[ordinal - self._base]

    def nth(self, n: int) -> int:
        """Ordinal of the n-th working day (1-based) counted from ORIGIN."""
        d = np.busday_offset(
            np.datetime64(ORIGIN, "D"), n - 1, roll="forward", busdaycal=self.np_cal
        )
        return d.astype(date).toordinal()

    def last_day(self, first: int, duration: int) -> int:
        """Last day of ``duration`` working days starting on working day ``first``."""
        return self.nth(self.done(first) + duration - 1)

    def working_between(self, first: int, last: int) -> list[int]:
        return [o for o in range(first, last + 1) if self.is_working(o)]


@dataclass
class Placement:
    """Where an activity is in one schedule: first and last day (ordinals) of its open work.

    Instants are "the end of day o" for an ordinal o. Work starts at the end of the day before
    its first day and finishes at the end of its last day; a milestone is one instant, so for it
    ``last`` is the day its instant ends and ``first`` the day after.
    """

    first: int
    last: int
    started: int
    """Instant its start means for SS/SF links: the actual start, or the planned one."""
    start_at_day_end: bool = False
    """Its start instant is the end of a working day (a milestone at the end of work), not the
    beginning of one: counted on another calendar, the lag then ends at a day's end too."""
    finish_at_day_end: bool = True
    """Its finish instant is the end of a working day (work, and milestones at the end of
    work); a milestone at the start of its day finishes at the beginning of one."""


def link_holds(
    link: Link, site: Site, cals: Mapping[str, OracleCalendar], pred: Placement, succ: Placement
) -> bool:
    """Does the schedule keep ``link``? (The rule in the module docstring.)"""
    ci = cals[site.activity(link.pred).calendar]
    cj = cals[site.activity(link.succ).calendar]
    finish_ref = link.type in FINISH_TYPES
    a = pred.last if finish_ref else pred.started
    b = succ.first - 1 if link.type in (LinkType.FS, LinkType.SS) else succ.last
    if site.lag_calendar is LagCalendar.SUCCESSOR:
        return cj.done(b) >= cj.done(a) + link.lag
    n = ci.done(a) + link.lag
    at_day_end = pred.finish_at_day_end if finish_ref else pred.start_at_day_end
    moved = ci.nth(n) if at_day_end else ci.nth(n + 1) - 1
    return cj.done(b) >= cj.done(moved)


@dataclass
class Problem:
    """One random schedule problem: the site, progress, readiness holds, status date."""

    site: Site
    status: date
    progress: dict[str, Progress] = field(default_factory=dict)
    holds: dict[str, date] = field(default_factory=dict)
    """Per activity, first day it may start because of an open readiness item."""

    @property
    def data_date(self) -> date:
        return self.status + timedelta(days=1)


@dataclass
class Enumeration:
    """What the brute force found."""

    finish: int
    """Earliest finish any link-keeping schedule reaches (ordinal)."""
    early: dict[str, Placement]
    """The first schedule found: every activity as early as the links allow."""
    total: int
    """Schedules that keep the links and meet the late dates."""
    runs: dict[str, Counter]
    """Per activity, per day ordinal: in how many of those schedules it runs that day."""


def enumerate_schedules(p: Problem, horizon_days: int = 90) -> Enumeration:
    """Walk every schedule of ``p``'s open work (see the module docstring)."""
    site = p.site
    cals = {name: OracleCalendar(spec) for name, spec in site.calendars.items()}
    prog = {a.id: p.progress.get(a.id, Progress()) for a in site.activities}
    fixed: dict[str, Placement] = {}
    open_ids: list[str] = []
    for a in site.activities:
        pr = prog[a.id]
        if pr.status is Status.FINISHED:
            fixed[a.id] = Placement(
                pr.actual_start.toordinal(),
                pr.actual_finish.toordinal(),
                pr.actual_start.toordinal() - 1,
            )
        else:
            open_ids.append(a.id)
    order = _topological(open_ids, site.links)
    dd = p.data_date.toordinal()
    horizon = dd + horizon_days
    in_links = {aid: [lk for lk in site.links if lk.succ == aid] for aid in open_ids}

    def candidates(aid: str, latest_last: int) -> list[tuple[int, int]]:
        a = site.activity(aid)
        c = cals[a.calendar]
        pr = prog[aid]
        lo = max(dd, site.start.toordinal())
        if pr.status is Status.NOT_STARTED:
            for when in (a.start_not_before, p.holds.get(aid)):
                if when is not None:
                    lo = max(lo, when.toordinal())
        dur = pr.remaining if pr.status is Status.IN_PROGRESS else a.duration
        out = []
        for first in range(lo, horizon):
            if not c.is_working(first):
                continue
            last = c.last_day(first, dur)
            if last > latest_last:
                break
            out.append((first, last))
        return out

    def counts(aid: str, pred_id: str) -> bool:
        if pred_id in fixed:
            return prog[aid].status is Status.NOT_STARTED
        return not (prog[aid].status is Status.IN_PROGRESS and site.progress_override)

    class _Stop(Exception):
        pass

    def walk(limit: Mapping[str, int], visit) -> None:
        placed: dict[str, Placement] = dict(fixed)
        options = {aid: candidates(aid, limit[aid]) for aid in order}

        def step(k: int) -> None:
            if k == len(order):
                visit(placed)
                return
            aid = order[k]
            pr = prog[aid]
            for first, last in options[aid]:
                started = pr.actual_start.toordinal() - 1 if pr.actual_start else first - 1
                here = Placement(first, last, started)
                if all(
                    link_holds(lk, site, cals, placed[lk.pred], here)
                    for lk in in_links[aid]
                    if counts(aid, lk.pred)
                ):
                    placed[aid] = here
                    step(k + 1)
                    del placed[aid]

        step(0)

    # 1. The earliest schedule. Every link only puts a floor under its successor, and that
    # floor rises with the predecessor, so the first schedule a walk in network order with
    # days in ascending order reaches has every activity as early as it can be: no other
    # schedule finishes earlier.
    early: dict[str, Placement] = {}

    def first_found(placed: dict[str, Placement]) -> None:
        early.update({k: Placement(v.first, v.last, v.started) for k, v in placed.items()})
        raise _Stop

    with contextlib.suppress(_Stop):
        walk(dict.fromkeys(order, horizon), first_found)
    assert early, "no schedule inside the horizon"
    finish = max(pl.last for pl in early.values())
    assert finish < horizon - 10, "horizon too short"

    # 2. every schedule that meets the late dates.
    target = site.finish_by.toordinal() if site.finish_by else finish
    limit = {}
    for aid in order:
        fna = site.activity(aid).finish_not_after
        limit[aid] = min(target, fna.toordinal()) if fna else target
    runs: dict[str, Counter] = {aid: Counter() for aid in order}
    total = [0]

    def tally(placed: dict[str, Placement]) -> None:
        total[0] += 1
        for aid in order:
            runs[aid][(placed[aid].first, placed[aid].last)] += 1

    walk(limit, tally)
    per_day: dict[str, Counter] = {}
    for aid in order:
        c = cals[site.activity(aid).calendar]
        days: Counter = Counter()
        for (first, last), n in runs[aid].items():
            for o in c.working_between(first, last):
                days[o] += n
        per_day[aid] = days
    return Enumeration(finish, early, total[0], per_day)


def _topological(ids: Sequence[str], links: Sequence[Link]) -> list[str]:
    left = list(ids)
    done: list[str] = []
    while left:
        for aid in left:
            if all(lk.pred not in left for lk in links if lk.succ == aid):
                done.append(aid)
                left.remove(aid)
                break
    return done


# -- invented sites ----------------------------------------------------------------------------

WEEKDAYS = CalendarSpec("weekdays", frozenset({0, 1, 2, 3, 4}))


def make_site(
    activities: Sequence[Activity],
    links: Sequence[Link] = (),
    *,
    calendars: Sequence[CalendarSpec] = (WEEKDAYS,),
    crews: Mapping[str, int] | None = None,
    start: date = date(2026, 3, 2),
    finish_by: date | None = None,
    name: str = "Test yard (invented)",
    lag_calendar: LagCalendar = LagCalendar.SUCCESSOR,
    override: bool = False,
    revision: int = 1,
) -> Site:
    """A :class:`Site` built in memory for a test."""
    return Site(
        name=name,
        start=start,
        calendar=calendars[0].name,
        calendars=MappingProxyType({c.name: c for c in calendars}),
        crews=MappingProxyType({c: Crew(c, n) for c, n in (crews or {}).items()}),
        revision=revision,
        activities=tuple(activities),
        links=tuple(links),
        finish_by=finish_by,
        progress_override=override,
        lag_calendar=lag_calendar,
    )


def act(
    aid: str,
    duration: int,
    name: str | None = None,
    *,
    calendar: str = "weekdays",
    crew: Mapping[str, int] | None = None,
    start_not_before: date | None = None,
    finish_not_after: date | None = None,
) -> Activity:
    """An activity with a readable default name."""
    return Activity(
        aid,
        name or f"Activity {aid}",
        duration,
        calendar,
        start_not_before=start_not_before,
        finish_not_after=finish_not_after,
        crew=MappingProxyType(dict(crew or {})),
    )


# -- self-checks of the oracle against numpy directly -------------------------------------------


def test_oracle_counts_match_numpy_busday_count() -> None:
    """The oracle's day counts are numpy's (numpy 2.x busday_count, half-open [begin, end))."""
    cal = OracleCalendar(
        CalendarSpec("w", frozenset({0, 1, 2, 3, 4}), frozenset({date(2026, 3, 4)}))
    )
    a, b = date(2026, 3, 2), date(2026, 3, 8)
    assert cal.done(b.toordinal()) - cal.done(a.toordinal()) == 3  # Tue, Thu, Fri (Wed closed)
    assert cal.last_day(a.toordinal(), 3) == date(2026, 3, 5).toordinal()


def test_oracle_fs_link_means_next_working_day() -> None:
    """FS with no lag: the successor may start on the next working day (DEVELOPERS.md)."""
    site = make_site([act("A", 1), act("B", 1)], [Link("A", "B")])
    cals = {"weekdays": OracleCalendar(WEEKDAYS)}
    fri, sat, mon = (date(2026, 3, d).toordinal() for d in (6, 7, 9))
    pred = Placement(fri, fri, fri - 1)
    assert not link_holds(Link("A", "B"), site, cals, pred, Placement(fri, fri, fri - 1))
    assert link_holds(Link("A", "B"), site, cals, pred, Placement(mon, mon, mon - 1))
    assert link_holds(Link("A", "B"), site, cals, pred, Placement(sat, sat, sat - 1))
