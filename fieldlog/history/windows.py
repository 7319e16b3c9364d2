"""Logged days grouped into the windows a report shows: each day, each week or each month.

A window's movement is the sum of its days' movements, and its split the sum of their steps,
so the windows of any grouping add up to the same total. Evidence that repeats day after day
(the same MUST work still not started) is listed once per window, on its first day.
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from datetime import date, timedelta

from fieldlog.history.causes import empty_split
from fieldlog.history.values import DayRecord, Evidence, Window

GROUPINGS = ("day", "week", "month")


def window_bounds(day: date, by: str) -> tuple[date, date]:
    """First and last calendar day of the window holding ``day`` (weeks run Monday-Sunday)."""
    if by == "day":
        return day, day
    if by == "week":
        first = day - timedelta(days=day.weekday())
        return first, first + timedelta(days=6)
    if by == "month":
        first = day.replace(day=1)
        nxt = (first + timedelta(days=32)).replace(day=1)
        return first, nxt - timedelta(days=1)
    raise ValueError(f"unknown grouping {by!r} (known: {', '.join(GROUPINGS)})")


def window_label(first: date, by: str) -> str:
    """``2026-09-14`` for a day, ``wk 2026-09-14`` for a week, ``2026-09`` for a month."""
    if by == "month":
        return first.strftime("%Y-%m")
    if by == "week":
        return f"wk {first.isoformat()}"
    return first.isoformat()


def group(records: Sequence[DayRecord], by: str) -> tuple[Window, ...]:
    """The day records (in day order) folded into windows."""
    out: list[Window] = []
    batch: list[DayRecord] = []
    bounds: tuple[date, date] | None = None
    for r in records:
        b = window_bounds(r.day, by)
        if bounds is not None and b != bounds:
            out.append(_window(batch, bounds, by))
            batch = []
        bounds = b
        batch.append(r)
    if batch and bounds is not None:
        out.append(_window(batch, bounds, by))
    return tuple(out)


def _window(days: Sequence[DayRecord], bounds: tuple[date, date], by: str) -> Window:
    last = days[-1]
    split = empty_split()
    for r in days:
        for s in r.steps:
            split[s.bucket] += s.days
    return Window(
        label=window_label(bounds[0], by),
        first=bounds[0],
        last=bounds[1],
        status=last.day,
        finish=last.finish,
        finish_float=last.finish_float,
        movement=sum(r.movement for r in days),
        split=split,
        driving_path=last.driving_path,
        steps=tuple(s for r in days for s in r.steps),
        evidence=_once(e for r in days for e in r.evidence),
    )


def _once(items: Iterable[Evidence]) -> tuple[Evidence, ...]:
    """Evidence with repeats dropped: an entry once, an absence once per activity."""
    seen: set[tuple[str, str]] = set()
    out = []
    for e in items:
        key = (e.kind, e.entry_id or e.activity or e.text)
        if key not in seen:
            seen.add(key)
            out.append(e)
    return tuple(out)
