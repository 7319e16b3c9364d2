"""The frozen values a forecast history is made of; the renderers and the app only read them."""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from datetime import date

from fieldlog.history.causes import BUCKETS


@dataclass(frozen=True)
class Step:
    """One part of a day's movement of the forecast finish, and the bucket it goes to."""

    bucket: str
    """One of :data:`fieldlog.history.causes.BUCKETS`."""
    days: int
    """Working days the finish moved in this step (+ later, - earlier)."""
    what: str
    """What the log shows for it, in plain words."""


@dataclass(frozen=True)
class Evidence:
    """An entry (or a recorded absence) of a window that bears on the movement."""

    day: date
    kind: str
    """``lost day``, ``lost hours``, ``missing start``, ``late start``, ``remaining up``,
    ``held by readiness`` or ``instruction``."""
    text: str
    entry_id: str = ""
    activity: str = ""


@dataclass(frozen=True)
class DayRecord:
    """The schedule as of the end of one logged day, and how that day moved the finish."""

    day: date
    finish: date
    finish_float: int | None
    driving_path: tuple[str, ...]
    movement: int
    """Working days since the previous logged day (+ later); the sum of ``steps``."""
    steps: tuple[Step, ...]
    evidence: tuple[Evidence, ...]


@dataclass(frozen=True)
class Window:
    """One period of the history (a day, a week or a month) ending at its last logged day."""

    label: str
    first: date
    last: date
    status: date
    """The last logged day in the window: the schedule shown is as of its end."""
    finish: date
    finish_float: int | None
    movement: int
    """Working days the finish moved since the previous window (+ later)."""
    split: Mapping[str, int]
    """Movement per bucket (every bucket present, in report order); adds up to ``movement``."""
    driving_path: tuple[str, ...]
    steps: tuple[Step, ...]
    evidence: tuple[Evidence, ...]


@dataclass(frozen=True)
class Assignment:
    """One activity of a week's plan (MUST, or MAY with an early start in the week)."""

    activity: str
    must: bool
    required: str
    """What the plan needed that week: ``finish``, ``start`` or ``progress``."""
    done: bool
    reasons: tuple[str, ...]
    """For a miss, what the log records about it that week (never empty for a miss)."""


@dataclass(frozen=True)
class WeekReliability:
    """Percent plan complete of one week (Monday to Sunday)."""

    first: date
    last: date
    plan_as_of: date
    """The status date of the lookahead the week's plan is read from (the Sunday before)."""
    assignments: tuple[Assignment, ...]

    @property
    def planned(self) -> int:
        return len(self.assignments)

    @property
    def done(self) -> int:
        return sum(a.done for a in self.assignments)

    @property
    def ppc(self) -> float | None:
        """Done / planned x 100, or None for a week with nothing planned."""
        return 100.0 * self.done / self.planned if self.assignments else None

    @property
    def must_planned(self) -> int:
        return sum(a.must for a in self.assignments)

    @property
    def must_done(self) -> int:
        return sum(a.must and a.done for a in self.assignments)


@dataclass(frozen=True)
class History:
    """The forecast history of a site over a range of logged days."""

    site: str
    revision: int
    calendar: str
    """The calendar movements are counted on (the site's default)."""
    finish_by: date | None
    by: str
    baseline_status: date
    """Status date of the schedule the first window is measured from."""
    baseline_finish: date
    baseline_float: int | None
    windows: tuple[Window, ...]
    weeks: tuple[WeekReliability, ...]
    problems: tuple[str, ...] = ()

    @property
    def total_movement(self) -> int:
        return sum(w.movement for w in self.windows)

    @property
    def split(self) -> dict[str, int]:
        """Movement per bucket over the whole range."""
        return {b: sum(w.split.get(b, 0) for w in self.windows) for b in BUCKETS}
