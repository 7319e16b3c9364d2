"""The valid path of schedule.toml's checks, in bulk: whole columns at once, no wording.

:mod:`fieldlog.site.schema` checks one activity and one link at a time, so that the first
mistake in a file is the one reported, with its file, line, activity id and fix. That costs
several seconds on a 200,000-activity schedule that has no mistake at all, and nearly every
schedule fieldlog reads is valid. So the schema first asks :func:`bulk_schedule`, which tests
the same rules a column at a time (a set of every key used, the types of every duration, one
set difference for every ``after`` id) and builds the activities and links when all hold.

It never words an error: at the first doubt it answers None and the schema's precise checks run
from the top, which raise exactly the error they always raised (or, should this module be
stricter than they are, build the same site more slowly). So this module may refuse too much,
never too little: every rule it tests is one the precise checks also apply, and
tests/test_site_bulk.py compares both on valid and broken files.
"""

from __future__ import annotations

import re
from collections.abc import Mapping
from datetime import date
from itertools import repeat
from operator import eq
from types import MappingProxyType
from typing import Any

from fieldlog import bounds
from fieldlog.errors import OutOfBounds
from fieldlog.site.model import Activity, CalendarSpec, Crew, Link, LinkType, from_columns

ACTIVITY_KEYS = frozenset(
    {
        "id",
        "name",
        "duration",
        "calendar",
        "after",
        "start_not_before",
        "finish_not_after",
        "crew",
    }
)
LINK_KEYS = frozenset({"from", "to", "type", "lag"})
ID_PATTERN = re.compile(r"^[A-Za-z0-9][A-Za-z0-9._-]{0,31}$")
LINK_TYPES = {t.value: t for t in LinkType}
NO_CREW: MappingProxyType[str, int] = MappingProxyType({})
"""Shared by every activity without a crew (most of a big schedule): read-only and empty."""

_DATE_KEYS = ("start_not_before", "finish_not_after")
_OPTIONAL_KEYS = frozenset({"crew", *_DATE_KEYS})
"""Keys most activities leave out: the rows that have them are checked one by one."""

Built = tuple[list[Activity], list[Link]]


def bulk_schedule(
    data: Mapping[str, Any],
    calendars: Mapping[str, CalendarSpec],
    crews: Mapping[str, Crew],
    default_cal: str,
    start: date,
) -> Built | None:
    """The activities and links of a valid schedule.toml ``data``; None at the first doubt.

    ``data`` has passed the top-level checks (known keys, revision). Links come as the
    precise checks order them: every ``after`` of every activity, then the ``[[link]]`` tables.
    """
    rows = data.get("activity", [])
    link_rows = data.get("link", [])
    if type(rows) is not list or type(link_rows) is not list:
        return None
    try:
        built = _activities(rows, calendars, crews, default_cal, start)
        if built is None:
            return None
        activities, links, canon = built
        typed = _typed_links(link_rows, canon)
    except (TypeError, ValueError, OutOfBounds):
        return None  # an unhashable or odd value: the precise checks say what it is
    if typed is None:
        return None
    links.extend(typed)
    return activities, links


def _case_twins(ids: list[str]) -> bool:
    """True when two of the (distinct) ids differ only in case. Ids with no lower-case letter
    at all (or no upper-case one) cannot: one joined string shows it in a few milliseconds
    on 200,000 ids, where a set of lowered ids takes ten times as long."""
    joined = "\n".join(ids)
    if joined.upper() == joined or joined.lower() == joined:
        return False
    return len(set(joined.lower().split("\n"))) != len(ids)


def _activities(
    rows: list[Any],
    calendars: Mapping[str, CalendarSpec],
    crews: Mapping[str, Crew],
    default_cal: str,
    start: date,
) -> tuple[list[Activity], list[Link], dict[str, str]] | None:
    if not all(type(row) is dict for row in rows):
        return None
    used_keys: set[str] = set().union(*rows)
    if not used_keys <= ACTIVITY_KEYS:
        return None
    ids = [row.get("id") for row in rows]
    if set(map(type, ids)) - {str} or not all(map(ID_PATTERN.match, ids)):
        return None
    canon = dict(zip(ids, ids, strict=True))
    if len(canon) != len(ids) or _case_twins(ids):
        return None  # a duplicate id, or two that differ only in case
    names = [row.get("name") for row in rows]
    if set(map(type, names)) - {str} or max(map(len, names), default=0) > bounds.MAX_TEXT:
        return None
    names = [name.strip() for name in names]
    if not all(names) or not all(map(str.isprintable, names)):
        return None  # a blank name, or one with a character to look at closely
    durations = [row.get("duration") for row in rows]
    if set(map(type, durations)) - {int}:  # bool is not int here: type(True) is bool
        return None
    if durations and not 0 <= min(durations) <= max(durations) <= bounds.MAX_DAYS:
        return None
    if "calendar" in used_keys:
        cals = [row.get("calendar", default_cal) for row in rows]
        if not set(cals) <= calendars.keys():
            return None
    else:
        cals = [default_cal] * len(rows)
    extras = _optional_fields(rows, used_keys, crews, start)
    if extras is None:
        return None
    snbs, fnas, crew_maps = extras
    links = _after_links(rows, ids, canon) if "after" in used_keys else []
    if links is None:
        return None
    columns = {
        "id": ids,
        "name": names,
        "duration": durations,
        "calendar": cals,
        "start_not_before": snbs,
        "finish_not_after": fnas,
        "crew": crew_maps,
    }
    activities = list(from_columns(Activity, len(ids), columns))
    return activities, links, canon


def _optional_fields(
    rows: list[dict[str, Any]], used_keys: set[str], crews: Mapping[str, Crew], start: date
) -> tuple[list[date | None], list[date | None], list[Mapping[str, int]]] | None:
    """Dates and crews, checked only in the rows that have any (usually few)."""
    n = len(rows)
    snbs: list[date | None] = [None] * n
    fnas: list[date | None] = [None] * n
    crew_maps: list[Mapping[str, int]] = [NO_CREW] * n
    if not used_keys & _OPTIONAL_KEYS:
        return snbs, fnas, crew_maps
    for k, row in enumerate(rows):
        if not row.keys() & _OPTIONAL_KEYS:
            continue
        for key, column in ((_DATE_KEYS[0], snbs), (_DATE_KEYS[1], fnas)):
            value = row.get(key)
            if value is not None:
                if type(value) is not date:
                    return None  # text or a date-time: the precise checks convert those
                column[k] = bounds.check_date(value, key, site_start=start)
        crew = row.get("crew", {})
        if type(crew) is not dict or not crew.keys() <= crews.keys():
            return None
        if set(map(type, crew.values())) - {int}:
            return None
        if crew and not 0 <= min(crew.values()) <= max(crew.values()) <= bounds.MAX_HEADCOUNT:
            return None
        if crew:
            crew_maps[k] = MappingProxyType(dict(crew))
    return snbs, fnas, crew_maps


def _after_links(
    rows: list[dict[str, Any]], ids: list[str], canon: dict[str, str]
) -> list[Link] | None:
    """The finish-to-start links of every ``after`` list, in file order."""
    afters = [row.get("after", ()) for row in rows]
    if set(map(type, afters)) - {list, tuple}:
        return None  # tuple is only the default above; TOML gives lists
    written = [p for after in afters for p in after]
    succs = [aid for aid, after in zip(ids, afters, strict=True) for aid in repeat(aid, len(after))]
    if set(map(type, written)) - {str}:
        return None
    preds = _canonical(written, canon)
    if preds is None:
        return None
    if any(map(eq, preds, succs)):
        return None  # an activity after itself
    count = len(preds)
    plain = {
        "pred": preds,
        "succ": succs,
        "type": repeat(LinkType.FS, count),
        "lag": repeat(0, count),
    }
    return list(from_columns(Link, count, plain))


def _canonical(ends: list[str], canon: dict[str, str]) -> list[str] | None:
    """Each id in ``ends`` as the very string object of its activity's id; None for an id no
    activity has.

    The TOML reader makes a new string for every ``after`` entry and every ``from``/``to``;
    sharing the activity's own string saves 400,000 strings on a 200,000-activity schedule,
    and every later lookup by id (the loop test, the engine's network, the cache) then
    matches by identity instead of comparing characters.
    """
    try:
        return list(map(canon.__getitem__, ends))
    except KeyError:
        return None


def _typed_links(rows: list[Any], canon: dict[str, str]) -> list[Link] | None:
    """The ``[[link]]`` tables as links, in file order."""
    if not rows:
        return []
    if not all(type(row) is dict for row in rows):
        return None
    if not set().union(*rows) <= LINK_KEYS:
        return None
    ends = [row.get("from") for row in rows] + [row.get("to") for row in rows]
    if set(map(type, ends)) - {str}:
        return None
    canonical = _canonical(ends, canon)
    if canonical is None:
        return None
    preds, succs = canonical[: len(rows)], canonical[len(rows) :]
    if any(map(eq, preds, succs)):
        return None
    types = [LINK_TYPES.get(row.get("type", "FS")) for row in rows]
    if None in types:
        return None  # lower case or unknown: the precise checks take "ss" and word the rest
    lags = [row.get("lag", 0) for row in rows]
    if set(map(type, lags)) - {int}:
        return None
    if not -bounds.MAX_DAYS <= min(lags) <= max(lags) <= bounds.MAX_DAYS:
        return None
    columns: dict[str, list[Any]] = {"pred": preds, "succ": succs, "type": types, "lag": lags}
    return list(from_columns(Link, len(rows), columns))
