"""Critical path method: forward and backward passes over the precedence network.

Pure: no I/O, no clock. Input is a :class:`~fieldlog.model.Site`, the status date ("as of the
end of day D"; the data date is the next day) and each activity's :class:`Progress`.
Output is a :class:`ScheduleResult`.

How the passes work (the rules are in DESIGN.md section 3; the formulas are the precedence
diagramming method's, e.g. Hendrickson, *Project Management for Construction*, section 10.7):

* Times are integer *points* on each activity's own calendar (see :mod:`fieldlog.calendars`).
  ES is the start point, EF = ES + duration the finish point. Shown dates are inclusive working
  days: first day ``day(ES)``, last day ``day(EF - 1)``.
* A link's bound moves from the predecessor's calendar to the successor's by the date it
  stands for: a *finish* point is "after the predecessor's last day", a *start* point is "at
  the predecessor's first day". With one calendar the conversion is the identity.
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
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from datetime import date, timedelta

from fieldlog.calendars import HorizonExceeded, WorkCalendar, build_calendars
from fieldlog.model import LagCalendar, Link, Site
from fieldlog.network import topological_order
from fieldlog.progress import NO_PROGRESS, Progress, Status, remaining_at
from fieldlog.schedule_result import (
    ActivityResult,
    OutOfSequence,
    ScheduleResult,
    find_out_of_sequence,
)

_FS, _SS, _FF, _SF = 0, 1, 2, 3
_TYPE_CODE = {"FS": _FS, "SS": _SS, "FF": _FF, "SF": _SF}
_DAY = timedelta(days=1)


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


def _initial_range(site: Site, status: date, progress: Mapping[str, Progress],
                   holds: Mapping[str, date]) -> tuple[date, date]:
    known = [site.start, status]
    known += [d for d in (site.finish_by,) if d]
    for p in progress.values():
        known += [d for d in (p.actual_start, p.actual_finish) if d]
    known += list(holds.values())
    work = sum(a.duration for a in site.activities) + sum(max(lk.lag, 0) for lk in site.links)
    ahead = min(work * 2, 365 * 6) + 400
    return min(known) - timedelta(days=400), max(known) + timedelta(days=ahead)


def _network(site: Site) -> tuple[list[int], list[list[tuple[int, int, int, Link]]],
                                  list[list[tuple[int, int, int, Link]]]]:
    """Topological order and predecessor/successor lists, cached on the site value."""
    cached = site.__dict__.get("_cpm_network")
    if cached is not None:
        return cached
    ids = [a.id for a in site.activities]
    index = {aid: k for k, aid in enumerate(ids)}
    order_ids, cycle = topological_order(ids, ((lk.pred, lk.succ) for lk in site.links))
    assert cycle is None, "site_files refuses loops"
    order = [index[a] for a in order_ids]
    preds: list[list[tuple[int, int, int, Link]]] = [[] for _ in ids]
    succs: list[list[tuple[int, int, int, Link]]] = [[] for _ in ids]
    for lk in site.links:
        i, j, t = index[lk.pred], index[lk.succ], _TYPE_CODE[lk.type.value]
        preds[j].append((i, t, lk.lag, lk))
        succs[i].append((j, t, lk.lag, lk))
    cached = (order, preds, succs)
    object.__setattr__(site, "_cpm_network", cached)
    return cached


def _run(site: Site, status_date: date, progress: Mapping[str, Progress],
         holds: Mapping[str, date], calendars: Mapping[str, WorkCalendar]) -> ScheduleResult:
    acts = site.activities
    n = len(acts)
    order, preds, succs = _network(site)
    cal = [calendars[a.calendar] for a in acts]
    prog = [progress.get(a.id, NO_PROGRESS) for a in acts]
    status = [p.status for p in prog]
    on_succ_cal = site.lag_calendar is LagCalendar.SUCCESSOR
    override = site.progress_override
    FIN, RUN = Status.FINISHED, Status.IN_PROGRESS

    # Per-calendar points that bound every open activity.
    after_status = status_date + _DAY
    floor_pt = {
        name: max(c.pos(site.start), c.pos(after_status)) for name, c in calendars.items()
    }

    dur = [0] * n          # planned duration, or remaining for work in progress
    overdue = [False] * n
    start_pt = [0] * n     # actual start point for started work (what SS/SF links see)
    es = [0] * n
    ef = [0] * n
    driver: list[Link | str | None] = [None] * n

    for j in order:
        a, c, p, st = acts[j], cal[j], prog[j], status[j]
        if st is FIN:
            s_day = p.actual_start or p.actual_finish
            es[j] = start_pt[j] = c.pos(s_day)
            ef[j] = max(c.pos(p.actual_finish + _DAY), es[j])
            dur[j] = ef[j] - es[j]
            driver[j] = "actual dates"
            continue
        if st is RUN:
            d, overdue[j] = remaining_at(p, a.duration, c, status_date)
            start_pt[j] = c.pos(p.actual_start)
            lo, why = floor_pt[a.calendar], "data date"
        else:
            d = a.duration
            lo, why = floor_pt[a.calendar], "data date"
            if c.pos(site.start) >= lo:
                why = "site start"
            for when, label in ((a.start_not_before, "start not before"),
                                (holds.get(a.id), "readiness")):
                if when is not None and c.pos(when) > lo:
                    lo, why = c.pos(when), label
        dur[j] = d
        for i, t, lag, link in preds[j]:
            if st is RUN and (override or status[i] is FIN):
                continue  # history: the link was met or broken before the status date
            ci = cal[i]
            if t in (_FS, _FF):
                b = ef[i]
                if not on_succ_cal:
                    b += lag
                if ci is not c:
                    b = c.pos_ordinal(ci.day_ordinal(b - 1) + 1)
            else:
                b = start_pt[i]
                if not on_succ_cal:
                    b += lag
                if ci is not c:
                    b = c.pos_ordinal(ci.day_ordinal(b))
            if on_succ_cal:
                b += lag
            if t in (_FF, _SF):
                b -= d
            if b > lo:
                lo, why = b, link
        es[j] = lo
        ef[j] = lo + d
        if st is not RUN:
            start_pt[j] = lo
        driver[j] = why

    # Forecast finish: the latest last day of any activity.
    last_day = [_last_day(acts[k], cal[k], es[k], ef[k], prog[k], bool(preds[k]))
                for k in range(n)]
    finish = max(last_day) if n else site.start
    target = site.finish_by or finish
    proj_pt = {name: c.pos(target + _DAY) for name, c in calendars.items()}
    early_pt = {name: c.pos(finish + _DAY) for name, c in calendars.items()}

    ls = [0] * n
    lf = [0] * n
    free = [0] * n
    for i in reversed(order):
        if status[i] is FIN:
            continue
        a, ci = acts[i], cal[i]
        late = proj_pt[a.calendar]
        slack = early_pt[a.calendar] - ef[i]
        if a.finish_not_after is not None:
            fna = ci.pos(a.finish_not_after + _DAY)
            late = min(late, fna)
            slack = min(slack, fna - ef[i])
        for j, t, lag, _link in succs[i]:
            sj = status[j]
            if sj is FIN or (sj is RUN and override):
                continue
            if status[i] is RUN and (t in (_SS, _SF)):
                continue  # bound came from the actual start: nothing left to constrain
            cj = cal[j]
            if t in (_FS, _SS):
                q_late, q_early = ls[j], es[j]
            else:
                q_late, q_early = lf[j], ef[j]
            if on_succ_cal:
                q_late -= lag
                q_early -= lag
            if t in (_FS, _FF):
                if cj is not ci:
                    q_late = ci.pos_ordinal(cj.day_ordinal(q_late))
                    q_early = ci.pos_ordinal(cj.day_ordinal(q_early))
                if not on_succ_cal:
                    q_late -= lag
                    q_early -= lag
                late = min(late, q_late)
                slack = min(slack, q_early - ef[i])
            else:
                if cj is not ci:
                    q_late = ci.pos_ordinal(cj.day_ordinal(q_late) + 1) - 1
                    q_early = ci.pos_ordinal(cj.day_ordinal(q_early) + 1) - 1
                if not on_succ_cal:
                    q_late -= lag
                    q_early -= lag
                late = min(late, q_late + dur[i])
                slack = min(slack, q_early - es[i])
        lf[i] = late
        ls[i] = late - dur[i]
        free[i] = max(slack, 0)

    results = []
    for k, a in enumerate(acts):
        c, p, st = cal[k], prog[k], status[k]
        if st is FIN:
            results.append(ActivityResult(
                id=a.id, name=a.name, calendar=a.calendar, duration=a.duration, status=st,
                early_start=p.actual_start or p.actual_finish, early_finish=p.actual_finish,
                late_start=None, late_finish=None, total_float=None, free_float=None,
                critical=False, on_driving_path=False, actual_start=p.actual_start,
                actual_finish=p.actual_finish, remaining=0, percent=p.percent,
                driving=None, driven_by="actual dates", overdue=False,
            ))
            continue
        has_preds = bool(preds[k])
        drv = driver[k]
        results.append(ActivityResult(
            id=a.id, name=a.name, calendar=a.calendar, duration=a.duration, status=st,
            early_start=_first_day(c, es[k], ef[k], has_preds),
            early_finish=last_day[k],
            late_start=_first_day(c, ls[k], lf[k], has_preds),
            late_finish=_finish_day(c, ls[k], lf[k], has_preds),
            total_float=lf[k] - ef[k], free_float=free[k], critical=False,
            on_driving_path=False, actual_start=p.actual_start, actual_finish=None,
            remaining=dur[k], percent=p.percent,
            driving=drv if isinstance(drv, Link) else None,
            driven_by=drv.pred if isinstance(drv, Link) else str(drv),
            overdue=overdue[k],
        ))
    out_of_sequence: tuple[OutOfSequence, ...] = find_out_of_sequence(site, prog, override)
    return ScheduleResult.assemble(
        site=site, as_of=status_date, finish=finish, results=results,
        calendars=calendars, out_of_sequence=out_of_sequence,
    )



def _first_day(c: WorkCalendar, s: int, f: int, has_preds: bool) -> date:
    """First working day of an activity occupying points ``[s, f)``; milestones see below."""
    if f == s and has_preds:
        return c.day(s - 1)  # a milestone after other work falls at the end of their day
    return c.day(s)


def _finish_day(c: WorkCalendar, s: int, f: int, has_preds: bool) -> date:
    """Last working day of ``[s, f)``: a milestone's single date, else ``day(f - 1)``."""
    if f == s:
        return _first_day(c, s, f, has_preds)
    return c.day(f - 1)


def _last_day(a, c: WorkCalendar, s: int, f: int, p: Progress, has_preds: bool) -> date:
    if p.actual_finish is not None:
        return p.actual_finish
    return _finish_day(c, s, f, has_preds)
