"""Result rows (:class:`~fieldlog.engine.result.ActivityResult`) from the engine's arrays.

The passes end with one array per column (points, floats, flags). Turning 10,000 activities
into dated row objects costs about as much as the passes themselves, and a caller that only
wants the finish or the driving path does not need them. So the engine hands the result a
:class:`ScheduleRows`: a sequence that holds the :class:`Columns` and builds the rows the
first time one is read; :class:`RowsById` looks them up by id without building anything
until a row is asked for.

Every value put in a row is a plain Python value (``int``, ``bool``, ``date``, ``None``), never
a numpy scalar: results are compared, hashed and written to JSON downstream.
"""

from __future__ import annotations

import gc
import threading
from collections.abc import Iterator, Mapping, Sequence
from contextlib import contextmanager
from datetime import date
from typing import NamedTuple, overload

import numpy as np

from fieldlog.engine.calendar_tables import CalendarTables
from fieldlog.engine.compiled import CompiledSite
from fieldlog.engine.progress import Progress, Status
from fieldlog.engine.result import ActivityResult

REASONS = ("site start", "data date", "start not before", "readiness", "actual dates")
"""What sets an early start when no link does, by code (the engine's ``reason`` array)."""
SITE_START, DATA_DATE, START_NOT_BEFORE, READINESS, ACTUAL_DATES = range(len(REASONS))


class Columns(NamedTuple):
    """Everything a row needs, one array (or list) per column, positions as ``site.activities``.

    Points are on each activity's own calendar; values of finished work other than its
    progress are not used.
    """

    compiled: CompiledSite
    tables: CalendarTables
    progress: Sequence[tuple[int, Progress]]
    """(position, progress) of every activity the field reported on."""
    finished: np.ndarray
    remaining: np.ndarray
    early_start: np.ndarray
    early_finish: np.ndarray
    late_start: np.ndarray
    late_finish: np.ndarray
    total_float: np.ndarray
    free_float: np.ndarray
    critical: np.ndarray
    on_driving_path: np.ndarray
    driver: np.ndarray
    """Index in ``site.links`` of the driving link, or -1."""
    reason: np.ndarray
    """Code into :data:`REASONS` where no link drives."""
    overdue: np.ndarray
    end_after: np.ndarray

    def day_points(self) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
        """``(after_work, early first, early last, late first, late last)``: the flag and the
        working-day positions whose dates a row shows.

        A milestone's dates are the day of its point (the day before, after work). Finished
        work reads position 0 here; its rows get their actual dates instead.
        """
        fin, dur = self.finished, self.remaining
        after = self.end_after & (dur == 0) & ~fin  # a milestone at the end of its work
        point = fin | (dur == 0)
        e_first = np.where(fin, 0, self.early_start - after)
        e_last = np.where(point, e_first, self.early_finish - 1)
        l_first = np.where(fin, 0, self.late_start - after)
        l_last = np.where(point, l_first, self.late_finish - 1)
        return after, e_first, e_last, l_first, l_last

    def rows(self) -> tuple[ActivityResult, ...]:
        """One result per activity, in the order of ``site.activities``."""
        c = self.compiled
        n, fin = c.net.size, self.finished
        links, link_preds = c.links, c.link_preds
        dur = self.remaining
        after, e_first, e_last, l_first, l_last = self.day_points()
        days, cal = self.tables.dates, c.net.calendar
        early_start, early_finish = days[cal, e_first], days[cal, e_last]
        late_start, late_finish = days[cal, l_first], days[cal, l_last]
        total_float = self.total_float.astype(object)
        free_float = self.free_float.astype(object)
        driving = np.full(n, None, dtype=object)
        driven_by = np.array(REASONS, dtype=object)[self.reason]
        linked = np.flatnonzero(self.driver >= 0)
        driving[linked] = links[self.driver[linked]]
        driven_by[linked] = link_preds[self.driver[linked]]
        for column in (late_start, late_finish, total_float, free_float):
            column[fin] = None

        status = [Status.NOT_STARTED] * n
        actual_start: list[date | None] = [None] * n
        actual_finish: list[date | None] = [None] * n
        percent: list[float | None] = [None] * n
        for k, p in self.progress:
            status[k] = p.status
            actual_start[k] = p.actual_start
            percent[k] = p.percent
            if p.actual_finish is not None:
                early_start[k] = p.actual_start or p.actual_finish
                early_finish[k] = actual_finish[k] = p.actual_finish
        with collector_paused():
            return tuple(
                map(
                    ActivityResult._make,
                    zip(
                        c.net.ids,
                        c.names,
                        c.calendars,
                        c.durations,
                        status,
                        early_start.tolist(),
                        early_finish.tolist(),
                        late_start.tolist(),
                        late_finish.tolist(),
                        total_float.tolist(),
                        free_float.tolist(),
                        self.critical.tolist(),
                        self.on_driving_path.tolist(),
                        actual_start,
                        actual_finish,
                        np.where(fin, 0, dur).tolist(),
                        percent,
                        driving.tolist(),
                        driven_by.tolist(),
                        self.overdue.tolist(),
                        after.tolist(),
                        strict=True,
                    ),
                )
            )


@contextmanager
def collector_paused() -> Iterator[None]:
    """Pause Python's cyclic garbage collector while the rows are allocated.

    A collection starts every few hundred allocations, and some of them walk every object of
    the process (a 10,000-activity site alone holds over 10**5): for 50,000 rows that more than
    doubles the time. Rows hold no reference cycles, so the collector would find nothing; it
    is switched back on (if it was on) as soon as they exist.
    """
    if not gc.isenabled():
        yield
        return
    gc.disable()
    try:
        yield
    finally:
        gc.enable()


class ScheduleRows(Sequence[ActivityResult]):
    """The rows of one recompute, built from its :class:`Columns` the first time one is read.

    Explicitly lazy: the length is known at once, the rows are made on the first index,
    iteration or comparison, all together (one pass over the columns is the fast way), and
    kept. :attr:`columns` stays readable for renderers that work from the arrays. Two threads
    reading at once build the rows once (a lock).
    """

    __slots__ = ("columns", "_rows", "_lock")

    def __init__(self, columns: Columns) -> None:
        self.columns = columns
        self._rows: tuple[ActivityResult, ...] | None = None
        self._lock = threading.Lock()

    @property
    def built(self) -> bool:
        """True once the rows exist (for tests and benchmarks)."""
        return self._rows is not None

    def rows(self) -> tuple[ActivityResult, ...]:
        """Every row, built now if not yet."""
        rows = self._rows
        if rows is None:
            with self._lock:
                rows = self._rows
                if rows is None:
                    rows = self._rows = self.columns.rows()
        return rows

    def __len__(self) -> int:
        return self.columns.compiled.net.size

    @overload
    def __getitem__(self, index: int) -> ActivityResult: ...
    @overload
    def __getitem__(self, index: slice) -> tuple[ActivityResult, ...]: ...
    def __getitem__(self, index: int | slice) -> ActivityResult | tuple[ActivityResult, ...]:
        return self.rows()[index]

    def __iter__(self) -> Iterator[ActivityResult]:
        return iter(self.rows())

    def __eq__(self, other: object) -> bool:
        if isinstance(other, ScheduleRows):
            return self.rows() == other.rows()
        if isinstance(other, Sequence):
            return self.rows() == tuple(other)
        return NotImplemented

    __hash__ = None  # type: ignore[assignment]

    def __repr__(self) -> str:
        return repr(self.rows())


class RowsById(Mapping[str, ActivityResult]):
    """Rows by activity id, answering ``in``, ``len`` and the keys from the site's index
    without building any row (see :class:`ScheduleRows`)."""

    __slots__ = ("_rows", "_index", "_ids")

    def __init__(self, rows: ScheduleRows) -> None:
        net = rows.columns.compiled.net
        self._rows, self._index, self._ids = rows, net.index, net.ids

    def __getitem__(self, activity_id: str) -> ActivityResult:
        return self._rows.rows()[self._index[activity_id]]

    def get(  # type: ignore[override]
        self, activity_id: str, default: ActivityResult | None = None
    ) -> ActivityResult | None:
        """The row of ``activity_id``, or ``default``: one dict lookup (the lookahead asks
        once per open activity, and the generic ``Mapping.get`` costs several calls)."""
        k = self._index.get(activity_id)
        return default if k is None else self._rows.rows()[k]

    def __contains__(self, activity_id: object) -> bool:
        return activity_id in self._index

    def __iter__(self) -> Iterator[str]:
        return iter(self._ids)

    def __len__(self) -> int:
        return len(self._ids)

    def __repr__(self) -> str:
        return f"RowsById({len(self)} activities)"
