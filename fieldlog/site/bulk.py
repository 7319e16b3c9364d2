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
from collections.abc import Iterable, Mapping
from datetime import date
from itertools import repeat
from operator import eq
from types import MappingProxyType
from typing import Any, NamedTuple

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


class Built(NamedTuple):
    """The activities and links of a valid schedule, and each link's two ends as positions
    in the activity list (found here anyway; the loop test and the engine's network need
    them, and looking 400,000 ids up a second time cost a fifth of a second)."""

    activities: list[Activity]
    links: list[Link]
    pred: list[int]
    succ: list[int]


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
        activities, ids, position, after = built
        typed = _typed_links(link_rows, ids, position)
    except (TypeError, ValueError, OutOfBounds):
        return None  # an unhashable or odd value: the precise checks say what it is
    if typed is None:
        return None
    links, pred, succ = after
    links.extend(typed[0])
    return Built(activities, links, pred + typed[1], succ + typed[2])


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
) -> tuple[list[Activity], list[str], dict[str, int], _Links] | None:
    """The activities of valid ``rows``, their ids, each id's position, and the ``after``
    links (None at the first doubt)."""
    if not all(type(row) is dict for row in rows):
        return None
    used_keys: set[str] = set().union(*rows)
    if not used_keys <= ACTIVITY_KEYS:
        return None
    ids = [row.get("id") for row in rows]
    if set(map(type, ids)) - {str} or not all(map(ID_PATTERN.match, ids)):
        return None
    position = dict(zip(ids, range(len(ids)), strict=True))
    if len(position) != len(ids) or _case_twins(ids):
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
    links = _after_links(rows, ids, position) if "after" in used_keys else ([], [], [])
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
    return activities, ids, position, links


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


_Links = tuple[list[Link], list[int], list[int]]
"""Links and their ends as positions in the activity list."""


def _after_links(
    rows: list[dict[str, Any]], ids: list[str], position: dict[str, int]
) -> _Links | None:
    """The finish-to-start links of every ``after`` list, in file order."""
    afters = [row.get("after", ()) for row in rows]
    if set(map(type, afters)) - {list, tuple}:
        return None  # tuple is only the default above; TOML gives lists
    written = [p for after in afters for p in after]
    if set(map(type, written)) - {str}:
        return None
    pred = _positions(written, position)
    if pred is None:
        return None
    succ = [k for k, after in enumerate(afters) for k in repeat(k, len(after))]
    if any(map(eq, pred, succ)):
        return None  # an activity after itself
    count = len(pred)
    plain = {
        "pred": map(ids.__getitem__, pred),
        "succ": map(ids.__getitem__, succ),
        "type": repeat(LinkType.FS, count),
        "lag": repeat(0, count),
    }
    return list(from_columns(Link, count, plain)), pred, succ


def _positions(ends: list[str], position: dict[str, int]) -> list[int] | None:
    """The position of each id of ``ends`` in the activity list; None for an id no activity
    has.

    A link's ends are then written as the very string objects of the activities' ids
    (``ids[k]``): the TOML reader makes a new string for every ``after`` entry and every
    ``from``/``to``, and sharing the activity's own saves 400,000 strings on a
    200,000-activity schedule; every later lookup by id (the loop test, the engine's network,
    the cache) then matches by identity instead of comparing characters.
    """
    try:
        return list(map(position.__getitem__, ends))
    except KeyError:
        return None


def _typed_links(rows: list[Any], ids: list[str], position: dict[str, int]) -> _Links | None:
    """The ``[[link]]`` tables as links, in file order."""
    if not rows:
        return [], [], []
    if not all(type(row) is dict for row in rows):
        return None
    if not set().union(*rows) <= LINK_KEYS:
        return None
    ends = [row.get("from") for row in rows] + [row.get("to") for row in rows]
    if set(map(type, ends)) - {str}:
        return None
    at = _positions(ends, position)
    if at is None:
        return None
    pred, succ = at[: len(rows)], at[len(rows) :]
    if any(map(eq, pred, succ)):
        return None
    types = [LINK_TYPES.get(row.get("type", "FS")) for row in rows]
    if None in types:
        return None  # lower case or unknown: the precise checks take "ss" and word the rest
    lags = [row.get("lag", 0) for row in rows]
    if set(map(type, lags)) - {int}:
        return None
    if not -bounds.MAX_DAYS <= min(lags) <= max(lags) <= bounds.MAX_DAYS:
        return None
    columns: dict[str, Iterable[Any]] = {
        "pred": map(ids.__getitem__, pred),
        "succ": map(ids.__getitem__, succ),
        "type": types,
        "lag": lags,
    }
    return list(from_columns(Link, len(rows), columns)), pred, succ
