"""Days as a tired person types them: ``today``, ``yesterday``, ``fri``, ``-2`` or ``2026-09-25``.

One parser for the command line (``fieldlog record ... --on``) and the app's day fields, so the
same words mean the same day everywhere and the same mistake gets the same one-line message.

The words, relative to the ``today`` the caller passes in (never read from the clock here):

* ``today`` (or ``t``), ``yesterday`` (or ``y``);
* a weekday, ``mon`` .. ``sun`` or the full name: the latest such day *up to and including*
  today, so on a Friday ``fri`` is today and ``thu`` yesterday; a foreman catching up names
  the day just gone, never next week's;
* ``-N``: N calendar days back (``-1`` is yesterday); ``+N`` N days ahead, only where a later
  day makes sense (an expected delivery date);
* an ISO date, ``2026-09-25``.

Bounds: never after ``latest`` (today, for the day an entry describes), never before
``earliest`` (the site start less a year, :func:`earliest_day`). A day can be typed so far
back only by mistake (a wrong year); refusing it is cheaper than a wrong legal record.
"""

from __future__ import annotations

import re
from datetime import date, timedelta

WEEKDAYS = ("monday", "tuesday", "wednesday", "thursday", "friday", "saturday", "sunday")
"""Full weekday names; any prefix of three letters or more names the day (``fri``, ``frid``)."""

YEAR_BEFORE_START = timedelta(days=366)
"""How far before the site start a day may lie (site preparation, a late catch-up)."""

MAX_SHIFT = 3660
"""Largest ``-N`` / ``+N`` accepted, in days (about ten years): beyond that it is a typo."""

HELP = "today, yesterday, a weekday (fri), -2 (days back) or 2026-09-25"
"""What a day field accepts, in words, for placeholders and ``--help``."""

_SHIFT_RE = re.compile(r"^([+-])(\d{1,6})$")


class DayProblem(ValueError):
    """What was typed is not a day, or a day out of bounds; the message says what to type."""


def earliest_day(site_start: date) -> date:
    """The first day an entry may describe for a site starting on ``site_start``."""
    return site_start - YEAR_BEFORE_START


def parse_day(
    text: str, today: date, *, earliest: date | None = None, latest: date | None = None
) -> date:
    """The day ``text`` names, as of ``today``.

    Args:
        text: what was typed (case and surrounding spaces do not matter).
        today: the day the words are relative to.
        earliest: the first day allowed (None: no lower bound).
        latest: the last day allowed (None: no upper bound; ``+N`` is refused unless a
            bound later than today is given or there is none).

    Raises:
        DayProblem: one line saying what was wrong and what to type.

    Examples:
        >>> parse_day("fri", date(2026, 9, 28))     # a Monday: the Friday just gone
        datetime.date(2026, 9, 25)
        >>> parse_day("-2", date(2026, 9, 28))
        datetime.date(2026, 9, 26)
    """
    word = text.strip().lower()
    if not word:
        raise DayProblem(f"no day given: type {HELP}")
    if len(word) > 40:
        raise DayProblem(f"'{text[:20]}...' is not a day: type {HELP}")
    day = _named(word, today)
    if day is None:
        raise DayProblem(f"'{text.strip()}' is not a day: type {HELP}")
    if latest is not None and day > latest:
        bound = f"today ({long_day(latest)})" if latest == today else long_day(latest)
        raise DayProblem(
            f"{long_day(day)} is after {bound}: a day that has not happened yet cannot be recorded"
        )
    if earliest is not None and day < earliest:
        raise DayProblem(
            f"{long_day(day)} is before {long_day(earliest)}, a year before the "
            "site start: check the year"
        )
    return day


def long_day(day: date) -> str:
    """The full day with its year, as every echo of a typed day shows it: ``Fri 25 Sep 2026``."""
    return f"{day:%a %d %b %Y}"


def _named(word: str, today: date) -> date | None:
    if word in ("today", "t", "now"):
        return today
    if word in ("yesterday", "y"):
        return today - timedelta(days=1)
    shift = _SHIFT_RE.match(word)
    if shift:
        n = int(shift[2])
        if n > MAX_SHIFT:
            return None
        return today + timedelta(days=n if shift[1] == "+" else -n)
    if len(word) >= 3 and word.isalpha():
        for k, name in enumerate(WEEKDAYS):
            if name.startswith(word):
                return today - timedelta(days=(today.weekday() - k) % 7)
        return None
    if re.fullmatch(r"\d{4}-\d{2}-\d{2}", word):
        try:
            return date.fromisoformat(word)
        except ValueError:
            return None
    return None
