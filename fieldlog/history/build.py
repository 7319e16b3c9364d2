"""The forecast history of a site: every logged day recomputed, grouped, with PPC per week.

Pure: the site and the journal in, a frozen :class:`History` out; no files, no clock.
The days are replayed one after another (:mod:`fieldlog.history.days`) and scheduled on shared
calendars (:mod:`fieldlog.history.scheduler`); each day's movement is split by cause
(:mod:`fieldlog.history.movement`), the days are grouped into windows
(:mod:`fieldlog.history.windows`) and each week's plan is checked against the log
(:mod:`fieldlog.history.reliability`).
"""

from __future__ import annotations

from collections.abc import Iterator, Sequence
from dataclasses import dataclass, field
from datetime import date, timedelta

from fieldlog.engine.readiness import holds
from fieldlog.engine.result import ScheduleResult
from fieldlog.history.days import DayState, logged_days, replay_days
from fieldlog.history.movement import DayMovement, Point
from fieldlog.history.reliability import week_reliability
from fieldlog.history.scheduler import DayScheduler
from fieldlog.history.values import DayRecord, History, WeekReliability
from fieldlog.history.windows import GROUPINGS, group
from fieldlog.journal.entries import Entry
from fieldlog.journal.reader import Journal
from fieldlog.journal.replay import replay
from fieldlog.site.model import Site

_DAY = timedelta(days=1)


@dataclass
class _Week:
    """A week being collected: its plan and the entries dated in it so far."""

    monday: date
    plan: ScheduleResult
    readiness: tuple
    entries: list[Entry] = field(default_factory=list)

    def close(self) -> WeekReliability:
        return week_reliability(self.plan, self.readiness, self.monday, self.entries)


@dataclass(frozen=True)
class DayRun:
    """One logged day as the history computes it (for the app and the differential tests)."""

    record: DayRecord
    result: ScheduleResult
    """The schedule as of the end of the day, the same as ``fieldlog schedule --as-of``."""
    state: DayState


def history_days(
    site: Site,
    entries: Sequence[Entry],
    first: date | None = None,
    last: date | None = None,
    weeks: list[WeekReliability] | None = None,
) -> Iterator[DayRun | Point]:
    """The starting point, then every logged day in ``[first, last]`` in order.

    The first item is the :class:`~fieldlog.history.movement.Point` the first day is measured
    from (the log as of the last logged day before ``first``; the plan with no progress when
    there is none). When ``weeks`` is given, each week's PPC is appended to it as it closes.
    """
    days = [d for d in logged_days(entries) if last is None or d <= last]
    scheduler = DayScheduler(
        site, days[0] if days else site.start, days[-1] if days else site.start
    )
    mover = DayMovement(scheduler)
    before: DayState | None = None
    prev: Point | None = None
    week: _Week | None = None
    for state in replay_days(site, entries, days):
        if first is not None and state.day < first:
            before = state
            continue
        if prev is None:
            status = before.day if before else min(site.start, state.day) - _DAY
            prev = mover.start(status, before)
            yield prev
        monday = state.day - timedelta(days=state.day.weekday())
        if weeks is not None and (week is None or week.monday != monday):
            if week is not None:
                weeks.append(week.close())
            week = _Week(monday, _plan(scheduler, prev, monday - _DAY), prev.readiness)
        if week is not None:
            week.entries.extend(state.entries)
        prev, record = mover.day(prev, state)
        yield DayRun(record, prev.result, state)
    if prev is None:
        status = before.day if before else site.start - _DAY
        if last is not None and last < status:
            status = last  # a range that ends before the site starts: the plan as of then
        yield mover.start(status, before)
    if weeks is not None and week is not None:
        weeks.append(week.close())


def _plan(scheduler: DayScheduler, prev: Point, sunday: date) -> ScheduleResult:
    """The schedule a week's lookahead is read from: the log as of ``prev``, status Sunday."""
    if sunday <= prev.status:
        return prev.result
    return scheduler.schedule(sunday, prev.progress, prev.lost, holds(prev.readiness, sunday))


def build_history(
    site: Site,
    journal: Journal | Sequence[Entry],
    *,
    first: date | None = None,
    last: date | None = None,
    by: str = "day",
) -> History:
    """The forecast history over the logged days in ``[first, last]`` grouped ``by`` day,
    week or month, with PPC for every week that has a logged day in the range.

    Give the :class:`~fieldlog.journal.Journal` itself, so a damaged file is among the
    problems; a plain sequence of entries has no file findings.

    Raises:
        ValueError: ``by`` is not one of :data:`~fieldlog.history.windows.GROUPINGS`, or
            ``first`` is after ``last``.
    """
    if by not in GROUPINGS:
        raise ValueError(f"unknown grouping {by!r} (known: {', '.join(GROUPINGS)})")
    if first is not None and last is not None and first > last:
        raise ValueError(f"--from {first} is after --to {last}")
    entries = journal.entries if isinstance(journal, Journal) else journal
    weeks: list[WeekReliability] = []
    records: list[DayRecord] = []
    start: Point | None = None
    for item in history_days(site, entries, first, last, weeks):
        if isinstance(item, Point):
            start = item
        else:
            records.append(item.record)
    assert start is not None
    status = last or (records[-1].day if records else start.status)
    problems = tuple(p.message for p in replay(site, journal, status).problems)
    return History(
        site=site.name,
        revision=site.revision,
        calendar=site.calendar,
        finish_by=site.finish_by,
        by=by,
        baseline_status=start.status,
        baseline_finish=start.result.finish,
        baseline_float=start.result.finish_float,
        windows=group(records, by),
        weeks=tuple(weeks),
        problems=problems,
    )
