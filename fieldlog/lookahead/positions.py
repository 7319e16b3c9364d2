"""Where each open activity sits on its calendar, and what each link asks of its successor.

Levelling moves activities and must prove that every link still holds, on each activity's own
calendar. This module turns the dates of a :class:`ScheduleResult` back into *points* (see
:mod:`fieldlog.engine.calendars`: point p is the start of the p-th working day) and states each
link as the earliest start point it allows its successor, following the conventions of
:mod:`fieldlog.engine.cpm`:

* work starts "at its first day" and finishes "after its last day"; a milestone is an instant,
  either the end of the work that drives it (``after_work``: dated on that work's last day) or
  the start of its own day; moving a bound to another calendar goes through the date it
  stands for;
* the lag is counted on the successor's calendar unless the site counts it on the
  predecessor's;
* FF and SF links bound the successor's finish, so its duration is taken off.
"""

from __future__ import annotations

from dataclasses import dataclass
from datetime import date

from fieldlog.engine.calendars import WorkCalendar
from fieldlog.engine.progress import Status
from fieldlog.engine.result import ActivityResult, ScheduleResult
from fieldlog.site.model import LagCalendar, Link, LinkType


@dataclass(frozen=True)
class Placed:
    """One open activity on its calendar: start point and working days still to do."""

    result: ActivityResult
    calendar: WorkCalendar
    start: int
    """Early start point (of the remaining work, for work in progress)."""
    duration: int
    """Working days left (0 for a milestone)."""
    late_start: int
    """Latest start point that meets the late finish."""
    actual_start: int | None
    """Point of the actual start, which SS and SF successors of started work see."""
    after_work: bool
    """A milestone that marks the end of the work driving it: dated on the day before its
    point, and read by other calendars as "after that day" (see :mod:`fieldlog.engine.cpm`)."""

    @property
    def start_after(self) -> bool:
        """Other calendars read this activity's start as "after the day before" (a milestone
        at the end of work) rather than "at its first day"."""
        return self.after_work

    @property
    def end_after(self) -> bool:
        """Other calendars read its finish as "after its last day": work and milestones at the
        end of work; a milestone at the start of its day is read "at that day"."""
        return self.duration > 0 or self.after_work

    def first_day(self, start: int) -> date:
        """First working day when starting at point ``start`` (a milestone's single date)."""
        return self.calendar.day(start - 1 if self.after_work else start)

    def last_day(self, start: int) -> date:
        """Last working day when starting at point ``start``."""
        if self.duration == 0:
            return self.first_day(start)
        return self.calendar.day(start + self.duration - 1)


def start_point(calendar: WorkCalendar, day: date, after_work: bool) -> int:
    """The point of an activity whose shown first day is ``day``.

    An ``after_work`` milestone is dated on the day before its point (see
    :mod:`fieldlog.engine.cpm`).
    """
    p = calendar.pos(day)
    return p + 1 if after_work else p


def place_one(r: ActivityResult, calendar: WorkCalendar) -> Placed:
    """One open activity as points on its calendar."""
    assert r.early_start is not None and r.late_start is not None
    after = r.remaining == 0 and r.after_work
    actual = calendar.pos(r.actual_start) if r.actual_start is not None else None
    return Placed(
        r,
        calendar,
        start_point(calendar, r.early_start, after),
        r.remaining,
        start_point(calendar, r.late_start, after),
        actual,
        after,
    )


class Network:
    """The open activities of a schedule as points, and the links that still bind them.

    Activities are placed on demand: a levelling suggestion usually touches a few dozen of a
    site's thousands of activities, and placing them all would cost more than the suggestion.

    Args:
        result: the schedule.
    """

    def __init__(self, result: ScheduleResult) -> None:
        site = result.site
        self._result = result
        self._placed: dict[str, Placed | None] = {}
        self._pred_lag = site.lag_calendar is LagCalendar.PREDECESSOR
        self._override = site.progress_override
        self._out, self._in = result.compiled.links_out, result.compiled.links_in

    def placed(self, aid: str) -> Placed | None:
        """The activity as points, or None when it is finished."""
        if aid in self._placed:
            return self._placed[aid]
        r = self._result.by_id[aid]
        p = place_one(r, self._result.calendars[r.calendar]) if r.is_open else None
        self._placed[aid] = p
        return p

    def __getitem__(self, aid: str) -> Placed:
        p = self.placed(aid)
        assert p is not None, f"{aid} is finished"
        return p

    def binds(self, link: Link) -> bool:
        """True when the link still limits the forecast (both ends open, not overridden)."""
        p, s = self.placed(link.pred), self.placed(link.succ)
        if p is None or s is None:
            return False  # one end finished: the link is history
        # With progress override, started work ignores its predecessors.
        return not (s.result.status is Status.IN_PROGRESS and self._override)

    def out_links(self, aid: str) -> list[Link]:
        """Links from ``aid`` that still bind."""
        return [lk for lk in self._out.get(aid, ()) if self.binds(lk)]

    def in_links(self, aid: str) -> list[Link]:
        """Links into ``aid`` that still bind."""
        return [lk for lk in self._in.get(aid, ()) if self.binds(lk)]

    def bound(self, link: Link, pred_start: int) -> int:
        """Earliest start point of ``link.succ`` when ``link.pred`` starts at ``pred_start``."""
        p, s = self[link.pred], self[link.succ]
        ci, cj = p.calendar, s.calendar
        lag = link.lag
        if link.type in (LinkType.SS, LinkType.SF):
            b = p.actual_start if p.actual_start is not None else pred_start
            after = p.start_after
        else:
            b = pred_start + p.duration
            after = p.end_after
        if ci is cj:
            b += lag
        elif self._pred_lag:
            b = _move(b + lag, ci, cj, after)
        else:
            b = _move(b, ci, cj, after) + lag
        if link.type in (LinkType.FF, LinkType.SF):
            b -= s.duration
        return b


def _move(b: int, frm: WorkCalendar, to: WorkCalendar, after: bool) -> int:
    """Point ``b`` of ``frm`` as a point of ``to``, through the date it stands for: "after the
    working day before ``b``" when ``after``, else "at ``b``'s working day"."""
    return to.pos_ordinal(frm.day_ordinal(b - 1) + 1 if after else frm.day_ordinal(b))
