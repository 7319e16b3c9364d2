"""What a CPM pass returns: per-activity dates and floats, the paths, and what to flag.

Kept apart from :mod:`fieldlog.cpm` so that readers of results (lookahead, reports, the app)
depend on these plain values only, never on the passes themselves.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
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
                 out_of_sequence: tuple[OutOfSequence, ...]) -> ScheduleResult:
        """Mark the critical activities and trace the driving path, then freeze."""
        open_floats = [r.total_float for r in results if r.total_float is not None]
        threshold = max(0, min(open_floats)) if open_floats else 0
        by_id = {r.id: r for r in results}
        path = _driving_path(results, by_id, finish)
        on_path = set(path)
        marked = []
        for r in results:
            crit = r.total_float is not None and r.total_float <= threshold
            if crit or r.id in on_path:
                r = _replace(r, critical=crit, on_driving_path=r.id in on_path)
            marked.append(r)
        by_id = {r.id: r for r in marked}
        finish_float = None
        if site.finish_by is not None:
            c = calendars[site.calendar]
            finish_float = c.count(finish + timedelta(days=1), site.finish_by + timedelta(days=1))
        return cls(
            site=site, as_of=as_of, finish=finish, finish_float=finish_float,
            activities=tuple(marked), driving_path=tuple(path),
            lowest_float=tuple(r.id for r in marked if r.critical),
            out_of_sequence=out_of_sequence, calendars=MappingProxyType(dict(calendars)),
            by_id=MappingProxyType(by_id),
        )


def _replace(r: ActivityResult, **changes: object) -> ActivityResult:
    from dataclasses import replace

    return replace(r, **changes)


def _driving_path(results: Sequence[ActivityResult], by_id: Mapping[str, ActivityResult],
                  finish: date) -> list[str]:
    """Walk driving links back from the open activity that finishes last."""
    ends = [r for r in results if r.is_open and r.early_finish == finish]
    if not ends:
        return []
    # Of several activities ending on the finish day prefer the one with the least float.
    end = min(ends, key=lambda r: (r.total_float if r.total_float is not None else 0))
    path = [end.id]
    seen = {end.id}
    current = end
    while current.driving is not None:
        pred = by_id[current.driving.pred]
        if pred.id in seen:
            break
        path.append(pred.id)
        seen.add(pred.id)
        if not pred.is_open:
            break
        current = pred
    path.reverse()
    return path


def find_out_of_sequence(site: Site, progress: Sequence[Progress],
                         override: bool) -> tuple[OutOfSequence, ...]:
    """Links whose successor has moved on while the predecessor has not (as of the status date).

    Definitions follow the GAO Schedule Assessment Guide's page on out-of-sequence logic:
    started before an FS predecessor finished, started before an SS predecessor started,
    finished before an FF predecessor finished (and, by the same reading, before an SF
    predecessor started).
    """
    index = {a.id: k for k, a in enumerate(site.activities)}
    treatment = "progress override" if override else "retained logic"
    found = []
    for link in site.links:
        p, s = progress[index[link.pred]], progress[index[link.succ]]
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
