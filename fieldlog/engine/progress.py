"""Progress of one activity as of a status date: what the field reported, and what it means.

The journal's replay produces one :class:`Progress` per activity. The engine turns it into a
status and a remaining duration *as of the end of the status date*:

* a remaining duration recorded on day X counts down by the working days worked since X
  (working days of the activity's own calendar, so a weather day recorded as lost time does not
  count down, which is how a lost day moves the forecast);
* an activity started without any remaining recorded needs its planned duration less the
  working days since its actual start;
* an open activity never needs less than one more day: it is done only when someone records it
  finished. When the count-down reaches zero the activity is flagged as overdue for an update.
"""

from __future__ import annotations

from dataclasses import dataclass
from datetime import date, timedelta
from enum import StrEnum

from fieldlog.engine.calendars import WorkCalendar


class Status(StrEnum):
    """Where an activity stands at the status date."""

    NOT_STARTED = "not started"
    IN_PROGRESS = "in progress"
    FINISHED = "finished"


@dataclass(frozen=True)
class Progress:
    """What the field log says about one activity as of a status date."""

    actual_start: date | None = None
    actual_finish: date | None = None
    remaining: int | None = None
    """Working days still needed, as last recorded."""
    remaining_as_of: date | None = None
    """The day the remaining duration was recorded for (as of the end of that day)."""
    percent: float | None = None
    """Physical percent complete, kept apart from the remaining duration."""

    @property
    def status(self) -> Status:
        """Finished, in progress or not started."""
        if self.actual_finish is not None:
            return Status.FINISHED
        if self.actual_start is not None:
            return Status.IN_PROGRESS
        return Status.NOT_STARTED


NO_PROGRESS = Progress()


def remaining_at(
    progress: Progress, duration: int, calendar: WorkCalendar, status_date: date
) -> tuple[int, bool]:
    """Working days an in-progress activity still needs after ``status_date``.

    Returns:
        ``(remaining, overdue)``; ``overdue`` is True when the planned count-down ran out
        without a finish being recorded (the remaining is then held at 1).
    """
    if progress.remaining is not None:
        base = progress.remaining
        since = progress.remaining_as_of or progress.actual_start or status_date
    else:
        base = duration
        start = progress.actual_start or status_date
        since = start - timedelta(days=1)  # the start day itself was worked
    if since >= status_date:
        elapsed = 0
    else:
        elapsed = calendar.count(since + timedelta(days=1), status_date + timedelta(days=1))
    left = base - elapsed
    if left < 1:
        return 1, True
    return left, False
