"""The float view's filters and the "what drives this activity" line (pure functions).

Rows come in the printed float list's order (:func:`fieldlog.reports.schedule_sheet.sort_key`):
open work by total float, then early start, then id; finished work last.
"""

from __future__ import annotations

from datetime import date, timedelta

from fieldlog.engine.result import ActivityResult, ScheduleResult
from fieldlog.lookahead.build import LOOKAHEAD_DAYS
from fieldlog.reports.schedule_sheet import sort_key

NEAR_CRITICAL_DAYS = 5
"""Near critical: open, not critical, total float of at most this many working days.

Common practice puts the near-critical band somewhere between 5 and 10 working days; five is a
fortnight's look at one working week. The filter's label shows the number, so nobody has to
guess."""

FILTERS: dict[str, str] = {
    "all": "all activities",
    "behind": "behind: negative float or update due",
    "critical": "critical and driving path",
    "near": f"near critical: float 1-{NEAR_CRITICAL_DAYS} days",
    "fortnight": "may run in the next two weeks",
}
"""Filter id -> the words shown above the list."""


def filtered(schedule: ScheduleResult, kind: str, query: str = "") -> list[ActivityResult]:
    """Activities passing filter ``kind`` and matching every word of ``query``, in list order.

    Args:
        schedule: the current schedule.
        kind: one of :data:`FILTERS`.
        query: words to find in the id or the name (case does not matter).

    Raises:
        KeyError: ``kind`` is not a filter.
    """
    if kind not in FILTERS:
        raise KeyError(kind)
    words = query.lower().split()
    horizon = schedule.data_date + timedelta(days=LOOKAHEAD_DAYS - 1)
    out = []
    for r in sorted(schedule.activities, key=sort_key):
        if not _passes(r, kind, horizon):
            continue
        hay = f"{r.id} {r.name}".lower()
        if all(w in hay for w in words):
            out.append(r)
    return out


def _passes(r: ActivityResult, kind: str, horizon: date) -> bool:
    if kind == "all":
        return True
    if not r.is_open:
        return False
    tf = r.total_float
    if kind == "behind":
        return r.late or r.overdue
    if kind == "critical":
        return r.critical or r.on_driving_path
    if kind == "near":
        return not r.critical and tf is not None and 0 < tf <= NEAR_CRITICAL_DAYS
    # fortnight
    return r.early_start <= horizon


def driver_text(schedule: ScheduleResult, r: ActivityResult) -> str:
    """What sets the activity's early start, in words: a predecessor link or something else."""
    if r.driving is not None:
        link = r.driving
        pred = schedule.by_id.get(link.pred)
        name = f" {pred.name}" if pred is not None else ""
        lag = f", lag {link.lag:+d}" if link.lag else ""
        return f"driven by {link.pred}{name} ({link.type.value}{lag})"
    if r.driven_by:
        return f"start set by {r.driven_by}"
    return "no predecessor"
