"""Reasons in a foreman's words: why a day is MAY or CANNOT, and what to chase.

Every MAY and CANNOT cell of the lookahead points at one of these sentences. They name what
someone can act on: the predecessor to push ("waiting on EXC-010 (Excavate footings) to
finish"), the readiness item to chase ("needs rebar shop drawings, expected ..."), the float
there is to play with, or the late finish not to run past.
"""

from __future__ import annotations

from collections import defaultdict
from collections.abc import Callable, Sequence
from datetime import date

from fieldlog.engine.progress import Status
from fieldlog.engine.readiness import OpenItem
from fieldlog.engine.result import ActivityResult, ScheduleResult
from fieldlog.lookahead.classify import Why
from fieldlog.reports.words import working_days
from fieldlog.site.model import Link, LinkType, Site

WEEKDAYS = ("Mon", "Tue", "Wed", "Thu", "Fri", "Sat", "Sun")
MONTHS = ("Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec")
"""English names spelled out here, not taken from the machine's locale: the sheet's bytes must
not depend on where it is printed."""


_DATE_TEXT: dict[date, str] = {}


def date_text(d: date) -> str:
    """A date as printed on the sheet and in reasons, e.g. ``Tue 10 Mar 2026``."""
    text = _DATE_TEXT.get(d)
    if text is None:
        text = f"{WEEKDAYS[d.weekday()]} {d.day:02d} {MONTHS[d.month - 1]} {d.year}"
        if len(_DATE_TEXT) < 100_000:  # a few centuries of days: bounded, never evicted
            _DATE_TEXT[d] = text
    return text


_LINK_VERB = {
    LinkType.FS: "to finish",
    LinkType.SS: "to start",
    LinkType.FF: "to finish (it may not finish before)",
    LinkType.SF: "to start (it may not finish before)",
}


class ReasonWriter:
    """Writes the reasons for the activities of one schedule.

    Args:
        result: the schedule the lookahead is built from.
        readiness: readiness items still open at its status date.
    """

    def __init__(self, result: ScheduleResult, readiness: Sequence[OpenItem]) -> None:
        self._result = result
        self._site: Site = result.site
        self._as_of = result.as_of
        self._items: dict[str, list[OpenItem]] = defaultdict(list)
        for item in readiness:
            self._items[item.activity].append(item)
        self._past = f"already past: the status date is the end of {date_text(result.as_of)}"

    @property
    def has_items(self) -> frozenset[str]:
        """Ids of the activities with open readiness items."""
        return frozenset(self._items)

    def text(self, r: ActivityResult, why: Why) -> str:
        """The sentence for one reason kind of activity ``r`` (empty for :data:`Why.NONE`)."""
        say = _BY_KIND.get(why)
        return say(self, r) if say is not None else ""

    def readiness(self, r: ActivityResult) -> tuple[tuple[str, ...], tuple[str, ...]]:
        """Notes on the activity's open readiness items, and the ones flagged as not ready.

        Returns:
            ``(notes, flags)``: a note for each open item whose date is still ahead (it holds
            the activity back), and a flag for each item with no date or a date that has passed.
        """
        items = self._items.get(r.id)
        if not items:
            return (), ()
        notes, flags = [], []
        for item in sorted(items, key=lambda i: (i.expected or date.max, i.what)):
            flag = item.flag(self._as_of)
            if flag is not None:
                flags.append(flag)
            else:
                assert item.expected is not None
                notes.append(f"needs {item.what}, expected {date_text(item.expected)}")
        return tuple(notes), tuple(flags)

    # -- the sentences --------------------------------------------------------------------------

    def _waiting(self, r: ActivityResult) -> str:
        earliest = f"earliest start {date_text(r.early_start)}"
        link = r.driving
        if link is not None:
            return f"{self._link_text(link)}; {earliest}"
        what = r.driven_by
        if what == "readiness":
            items = [i for i in self._items.get(r.id, ()) if i.holds_until(self._as_of)]
            if items:
                item = max(items, key=lambda i: (i.expected, i.what))
                assert item.expected is not None  # only an item with a date holds work back
                return f"needs {item.what}, expected {date_text(item.expected)}; {earliest}"
            return f"held back by an open readiness item; {earliest}"
        if what == "start not before":
            snb = self._site.activity(r.id).start_not_before
            if snb is not None:
                return f"not to start before {date_text(snb)} (date in the schedule); {earliest}"
        if what == "site start":
            return f"the site starts {date_text(self._site.start)}; {earliest}"
        return earliest

    def _past_text(self, r: ActivityResult) -> str:
        return self._past

    def _after_late_finish(self, r: ActivityResult) -> str:
        assert r.late_finish is not None  # open work, which always has late dates
        return f"done by then: to be finished by its late finish {date_text(r.late_finish)}"

    def _late(self, r: ActivityResult) -> str:
        assert r.total_float is not None and r.late_finish is not None
        return (
            f"late: {working_days(-r.total_float)} behind; every day it can run up to "
            f"{date_text(r.early_finish)} must be worked (late finish was "
            f"{date_text(r.late_finish)})"
        )

    def _link_text(self, link: Link) -> str:
        pred = self._result.by_id.get(link.pred)
        name = f" ({pred.name})" if pred is not None else ""
        text = f"waiting on {link.pred}{name} {_LINK_VERB[link.type]}"
        if link.lag > 0:
            text += f" + {working_days(link.lag)}"
        elif link.lag < 0:
            text += f" less a {working_days(-link.lag)} lead"
        return text

    def _float(self, r: ActivityResult) -> str:
        tf = r.total_float
        assert tf is not None and r.late_start is not None and r.late_finish is not None
        text = f"{working_days(tf)} of float"
        if r.status is Status.IN_PROGRESS:
            return (
                f"{text}: the remaining {working_days(r.remaining)} must finish by "
                f"{date_text(r.late_finish)}"
            )
        return f"{text}: start by {date_text(r.late_start)}, finish by {date_text(r.late_finish)}"


_BY_KIND: dict[Why, Callable[[ReasonWriter, ActivityResult], str]] = {
    Why.PAST: ReasonWriter._past_text,
    Why.WAITING: ReasonWriter._waiting,
    Why.FLOAT: ReasonWriter._float,
    Why.AFTER_LATE_FINISH: ReasonWriter._after_late_finish,
    Why.LATE: ReasonWriter._late,
}
"""The sentence writer of each reason kind. Plain functions at module level, not bound
methods kept on the writer: a writer holding its own bound methods is a reference cycle,
which kept the whole schedule (every row of a 10,000-activity site) alive until the garbage
collector's next full pass, or the end of the process."""
