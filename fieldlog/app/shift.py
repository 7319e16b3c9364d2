"""Which activities the end-of-shift list shows, in which order, and how each is described.

The list holds the work the foreman can say something about today:

* activities running (started, not finished), including ones started or finished today, so a
  row does not vanish under the cursor the moment it is marked;
* activities ready to start: not started and nothing but the data date holds them (their early
  start is the data date), so "started today" is one key away.

Order: running work first, then ready work, then what was finished today; within each group
the least float first (late work at the very top), then the early start, then the id, the same
tie-breaks as the printed float list.
"""

from __future__ import annotations

from dataclasses import dataclass
from datetime import date

from fieldlog.engine.progress import Status
from fieldlog.engine.result import ActivityResult, ScheduleResult

RUNNING, READY, DONE_TODAY = 0, 1, 2


@dataclass(frozen=True)
class ShiftRow:
    """One activity of the end-of-shift list."""

    result: ActivityResult
    group: int
    """:data:`RUNNING`, :data:`READY` or :data:`DONE_TODAY`."""
    state: str
    """Plain words: "running", "started" (today), "ready", "finished" (today), "overdue"
    (the count-down ran out with no finish recorded)."""

    @property
    def id(self) -> str:
        """The activity id."""
        return self.result.id


def shift_rows(schedule: ScheduleResult, today: date) -> list[ShiftRow]:
    """The end-of-shift list for ``today`` (status date = end of today)."""
    data_date = schedule.data_date
    rows = []
    for r in schedule.activities:
        row = _row(r, today, data_date)
        if row is not None:
            rows.append(row)
    rows.sort(key=_order)
    return rows


def _row(r: ActivityResult, today: date, data_date: date) -> ShiftRow | None:
    if r.status is Status.FINISHED:
        if r.actual_finish == today:
            return ShiftRow(r, DONE_TODAY, "finished")
        return None
    if r.status is Status.IN_PROGRESS:
        if r.actual_start == today:
            return ShiftRow(r, RUNNING, "started")
        return ShiftRow(r, RUNNING, "overdue" if r.overdue else "running")
    if r.early_start <= data_date:
        return ShiftRow(r, READY, "ready")
    return None


def _order(row: ShiftRow) -> tuple:
    r = row.result
    tf = r.total_float if r.total_float is not None else 0
    if row.group == DONE_TODAY:
        return (row.group, 0, date.min, r.id)
    return (row.group, tf, r.early_start or date.min, r.id)
