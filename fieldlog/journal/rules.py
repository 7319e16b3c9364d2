"""Whether a new entry makes sense against the schedule and what the log already says.

Field shapes are checked in :mod:`fieldlog.journal.entries`; here are the checks that need
context: the activity exists, the day is not in the future, a finish is not before its start,
an activity is not started twice, remaining days are not given for finished work, a readiness
item being cleared was opened. Each refusal says what to do instead, usually which correction
to record, because the log is never edited.
"""

from __future__ import annotations

from collections.abc import Mapping
from datetime import date
from typing import TYPE_CHECKING, Any

from fieldlog.bounds import RECORD_HIDDEN, check_date, check_line
from fieldlog.day_words import earliest_day, long_day
from fieldlog.errors import EntryRefused, OutOfBounds
from fieldlog.journal.context import ActivityEntries, EntryContext
from fieldlog.site.model import Site

if TYPE_CHECKING:  # a kept context is checked without importing replay (fieldlog record)
    from fieldlog.journal.replay import Replay


def refuse(problem: str, *, activity: str | None = None, fix: str | None = None) -> EntryRefused:
    """An :class:`EntryRefused` (nothing has been written when it is raised)."""
    return EntryRefused(problem, activity=activity, fix=fix)


def check_day(day: date, today: date, site_start: date | None = None) -> None:
    """A day in the future cannot have happened yet; one more than a year before the site
    start is a mistyped year (the bound of :mod:`fieldlog.day_words`, so the app's day fields
    and ``--on`` agree), and any date stays inside :mod:`fieldlog.bounds`' range."""
    if day > today:
        raise refuse(
            f"{long_day(day)} is after today ({long_day(today)})",
            fix="record what happened on a day up to today",
        )
    if site_start is not None and day < earliest_day(site_start):
        raise refuse(
            f"{long_day(day)} is before {long_day(earliest_day(site_start))}, a year "
            "before the site start",
            fix="check the year of the day",
        )
    try:
        check_date(day, "the day", site_start)
    except OutOfBounds as exc:
        raise refuse(exc.problem, fix=exc.fix) from None


def check_entry(
    site: Site,
    view: Replay | EntryContext,
    kind: str,
    day: date,
    fields: Mapping[str, Any],
    site_name: str,
) -> None:
    """Refuse an entry of ``kind`` for ``day`` that contradicts the schedule or the log.

    Args:
        site: the site as loaded now (its current schedule revision).
        view: the log replayed over every day (without the entry being corrected, when the
            new entry is a correction's replacement), or its :class:`EntryContext`.
        kind, day, fields: the new entry (fields already shape-checked).
        site_name: how the site folder was named on the command line, for the fixes.

    Raises:
        EntryRefused: with the fix.
    """
    check_hidden(kind, fields)
    for aid in _activities(fields):
        if not site.has_activity(aid):
            import difflib  # only to name close ids in a refusal

            close = difflib.get_close_matches(aid, [a.id for a in site.activities], n=3)
            hint = (
                f"did you mean {', '.join(close)}?"
                if close
                else f"see 'fieldlog schedule {site_name}' for the ids"
            )
            raise refuse(
                f"unknown activity '{aid}' (schedule revision {site.revision})",
                activity=aid,
                fix=hint,
            )
    for name in fields.get("calendars", ()):
        if name not in site.calendars:
            raise refuse(
                f"unknown calendar '{name}'", fix=f"use one of: {', '.join(site.calendars)}"
            )
    ctx = view if isinstance(view, EntryContext) else EntryContext.of(view)
    ev = ctx.evidence.get(fields.get("activity", ""), ActivityEntries())
    correct = f"fieldlog record {site_name} correct ENTRY-ID --reason '...'"
    if kind == "started":
        if site.activity(fields["activity"]).is_milestone:
            aid = fields["activity"]
            raise refuse(
                f"{aid} is a milestone (no duration), so it does not start and run",
                activity=aid,
                fix=f"record it reached with: fieldlog record {site_name} finished "
                f"{aid} --on {day}",
            )
        _started(fields["activity"], day, ev, correct)
    elif kind == "finished":
        _finished(fields["activity"], day, ev, correct)
    elif kind in ("remaining", "percent"):
        _measure(kind, fields, day, ev)
    elif kind == "need":
        expected = fields.get("expected")
        if expected is not None and expected < day:
            raise refuse(
                f"expected date {expected} is before {day}, the day it is recorded for",
                activity=fields["activity"],
                fix="give the date it is now expected, or leave it out",
            )
    elif kind == "cleared":
        _cleared(fields["item"], day, ctx)
    elif kind == "weather":
        _plausible_temperatures(fields)


PLAUSIBLE_AIR: Mapping[str, tuple[float, float]] = {"C": (-60.0, 60.0), "F": (-76.0, 140.0)}
"""Air temperatures a new weather entry may give, per unit (the same range in both units).

From memory: the highest air temperature on record is about 56.7 C (134 F); outdoor site
work stops long before -60 C (common practice), though a few inhabited places have read
below it. A site reading outside -60..60 C is a typo or the other unit. Checked when an entry
is recorded only: the reader keeps accepting the wider stored range (-80..140 in either unit,
:data:`fieldlog.journal.entries.KINDS`), so an entry an older fieldlog wrote stays readable.
"""


def _plausible_temperatures(fields: Mapping[str, Any]) -> None:
    unit = fields.get("unit", "C")
    low, high = PLAUSIBLE_AIR.get(unit, PLAUSIBLE_AIR["C"])
    for name in ("high", "low"):
        value = fields.get(name)
        if value is not None and not low <= value <= high:
            other = "F" if unit == "C" else "C"
            raise refuse(
                f"weather {name} {value:g} {unit} is not a plausible air temperature "
                f"(in {unit}: {low:g} to {high:g})",
                fix=f"check the {name} temperature; if it is in {other}, give the unit "
                f"{other} (--unit {other})",
            )


def check_hidden(kind: str, fields: Mapping[str, Any]) -> None:
    """Refuse text holding DEL, a C1 control or a direction override (the reader refuses the
    other control characters already): it would show on a screen or a printed report as
    something else than what is stored. Checked when an entry is recorded only."""
    for name, value in fields.items():
        texts = value if isinstance(value, list | tuple) else (value,)
        for text in texts:
            if isinstance(text, str):
                try:
                    check_line(text, name, RECORD_HIDDEN)
                except OutOfBounds as exc:
                    raise refuse(f"{kind}: {exc.problem}", fix=exc.fix) from None


def _activities(fields: Mapping[str, Any]) -> list[str]:
    out = [fields["activity"]] if fields.get("activity") else []
    return out + list(fields.get("activities", ()))


def _started(aid: str, day: date, ev: ActivityEntries, correct: str) -> None:
    if ev.start is not None:
        same = "already recorded" if ev.start.day == day else f"already started on {ev.start.day}"
        raise refuse(
            f"{aid} {same} (entry {ev.start.id})",
            activity=aid,
            fix=f"to change it: {correct.replace('ENTRY-ID', ev.start.id)} --on DATE",
        )
    if ev.finish is not None and ev.finish.day < day:
        raise refuse(
            f"{aid} cannot start on {day}: it finished on {ev.finish.day} (entry {ev.finish.id})",
            activity=aid,
            fix="give the real start date, or correct the finish",
        )
    for measure in (ev.remaining, ev.percent):
        if measure is not None and measure.day < day:
            raise refuse(
                f"{aid} cannot start on {day}: progress was recorded for "
                f"{measure.day} (entry {measure.id})",
                activity=aid,
                fix="give the real start date, or correct that entry",
            )


def _finished(aid: str, day: date, ev: ActivityEntries, correct: str) -> None:
    if ev.finish is not None:
        same = (
            "already recorded" if ev.finish.day == day else f"already finished on {ev.finish.day}"
        )
        raise refuse(
            f"{aid} {same} (entry {ev.finish.id})",
            activity=aid,
            fix=f"to change it: {correct.replace('ENTRY-ID', ev.finish.id)} --on DATE",
        )
    if ev.start is not None and day < ev.start.day:
        raise refuse(
            f"{aid} cannot finish on {day}, before its start on {ev.start.day} "
            f"(entry {ev.start.id})",
            activity=aid,
            fix="give the real finish date, or correct the start",
        )


def _measure(kind: str, fields: Mapping[str, Any], day: date, ev: ActivityEntries) -> None:
    aid = fields["activity"]
    what = "remaining days" if kind == "remaining" else "percent complete"
    if ev.start is None or ev.start.day > day:
        raise refuse(
            f"{aid} has no actual start on or before {day}, so it has no {what}",
            activity=aid,
            fix="record 'started' first (it may be the same day)",
        )
    if ev.finish is not None and ev.finish.day <= day:
        if kind == "percent" and fields["percent"] == 100:
            return
        raise refuse(
            f"{aid} finished on {ev.finish.day} (entry {ev.finish.id}); a finished "
            f"activity has no {what}",
            activity=aid,
            fix="if it is not finished after all, correct the finish entry",
        )


def _cleared(item: str, day: date, ctx: EntryContext) -> None:
    need = ctx.needs.get(ctx.current.get(item, item))
    if need is None:
        open_ids = ", ".join(ctx.open_items) or "none"
        raise refuse(
            f"{item} is not a readiness item in the log",
            fix=f"give the id of a 'need' entry (open now: {open_ids})",
        )
    if need.id in ctx.cleared:
        raise refuse(
            f"readiness item {need.id} was already cleared (entry {ctx.cleared[need.id].id})"
        )
    if day < need.day:
        raise refuse(
            f"readiness item {need.id} was opened on {need.day}, after {day}",
            fix="give the day it was really cleared",
        )
