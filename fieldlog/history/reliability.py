"""Plan reliability per week: percent plan complete (PPC) against the lookahead.

PPC is a published lean-construction measure (Ballard 2000, *The Last Planner System of
Production Control*): planned assignments completed as planned in the week, divided by all
planned assignments, times 100, each assignment counted done or not done (a part-done one is
not done), with the reasons for every miss recorded.

How the week's plan and "done" are read from fieldlog's own data is our choice:

* the plan is the two-week lookahead as it stood at the start of the week (status date the
  Sunday before, data date the Monday), restricted to the week's seven days. Every activity
  with a MUST day in the week is an assignment, and so is every activity with a MAY day (the
  early-start plan puts it in the week): "MUST and planned MAY". Milestones are events, not
  assignments, and are left out;
* what the week needed of it: a *finish* when the plan's early finish is in the week; else a
  *start* when it had not started; else *progress* (it runs on past the week);
* done, from the entries of the week alone: a finish needs a ``finished`` entry; a start a
  ``started`` (or ``finished``) entry; progress a ``remaining``, ``percent`` or ``finished``
  entry, with no ``remaining`` entry that week above what the plan left for that day;
* the reasons for a miss are the week's entries about the activity (lost time, readiness
  needs, instructions, notes), the whole days lost on its calendar that week, and readiness
  items open on it at the start of the week; with none, "no reason recorded in the log".
"""

from __future__ import annotations

from collections.abc import Sequence
from datetime import date, timedelta

from fieldlog.engine.progress import Status
from fieldlog.engine.readiness import OpenItem
from fieldlog.engine.result import ActivityResult, ScheduleResult
from fieldlog.history.causes import lost_time_category
from fieldlog.history.values import Assignment, WeekReliability
from fieldlog.journal.entries import Entry
from fieldlog.lookahead.classify import Cell, PatternCache, Window

NO_REASON = "no reason recorded in the log"
_DAY = timedelta(days=1)


def week_reliability(
    plan: ScheduleResult, readiness: Sequence[OpenItem], monday: date, entries: Sequence[Entry]
) -> WeekReliability:
    """PPC of the week starting ``monday``, from ``plan`` (as of the Sunday before) and the
    entries in force dated in the week (module docstring)."""
    sunday = monday + 6 * _DAY
    week = [e for e in entries if monday <= e.day <= sunday]
    about: dict[str, list[Entry]] = {}
    for e in week:
        for aid in e.activities():
            about.setdefault(aid, []).append(e)
    out = []
    for row, must in week_plan(plan, monday):
        required = needed(row, sunday)
        mine = about.get(row.id, [])
        done = is_done(row, required, mine, plan, monday)
        reasons = () if done else miss_reasons(row, week, readiness, mine)
        out.append(Assignment(row.id, must, required, done, reasons))
    return WeekReliability(monday, sunday, plan.as_of, tuple(out))


def week_plan(plan: ScheduleResult, monday: date) -> list[tuple[ActivityResult, bool]]:
    """The week's assignments, by id, and whether each is MUST: the lookahead's own classes
    (:class:`fieldlog.lookahead.classify.PatternCache`, as ``build_lookahead`` uses them) for
    the seven days from ``monday``, without the reasons text a printed sheet needs."""
    days = [monday + k * _DAY for k in range(7)]
    window = Window(monday.toordinal(), 7, plan.data_date.toordinal())
    cache = PatternCache(
        window, {name: tuple(c.is_working(d) for d in days) for name, c in plan.calendars.items()}
    )
    out = []
    for r in sorted(plan.activities, key=lambda r: r.id):
        if not r.is_open or r.duration == 0:
            continue  # a milestone is an event, not an assignment
        assert r.late_start is not None and r.late_finish is not None
        assert r.total_float is not None
        cells = cache.get(
            r.calendar,
            r.early_start,
            r.early_finish,
            r.late_start,
            r.late_finish,
            r.total_float < 0,
        ).cells
        if Cell.MUST in cells or Cell.MAY in cells:
            out.append((r, Cell.MUST in cells))
    return out


def needed(row: ActivityResult, sunday: date) -> str:
    """What the week's plan needed of an activity: ``finish``, ``start`` or ``progress``."""
    if row.early_finish <= sunday:
        return "finish"
    if row.status is Status.NOT_STARTED:
        return "start"
    return "progress"


def is_done(
    row: ActivityResult, required: str, mine: Sequence[Entry], plan: ScheduleResult, monday: date
) -> bool:
    """Whether the week's entries about the activity show what the plan needed."""
    kinds = {e.kind for e in mine}
    if required == "finish":
        return "finished" in kinds
    if required == "start":
        return bool(kinds & {"started", "finished"})
    if not kinds & {"remaining", "percent", "finished"}:
        return False
    cal = plan.calendars[row.calendar]
    for e in mine:
        if e.kind == "remaining":
            planned_left = row.remaining - cal.count(monday, e.day + _DAY)
            if e.fields["days"] > max(planned_left, 1):
                return False
    return True


def miss_reasons(
    row: ActivityResult, week: Sequence[Entry], readiness: Sequence[OpenItem], mine: Sequence[Entry]
) -> tuple[str, ...]:
    """What the log records about a missed assignment that week (module docstring)."""
    out: list[str] = []
    for e in mine:
        f = e.fields
        if e.kind == "lost-time":
            lost = "whole day" if f.get("whole_day") else f"{f['hours']:g} h"
            out.append(f"{e.day}: {lost} lost ({lost_time_category(f['cause'])})")
        elif e.kind == "need":
            out.append(f"{e.day}: needs {f['what']} ({f['category']})")
        elif e.kind == "instruction":
            out.append(f"{e.day}: instruction from {f['given_by']}: {f['text']}")
        elif e.kind == "note":
            out.append(f"{e.day}: note: {f['text']}")
    for e in week:
        if (
            e.kind == "lost-time"
            and e.fields.get("whole_day")
            and not e.activities()
            and row.calendar in (e.fields.get("calendars") or [row.calendar])
        ):
            out.append(f"{e.day}: day lost on site ({lost_time_category(e.fields['cause'])})")
    for item in readiness:
        if item.activity == row.id:
            out.append(f"open readiness item: {item.what} ({item.kind})")
    return tuple(out) or (NO_REASON,)
