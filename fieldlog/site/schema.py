"""Build a validated :class:`~fieldlog.site.model.Site` from the parsed site.toml and schedule.toml.

Validation happens here, at the boundary, so the engine can trust what it gets. Every mistake a
user can make becomes a :class:`~fieldlog.errors.SiteError` naming the file, the line when it can
be found, the activity id and the fix. Unknown keys are refused: a typo such as ``durtion`` must
never be silently ignored on a legal record.
"""

from __future__ import annotations

import re
from collections.abc import Callable
from datetime import date, datetime
from functools import partial
from types import MappingProxyType
from typing import Any, Literal, overload

from fieldlog import bounds
from fieldlog.engine.topology import LinkEnds, ends_at, link_ends, topological_order
from fieldlog.errors import DependencyLoopError, OutOfBounds
from fieldlog.site.bulk import (
    ACTIVITY_KEYS,
    ID_PATTERN,
    LINK_KEYS,
    LINK_TYPES,
    NO_CREW,
    bulk_schedule,
)
from fieldlog.site.model import (
    WEEKDAY_NAMES,
    Activity,
    CalendarSpec,
    Crew,
    LagCalendar,
    Link,
    Site,
)
from fieldlog.site.toml_file import SITE_FILE, Line, TomlFile

MAX_LAG = bounds.MAX_DAYS
"""Largest lag or lead accepted, in working days (about 14 years): beyond it is a typo."""


_SITE_KEYS = {"name", "start", "finish_by", "calendar", "progress_override", "lag_calendar"}
_CALENDAR_KEYS = {"workdays", "holidays", "public_holidays"}
_CREW_KEYS = {"available"}
_ACTIVITY_KEYS = set(ACTIVITY_KEYS)
_LINK_KEYS = set(LINK_KEYS)
_ID_PATTERN = ID_PATTERN
_LINK_TYPES = LINK_TYPES
_DATE_KEYS = ("start_not_before", "finish_not_after")
_NO_CREW = NO_CREW

# A valid schedule is built by fieldlog.site.bulk, a column at a time. The per-activity checks
# below run only when it has a doubt, and word the first mistake in the file exactly.


def build_site(site_file: TomlFile, schedule_file: TomlFile) -> Site:
    """Validate two parsed files and build the :class:`Site`."""
    return build_site_and_ends(site_file, schedule_file)[0]


def build_site_and_ends(site_file: TomlFile, schedule_file: TomlFile) -> tuple[Site, LinkEnds]:
    """Validate two parsed files and build the :class:`Site`, with its links' ends as the
    loop test found them (the loader compiles the site's network from them)."""
    head = _table(site_file, site_file.data, "site", required=True)
    _no_unknown(site_file, site_file.data, {"site", "calendars", "crews"}, "top level")
    _no_unknown(site_file, head, _SITE_KEYS, "[site]")
    name = _string(site_file, head, "name", "[site]")
    start = _date(site_file, head, "start", "[site]", required=True)
    finish_by = _date(site_file, head, "finish_by", "[site]", site_start=start)
    calendars = _calendars(site_file, start)
    default_cal = head.get("calendar")
    if default_cal is None:
        if len(calendars) != 1:
            raise site_file.error(
                "[site] has no 'calendar'",
                line=site_file.line_of(r"^\[site\]"),
                fix='add calendar = "<name of one [calendars.NAME]>"',
            )
        default_cal = next(iter(calendars))
    if default_cal not in calendars:
        raise site_file.error(
            f"[site] calendar '{default_cal}' is not defined",
            line=site_file.line_of(r"^\s*calendar\s*="),
            fix=f"define [calendars.{default_cal}] or use one of: {', '.join(calendars)}",
        )
    override = head.get("progress_override", False)
    if not isinstance(override, bool):
        raise site_file.error(
            "[site] progress_override must be true or false",
            line=site_file.line_of(r"^\s*progress_override\s*="),
        )
    lag_cal_text = head.get("lag_calendar", "successor")
    try:
        lag_calendar = LagCalendar(lag_cal_text)
    except ValueError:
        raise site_file.error(
            f"[site] lag_calendar '{lag_cal_text}' is not known",
            line=site_file.line_of(r"^\s*lag_calendar\s*="),
            fix='use "successor" or "predecessor"',
        ) from None
    crews = _crews(site_file)
    revision, activities, links, at = _schedule(schedule_file, calendars, crews, default_cal, start)
    if finish_by is not None and finish_by < start:
        raise site_file.error(
            f"finish_by {finish_by} is before the site start {start}",
            line=site_file.line_of(r"^\s*finish_by\s*="),
            fix="correct one of the two dates",
        )
    if at is not None:
        ends = ends_at(len(activities), *at)
    else:
        ends = link_ends({a.id: k for k, a in enumerate(activities)}, links)
    if ends.level is None:
        ids = [a.id for a in activities]
        _, cycle = topological_order(ids, ((lk.pred, lk.succ) for lk in links))
        assert cycle, "levels() and topological_order() disagree on a loop"
        raise DependencyLoopError(cycle, file=schedule_file.path)
    site = Site(
        name=name,
        start=start,
        calendar=default_cal,
        calendars=MappingProxyType(calendars),
        crews=MappingProxyType(crews),
        revision=revision,
        activities=tuple(activities),
        links=tuple(links),
        finish_by=finish_by,
        progress_override=override,
        lag_calendar=lag_calendar,
    )
    return site, ends


# --- pieces ----------------------------------------------------------------------------------


def _calendars(f: TomlFile, start: date) -> dict[str, CalendarSpec]:
    tables = _table(f, f.data, "calendars", required=True)
    if not tables:
        raise f.error("no calendars defined", fix="add [calendars.weekdays] with workdays = [...]")
    out: dict[str, CalendarSpec] = {}
    for cname, body in tables.items():
        _bounded(f, bounds.check_line, cname, "a calendar name", line=None)
        where = f"[calendars.{cname}]"
        if not isinstance(body, dict):
            raise f.error(f"{where} must be a table", line=f.line_of(rf"\b{re.escape(cname)}\b"))
        _no_unknown(f, body, _CALENDAR_KEYS, where)
        days = body.get("workdays")
        if not isinstance(days, list) or not days:
            raise f.error(
                f'{where} needs workdays, e.g. ["mon", "tue", "wed"]',
                line=f.line_of(rf"^\[calendars\.{re.escape(cname)}\]"),
            )
        weekdays = set()
        for d in days:
            key = str(d).strip().lower()[:3]
            if key not in WEEKDAY_NAMES:
                raise f.error(
                    f"{where} workdays has {bounds.shown(d)}, not a weekday",
                    line=f.line_of(r"^\s*workdays\s*="),
                    fix="use mon, tue, wed, thu, fri, sat, sun",
                )
            weekdays.add(WEEKDAY_NAMES.index(key))
        hol = body.get("holidays", [])
        if not isinstance(hol, list):
            raise f.error(
                f"{where} holidays must be a list of dates", line=f.line_of(r"^\s*holidays\s*=")
            )
        holidays = frozenset(_as_date(f, h, f"{where} holidays", site_start=start) for h in hol)
        region = body.get("public_holidays")
        if region is not None and (not isinstance(region, str) or len(region) > 10):
            raise f.error(
                f'{where} public_holidays must be a region code like "GB-ENG"',
                line=f.line_of(r"^\s*public_holidays\s*="),
            )
        out[cname] = CalendarSpec(cname, frozenset(weekdays), holidays, region)
    return out


def _crews(f: TomlFile) -> dict[str, Crew]:
    out: dict[str, Crew] = {}
    for cname, body in _table(f, f.data, "crews").items():
        _bounded(f, bounds.check_line, cname, "a crew name", line=None)
        where = f"[crews.{cname}]"
        if not isinstance(body, dict):
            raise f.error(f"{where} must be a table")
        _no_unknown(f, body, _CREW_KEYS, where)
        available = body.get("available")
        crew_line = partial(f.line_of, rf"^\[crews\.{re.escape(cname)}\]")
        if not isinstance(available, int) or isinstance(available, bool) or available < 0:
            raise f.error(
                f"{where} available must be a whole number of people, 0 or more", line=crew_line
            )
        _bounded(f, bounds.check_headcount, available, f"{where} available", line=crew_line)
        out[cname] = Crew(cname, available)
    return out


def _schedule(
    f: TomlFile,
    calendars: dict[str, CalendarSpec],
    crews: dict[str, Crew],
    default_cal: str,
    start: date,
) -> tuple[int, list[Activity], list[Link], tuple[list[int], list[int]] | None]:
    """The revision, activities and links of schedule.toml, and the links' ends as positions
    when the bulk checks found them (None from the precise checks)."""
    _no_unknown(f, f.data, {"revision", "activity", "link"}, "top level")
    revision = f.data.get("revision")
    if not isinstance(revision, int) or isinstance(revision, bool) or revision < 0:
        raise f.error(
            "revision must be a whole number (the office's revision counter)",
            line=f.line_of(r"^\s*revision\s*="),
            fix="add revision = 1 at the top",
        )
    _bounded(
        f, bounds.check_counter, revision, "revision", line=partial(f.line_of, r"^\s*revision\s*=")
    )
    built = bulk_schedule(f.data, calendars, crews, default_cal, start)
    if built is not None:
        return revision, built.activities, built.links, (built.pred, built.succ)
    rows = f.data.get("activity", [])
    if not isinstance(rows, list):
        raise f.error("activities must be [[activity]] tables")
    activities: list[Activity] = []
    links: list[Link] = []
    seen: dict[str, int] = {}
    folded: dict[str, str] = {}  # by lower case: ids differing only in case are one to a person
    for row in rows:
        if not isinstance(row, dict):
            raise f.error("activities must be [[activity]] tables")
        aid = row.get("id")
        if not isinstance(aid, str) or not _ID_PATTERN.match(aid):
            raise f.error(
                f"activity id {bounds.shown(aid)} is not valid",
                line=f.line_of(r"^\s*id\s*=", len(activities)),
                fix="use 1-32 letters, digits, '.', '_' or '-', starting with a letter or digit",
            )
        nth = seen.get(aid, 0)
        seen[aid] = nth + 1
        line = partial(f.line_of_id, aid, nth)
        if nth:
            raise f.error(
                f"duplicate activity id '{aid}'",
                line=line,
                activity=aid,
                fix="give every activity its own id",
            )
        first = folded.setdefault(aid.lower(), aid)
        if first != aid:
            raise f.error(
                f"activity id '{aid}' differs only in case from '{first}' "
                f"(line {f.line_of_id(first, 0)})",
                line=line,
                activity=aid,
                fix="give every activity an id of its own: a foreman typing 'record started "
                f"{aid.lower()}' must not have to guess which one is meant",
            )
        if not row.keys() <= _ACTIVITY_KEYS:
            _no_unknown(f, row, _ACTIVITY_KEYS, f"activity '{aid}'", line=line, activity=aid)
        name = row.get("name")
        if not isinstance(name, str) or not name.strip():
            raise f.error(
                f"activity '{aid}' has no name",
                line=line,
                activity=aid,
                fix='add name = "what the crew does"',
            )
        if len(name) > bounds.MAX_TEXT or not name.isprintable():
            what = f"activity '{aid}' name"
            _bounded(f, bounds.check_line, name.strip(), what, line=line, activity=aid)
        duration = row.get("duration")
        if not isinstance(duration, int) or isinstance(duration, bool):
            raise f.error(
                f"activity '{aid}' duration must be a whole number of working days",
                line=line,
                activity=aid,
                fix="e.g. duration = 5 (0 for a milestone)",
            )
        if duration < 0:
            raise f.error(
                f"activity '{aid}' has a negative duration ({duration})",
                line=line,
                activity=aid,
                fix="use 0 for a milestone or a positive number",
            )
        if duration > bounds.MAX_DAYS:
            _bounded(
                f,
                bounds.check_days,
                duration,
                f"activity '{aid}' duration",
                activity=aid,
                line=partial(f.key_line, "duration", line),
            )
        cal = row.get("calendar", default_cal)
        if cal not in calendars:
            raise f.error(
                f"activity '{aid}' uses unknown calendar '{cal}'",
                line=line,
                activity=aid,
                fix=f"use one of: {', '.join(calendars)}",
            )
        crew = row.get("crew", {})
        if not isinstance(crew, dict):
            raise f.error(
                f"activity '{aid}' crew must be a table like {{ carpenters = 4 }}",
                line=line,
                activity=aid,
            )
        for cname, count in crew.items():
            if cname not in crews:
                raise f.error(
                    f"activity '{aid}' uses unknown crew '{cname}'",
                    line=line,
                    activity=aid,
                    fix=f"define [crews.{cname}] in {SITE_FILE} or use one of: "
                    f"{', '.join(crews) or '(none defined)'}",
                )
            if not isinstance(count, int) or isinstance(count, bool) or count < 0:
                raise f.error(
                    f"activity '{aid}' crew '{cname}' must be a whole headcount",
                    line=line,
                    activity=aid,
                )
            if count > bounds.MAX_HEADCOUNT:
                _bounded(
                    f,
                    bounds.check_headcount,
                    count,
                    f"activity '{aid}' crew '{cname}'",
                    line=line,
                    activity=aid,
                )
        limits: dict[str, date | None] = {}
        for key in _DATE_KEYS:
            if key in row:
                limits[key] = _date(
                    f,
                    row,
                    key,
                    f"activity '{aid}'",
                    activity=aid,
                    line=partial(f.key_line, key, line),
                    site_start=start,
                )
        activities.append(
            Activity(
                id=aid,
                name=name.strip(),
                duration=duration,
                calendar=cal,
                start_not_before=limits.get("start_not_before"),
                finish_not_after=limits.get("finish_not_after"),
                crew=MappingProxyType(dict(crew)) if crew else _NO_CREW,
            )
        )
        after = row.get("after", [])
        if not isinstance(after, list) or not all(isinstance(p, str) for p in after):
            raise f.error(f"activity '{aid}' after must be a list of ids", line=line, activity=aid)
        links.extend(Link(pred=p, succ=aid) for p in after)
    known = {a.id for a in activities}
    for link in links:
        if link.pred not in known:
            raise f.error(
                f"activity '{link.succ}' is after unknown activity '{link.pred}'",
                line=f.line_of_id(link.succ),
                activity=link.succ,
                fix="correct the id in 'after' or add that activity",
            )
        if link.pred == link.succ:
            raise f.error(
                f"activity '{link.succ}' is after itself",
                line=f.line_of_id(link.succ),
                activity=link.succ,
            )
    links.extend(_typed_links(f, known))
    return revision, activities, links, None


def _typed_links(f: TomlFile, known: set[str]) -> list[Link]:
    rows = f.data.get("link", [])
    if not isinstance(rows, list):
        raise f.error("links must be [[link]] tables")
    out = []
    for n, row in enumerate(rows):
        line = partial(f.line_of, r"^\s*\[\[link\]\]", n)
        if not isinstance(row, dict):
            raise f.error("links must be [[link]] tables", line=line)
        if not row.keys() <= _LINK_KEYS:
            _no_unknown(f, row, _LINK_KEYS, "[[link]]", line=line)
        pred, succ = row.get("from"), row.get("to")
        for key, value in (("from", pred), ("to", succ)):
            if not isinstance(value, str):
                raise f.error(f"[[link]] needs '{key}' (an activity id)", line=line)
            if value not in known:
                raise f.error(
                    f"[[link]] {key} unknown activity '{value}'",
                    line=line,
                    activity=value,
                    fix="correct the id or add that activity",
                )
        if pred == succ:
            raise f.error(f"[[link]] from '{pred}' to itself", line=line, activity=pred)
        kind = row.get("type", "FS")
        link_type = _LINK_TYPES.get(kind) if type(kind) is str else None
        if link_type is None:
            link_type = _LINK_TYPES.get(str(kind).upper())
        if link_type is None:
            raise f.error(
                f"[[link]] {pred} -> {succ} has unknown type {bounds.shown(row.get('type'))}",
                line=line,
                activity=succ,
                fix="use FS, SS, FF or SF",
            )
        lag = row.get("lag", 0)
        if not isinstance(lag, int) or isinstance(lag, bool):
            raise f.error(
                f"[[link]] {pred} -> {succ} lag must be whole working days",
                line=line,
                activity=succ,
                fix="e.g. lag = 2, or lag = -1 for a lead",
            )
        if not -MAX_LAG <= lag <= MAX_LAG:
            _bounded(
                f,
                bounds.check_days,
                lag,
                f"[[link]] {pred} -> {succ} lag",
                low=-MAX_LAG,
                line=line,
                activity=succ,
            )
        out.append(Link(str(pred), str(succ), link_type, lag))
    return out


def _table(f: TomlFile, data: dict[str, Any], key: str, *, required: bool = False) -> dict:
    value = data.get(key)
    if value is None:
        if required:
            raise f.error(f"[{key}] is missing", fix=f"add a [{key}] table")
        return {}
    if not isinstance(value, dict):
        raise f.error(f"'{key}' must be a table", line=f.line_of(rf"^\s*{key}\s*="))
    return value


def _no_unknown(
    f: TomlFile,
    table: dict[str, Any],
    allowed: set[str],
    where: str,
    *,
    line: Line = None,
    activity: str | None = None,
) -> None:
    """Refuse keys not in ``allowed``; ``line`` is the table's first line, when known."""
    for key in table:
        if key not in allowed:
            raise f.error(
                f"unknown key '{key}' in {where}",
                activity=activity,
                line=(
                    f.key_line(key, line)
                    if line is not None
                    else f.line_of(rf"^\s*{re.escape(key)}\s*=")
                ),
                fix=f"check the spelling; allowed keys: {', '.join(sorted(allowed))}",
            )


def _string(f: TomlFile, table: dict[str, Any], key: str, where: str) -> str:
    value = table.get(key)
    line = partial(f.line_of, rf"^\s*{key}\s*=")
    if not isinstance(value, str) or not value.strip():
        raise f.error(f"{where} needs {key} (text)", line=line)
    return _bounded(f, bounds.check_line, value.strip(), f"{where} {key}", line=line)


def _bounded(
    f: TomlFile,
    check: Callable[..., Any],
    value: Any,
    what: str,
    *,
    line: Line,
    activity: str | None = None,
    **limits: Any,
) -> Any:
    """``check(value, what, **limits)`` from :mod:`fieldlog.bounds`, located in ``f``."""
    try:
        return check(value, what, **limits)
    except OutOfBounds as exc:
        raise f.error(exc.problem, line=line, activity=activity, fix=exc.fix) from None


@overload
def _date(
    f: TomlFile,
    table: dict[str, Any],
    key: str,
    where: str,
    *,
    required: Literal[True],
    line: Line = None,
    activity: str | None = None,
    site_start: date | None = None,
) -> date: ...
@overload
def _date(
    f: TomlFile,
    table: dict[str, Any],
    key: str,
    where: str,
    *,
    required: Literal[False] = False,
    line: Line = None,
    activity: str | None = None,
    site_start: date | None = None,
) -> date | None: ...
def _date(
    f: TomlFile,
    table: dict[str, Any],
    key: str,
    where: str,
    *,
    required: bool = False,
    line: Line = None,
    activity: str | None = None,
    site_start: date | None = None,
) -> date | None:
    """The date at ``key``; None when it is absent, unless ``required`` (then it refuses)."""
    value = table.get(key)
    if value is None:
        if required:
            raise f.error(f"{where} needs {key} (a date like 2026-03-02)", line=line)
        return None
    return _as_date(
        f,
        value,
        f"{where} {key}",
        activity=activity,
        site_start=site_start,
        line=line or partial(f.line_of, rf"^\s*{key}\s*="),
    )


def _as_date(
    f: TomlFile,
    value: Any,
    what: str,
    *,
    line: Line = None,
    activity: str | None = None,
    site_start: date | None = None,
) -> date:
    """A date from TOML (or ISO text), in fieldlog's range and near the site start."""
    day: date | None = None
    if isinstance(value, datetime):
        day = value.date()
    elif isinstance(value, date):
        day = value
    elif isinstance(value, str) and len(value) <= 40:
        try:
            day = date.fromisoformat(value.strip())
        except ValueError:
            day = None
    if day is None:
        raise f.error(
            f"{what} {bounds.shown(value)} is not a date",
            activity=activity,
            line=line or partial(f.line_of, re.escape(str(value)[:40])),
            fix="write dates as YYYY-MM-DD, e.g. 2026-03-02",
        )
    return _bounded(
        f,
        bounds.check_date,
        day,
        what,
        site_start=site_start,
        activity=activity,
        line=line or partial(f.line_of, re.escape(day.isoformat())),
    )
