"""What a CPM pass returns: per-activity dates and floats, the paths, and what to flag.

Kept apart from :mod:`fieldlog.cpm` so that readers of results (lookahead, reports, the app)
depend on these plain values only, never on the passes themselves.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass, field, fields
from datetime import date, timedelta
from types import MappingProxyType

from fieldlog.calendars import WorkCalendar
from fieldlog.model import Link, LinkType, Site
from fieldlog.progress import Progress, Status


@dataclass(frozen=True)
class ActivityResult:
    """One activity's schedule as of the status date.

    Open activities carry forecast dates (for work in progress: of the remaining work) and
    floats in working days of their own calendar; finished ones carry their actual dates and no
    float.
    """

    id: str
    name: str
    calendar: str
    duration: int
    status: Status
    early_start: date | None
    early_finish: date | None
    late_start: date | None
    late_finish: date | None
    total_float: int | None
    free_float: int | None
    critical: bool
    on_driving_path: bool
    actual_start: date | None
    actual_finish: date | None
    remaining: int
    """Working days still needed after the status date (0 when finished)."""
    percent: float | None
    driving: Link | None
    """The predecessor link that sets the early start, if a link does."""
    driven_by: str
    """Predecessor id, or what else set the early start: data date, site start,
    start not before, readiness, actual dates."""
    overdue: bool
    """The planned count-down ran out and no finish was recorded."""
    after_work: bool = False
    """A milestone that marks the end of the work driving it: its date is the last day of that
    work, and its point (see :mod:`fieldlog.calendars`) is the next working day's start.
    False for other milestones (dated on the day they fall at the start of) and for work."""

    @classmethod
    def from_fields(cls, values: dict[str, object]) -> ActivityResult:
        """Build from a dict holding every field by name, skipping ``__init__``.

        The engine builds one result per activity on every recompute; the generated frozen
        ``__init__`` sets each of the 21 fields through ``object.__setattr__`` and costs about
        twice as much. Only for callers that pass every field (checked in tests).
        """
        result = object.__new__(cls)
        result.__dict__.update(values)
        return result

    @property
    def is_open(self) -> bool:
        """Not finished."""
        return self.status is not Status.FINISHED

    @property
    def late(self) -> bool:
        """Negative total float: the job slips unless this activity catches up."""
        return self.total_float is not None and self.total_float < 0


_FIELD_NAMES = tuple(f.name for f in fields(ActivityResult))


@dataclass(frozen=True)
class OutOfSequence:
    """Work that started (or finished) before its predecessor allowed."""

    link: Link
    kind: str
    """``"started before predecessor finished"`` and similar plain words."""
    treatment: str
    """``"retained logic"`` or ``"progress override"``."""

    def describe(self) -> str:
        """One line for reports."""
        return (f"{self.link.succ} {self.kind} {self.link.pred} ({self.link.type.value}); "
                f"{self.treatment}")


@dataclass(frozen=True)
class ScheduleResult:
    """The whole schedule as of ``as_of`` (end of day); the data date is the next day."""

    site: Site
    as_of: date
    finish: date
    """Forecast finish of the job (latest last day of any activity)."""
    finish_float: int | None
    """Working days (default calendar) between forecast finish and ``finish_by``; negative
    means late. None when the site sets no required finish."""
    activities: tuple[ActivityResult, ...]
    driving_path: tuple[str, ...]
    """Activities traced back from the finish along driving links (the longest path)."""
    lowest_float: tuple[str, ...]
    """Open activities flagged critical by float (total float <= max(0, lowest float))."""
    out_of_sequence: tuple[OutOfSequence, ...]
    calendars: Mapping[str, WorkCalendar] = field(repr=False)
    by_id: Mapping[str, ActivityResult] = field(repr=False)

    @property
    def data_date(self) -> date:
        """The first day of the forecast: the day after the status date."""
        return self.as_of + timedelta(days=1)

    @property
    def paths_differ(self) -> bool:
        """True when the driving path and the lowest-float set name different open work."""
        open_driving = {a for a in self.driving_path if self.by_id[a].is_open}
        return open_driving != set(self.lowest_float)

    @classmethod
    def assemble(cls, *, site: Site, as_of: date, finish: date,
                 results: Sequence[ActivityResult], calendars: Mapping[str, WorkCalendar],
                 out_of_sequence: tuple[OutOfSequence, ...],
                 driving_path: tuple[str, ...]) -> ScheduleResult:
        """Freeze results that are already marked critical / on the driving path."""
        finish_float = None
        if site.finish_by is not None:
            c = calendars[site.calendar]
            finish_float = c.count(finish + timedelta(days=1), site.finish_by + timedelta(days=1))
        return cls(
            site=site, as_of=as_of, finish=finish, finish_float=finish_float,
            activities=tuple(results), driving_path=driving_path,
            lowest_float=tuple(r.id for r in results if r.critical),
            out_of_sequence=out_of_sequence, calendars=MappingProxyType(dict(calendars)),
            by_id=MappingProxyType({r.id: r for r in results}),
        )


def critical_threshold(total_floats: Iterable[int]) -> int:
    """Critical means total float <= this: max(0, lowest total float of open work).

    With a required finish later than the forecast every float is positive, and the activities
    with the lowest float are the critical ones; otherwise zero or negative float is critical.
    """
    return max(0, min(total_floats, default=0))


def find_out_of_sequence(site: Site, progress: Sequence[Progress],
                         override: bool) -> tuple[OutOfSequence, ...]:
    """Links whose successor has moved on while the predecessor has not (as of the status date).

    ``progress`` is in the order of ``site.activities``. Definitions follow the GAO Schedule
    Assessment Guide's page on out-of-sequence logic: started before an FS predecessor
    finished, started before an SS predecessor started, finished before an FF predecessor
    finished (and, by the same reading, before an SF predecessor started).
    """
    moved = {a.id: p for a, p in zip(site.activities, progress, strict=True)
             if p.actual_start or p.actual_finish}
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
    return tuple(found)


_NOTHING = Progress()
