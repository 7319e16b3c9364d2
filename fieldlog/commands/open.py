"""``fieldlog open SITE``: the end-of-shift app (Textual) for one site folder.

The site is loaded before the terminal is taken over, so a site with errors fails exactly as
every other command does: one line on stderr naming file, line, activity and fix, exit code 2.
Textual is imported only inside :func:`run`, so the other commands start without it.
"""

from __future__ import annotations

import argparse
from datetime import date

from fieldlog.cli import iso_date, shift_day


def add_parser(sub: argparse._SubParsersAction) -> None:
    """Register ``fieldlog open``."""
    p = sub.add_parser(
        "open", help="the end-of-shift app: record the day, see float and the lookahead",
        description="Open the keyboard-driven app on a site folder: record what happened "
        "today (every key writes the log at once), see the float and the two-week lookahead "
        "change, correct past entries, sync with the office. Press ? in the app for every key.")
    p.add_argument("site", help="the site folder")
    p.add_argument("--today", type=iso_date, metavar="DATE",
                   help="the shift to record (default: this machine's date)")
    p.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    """Load the site (errors exit 2 before the screen changes), then run the app."""
    # The one place the app's "today" is read from the clock.
    today = shift_day(args.today, date.today())
    return open_site(args.site, today)


def open_site(folder: str, today: date, notice: str = "") -> int:
    """Load ``folder`` as of the end of ``today`` and run the app on it until the user leaves.

    Raises:
        FieldlogError: the site cannot be loaded (the CLI prints it and exits 2).
    """
    from fieldlog.app.session import SiteSession

    session = SiteSession(folder, today)
    session.load()

    from fieldlog.app.app import make_app  # Textual from here on

    make_app(folder, today, session=session, notice=notice).run()
    return 0
