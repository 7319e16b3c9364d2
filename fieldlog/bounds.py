"""Every limit fieldlog puts on a value or a file, in one place.

A site folder arrives from other people: the office's schedule, a stick from another laptop, a
file somebody edited by hand. One absurd number must not hang the site (a duration of a
billion days makes the calendars allocate by the billion; an entry number of a billion made
the journal's gap check loop a billion times). So every value a person or a file can give is
bounded here, and site_schema, the journal's fields and reader, sync and the command line all
call these functions: the same mistake gets the same message wherever it is made.

The limits are far beyond any real job and far below what would hurt:

=================== ======================= =================================================
what                limit                   why this number
=================== ======================= =================================================
any date            1900-01-01..2199-12-31  calendars are built day by day between dates
date on a site      within 50 years of the  a typo in the year (2062 for 2026) is caught
                    site start
durations, lags,    3,650 working days      about 14 years of working days
remaining days
headcounts          100,000 people          the largest sites hold a few tens of thousands
revision, entry     below 2**31             fits every 32-bit counter an office tool uses
numbers
text                4,000 characters        a long note is a few hundred
=================== ======================= =================================================

File size caps (checked before a byte is read) and the nesting cap are in
:data:`FILE_CAPS` and :data:`MAX_NESTING`; :mod:`fieldlog.guarded_read` applies them.

A refusal is an :class:`~fieldlog.errors.OutOfBounds` that says what and the fix; the caller
adds where (file, line, activity, entry) and turns it into its own error or finding.
"""

from __future__ import annotations

import re
from datetime import date, datetime

from fieldlog.errors import OutOfBounds

EARLIEST_DATE = date(1900, 1, 1)
LATEST_DATE = date(2199, 12, 31)
SITE_SPAN_YEARS = 50
"""A date on a site may lie at most this many years before or after the site start."""
MAX_DAYS = 3650
"""Durations, lags (either sign) and remaining days, in working days."""
MAX_HEADCOUNT = 100_000
MAX_COUNTER = 2**31 - 1
"""Largest revision or entry number (``seq``) accepted."""
MAX_TEXT = 4000
"""Longest name, note or other text, in characters."""
MAX_NESTING = 32
"""Deepest nesting of arrays, inline tables and dotted keys accepted in a TOML file."""
SHEET_WIDTHS = (80, 132)
"""The printed lookahead's page widths in columns (``--width``): a terminal and a wide page."""

KIB, MIB = 1024, 1024 * 1024
MAX_TABLE_KEYS = 64
"""Keys a table of site.toml or schedule.toml may hold on average (an activity has about ten;
inline tables' keys count too), checked before parsing with :data:`KEY_SLACK` more allowed."""
KEY_SLACK = 10_000
"""Keys allowed beyond :data:`MAX_TABLE_KEYS` per table: a small file is never refused."""
KEY_COUNTED = frozenset({"site.toml", "schedule.toml"})
"""The kinds whose keys are counted before parsing (a receipt's holdings list is one table of
many inline tables; journal day files are capped at a few MB)."""
FILE_CAPS = {
    "site.toml": 1 * MIB,
    "schedule.toml": 64 * MIB,
    "journal": 5 * MIB,
    "settings": 64 * KIB,
    "receipts": 16 * MIB,
}
"""Largest file accepted, by kind. schedule.toml: a 200,000-activity schedule is about 25 MB.
journal: one device's day file; no real day comes near (a full day of entries is a few KB).
settings: device.toml and the last-sync records in fieldlog's own data folder.
receipts: one device's office receipts chain; a receipt is a few hundred bytes per device, so
this is tens of thousands of syncs."""


def check_date(value: date, what: str, site_start: date | None = None) -> date:
    """``value`` if it lies in the calendar fieldlog handles (and near ``site_start``).

    Raises:
        OutOfBounds: before 1900, after 2199, or more than 50 years from the site start.
    """
    day = value.date() if isinstance(value, datetime) else value
    if not EARLIEST_DATE <= day <= LATEST_DATE:
        raise OutOfBounds(
            f"{what} {day.isoformat()} is outside {EARLIEST_DATE.isoformat()} to "
            f"{LATEST_DATE.isoformat()}",
            fix="check the year",
        )
    if site_start is not None:
        low, high = (
            _years_from(site_start, -SITE_SPAN_YEARS),
            _years_from(site_start, SITE_SPAN_YEARS),
        )
        if not low <= day <= high:
            raise OutOfBounds(
                f"{what} {day.isoformat()} is more than {SITE_SPAN_YEARS} years from the site "
                f"start {site_start.isoformat()}",
                fix="check the year",
            )
    return value


def site_window(site_start: date) -> tuple[date, date]:
    """The first and last day fieldlog handles for a site that starts on ``site_start``."""
    return (
        max(EARLIEST_DATE, _years_from(site_start, -SITE_SPAN_YEARS)),
        min(LATEST_DATE, _years_from(site_start, SITE_SPAN_YEARS)),
    )


def _years_from(day: date, years: int) -> date:
    """``day`` moved by whole years (29 February becomes 28 February), kept in range."""
    year = min(max(day.year + years, date.min.year), date.max.year)
    return day.replace(year=year, day=min(day.day, 28) if day.month == 2 else day.day)


def check_days(value: int, what: str, *, low: int = 0) -> int:
    """A count of working days (duration, remaining days: ``low`` 0 or 1; lag: ``low`` -3650).

    Raises:
        OutOfBounds: below ``low`` or above 3,650.
    """
    if value > MAX_DAYS or value < low:
        bound = f"from {low} to {MAX_DAYS}" if low >= 0 else f"from -{MAX_DAYS} to {MAX_DAYS}"
        raise OutOfBounds(
            f"{what} {value} is not {bound} working days",
            fix="check the number; it counts working days",
        )
    return value


def check_headcount(value: int, what: str) -> int:
    """A number of people, 0 to 100,000.

    Raises:
        OutOfBounds: negative or above 100,000.
    """
    if not 0 <= value <= MAX_HEADCOUNT:
        raise OutOfBounds(
            f"{what} {value} is not 0 to {MAX_HEADCOUNT:,} people", fix="check the number of people"
        )
    return value


def check_counter(value: int, what: str, *, low: int = 0) -> int:
    """A revision or entry number: ``low`` up to 2**31 - 1.

    Raises:
        OutOfBounds: outside that range.
    """
    if not low <= value <= MAX_COUNTER:
        raise OutOfBounds(
            f"{what} {shown(value)} is not {low} to {MAX_COUNTER:,}", fix="check the number"
        )
    return value


def check_text(value: str, what: str) -> str:
    """Text of at most 4,000 characters.

    Raises:
        OutOfBounds: longer than that.
    """
    if len(value) > MAX_TEXT:
        raise OutOfBounds(
            f"{what} is {len(value):,} characters, more than {MAX_TEXT:,}", fix="shorten it"
        )
    return value


HIDDEN_CHARS = re.compile("[\x00-\x1f\x7f-\x9f\u202a-\u202e\u2066-\u2069]")
"""Characters a reader never sees as themselves: control characters (C0, DEL, C1; an escape
sequence in a name clears or retitles the terminal the schedule is printed on, a tab or a
line break breaks its columns) and the bidirectional overrides and isolates (U+202A-U+202E,
U+2066-U+2069), which show text in another order than it is stored (common practice in
source and text review: the "Trojan Source" characters)."""

RECORD_HIDDEN = re.compile("[\x7f-\x9f\u202a-\u202e\u2066-\u2069]")
"""What a new journal entry's text may not hold beyond what the reader refuses (C0 controls
other than a line break and a tab): DEL, C1 controls, bidirectional overrides. Checked when
an entry is recorded only, so an entry an older fieldlog wrote stays readable."""


def check_line(value: str, what: str, hidden: re.Pattern[str] = HIDDEN_CHARS) -> str:
    """One line of text a person reads (a name): :func:`check_text`'s length and none of
    ``hidden`` (default :data:`HIDDEN_CHARS`).

    Raises:
        OutOfBounds: too long, or it holds a hidden character (named by its code point).
    """
    check_text(value, what)
    if not value.isprintable():  # nearly every name is: one C-level scan, no regex
        found = hidden.search(value)
        if found is not None:
            raise OutOfBounds(
                f"{what} holds the hidden character U+{ord(found[0]):04X} at position "
                f"{found.start() + 1}",
                fix="retype the text without control characters or direction overrides",
            )
    return value


def check_size(size: int, kind: str, what: str) -> None:
    """Refuse a file of ``size`` bytes larger than the cap for ``kind`` (see FILE_CAPS).

    Raises:
        OutOfBounds: the file is bigger than the cap.
    """
    cap = FILE_CAPS[kind]
    if size > cap:
        raise OutOfBounds(
            f"{what} is {_megabytes(size)}, more than the {_megabytes(cap)} fieldlog reads",
            fix="this is not a file fieldlog wrote or expects; "
            "check where it came from and replace it with a good copy",
        )


def _megabytes(n: int) -> str:
    return f"{n / MIB:.1f} MB" if n >= MIB else f"{n / KIB:.0f} KB"


def shown(value: object, width: int = 40) -> str:
    """``repr(value)`` cut to ``width`` characters, for a one-line message about any value.

    Only scalars are ever printed whole: a list or table from a hostile file could be
    megabytes long, or nested deep enough to make ``repr`` itself fail.
    """
    if isinstance(value, list | tuple | dict | set):
        return f"a {type(value).__name__} of {len(value)} items"
    text = repr(value) if not isinstance(value, int) or abs(value) < 10**30 else "a huge number"
    return text if len(text) <= width else text[: width - 3] + "..."
