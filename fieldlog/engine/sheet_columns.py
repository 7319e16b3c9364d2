"""The schedule's printed columns, one list or array per column, for the sheet renderers.

A printed schedule (text, JSON, CSV) reads the same dozen values of every activity. Going
through the result rows costs a named tuple per activity and then a dict or a formatted
line per row; for 10,000 activities that is several times the recompute. The engine's
:class:`~fieldlog.engine.rows.Columns` already hold those values as arrays, so
:func:`sheet_columns` takes them from there in a handful of array operations and
:mod:`fieldlog.reports.schedule_sheet` writes whole columns at once. A result whose rows
were replaced by a plain tuple (``dataclasses.replace``) gets the same columns from its rows,
one pass, so every result prints through one renderer.

Dates are kept as date ordinals (``0`` where a row has none): a renderer turns each distinct
day into text once (:func:`day_texts`), and a 10,000-activity schedule has a few hundred of
them.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from datetime import date
from typing import NamedTuple

import numpy as np

from fieldlog.engine.progress import Status
from fieldlog.engine.result import ActivityResult
from fieldlog.engine.rows import REASONS, Columns, ScheduleRows

NO_DAY = 0
"""The ordinal standing for "no date" (no real date has ordinal 0)."""


class SheetColumns(NamedTuple):
    """What the printed sheets show, by activity position (``site.activities`` order).

    Values are those of the matching :class:`~fieldlog.engine.result.ActivityResult` fields;
    dates are ordinals, :data:`NO_DAY` for ``None``; floats of finished work are ``None``.
    """

    ids: Sequence[str]
    names: Sequence[str]
    calendars: Sequence[str]
    status: Sequence[Status]
    early_start: np.ndarray
    early_finish: np.ndarray
    late_start: np.ndarray
    late_finish: np.ndarray
    actual_start: np.ndarray
    actual_finish: np.ndarray
    total_float: list[int | None]
    free_float: list[int | None]
    critical: np.ndarray
    on_driving_path: np.ndarray
    remaining: list[int]
    driven_by: list[str]
    overdue: np.ndarray
    finished: np.ndarray

    def __len__(self) -> int:
        return len(self.ids)

    def dates(self) -> tuple[np.ndarray, ...]:
        """The six date columns in the contract's order: early start and finish, late start
        and finish, actual start and finish."""
        return (
            self.early_start,
            self.early_finish,
            self.late_start,
            self.late_finish,
            self.actual_start,
            self.actual_finish,
        )


def sheet_columns(activities: Sequence[ActivityResult]) -> SheetColumns:
    """The columns of a result's ``activities``: from the engine's arrays when it has them
    (rows not built yet stay unbuilt), else from the rows."""
    if isinstance(activities, ScheduleRows) and not activities.built:
        return _from_arrays(activities.columns)
    return _from_rows(activities)


def _from_arrays(c: Columns) -> SheetColumns:
    comp, fin = c.compiled, c.finished
    n = comp.net.size
    _, e_first, e_last, l_first, l_last = c.day_points()
    work, cal = c.tables.work, comp.net.calendar
    early_start, early_finish = work[cal, e_first], work[cal, e_last]
    late_start, late_finish = work[cal, l_first], work[cal, l_last]
    late_start[fin] = NO_DAY
    late_finish[fin] = NO_DAY

    status = [Status.NOT_STARTED] * n
    actual_start = np.zeros(n, dtype=np.int64)
    actual_finish = np.zeros(n, dtype=np.int64)
    for k, p in c.progress:
        status[k] = p.status
        if p.actual_start is not None:
            actual_start[k] = p.actual_start.toordinal()
        if p.actual_finish is not None:
            actual_finish[k] = p.actual_finish.toordinal()
    early_start[fin] = np.where(actual_start[fin] != NO_DAY, actual_start[fin], actual_finish[fin])
    early_finish[fin] = actual_finish[fin]

    driven_by = np.array(REASONS, dtype=object)[c.reason]
    linked = np.flatnonzero(c.driver >= 0)
    driven_by[linked] = comp.link_preds[c.driver[linked]]
    done = np.flatnonzero(fin).tolist()
    return SheetColumns(
        ids=comp.net.ids,
        names=comp.names,
        calendars=comp.calendars,
        status=status,
        early_start=early_start,
        early_finish=early_finish,
        late_start=late_start,
        late_finish=late_finish,
        actual_start=actual_start,
        actual_finish=actual_finish,
        total_float=_blank(c.total_float.tolist(), done),
        free_float=_blank(c.free_float.tolist(), done),
        critical=c.critical,
        on_driving_path=c.on_driving_path,
        remaining=np.where(fin, 0, c.remaining).tolist(),
        driven_by=driven_by.tolist(),
        overdue=c.overdue,
        finished=fin,
    )


def _blank(values: list[int | None], at: list[int]) -> list[int | None]:
    for k in at:
        values[k] = None
    return values


def _from_rows(rows: Sequence[ActivityResult]) -> SheetColumns:
    def ordinals(field: Callable[[ActivityResult], date | None]) -> np.ndarray:
        return np.array([d.toordinal() if d else NO_DAY for d in map(field, rows)], dtype=np.int64)

    def flags(field: Callable[[ActivityResult], bool]) -> np.ndarray:
        return np.array(list(map(field, rows)), dtype=bool)

    status = [r.status for r in rows]
    return SheetColumns(
        ids=[r.id for r in rows],
        names=[r.name for r in rows],
        calendars=[r.calendar for r in rows],
        status=status,
        early_start=ordinals(lambda r: r.early_start),
        early_finish=ordinals(lambda r: r.early_finish),
        late_start=ordinals(lambda r: r.late_start),
        late_finish=ordinals(lambda r: r.late_finish),
        actual_start=ordinals(lambda r: r.actual_start),
        actual_finish=ordinals(lambda r: r.actual_finish),
        total_float=[r.total_float for r in rows],
        free_float=[r.free_float for r in rows],
        critical=flags(lambda r: r.critical),
        on_driving_path=flags(lambda r: r.on_driving_path),
        remaining=[r.remaining for r in rows],
        driven_by=[r.driven_by for r in rows],
        overdue=flags(lambda r: r.overdue),
        finished=np.array([s is Status.FINISHED for s in status], dtype=bool),
    )


def day_texts(
    columns: Sequence[np.ndarray], text: Callable[[date], str], none: str
) -> list[list[str]]:
    """Each column of ordinals as ``text(date)`` per cell, :data:`NO_DAY` as ``none``.

    Every distinct day is formatted once, through a lookup table over the days the columns
    span (they lie within the site's bounded date range, so the table stays small; no sort).
    """
    days = [c[c != NO_DAY] for c in columns]
    present = np.concatenate(days) if days else np.zeros(0, dtype=np.int64)
    if not present.size:
        return [[none] * c.size for c in columns]
    low = int(present.min())
    seen = np.zeros(int(present.max()) - low + 2, dtype=bool)  # the last slot: no day
    seen[present - low] = True
    table = np.full(seen.size, none, dtype=object)
    table[seen] = [text(date.fromordinal(o)) for o in (np.flatnonzero(seen) + low).tolist()]
    out = []
    for c in columns:
        at = c - low
        at[c == NO_DAY] = seen.size - 1
        out.append(table[at].tolist())
    return out
