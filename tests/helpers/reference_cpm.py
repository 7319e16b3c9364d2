"""Reference CPM engine for tests: the pure-Python passes, kept as they were written.

This is a frozen copy of the engine before it moved to array passes (fieldlog/engine/cpm.py at the
commit that added numpy). It is deliberately plain: one loop over the topological order, one
activity at a time, so that the array engine can be checked against it field by field on
random sites (tests/test_cpm_differential.py). It is used only by tests; do not "improve" it
along with the engine, or the comparison stops meaning anything. Changes from the copy: it
builds its network on every call (it kept it on the site value), it hands the result the
site's compiled form (a field results carry), and the small result helpers it relied on
(critical_threshold, find_out_of_sequence and the result assembly) are copied below so that
changes to fieldlog/engine/result.py cannot leak into it.

Original docstring follows.

Critical path method: forward and backward passes over the precedence network.

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

The passes are written as flat loops over lists indexed by activity position (no per-activity
objects until the results are built): a 10,000-activity site recomputes in a few tens of
milliseconds (see tests/benchmarks/bench_cpm.py), so the app can recompute after every entry.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping, Sequence
from datetime import date, timedelta
from types import MappingProxyType

from fieldlog.engine.calendars import HorizonExceeded, WorkCalendar, build_calendars
from fieldlog.engine.compiled import compile_site
from fieldlog.engine.progress import NO_PROGRESS, Progress, Status, remaining_at
from fieldlog.engine.result import ActivityResult, OutOfSequence, ScheduleResult
from fieldlog.engine.topology import topological_order
from fieldlog.site.model import LagCalendar, Link, LinkType, Site

_FS, _SS, _FF, _SF = 0, 1, 2, 3
# Bit 1 set: the link reads the predecessor's start (SS, SF); bit 2 set: it bounds the
# successor's finish (FF, SF).
_TYPE_CODE = {LinkType.FS: _FS, LinkType.SS: _SS, LinkType.FF: _FF, LinkType.SF: _SF}
_DAY = timedelta(days=1)

_Edge = tuple[int, int, int, Link, bool]
"""(other activity's position, link type code, lag, link, both ends on the same calendar)."""


def compute_schedule(
    site: Site,
    status_date: date,
    progress: Mapping[str, Progress] | None = None,
    *,
    lost_days: Mapping[str, Iterable[date]] | None = None,
    holds: Mapping[str, date] | None = None,
) -> ScheduleResult:
    """Schedule ``site`` as of the end of ``status_date``.

    Args:
        site: the validated site.
        status_date: the last day whose progress is known; the data date is the next day.
        progress: field progress per activity id (missing ids have not started).
        lost_days: per calendar name, days lost on site; they become non-working days.
        holds: per activity id, a date it cannot start before (open readiness items).

    Returns:
        Dates, floats, status and the driving predecessor of every activity.
    """
    progress = progress or {}
    lost = {name: tuple(days) for name, days in (lost_days or {}).items()}
    holds = holds or {}
    lo, hi = _initial_range(site, status_date, progress, holds)
    while True:
        calendars = build_calendars(site.calendars, lo, hi, lost)
        try:
            return _run(site, status_date, progress, holds, calendars)
        except HorizonExceeded:
            span = (hi - lo).days
            lo, hi = lo - timedelta(days=span), hi + timedelta(days=span)


def _initial_range(
    site: Site, status: date, progress: Mapping[str, Progress], holds: Mapping[str, date]
) -> tuple[date, date]:
    known = [site.start, status]
    known += [d for d in (site.finish_by,) if d]
    for p in progress.values():
        known += [d for d in (p.actual_start, p.actual_finish) if d]
    known += list(holds.values())
    ahead = min(_network(site)[3] * 2, 365 * 6) + 400
    return min(known) - timedelta(days=400), max(known) + timedelta(days=ahead)


def _network(site: Site) -> tuple[list[int], list[list[_Edge]], list[list[_Edge]], int]:
    """Topological order, predecessor and successor lists, and the total work in days."""
    ids = [a.id for a in site.activities]
    index = {aid: k for k, aid in enumerate(ids)}
    order_ids, cycle = topological_order(ids, ((lk.pred, lk.succ) for lk in site.links))
    assert cycle is None, "site_files refuses loops"
    order = [index[a] for a in order_ids]
    preds: list[list[_Edge]] = [[] for _ in ids]
    succs: list[list[_Edge]] = [[] for _ in ids]
    cal_of = [a.calendar for a in site.activities]
    work = sum(a.duration for a in site.activities)
    for lk in site.links:
        i, j, t, lag = index[lk.pred], index[lk.succ], _TYPE_CODE[lk.type], lk.lag
        same = cal_of[i] == cal_of[j]
        preds[j].append((i, t, lag, lk, same))
        succs[i].append((j, t, lag, lk, same))
        if lag > 0:
            work += lag
    return order, preds, succs, work


def _run(
    site: Site,
    status_date: date,
    progress: Mapping[str, Progress],
    holds: Mapping[str, date],
    calendars: Mapping[str, WorkCalendar],
) -> ScheduleResult:
    acts = site.activities
    n = len(acts)
    order, preds, succs, _ = _network(site)
    cal = [calendars[a.calendar] for a in acts]
    if progress:
        prog = [progress.get(a.id, NO_PROGRESS) for a in acts]
        status = [p.status for p in prog]
    else:
        prog = [NO_PROGRESS] * n
        status = [Status.NOT_STARTED] * n
    lag_on_succ = site.lag_calendar is LagCalendar.SUCCESSOR
    override = site.progress_override
    FIN, RUN = Status.FINISHED, Status.IN_PROGRESS

    # Per calendar: the point that bounds every open activity, and what it is called.
    after_status = status_date + _DAY
    floor_pt: dict[WorkCalendar, tuple[int, str]] = {}
    for c in calendars.values():
        s, d = c.pos(site.start), c.pos(after_status)
        floor_pt[c] = (s, "site start") if s >= d else (d, "data date")

    dur = [a.duration for a in acts]  # planned, or remaining for work in progress
    overdue = [False] * n
    start_pt = [0] * n  # actual start point for started work (what SS/SF links see)
    es = [0] * n
    ef = [0] * n
    driver: list[Link | str] = ["site start"] * n
    # How a successor on another calendar reads this activity's start and finish points:
    # True = "after the working day before the point", False = "at the point's day".
    # Work: start at its first day, finish after its last day. Milestones: see module doc.
    start_after = [False] * n
    end_after = [True] * n

    for j in order:
        st, c = status[j], cal[j]
        if st is FIN:
            p = prog[j]
            es[j] = start_pt[j] = c.pos(p.actual_start or p.actual_finish)
            ef[j] = max(c.pos(p.actual_finish + _DAY), es[j])
            dur[j] = ef[j] - es[j]
            driver[j] = "actual dates"
            continue
        lo, why = floor_pt[c]
        if st is RUN:
            p = prog[j]
            d, overdue[j] = remaining_at(p, dur[j], c, status_date)
            dur[j] = d
            start_pt[j] = c.pos(p.actual_start)
            if why == "site start":
                why = "data date"
        else:
            d = dur[j]
            a = acts[j]
            if a.start_not_before is not None:
                b = c.pos(a.start_not_before)
                if b > lo:
                    lo, why = b, "start not before"
            if holds:
                when = holds.get(a.id)
                if when is not None and c.pos(when) > lo:
                    lo, why = c.pos(when), "readiness"
        date_lo, lo_after = lo, False
        for i, t, lag, link, same in preds[j]:
            if st is RUN and (override or status[i] is FIN):
                continue  # history: the link was met or broken before the status date
            b = start_pt[i] if t & 1 else ef[i]
            if same:
                b += lag
            else:
                aft = start_after[i] if t & 1 else end_after[i]
                if lag_on_succ:
                    b = _move(b, cal[i], c, aft) + lag
                else:
                    b = _move(b + lag, cal[i], c, aft)
            if t & 2:
                b -= d
            # A link that ties with a date still drives (the driving path goes through it).
            if b > lo or (b == lo and type(why) is str):
                lo, why = b, link
                lo_after = start_after[i] if t & 1 else end_after[i]
        es[j] = lo
        ef[j] = lo + d
        if st is not RUN:
            start_pt[j] = lo
        driver[j] = why
        if d == 0:  # a milestone: the end of the work that drives it, or the start of its day
            start_after[j] = end_after[j] = lo_after and lo > date_lo

    # Last working day of every activity (a start milestone: its own day), as an ordinal.
    last_ord = [0] * n
    for k in range(n):
        if status[k] is FIN:
            last_ord[k] = prog[k].actual_finish.toordinal()
            continue
        work = cal[k].work
        p = ef[k] - 1 if dur[k] or end_after[k] else es[k]
        if p >= len(work):
            raise HorizonExceeded(cal[k].name)
        last_ord[k] = work[p]
    finish_ord = max(last_ord, default=site.start.toordinal())
    finish = date.fromordinal(finish_ord)
    target = site.finish_by or finish
    proj_pt = {c: c.pos(target + _DAY) for c in calendars.values()}
    early_pt = {c: c.pos(finish + _DAY) for c in calendars.values()}

    ls = [0] * n
    lf = [0] * n
    free = [0] * n
    for i in reversed(order):
        st = status[i]
        if st is FIN:
            continue
        a, ci, d = acts[i], cal[i], dur[i]
        # A milestone at the start of its day is "on or before day X" one point earlier.
        cut = 0 if end_after[i] else 1
        late = proj_pt[ci] - cut
        slack = early_pt[ci] - cut - ef[i]
        if a.finish_not_after is not None:
            fna = ci.pos(a.finish_not_after + _DAY) - cut
            late = min(late, fna)
            slack = min(slack, fna - ef[i])
        for j, t, lag, _link, same in succs[i]:
            sj = status[j]
            if sj is FIN or (sj is RUN and override) or (t & 1 and st is RUN):
                continue  # history, or a bound that came from the actual start
            if t & 2:
                q_late, q_early = lf[j] - lag, ef[j] - lag
            else:
                q_late, q_early = ls[j] - lag, es[j] - lag
            if not same:
                aft = start_after[i] if t & 1 else end_after[i]
                if lag_on_succ:
                    q_late = _move_back(q_late, cal[j], ci, aft)
                    q_early = _move_back(q_early, cal[j], ci, aft)
                else:
                    q_late = _move_back(q_late + lag, cal[j], ci, aft) - lag
                    q_early = _move_back(q_early + lag, cal[j], ci, aft) - lag
            if t & 1:
                q_late += d
                q_early -= es[i]
            else:
                q_early -= ef[i]
            if q_late < late:
                late = q_late
            if q_early < slack:
                slack = q_early
        lf[i] = late
        ls[i] = late - d
        free[i] = slack if slack > 0 else 0

    # Criticality and the driving path, before any result object is built.
    floats = [lf[k] - ef[k] for k in range(n) if status[k] is not FIN]
    threshold = critical_threshold(floats)
    path = _driving_path(order, status, last_ord, ef, lf, driver, finish_ord, acts)
    on_path = set(path)

    if min((ls[k] for k in range(n) if status[k] is not FIN), default=1) < 1:
        raise HorizonExceeded("late dates")  # negative float reaching before the range
    results = []
    make = _make_result
    for k, a in enumerate(acts):
        p, st = prog[k], status[k]
        if st is FIN:
            results.append(
                make(
                    {
                        "id": a.id,
                        "name": a.name,
                        "calendar": a.calendar,
                        "duration": a.duration,
                        "status": st,
                        "early_start": p.actual_start or p.actual_finish,
                        "early_finish": p.actual_finish,
                        "late_start": None,
                        "late_finish": None,
                        "total_float": None,
                        "free_float": None,
                        "critical": False,
                        "on_driving_path": a.id in on_path,
                        "actual_start": p.actual_start,
                        "actual_finish": p.actual_finish,
                        "remaining": 0,
                        "percent": p.percent,
                        "driving": None,
                        "driven_by": "actual dates",
                        "overdue": False,
                        "after_work": False,
                    }
                )
            )
            continue
        d = dur[k]
        days = cal[k].dates  # every index below was range-checked above (last_ord, proj_pt, ls)
        if d:
            e_start, e_finish = days[es[k]], days[ef[k] - 1]
            l_start, l_finish = days[ls[k]], days[lf[k] - 1]
        else:
            shift = 1 if end_after[k] else 0
            e_start = e_finish = days[es[k] - shift]
            l_start = l_finish = days[ls[k] - shift]
        drv = driver[k]
        tf = lf[k] - ef[k]
        is_link = type(drv) is not str
        results.append(
            make(
                {
                    "id": a.id,
                    "name": a.name,
                    "calendar": a.calendar,
                    "duration": a.duration,
                    "status": st,
                    "early_start": e_start,
                    "early_finish": e_finish,
                    "late_start": l_start,
                    "late_finish": l_finish,
                    "total_float": tf,
                    "free_float": free[k],
                    "critical": tf <= threshold,
                    "on_driving_path": a.id in on_path,
                    "actual_start": p.actual_start,
                    "actual_finish": None,
                    "remaining": d,
                    "percent": p.percent,
                    "driving": drv if is_link else None,
                    "driven_by": drv.pred if is_link else drv,
                    "overdue": overdue[k],
                    "after_work": d == 0 and end_after[k],
                }
            )
        )
    out_of_sequence = find_out_of_sequence(site, prog, override) if progress else ()
    return _assemble(
        site=site,
        as_of=status_date,
        finish=finish,
        results=results,
        calendars=calendars,
        out_of_sequence=out_of_sequence,
        driving_path=tuple(path),
    )


def _move(b: int, frm: WorkCalendar, to: WorkCalendar, after: bool) -> int:
    """A bound at point ``b`` of calendar ``frm`` as a point of calendar ``to``.

    ``after``: the point stands for "after the working day before it" (a finish), otherwise
    for "at its working day" (a start). The date it stands for is rolled forward onto ``to``.
    """
    return to.pos_ordinal(frm.day_ordinal(b - 1) + 1 if after else frm.day_ordinal(b))


def _move_back(q: int, frm: WorkCalendar, to: WorkCalendar, after: bool) -> int:
    """Inverse of :func:`_move`: the latest point of ``to`` that moves to ``<= q`` on ``frm``."""
    if after:
        return to.pos_ordinal(frm.day_ordinal(q))
    return to.pos_ordinal(frm.day_ordinal(q) + 1) - 1


def _driving_path(
    order: list[int],
    status: list[Status],
    last_ord: list[int],
    ef: list[int],
    lf: list[int],
    driver: list[Link | str],
    finish_ord: int,
    acts: tuple,
) -> list[str]:
    """Walk driving links back from the open activity that finishes last.

    Of several open activities ending on the finish day the one with the least float is taken,
    and of those the last in network order (a finish milestone rather than the work before
    it). The walk stops at finished work or at an activity whose early start is set by a date
    rather than a link.
    """
    best = None
    for k in order:
        if (
            last_ord[k] == finish_ord
            and status[k] is not Status.FINISHED
            and (best is None or lf[k] - ef[k] <= lf[best] - ef[best])
        ):
            best = k
    if best is None:
        return []
    index = {a.id: k for k, a in enumerate(acts)}
    path = [acts[best].id]
    seen = {best}
    k = best
    while isinstance(driver[k], Link):
        k = index[driver[k].pred]
        if k in seen:
            break
        path.append(acts[k].id)
        seen.add(k)
        if status[k] is Status.FINISHED:
            break
    path.reverse()
    return path


# --- result helpers, copied from fieldlog/engine/result.py as they were -----------------------


def _make_result(values: dict[str, object]) -> ActivityResult:
    """An :class:`ActivityResult` through its ordinary ``__init__`` (every field given)."""
    return ActivityResult(**values)  # type: ignore[arg-type]


def _assemble(
    *,
    site: Site,
    as_of: date,
    finish: date,
    results: Sequence[ActivityResult],
    calendars: Mapping[str, WorkCalendar],
    out_of_sequence: tuple[OutOfSequence, ...],
    driving_path: tuple[str, ...],
) -> ScheduleResult:
    """Freeze results that are already marked critical / on the driving path."""
    finish_float = None
    if site.finish_by is not None:
        c = calendars[site.calendar]
        finish_float = c.count(finish + timedelta(days=1), site.finish_by + timedelta(days=1))
    return ScheduleResult(
        site=site,
        as_of=as_of,
        finish=finish,
        finish_float=finish_float,
        activities=tuple(results),
        driving_path=driving_path,
        lowest_float=tuple(r.id for r in results if r.critical),
        out_of_sequence=out_of_sequence,
        calendars=MappingProxyType(dict(calendars)),
        by_id=MappingProxyType({r.id: r for r in results}),
        compiled=compile_site(site),
    )


def critical_threshold(total_floats: Iterable[int]) -> int:
    """Critical means total float <= this: max(0, lowest total float of open work)."""
    return max(0, min(total_floats, default=0))


def find_out_of_sequence(
    site: Site, progress: Sequence[Progress], override: bool
) -> tuple[OutOfSequence, ...]:
    """Links whose successor has moved on while the predecessor has not (as of the status date).

    Definitions follow the GAO Schedule Assessment Guide's page on out-of-sequence logic.
    """
    moved = {
        a.id: p
        for a, p in zip(site.activities, progress, strict=True)
        if p.actual_start or p.actual_finish
    }
    if not moved:
        return ()
    treatment = "progress override" if override else "retained logic"
    found = []
    for link in site.links:
        s = moved.get(link.succ)
        if s is None:
            continue
        p = moved.get(link.pred, _NOTHING)
        kind = None
        if link.type is LinkType.FS and s.actual_start and not p.actual_finish:
            kind = "started before predecessor finished"
        elif link.type is LinkType.SS and s.actual_start and not p.actual_start:
            kind = "started before predecessor started"
        elif link.type is LinkType.FF and s.actual_finish and not p.actual_finish:
            kind = "finished before predecessor finished"
        elif link.type is LinkType.SF and s.actual_finish and not p.actual_start:
            kind = "finished before predecessor started"
        if kind:
            found.append(OutOfSequence(link, kind, treatment))
    # Work recorded finished with no start recorded (a milestone is only ever reached).
    for a, p in zip(site.activities, progress, strict=True):
        if p.actual_finish and not p.actual_start and a.duration > 0:
            found.append(
                OutOfSequence(
                    None,
                    "finished, no start recorded",
                    "its finish day is taken as its start; record the start as a correction",
                    a.id,
                )
            )
    return tuple(found)


_NOTHING = Progress()
