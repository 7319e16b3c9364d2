"""The fortnight's MUST work as an iCalendar file (RFC 5545) for the crews' phones.

One all-day event per activity per MUST day, rather than one long event per activity: the
UID is then ``<activity>.<day>.<site>@fieldlog.invalid`` and stays the same whatever the
schedule does to the days around it, so importing next week's file updates the days both
files share instead of adding duplicates. A day that is no longer MUST is simply not in the
new file (a calendar subscription drops it; a one-off import leaves the old event, which says
which status date it came from).

Deterministic on purpose (the bytes are a golden file): DTSTAMP is midnight UTC at the start
of the status date, never the clock; SEQUENCE is the number of days from :data:`SEQUENCE_EPOCH` to
the status date, so a later status always outranks an earlier one for the same UID. The
icalendar library is imported only when a file is written.
"""

from __future__ import annotations

import re
from collections.abc import Iterator, Mapping
from datetime import UTC, date, datetime, time, timedelta
from typing import Any

from fieldlog.errors import FieldlogError
from fieldlog.lookahead.build import ActivityRow, Lookahead
from fieldlog.lookahead.classify import Cell
from fieldlog.reports.words import working_days

PRODID = "-//fieldlog//two-week lookahead//EN"
UID_DOMAIN = "fieldlog.invalid"
"""RFC 2606 reserves ``.invalid``: the UIDs can never collide with a real domain's."""
SEQUENCE_EPOCH = date(2000, 1, 1)
CAUTION = (
    "A schedule is a plan, not a permit: work goes ahead only under the permits, method "
    "statements and sign-offs that govern it; the contract, local codes and licensed "
    "professionals decide."
)


def _icalendar() -> Any:
    """The icalendar package, imported on first use (it is an optional extra)."""
    try:
        import icalendar
    except ImportError as exc:
        raise FieldlogError(
            "writing .ics needs the icalendar package", fix="pip install 'fieldlog[ics]'"
        ) from exc
    return icalendar


def slug(text: str) -> str:
    """Lower-case letters, digits and dashes: safe in a UID and in a file name."""
    return re.sub(r"[^a-z0-9]+", "-", text.lower()).strip("-") or "site"


def must_days(row: ActivityRow, days: tuple[date, ...]) -> list[date]:
    """The window days on which ``row`` must run."""
    return [d for d, cell in zip(days, row.cells, strict=True) if cell is Cell.MUST]


def event_uid(activity_id: str, day: date, site: str) -> str:
    """The stable UID of one activity's MUST day (see the module docstring).

    Activity ids are already letters, digits, ``.``, ``_`` and ``-`` (site_schema), so they
    go in verbatim: lower-casing them could merge two activities' events.
    """
    return f"{activity_id}.{day:%Y%m%d}.{slug(site)}@{UID_DOMAIN}"


def rows_for_crew(la: Lookahead, crew: str | None) -> Iterator[ActivityRow]:
    """Rows with MUST work in the window; for ``crew``, only those needing that crew."""
    for row in la.rows:
        if crew is not None and row.crew.get(crew, 0) <= 0:
            continue
        if Cell.MUST in row.cells:
            yield row


def _crew_text(crew: Mapping[str, int]) -> str:
    return ", ".join(f"{name} {n}" for name, n in sorted(crew.items()))


def _summary(row: ActivityRow) -> str:
    late = "LATE " if row.late else ""
    crew = f" ({_crew_text(row.crew)})" if row.crew else ""
    return f"{late}MUST {row.id} {row.name}{crew}"


def _description(row: ActivityRow, la: Lookahead) -> str:
    lines = [
        f"Must run today or the job slips. Total float {working_days(row.total_float)}; "
        f"late finish {row.late_finish.isoformat()}."
    ]
    lines += list(row.reasons)
    lines.append(f"Status as of end of {la.as_of.isoformat()}, schedule revision {la.revision}.")
    lines.append(CAUTION)
    return "\n".join(lines)


def render_ics(la: Lookahead, crew: str | None = None) -> bytes:
    """One calendar of the window's MUST days (for one crew, or everyone).

    Raises:
        FieldlogError: the icalendar package is not installed.
    """
    ical = _icalendar()
    cal = ical.Calendar()
    cal.add("prodid", PRODID)
    cal.add("version", "2.0")
    cal.add("calscale", "GREGORIAN")
    who = f" ({crew})" if crew else ""
    cal.add("x-wr-calname", f"{la.site}: MUST work{who}")
    stamp = datetime.combine(la.as_of, time(0), tzinfo=UTC)
    sequence = max(0, (la.as_of - SEQUENCE_EPOCH).days)
    for row in rows_for_crew(la, crew):
        for day in must_days(row, la.days):
            ev = ical.Event()
            ev.add("uid", event_uid(row.id, day, la.site))
            ev.add("dtstamp", stamp)
            ev.add("sequence", sequence)
            ev.add("dtstart", day)
            ev.add("dtend", day + timedelta(days=1))  # DTEND of an all-day event is exclusive
            ev.add("summary", _summary(row))
            ev.add("description", _description(row, la))
            if row.crew:
                ev.add("categories", sorted(row.crew))
            ev.add("transp", "TRANSPARENT")
            cal.add_component(ev)
    return bytes(cal.to_ical())


def crew_calendars(la: Lookahead) -> dict[str, bytes]:
    """One calendar per crew with MUST work in the window, by file name.

    File names are ``<site>-<crew>.ics`` (see :func:`slug`); a crew with no MUST work in the
    window gets no file, because an empty calendar is not a valid import (RFC 5545 wants at
    least one component).
    """
    files = {}
    for load in la.crews:
        if any(True for _ in rows_for_crew(la, load.crew)):
            files[f"{slug(la.site)}-{slug(load.crew)}.ics"] = render_ics(la, load.crew)
    return files
