"""How one logged day moved the forecast finish, split by cause.

This is a contemporaneous, observational windows analysis in the sense of AACE RP 29R-03
(the "contemporaneous period analysis" family, MIP 3.3, with the split of a window into
parts that MIP 3.4 makes), done at the smallest window a daily log has: one day. The schedule
as of the previous logged day P and as of this day D are both recomputed from the log, and
the movement between them is cut into steps by recomputing in between, so every step's share
is a measured difference and the steps add up to the movement exactly. The steps and their
order are our own choice (DEVELOPERS.md, "Forecast history"):

1. **lost days** recorded for D, one cause category at a time (status still P): a lost day is a
   non-working day, so whatever it moves is that cause's;
2. **time and progress**: status D with D's progress entries (starts, finishes, remaining
   days) but P's readiness items. A later finish here means driving work did not start or
   finish when the plan needed, or its remaining days went up. It goes to the cause the log
   records for that activity on D (lost hours naming it, an open readiness item on it, an
   instruction naming it), first such activity along the driving path; with none recorded it
   is "not explained by the log". An earlier finish is "gained by progress";
3. **readiness items** opened or cleared (and holds they set), one category at a time.

Nothing is inferred beyond the entries: the cause is the one written in the log, or none.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass
from datetime import date, timedelta

from fieldlog.engine.progress import Progress, Status
from fieldlog.engine.readiness import OpenItem, holds
from fieldlog.engine.result import ActivityResult, ScheduleResult
from fieldlog.history.causes import (
    CAUSES,
    DESIGN,
    GAINED,
    NOT_EXPLAINED,
    OTHER,
    lost_time_category,
    readiness_category,
)
from fieldlog.history.days import DayState
from fieldlog.history.evidence import day_evidence, remaining_increase
from fieldlog.history.scheduler import DayScheduler, LostDays
from fieldlog.history.values import DayRecord, Step
from fieldlog.journal.entries import Entry

_DAY = timedelta(days=1)


@dataclass(frozen=True)
class Point:
    """The state a day is measured from: the log and the schedule as of ``status``."""

    status: date
    progress: Mapping[str, Progress]
    lost: LostDays
    readiness: tuple[OpenItem, ...]
    result: ScheduleResult


class DayMovement:
    """Works out :class:`DayRecord` values for one site, day after day."""

    def __init__(self, scheduler: DayScheduler) -> None:
        self.scheduler = scheduler
        self.site = scheduler.site
        self._measure_on = scheduler.calendars({})[self.site.calendar]

    def measure(self, finish: date) -> int:
        """A finish as a point of the site calendar without lost days: differences of two
        are working days, and they add up along the history whatever days were lost."""
        return self._measure_on.pos(finish + _DAY)

    def start(self, status: date, state: DayState | None) -> Point:
        """The point a history begins at: the log as of ``status`` (``state``, or nothing)."""
        progress = state.progress if state else {}
        lost = state.lost_days if state else {}
        items = state.readiness if state else ()
        result = self.scheduler.schedule(status, progress, lost, holds(items, status))
        return Point(status, progress, lost, items, result)

    def day(self, prev: Point, state: DayState) -> tuple[Point, DayRecord]:
        """The schedule as of the end of ``state.day`` and how it moved since ``prev``."""
        d, sched = state.day, self.scheduler
        steps = _Steps(self.measure, prev.result.finish)

        # 1. lost days, cause by cause, with the status still at the previous day
        lost: LostDays = prev.lost
        if state.lost_days != prev.lost:
            before = holds(prev.readiness, prev.status)
            for category, added, words in _lost_by_cause(prev.lost, state):
                lost = {**lost, **{c: lost.get(c, frozenset()) | ds for c, ds in added.items()}}
                steps.add(category, sched.finish(prev.status, prev.progress, lost, before), words)
            if lost != state.lost_days:
                lost = state.lost_days
                steps.add(
                    OTHER,
                    sched.finish(prev.status, prev.progress, lost, before),
                    "lost days changed by a correction",
                )
        # 2. time passes to D with D's progress; 3. readiness, category by category
        changed = set(prev.readiness) != set(state.readiness)
        result = sched.schedule(d, state.progress, lost, holds(state.readiness, d))
        progress_finish = result.finish
        if changed:
            progress_finish = sched.finish(d, state.progress, lost, holds(prev.readiness, d))
        self._progress_step(prev, state, result, progress_finish, steps)
        if changed:
            items = list(prev.readiness)
            for category, opened, cleared, words in _readiness_by_kind(prev.readiness, state):
                items = [i for i in items if i not in cleared] + opened
                steps.add(category, sched.finish(d, state.progress, lost, holds(items, d)), words)
            steps.add(OTHER, result.finish, "readiness items changed by a correction")
        record = DayRecord(
            day=d,
            finish=result.finish,
            finish_float=result.finish_float,
            driving_path=result.driving_path,
            movement=self.measure(result.finish) - self.measure(prev.result.finish),
            steps=tuple(steps.steps),
            evidence=day_evidence(prev, state, result),
        )
        return Point(d, state.progress, lost, state.readiness, result), record

    def _progress_step(
        self, prev: Point, state: DayState, result: ScheduleResult, new_finish: date, steps: _Steps
    ) -> None:
        """Step 2: a later finish goes to the cause recorded for the late driving work."""
        if self.measure(new_finish) <= self.measure(steps.finish):
            steps.add(GAINED, new_finish, f"progress recorded on {state.day} ahead of the plan")
            return
        late = late_driving_work(prev, state, result)
        what = "; ".join(w for _, w in late) or (
            "the finish moved with no late driving work in the log"
        )
        for aid, _ in late:
            category = recorded_cause(aid, state)
            if category is not None:
                steps.add(category, new_finish, what)
                return
        steps.add(NOT_EXPLAINED, new_finish, what)


class _Steps:
    """The steps of one day: each measured from the finish the step before left."""

    def __init__(self, measure: Callable[[date], int], finish: date) -> None:
        self.measure = measure
        self.finish = finish
        self.steps: list[Step] = []

    def add(self, bucket: str, new_finish: date, what: str) -> None:
        days = self.measure(new_finish) - self.measure(self.finish)
        self.finish = new_finish
        if days:
            self.steps.append(Step(bucket, days, what))


def late_driving_work(
    prev: Point, state: DayState, result: ScheduleResult
) -> list[tuple[str, str]]:
    """Driving work at the end of D that the plan as of P needed to start or finish by D, or
    whose remaining days went up on D: (activity, what the log shows)."""
    d = state.day
    before = prev.result.by_id
    out: list[tuple[str, str]] = []
    for aid in result.driving_path:
        row: ActivityResult | None = before.get(aid)
        now = state.progress.get(aid)
        if row is None or not row.is_open or (now and now.actual_finish):
            continue
        if row.status is Status.NOT_STARTED and not (now and now.actual_start):
            if row.early_start <= d:
                out.append((aid, f"{aid} did not start (planned to start {row.early_start})"))
        elif now and now.actual_start and row.early_finish <= d:
            out.append((aid, f"{aid} not finished (planned to finish {row.early_finish})"))
        up = remaining_increase(prev, state, aid)
        if up > 0:
            out.append((aid, f"{aid} remaining days up by {up}"))
    return out


def recorded_cause(aid: str, state: DayState) -> str | None:
    """The cause category the log records for ``aid`` on that day, if any."""
    for e in state.entries:
        if aid in e.activities():
            if e.kind == "lost-time":
                return lost_time_category(e.fields["cause"])
            if e.kind == "instruction":
                return DESIGN
    for item in state.readiness:
        if item.activity == aid:
            return readiness_category(item.kind)
    return None


def _lost_by_cause(
    before: LostDays, state: DayState
) -> list[tuple[str, dict[str, frozenset[date]], str]]:
    """Lost days added on D, grouped by cause category in report order."""
    cause_of: dict[tuple[date, str | None], Entry] = {}
    for e in state.entries:
        if e.kind == "lost-time" and e.fields.get("whole_day"):
            for name in e.fields.get("calendars") or [None]:
                cause_of.setdefault((e.day, name), e)
    groups: dict[str, dict[str, set[date]]] = {}
    for name, lost in state.lost_days.items():
        for day in lost - before.get(name, frozenset()):
            found = cause_of.get((day, name)) or cause_of.get((day, None))
            category = lost_time_category(found.fields["cause"]) if found else OTHER
            groups.setdefault(category, {}).setdefault(name, set()).add(day)
    out = []
    for category in CAUSES:
        if category in groups:
            added = {n: frozenset(ds) for n, ds in groups[category].items()}
            listed = sorted({x for ds in added.values() for x in ds})
            words = f"lost day {', '.join(map(str, listed))} ({category})"
            out.append((category, added, words))
    return out


def _readiness_by_kind(
    before: Sequence[OpenItem], state: DayState
) -> list[tuple[str, list[OpenItem], set[OpenItem], str]]:
    """Readiness items opened and cleared on D, grouped by category in report order."""
    was, now = set(before), set(state.readiness)
    groups: dict[str, tuple[list[OpenItem], set[OpenItem]]] = {}
    for item in state.readiness:
        if item not in was:
            groups.setdefault(readiness_category(item.kind), ([], set()))[0].append(item)
    for item in before:
        if item not in now:
            groups.setdefault(readiness_category(item.kind), ([], set()))[1].add(item)
    out = []
    for category in CAUSES:
        if category in groups:
            opened, cleared = groups[category]
            parts = [f"{i.activity} needs {i.what}" for i in opened]
            parts += [f"{i.activity}: {i.what} cleared" for i in cleared]
            out.append((category, opened, cleared, "; ".join(parts)))
    return out
