"""What a CPM pass returns: per-activity dates and floats, the paths, and what to flag.

Kept apart from :mod:`fieldlog.engine.cpm` so that readers of results (lookahead, reports, the app)
depend on these plain values only, never on the passes themselves.

The summary of a :class:`ScheduleResult` (finish, paths, flags) is ready at once; the engine's
per-activity rows are built the first time they are read
(:class:`fieldlog.engine.rows.ScheduleRows`).
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass, field
from datetime import date, timedelta
from types import MappingProxyType
from typing import NamedTuple

from fieldlog.engine.calendars import WorkCalendar
from fieldlog.engine.compiled import CompiledSite
from fieldlog.engine.progress import Progress, Status
from fieldlog.site.model import Link, LinkType, Site


class ActivityResult(NamedTuple):
    """One activity's schedule as of the status date.

    Open activities carry forecast dates (for work in progress: of the remaining work) and
    floats in working days of their own calendar; finished ones carry their actual dates and no
    float.

    A named tuple rather than a dataclass: a recompute makes one per activity (10,000 and more
    on a big job), and a tuple is built several times faster and takes a third of the memory.
    It is as immutable, and readers use the field names only.
    """

    id: str
    name: str
    calendar: str
    duration: int
    status: Status
    early_start: date
    """Forecast first day (of the remaining work, for work in progress); the actual start of
    finished work (its actual finish when no start was recorded)."""
    early_finish: date
    """Forecast last day; the actual finish of finished work."""
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
    work, and its point (see :mod:`fieldlog.engine.calendars`) is the next working day's start.
    False for other milestones (dated on the day they fall at the start of) and for work."""

    @property
    def is_open(self) -> bool:
        """Not finished."""
        return self.status is not Status.FINISHED

    @property
    def late(self) -> bool:
        """Negative total float: the job slips unless this activity catches up."""
        return self.total_float is not None and self.total_float < 0


@dataclass(frozen=True)
class OutOfSequence:
    """Work that started (or finished) before its predecessor allowed, or that was recorded
    finished with no start recorded (``link`` is None then, ``activity`` names it)."""

    link: Link | None
    kind: str
    """``"started before predecessor finished"`` and similar plain words."""
    treatment: str
    """``"retained logic"`` or ``"progress override"``; for a finish with no start, what the
    engine assumed instead."""
    activity: str = ""
    """The activity concerned when there is no link."""

    def describe(self) -> str:
        """One line for reports."""
        if self.link is None:
            return f"{self.activity} {self.kind}; {self.treatment}"
        return (
            f"{self.link.succ} {self.kind} {self.link.pred} ({self.link.type.value}); "
            f"{self.treatment}"
        )


NO_START_KIND = "finished, no start recorded"
NO_START_TREATMENT = "its finish day is taken as its start; record the start as a correction"


def finished_without_start(
    site: Site, progress: Mapping[str, Progress]
) -> tuple[OutOfSequence, ...]:
    """Work (not a milestone) recorded finished while no start was ever recorded.

    A daily log that shows a finish with no start is incomplete, and in a delay dispute that
    gap matters: the case is listed with the other out-of-sequence cases, never silently
    accepted. A milestone is only ever reached, so it has no start to miss. In file order.
    """
    # Looked up from the few reports with no start, not from every activity (a recompute of
    # a large site would pay a dict lookup per activity for nothing).
    missing = {aid for aid, p in progress.items() if p.actual_finish and not p.actual_start}
    if not missing:
        return ()
    return tuple(
        OutOfSequence(None, NO_START_KIND, NO_START_TREATMENT, a.id)
        for a in site.activities
        if a.id in missing and not a.is_milestone
    )


@dataclass(frozen=True)
class ScheduleResult:
    """The whole schedule as of ``as_of`` (end of day); the data date is the next day.

    The engine hands over ``activities`` as :class:`fieldlog.engine.rows.ScheduleRows`, a
    sequence that builds its rows on first read (the summary needs none of them); any other
    sequence of rows (a tuple) is as good, e.g. when a caller narrows a result with
    ``dataclasses.replace``.
    """

    site: Site
    as_of: date
    finish: date
    """Forecast finish of the job (latest last day of any activity)."""
    finish_float: int | None
    """Working days (default calendar) between forecast finish and ``finish_by``; negative
    means late. None when the site sets no required finish."""
    activities: Sequence[ActivityResult]
    """One row per activity, in the order of ``site.activities``."""
    driving_path: tuple[str, ...]
    """Activities traced back from the finish along driving links (the longest path)."""
    lowest_float: tuple[str, ...]
    """Open activities flagged critical by float (total float <= max(0, lowest float))."""
    out_of_sequence: tuple[OutOfSequence, ...]
    calendars: Mapping[str, WorkCalendar] = field(repr=False)
    by_id: Mapping[str, ActivityResult] = field(repr=False)
    compiled: CompiledSite = field(repr=False, compare=False)
    """The site's compiled form the result was computed from (the lookahead reuses it)."""

    @property
    def data_date(self) -> date:
        """The first day of the forecast: the day after the status date."""
        return self.as_of + timedelta(days=1)

    @property
    def paths_differ(self) -> bool:
        """True when the driving path and the lowest-float set name different open work."""
        open_driving = {a for a in self.driving_path if self.by_id[a].is_open}
        return open_driving != set(self.lowest_float)


def finish_float(site: Site, finish: date, calendars: Mapping[str, WorkCalendar]) -> int | None:
    """Working days (default calendar) from the forecast finish to ``site.finish_by``."""
    if site.finish_by is None:
        return None
    c = calendars[site.calendar]
    return c.count(finish + timedelta(days=1), site.finish_by + timedelta(days=1))


def critical_threshold(total_floats: Iterable[int]) -> int:
    """Critical means total float <= this: max(0, lowest total float of open work).

    With a required finish later than the forecast every float is positive, and the activities
    with the lowest float are the critical ones; otherwise zero or negative float is critical.
    """
    return max(0, min(total_floats, default=0))


OUT_OF_SEQUENCE_KINDS: Mapping[LinkType, str] = MappingProxyType(
    {
        LinkType.FS: "started before predecessor finished",
        LinkType.SS: "started before predecessor started",
        LinkType.FF: "finished before predecessor finished",
        LinkType.SF: "finished before predecessor started",
    }
)
"""How a link's successor moved on too early, by link type (the :attr:`OutOfSequence.kind`).

Definitions follow the GAO Schedule Assessment Guide's page on out-of-sequence logic; the SF
case is the same reading applied to start-to-finish. The successor side is its start for FS
and SS, its finish for FF and SF; the predecessor side its finish for FS and FF, its start for
SS and SF."""


def find_out_of_sequence(
    site: Site, progress: Sequence[Progress], override: bool
) -> tuple[OutOfSequence, ...]:
    """Links whose successor has moved on while the predecessor has not (as of the status date).

    ``progress`` is in the order of ``site.activities``. See :data:`OUT_OF_SEQUENCE_KINDS`.
    The engine finds the same links with arrays (``fieldlog.engine.cpm``); tests compare the two.
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
        on_finish = link.type in (LinkType.FF, LinkType.SF)
        from_start = link.type in (LinkType.SS, LinkType.SF)
        moved_on = s.actual_finish if on_finish else s.actual_start
        caught_up = p.actual_start if from_start else p.actual_finish
        if moved_on and not caught_up:
            found.append(OutOfSequence(link, OUT_OF_SEQUENCE_KINDS[link.type], treatment))
    by_id = {a.id: p for a, p in zip(site.activities, progress, strict=True)}
    return tuple(found) + finished_without_start(site, by_id)


_NOTHING = Progress()
