"""What every subcommand shares: exit codes, the date argument and the shift day.

Kept here, not in :mod:`fieldlog.cli`, so that a subcommand never imports the command line
that imports it (and the app can take the shift-day rule without the parser).
"""

from __future__ import annotations

import argparse
from datetime import date

from fieldlog.bounds import check_date, shown
from fieldlog.errors import OutOfBounds

EXIT_OK, EXIT_PROBLEM, EXIT_BAD_INPUT = 0, 1, 2
"""0 ok, 1 a problem was found (a broken log; a late job is not a problem), 2 bad input."""


def iso_date(text: str) -> date:
    """argparse type for YYYY-MM-DD dates, within fieldlog's range (see fieldlog.bounds)."""
    try:
        day = date.fromisoformat(text[:40])
    except ValueError:
        raise argparse.ArgumentTypeError(f"{shown(text)} is not a date like 2026-03-02") from None
    try:
        return check_date(day, "date")
    except OutOfBounds as exc:
        raise argparse.ArgumentTypeError(f"{exc.problem}; {exc.fix}") from None


def shift_day(given: date | None, machine_today: date) -> date:
    """The shift being recorded: ``--today`` if given, else the machine's date.

    The caller reads the machine's date (the command line's edge is the one place it is
    read) and passes it in. A ``--today`` later than it would let entries be written for days
    that have not happened, so it is refused.

    Raises:
        OutOfBounds: ``given`` is later than ``machine_today``.
    """
    if given is None:
        return machine_today
    if given > machine_today:
        raise OutOfBounds(
            f"--today {given.isoformat()} is later than this computer's date "
            f"{machine_today.isoformat()}",
            fix="give today's date or an earlier one, or set the computer's clock",
        )
    return given
