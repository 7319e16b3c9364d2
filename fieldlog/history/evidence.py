"""The entries of a day that bear on the forecast, listed beside the movement they explain.

Listed for every logged day, whether or not the finish moved, so a reader can see what the log
holds: lost time by cause, MUST work that did not start or started late, remaining days that
went up, readiness items holding driving work, and instructions received. "MUST" is the
lookahead's class as of the previous logged day (late start on or before the day).
"""

from __future__ import annotations

from datetime import timedelta
from typing import TYPE_CHECKING

from fieldlog.engine.progress import Status
from fieldlog.engine.result import ScheduleResult
from fieldlog.history.causes import lost_time_category
from fieldlog.history.values import Evidence

if TYPE_CHECKING:
    from fieldlog.history.days import DayState
    from fieldlog.history.movement import Point

_DAY = timedelta(days=1)


def day_evidence(prev: Point, state: DayState, result: ScheduleResult) -> tuple[Evidence, ...]:
    """Everything of ``state.day`` a delay narrative would cite (see module docstring)."""
    d = state.day
    out: list[Evidence] = []
    for e in state.entries:
        if e.kind == "lost-time":
            cause = lost_time_category(e.fields["cause"])
            acts = ", ".join(e.activities())
            note = e.fields.get("note")
            if e.fields.get("whole_day"):
                text = f"{cause}: whole day lost"
                kind = "lost day"
            else:
                text = f"{cause}: {e.fields['hours']:g} h lost"
                kind = "lost hours"
            text += (f" on {acts}" if acts else "") + (f" - {note}" if note else "")
            out.append(Evidence(d, kind, text, e.id, e.activity or ""))
        elif e.kind == "instruction":
            acts = ", ".join(e.activities())
            text = f"from {e.fields['given_by']} ({e.fields['form']}): {e.fields['text']}"
            out.append(Evidence(d, "instruction", text + (f" [{acts}]" if acts else ""), e.id))
        elif e.kind == "remaining":
            up = remaining_increase(prev, state, e.fields["activity"])
            if up > 0:
                out.append(
                    Evidence(
                        d,
                        "remaining up",
                        f"{e.fields['activity']}: {e.fields['days']} days left, "
                        f"{up} more than planned",
                        e.id,
                        e.fields["activity"],
                    )
                )
    out.extend(_must_starts(prev, state))
    path = set(result.driving_path)
    for item in state.readiness:
        row = result.by_id.get(item.activity)
        if item.activity in path and row is not None and row.driven_by == "readiness":
            until = f" until {item.expected}" if item.expected else ""
            out.append(
                Evidence(
                    d,
                    "held by readiness",
                    f"{item.activity} waits for {item.what} ({item.kind}){until}",
                    item.entry_id,
                    item.activity,
                )
            )
    return tuple(out)


def remaining_increase(prev: Point, state: DayState, aid: str) -> int:
    """Working days a remaining-days entry of D adds over what the plan as of P left for D."""
    entry = next(
        (
            e
            for e in reversed(state.entries)
            if e.kind == "remaining" and e.fields["activity"] == aid
        ),
        None,
    )
    now = state.progress.get(aid)
    row = prev.result.by_id.get(aid)
    if entry is None or now is None or now.actual_start is None or row is None:
        return 0
    cal = prev.result.calendars[row.calendar]
    first = max(prev.status + _DAY, now.actual_start)
    expected = row.remaining - cal.count(first, state.day + _DAY)
    return max(0, int(entry.fields["days"]) - max(expected, 0))


def _must_starts(prev: Point, state: DayState) -> list[Evidence]:
    """Work that was MUST by this day (late start on or before it) and started late or not."""
    d = state.day
    out = []
    for row in prev.result.activities:
        if row.status is not Status.NOT_STARTED or row.late_start is None:
            continue
        if row.late_start > d:
            continue
        now = state.progress.get(row.id)
        started = now.actual_start if now else None
        if started is None and not (now and now.actual_finish):
            out.append(
                Evidence(
                    d,
                    "missing start",
                    f"{row.id} was MUST from {row.late_start}, not started",
                    activity=row.id,
                )
            )
        elif started is not None and started > row.late_start:
            out.append(
                Evidence(
                    d,
                    "late start",
                    f"{row.id} started {started}, MUST from {row.late_start}",
                    activity=row.id,
                )
            )
    return out
