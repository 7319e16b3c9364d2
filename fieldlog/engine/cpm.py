"""Critical path method: forward and backward passes over the precedence network.

Pure: no I/O, no clock. Input is a :class:`~fieldlog.site.model.Site`, the status date ("as of the
end of day D"; the data date is the next day) and each activity's :class:`Progress`.
Output is a :class:`ScheduleResult`.

How the passes work (the rules are in DEVELOPERS.md, Rules of the trade; the formulas are
the precedence diagramming method's, e.g. Hendrickson, *Project Management for
Construction*, section 10.7):

* Times are integer *points* on each activity's own calendar (see :mod:`fieldlog.engine.calendars`).
  ES is the start point, EF = ES + duration the finish point. Shown dates are inclusive working
  days: first day ``day(ES)``, last day ``day(EF - 1)``.
* A link's bound moves from the predecessor's calendar to the successor's by the date it
  stands for: a *finish* point is "after the predecessor's last day", a *start* point is "at
  the predecessor's first day". With one calendar the conversion is the identity.
* A milestone (duration 0) is an instant. When a finish-type link drives it (FS or FF from
  other work) it is the end of that work: its date is the last day of the work before it, and
  a successor on another calendar sees "after that day". Otherwise (no predecessors, driven by
  the site start, the data date, a start-not-before date or a start-type link) it is the start
  of its day, and it is shown on that day. So a milestone is never dated before the data date,
  the site start or its own start-not-before date.
* Lags are counted on the successor's calendar (site setting ``lag_calendar`` can choose the
  predecessor's), the usual choice when a cure or dry time sits on a seven-day successor.
* Finished activities keep their actual dates. An open activity's remaining work starts no
  earlier than the data date. Out-of-sequence work: with retained logic (default) the remaining
  work still waits for unfinished predecessors; with progress override those links are dropped
  for it. Each case is reported.
* The backward pass starts from ``finish_by`` when the site sets one (so float can be negative
  and shows how far behind the job is), otherwise from the forecast finish; activity
  ``finish_not_after`` dates tighten it.
* Total float = LF - EF = LS - ES, free float = how far EF can move before any successor's
  early date moves (terminal activities: before the forecast finish), both in working days of
  the activity's own calendar.
* Critical means total float <= max(0, lowest total float); the *driving path* is traced back
  from the finish along driving links (the longest path). With several calendars the two can
  differ, and both are reported.

How it is computed, so the app can recompute after every journal entry:

* :mod:`fieldlog.engine.compiled` compiles the site once (the workspace does it and passes the
  value in): :mod:`fieldlog.engine.network_arrays` turns it into arrays, links sorted by the
  *level* of their successor (the longest chain of links leading to it);
* :mod:`fieldlog.engine.calendar_tables` stacks the calendars into tables, so moving a point to
  another calendar is an array lookup;
* this module fixes what dates and progress decide before the passes (:func:`_starting_point`),
  then :mod:`fieldlog.engine.passes` runs the forward and backward passes one level at a time with
  numpy, and the summary (finish, critical set, driving path) is taken from the arrays;
* :mod:`fieldlog.engine.rows` builds the per-activity result rows only when they are read.

Every entry point takes the compiled site, or a plain :class:`Site` that it compiles first
(convenient for one-off callers and tests; a caller that recomputes should compile once).

A 10,000-activity site recomputes in about ten milliseconds, rows included in a few tens (see
tests/benchmarks/bench_cpm.py). tests/helpers/reference_cpm.py keeps the earlier
one-activity-at-a-time engine, and tests/test_cpm_differential.py checks that both agree on
random sites.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from datetime import date, timedelta
from types import MappingProxyType
from typing import NamedTuple

import numpy as np

from fieldlog.engine.calendar_tables import CalendarTables, calendar_tables
from fieldlog.engine.calendars import HorizonExceeded, WorkCalendar, build_calendars
from fieldlog.engine.compiled import CompiledSite, compiled
from fieldlog.engine.horizon import widened
from fieldlog.engine.network_arrays import NetworkArrays
from fieldlog.engine.passes import Early, Start, backward, forward
from fieldlog.engine.progress import Progress, remaining_at
from fieldlog.engine.result import (
    OUT_OF_SEQUENCE_KINDS,
    OutOfSequence,
    ScheduleResult,
    critical_threshold,
    finish_float,
    finished_without_start,
)
from fieldlog.engine.rows import (
    ACTUAL_DATES,
    DATA_DATE,
    READINESS,
    SITE_START,
    START_NOT_BEFORE,
    Columns,
    RowsById,
    ScheduleRows,
)
from fieldlog.site.model import LagCalendar, Site

_DAY = timedelta(days=1)


def compute_schedule(
    site: Site | CompiledSite,
    status_date: date,
    progress: Mapping[str, Progress] | None = None,
    *,
    lost_days: Mapping[str, Iterable[date]] | None = None,
    holds: Mapping[str, date] | None = None,
) -> ScheduleResult:
    """Schedule ``site`` as of the end of ``status_date``.

    Args:
        site: the validated site, or its compiled form (see :mod:`fieldlog.engine.compiled`).
        status_date: the last day whose progress is known; the data date is the next day.
        progress: field progress per activity id (missing ids have not started).
        lost_days: per calendar name, days lost on site; they become non-working days.
        holds: per activity id, a date it cannot start before (open readiness items).

    Returns:
        Dates, floats, status and the driving predecessor of every activity.
    """
    comp = compiled(site)
    progress = progress or {}
    lost = {name: tuple(days) for name, days in (lost_days or {}).items()}
    holds = holds or {}
    lo, hi = _initial_range(comp, status_date, progress, holds)
    while True:
        calendars = build_calendars(comp.site.calendars, lo, hi, lost)
        try:
            return _run(comp, status_date, progress, holds, calendars)
        except HorizonExceeded:
            lo, hi = widened(comp.site.start, lo, hi)


def _initial_range(
    comp: CompiledSite, status: date, progress: Mapping[str, Progress], holds: Mapping[str, date]
) -> tuple[date, date]:
    """The first date range to build calendars over: every known date with a wide margin, and
    room for all the work after them. :func:`compute_schedule` widens it when a pass leaves it.
    """
    site = comp.site
    known = [site.start, status, *holds.values()]
    known += [d for d in (site.finish_by,) if d]
    for field in ("actual_start", "actual_finish"):
        days = [d for p in progress.values() if (d := getattr(p, field))]
        known += [min(days), max(days)] if days else []
    ahead = min(comp.net.total_work * 2, 365 * 6) + 400
    return min(known) - timedelta(days=400), max(known) + timedelta(days=ahead)


def schedule_on_calendars(
    site: Site | CompiledSite,
    status_date: date,
    progress: Mapping[str, Progress],
    holds: Mapping[str, date],
    calendars: Mapping[str, WorkCalendar],
) -> ScheduleResult:
    """:func:`compute_schedule` on calendars the caller built (lost days already applied).

    For callers that schedule one site as of many days (the forecast history): building the
    calendars once over a wide range and reusing them is most of the saving. The result does
    not depend on the range, only on the days in it.

    Raises:
        HorizonExceeded: the work runs outside the calendars' range; widen it and call again.
    """
    return _run(compiled(site), status_date, progress, holds, calendars)


def forecast_finish_on_calendars(
    site: Site | CompiledSite,
    status_date: date,
    progress: Mapping[str, Progress],
    holds: Mapping[str, date],
    calendars: Mapping[str, WorkCalendar],
) -> date:
    """The forecast finish alone (forward pass only): the same date as
    :func:`schedule_on_calendars` gives, at about half the cost.

    Raises:
        HorizonExceeded: as :func:`schedule_on_calendars`.
    """
    return _forward(compiled(site), status_date, progress, holds, calendars)[-1]


def _forward(
    comp: CompiledSite,
    status_date: date,
    progress: Mapping[str, Progress],
    holds: Mapping[str, date],
    calendars: Mapping[str, WorkCalendar],
) -> tuple[NetworkArrays, CalendarTables, _Fixed, Early, np.ndarray, int, date]:
    """The forward pass and what it fixes: last working day of every activity and the finish."""
    site, net = comp.site, comp.net
    tables = calendar_tables(calendars, net.calendar_names)
    fixed = _starting_point(site, net, tables, status_date, progress, holds)
    start = fixed.start
    early = forward(net, tables, start, **_options(site))
    fin, dur, cal = start.finished, start.duration, net.calendar
    is_open = ~fin
    # Last working day of every activity (a start milestone: its own day), as an ordinal.
    last = np.empty(net.size, dtype=np.int64)
    point = np.where((dur != 0) | early.end_after, early.finish - 1, early.start)
    last[is_open] = tables.ordinals(cal[is_open], point[is_open])
    last[fin] = start.actual_finish[fin]
    finish_ord = int(last.max()) if net.size else site.start.toordinal()
    return net, tables, fixed, early, last, finish_ord, date.fromordinal(finish_ord)


def _options(site: Site) -> dict[str, bool]:
    return {
        "override": site.progress_override,
        "lag_on_successor": site.lag_calendar is LagCalendar.SUCCESSOR,
    }


def _run(
    comp: CompiledSite,
    status_date: date,
    progress: Mapping[str, Progress],
    holds: Mapping[str, date],
    calendars: Mapping[str, WorkCalendar],
) -> ScheduleResult:
    net, tables, fixed, early, last, finish_ord, finish = _forward(
        comp, status_date, progress, holds, calendars
    )
    site = comp.site
    start = fixed.start
    options = _options(site)
    fin, dur = start.finished, start.duration
    is_open = ~fin

    latest, slack = _late_bounds(site, net, tables, early, is_open, finish)
    late_finish, slack = backward(net, tables, start, early, latest, slack, **options)
    late_start = late_finish - dur
    total_float = late_finish - early.finish
    threshold = critical_threshold(total_float[is_open].tolist())
    critical = is_open & (total_float <= threshold)
    path = _driving_path(net, fin, last, finish_ord, total_float, early.driver)
    if is_open.any() and late_start[is_open].min() < 1:
        raise HorizonExceeded("late dates")  # negative float reaching before the range

    on_path = np.zeros(net.size, dtype=bool)
    on_path[[net.index[aid] for aid in path]] = True
    columns = Columns(
        compiled=comp,
        tables=tables,
        progress=fixed.reported,
        finished=fin,
        remaining=dur,
        early_start=early.start,
        early_finish=early.finish,
        late_start=late_start,
        late_finish=late_finish,
        total_float=total_float,
        free_float=np.maximum(slack, 0),
        critical=critical,
        on_driving_path=on_path,
        driver=np.where(is_open, early.driver, -1),
        reason=fixed.reason,
        overdue=fixed.overdue,
        end_after=early.end_after,
    )
    ids = net.ids
    rows = ScheduleRows(columns)
    return ScheduleResult(
        site=site,
        as_of=status_date,
        finish=finish,
        finish_float=finish_float(site, finish, calendars),
        activities=rows,
        driving_path=tuple(path),
        lowest_float=tuple(ids[k] for k in np.flatnonzero(critical).tolist()),
        out_of_sequence=_out_of_sequence(site, net, fin, fixed.started)
        + finished_without_start(site, progress),
        calendars=MappingProxyType(dict(calendars)),
        by_id=RowsById(rows),
        compiled=comp,
    )


class _Fixed(NamedTuple):
    """What dates and progress fix before the passes (arrays by activity position)."""

    start: Start
    """The passes' input."""
    reason: np.ndarray
    """What sets the early start when no link does (code into ``cpm_rows.REASONS``)."""
    overdue: np.ndarray
    started: np.ndarray
    """An actual start is recorded."""
    reported: list[tuple[int, Progress]]
    """(position, progress) of every activity the field reported on."""


def _starting_point(
    site: Site,
    net: NetworkArrays,
    tables: CalendarTables,
    status_date: date,
    progress: Mapping[str, Progress],
    holds: Mapping[str, date],
) -> _Fixed:
    """What dates and progress fix before the passes.

    Open work starts no earlier than the later of the site start and the data date (on its
    calendar), and not before its start-not-before date or readiness hold. Finished work keeps
    its actual dates; work in progress needs its remaining duration from the data date and
    keeps its actual start for SS and SF links.
    """
    n, cal, cals = net.size, net.calendar, tables.calendars
    s = np.array([c.pos(site.start) for c in cals], dtype=np.int64)
    d = np.array([c.pos(status_date + _DAY) for c in cals], dtype=np.int64)
    floor = np.maximum(s, d)[cal]
    reason = np.where(s >= d, SITE_START, DATA_DATE)[cal]
    duration = net.duration.copy()
    finished = np.zeros(n, dtype=bool)
    in_progress = np.zeros(n, dtype=bool)
    actual_start = np.zeros(n, dtype=np.int64)
    actual_finish = np.zeros(n, dtype=np.int64)
    overdue = np.zeros(n, dtype=bool)

    reported: list[tuple[int, Progress]] = []
    done: list[tuple[int, int, int]] = []  # position, first day, day after the last
    going: list[tuple[int, int]] = []  # position, actual start
    for aid, p in progress.items():
        at = net.index.get(aid)
        if at is None:
            continue  # no longer in the schedule
        reported.append((at, p))
        if p.actual_finish is not None:
            first_day = p.actual_start or p.actual_finish
            done.append((at, first_day.toordinal(), p.actual_finish.toordinal() + 1))
        elif p.actual_start is not None:
            duration[at], overdue[at] = remaining_at(
                p, int(duration[at]), cals[cal[at]], status_date
            )
            going.append((at, p.actual_start.toordinal()))
    if done:
        k, first, after = (np.array(v, dtype=np.int64) for v in zip(*done, strict=True))
        es = tables.points(cal[k], first)
        ef = np.maximum(tables.points(cal[k], after), es)
        finished[k] = True
        floor[k], duration[k], reason[k] = es, ef - es, ACTUAL_DATES
        actual_finish[k] = after - 1
    if going:
        k, first = (np.array(v, dtype=np.int64) for v in zip(*going, strict=True))
        in_progress[k] = True
        actual_start[k] = tables.points(cal[k], first)
        reason[k] = DATA_DATE  # the floor of remaining work is the data date, even if later

    waiting = ~(finished | in_progress)
    k = np.flatnonzero(waiting & (net.start_not_before > 0))
    if k.size:
        b = tables.points(cal[k], net.start_not_before[k])
        later = b > floor[k]
        floor[k[later]], reason[k[later]] = b[later], START_NOT_BEFORE
    for aid, when in holds.items():
        j = net.index.get(aid)
        if j is not None and waiting[j]:
            b = cals[cal[j]].pos(when)
            if b > floor[j]:
                floor[j], reason[j] = b, READINESS
    start = Start(
        duration=duration,
        floor=floor,
        finished=finished,
        in_progress=in_progress,
        actual_start=actual_start,
        actual_finish=actual_finish,
    )
    started = in_progress.copy()
    started[[k for k, p in reported if p.actual_start and p.actual_finish]] = True
    return _Fixed(start, reason, overdue, started, reported)


def _late_bounds(
    site: Site,
    net: NetworkArrays,
    tables: CalendarTables,
    early: Early,
    is_open: np.ndarray,
    finish: date,
) -> tuple[np.ndarray, np.ndarray]:
    """Latest finish and free slack each open activity gets from dates alone.

    The backward pass starts at ``finish_by`` (or the forecast finish), tightened by finish
    not after dates; free slack runs to the forecast finish. A milestone at the start of its
    day is "on or before day X" one point earlier.
    """
    cal = net.calendar
    target = site.finish_by or finish
    end = np.array([c.pos(target + _DAY) for c in tables.calendars], dtype=np.int64)
    forecast = np.array([c.pos(finish + _DAY) for c in tables.calendars], dtype=np.int64)
    cut = (~early.end_after).astype(np.int64)
    latest = end[cal] - cut
    slack = forecast[cal] - cut - early.finish
    k = np.flatnonzero(is_open & (net.finish_not_after > 0))
    if k.size:
        fna = tables.points(cal[k], net.finish_not_after[k] + 1) - cut[k]
        latest[k] = np.minimum(latest[k], fna)
        slack[k] = np.minimum(slack[k], fna - early.finish[k])
    return latest, slack


def _out_of_sequence(
    site: Site, net: NetworkArrays, finished: np.ndarray, started: np.ndarray
) -> tuple[OutOfSequence, ...]:
    """Links whose successor moved on before the predecessor allowed, in file order.

    See :data:`fieldlog.engine.result.OUT_OF_SEQUENCE_KINDS`: the successor's side is its
    finish for links that bound a finish (FF, SF), otherwise its start; the predecessor's side
    is its start for links that read a start (SS, SF), otherwise its finish.
    """
    moved_on = np.where(net.bounds_finish, finished[net.succ], started[net.succ])
    caught_up = np.where(net.reads_start, started[net.pred], finished[net.pred])
    found = np.sort(net.link[moved_on & ~caught_up]).tolist()
    if not found:
        return ()
    treatment = "progress override" if site.progress_override else "retained logic"
    links = site.links
    return tuple(
        OutOfSequence(links[k], OUT_OF_SEQUENCE_KINDS[links[k].type], treatment) for k in found
    )


def _driving_path(
    net: NetworkArrays,
    finished: np.ndarray,
    last: np.ndarray,
    finish_ord: int,
    total_float: np.ndarray,
    driver: np.ndarray,
) -> list[str]:
    """Walk driving links back from the open activity that finishes last.

    Of several open activities ending on the finish day the one with the least float is taken,
    and of those the last in network order (a finish milestone rather than the work before
    it). The walk stops at finished work or at an activity whose early start is set by a date
    rather than a link.
    """
    ends = np.flatnonzero(~finished & (last == finish_ord))
    if not ends.size:
        return []
    least = ends[total_float[ends] == total_float[ends].min()]
    k = int(least[np.argmax(net.rank[least])] if least.size > 1 else least[0])
    # Plain lists for the walk (a long chain is walked link by link): the predecessor of each
    # link in site.links order, the driving link and the finished flag of each activity.
    pred_of = np.empty_like(net.pred)
    pred_of[net.link] = net.pred
    preds, drivers, done = pred_of.tolist(), driver.tolist(), finished.tolist()
    walk, seen = [k], {k}
    while drivers[k] >= 0:
        k = preds[drivers[k]]
        if k in seen:
            break
        walk.append(k)
        seen.add(k)
        if done[k]:
            break
    ids = net.ids
    return [ids[k] for k in reversed(walk)]
