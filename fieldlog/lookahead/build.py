"""Build the lookahead: every open activity classified per day, with reasons and crew load.

:func:`build_lookahead` is pure: a :class:`ScheduleResult`, the open readiness items and a
window in, a frozen :class:`Lookahead` out. The renderers (text, JSON, CSV) only read it.

Decisions a reader may look for:

* the window defaults to 14 calendar days from the data date (the day after the status date);
  ``start`` may move it, and days before the data date are past (CANNOT, "already past");
* every unfinished activity gets a row, so the JSON and CSV are complete; the printed sheet
  leaves out the rows with nothing to do inside the window and says how many it left out;
* finished activities get no row (there is nothing left to plan); those finished on or after
  the first day shown are listed apart, so a window that starts in the past still shows them;
* rows run in early-start order (a staircase a crew can read top-down), then by float and id.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass, replace
from datetime import date, timedelta
from operator import attrgetter
from typing import TYPE_CHECKING, NamedTuple

from fieldlog.engine.progress import Status
from fieldlog.engine.readiness import OpenItem
from fieldlog.engine.result import ScheduleResult
from fieldlog.engine.rows import collector_paused
from fieldlog.lookahead.classify import Cell, PatternCache, Why, Window
from fieldlog.lookahead.crew_load import CrewLoad, CrewWork, crew_loads, near_headcount
from fieldlog.lookahead.reasons import ReasonWriter

if TYPE_CHECKING:  # imported when some crew is over or near its headcount (start-up)
    from fieldlog.lookahead.fewest_people import FewestPeople
    from fieldlog.lookahead.levelling import Levelling

LOOKAHEAD_DAYS = 14
"""Calendar days in the lookahead window: two weeks (common practice), the one definition."""


class ActivityRow(NamedTuple):
    """One unfinished activity over the window.

    A named tuple rather than a dataclass: a lookahead makes one per open activity (10,000 on
    a big job) and a tuple is built several times faster; readers use the field names only.
    """

    id: str
    name: str
    status: Status
    calendar: str
    remaining: int
    early_start: date
    early_finish: date
    late_start: date
    late_finish: date
    total_float: int
    free_float: int
    critical: bool
    cells: tuple[Cell, ...]
    """One class per window day."""
    reasons: tuple[str, ...]
    """Why its MAY and CANNOT days are so, then notes on open readiness items."""
    why: tuple[int | None, ...]
    """Per window day, the index in ``reasons`` explaining that cell (None: nothing to say)."""
    not_ready: tuple[str, ...]
    """Readiness items with no expected date or a date already past: chase them."""
    crew: Mapping[str, int]

    @property
    def late(self) -> bool:
        """Negative total float: the job slips unless this activity catches up."""
        return self.total_float < 0

    @property
    def active(self) -> bool:
        """It must or may run on some day of the window."""
        return Cell.MUST in self.cells or Cell.MAY in self.cells


@dataclass(frozen=True)
class FinishedRow:
    """An activity finished on or after the first day of the window."""

    id: str
    name: str
    actual_start: date | None
    actual_finish: date


@dataclass(frozen=True)
class Lookahead:
    """The lookahead for one site, status date and window."""

    site: str
    revision: int
    as_of: date
    data_date: date
    days: tuple[date, ...]
    finish: date
    """Forecast finish of the job."""
    finish_by: date | None
    finish_float: int | None
    """Working days between forecast and required finish; negative means late."""
    rows: tuple[ActivityRow, ...]
    finished: tuple[FinishedRow, ...]
    crews: tuple[CrewLoad, ...]
    levelling: Levelling | None
    """A suggestion when some crew is over its headcount on early dates, else None."""
    fewest: FewestPeople | None = None
    """The fewest people per crew over or near its headcount, and the starts to move."""

    @property
    def rows_with_work(self) -> tuple[ActivityRow, ...]:
        """The rows with a MUST or MAY day in the window: what the printed sheet lists and
        what the app shows by default. One rule, here, so the screen and the paper agree."""
        return tuple(row for row in self.rows if row.active)


def build_lookahead(
    result: ScheduleResult,
    readiness: Sequence[OpenItem] = (),
    start: date | None = None,
    days: int = LOOKAHEAD_DAYS,
    *,
    suggest_levelling: bool = True,
    suggest_fewest: bool = True,
) -> Lookahead:
    """Classify every unfinished activity on each day of the window.

    Args:
        result: the schedule as of its status date.
        readiness: readiness items open at that date (the schedule already holds activities
            back for them; here they give reasons and not-ready flags).
        start: first day shown (default: the data date).
        days: number of calendar days shown (at least 1).
        suggest_levelling: look for a levelling suggestion when a crew is over its headcount.
        suggest_fewest: find the fewest people for crews over or near their headcount.

    Returns:
        The lookahead, ready for the renderers.

    Raises:
        ValueError: ``days`` is less than 1.
    """
    if days < 1:
        raise ValueError(f"a lookahead needs at least one day, got {days}")
    first = start or result.data_date
    window_days = tuple(first + timedelta(days=k) for k in range(days))
    window = Window(first.toordinal(), days, result.data_date.toordinal())
    working = {
        name: tuple(c.is_working(d) for d in window_days) for name, c in result.calendars.items()
    }
    cache = PatternCache(window, working)
    writer = ReasonWriter(result, readiness)
    site = result.site
    last_day = window_days[-1]

    with collector_paused():  # rows and their reasons hold no cycles (see the engine's rows)
        rows, work, finished = _rows(result, cache, writer, first, last_day)
    rows.sort(key=attrgetter("early_start", "total_float", "id"))
    finished.sort(key=lambda f: (f.actual_finish, f.id))
    loads = crew_loads(work, site.crews, days)

    levelling = None
    over = [load.crew for load in loads if load.over_early]
    if suggest_levelling and over:
        from fieldlog.lookahead.levelling import level

        levelling = level(
            result, window_days, over, {load.crew: load.early for load in loads}, rows
        )
        loads = tuple(_with_levelled(load, levelling.window_load) for load in loads)
    fewest = None
    peaks = {load.crew: max(load.early, default=0) for load in loads}
    if suggest_fewest and any(
        near_headcount(crew.available, peaks.get(name, 0)) for name, crew in site.crews.items()
    ):
        from fieldlog.lookahead.fewest_people import fewest_people

        fewest = fewest_people(result, window_days, peaks, rows)
    return Lookahead(
        site=site.name,
        revision=site.revision,
        as_of=result.as_of,
        data_date=result.data_date,
        days=window_days,
        finish=result.finish,
        finish_by=site.finish_by,
        finish_float=result.finish_float,
        rows=tuple(rows),
        finished=tuple(finished),
        crews=loads,
        levelling=levelling,
        fewest=fewest,
    )


def _rows(
    result: ScheduleResult, cache: PatternCache, writer: ReasonWriter, first: date, last_day: date
) -> tuple[list[ActivityRow], list[CrewWork], list[FinishedRow]]:
    """The row of every open activity (in result order), the crew work of the active ones,
    and the activities finished on or after ``first``."""
    text = writer.text
    crews = {a.id: a.crew for a in result.site.activities}
    has_items = writer.has_items
    first_o = first.toordinal()
    rows: list[ActivityRow] = []
    work: list[CrewWork] = []
    finished: list[FinishedRow] = []
    for r in result.activities:
        if r.status is Status.FINISHED:
            if r.actual_finish is not None and r.actual_finish >= first:
                finished.append(FinishedRow(r.id, r.name, r.actual_start, r.actual_finish))
            continue
        tf, ff, late_start, late_finish = r.total_float, r.free_float, r.late_start, r.late_finish
        # Only finished work (skipped above) has no late dates and no float.
        assert tf is not None and ff is not None
        assert late_start is not None and late_finish is not None
        pattern = cache.get(
            r.calendar, r.early_start, r.early_finish, late_start, late_finish, tf < 0
        )
        kinds = pattern.kinds
        reasons = [text(r, kind) for kind in kinds]
        if tf < 0 and Why.LATE not in kinds:
            reasons.append(text(r, Why.LATE))  # late, though not in the window
        if r.early_start > last_day and Why.WAITING not in kinds:
            reasons.append(text(r, Why.WAITING))  # the window is all days off
        flags: tuple[str, ...] = ()
        if r.id in has_items:
            notes, flags = writer.readiness(r)
            for note in notes:
                if not any(t.startswith(note) for t in reasons):
                    reasons.append(note)
            reasons.extend(flags)
        crew = crews[r.id]
        rows.append(
            ActivityRow(
                r.id,
                r.name,
                r.status,
                r.calendar,
                r.remaining,
                r.early_start,
                r.early_finish,
                late_start,
                late_finish,
                tf,
                ff,
                r.critical,
                pattern.cells,
                tuple(reasons),
                pattern.index,
                flags,
                crew,
            )
        )
        if crew and pattern.active:
            work.append(
                CrewWork(
                    crew,
                    pattern.cells,
                    r.early_start.toordinal() - first_o,
                    r.early_finish.toordinal() - first_o,
                )
            )
    return rows, work, finished


def _with_levelled(load: CrewLoad, window_load: Mapping[str, tuple[int, ...]]) -> CrewLoad:
    return replace(load, levelled=window_load.get(load.crew, load.early))
