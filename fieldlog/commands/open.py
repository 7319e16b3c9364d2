"""``fieldlog open SITE``: the end-of-shift app (Textual) for one site folder.

The site is loaded before the terminal is taken over, so a site with errors fails exactly as
every other command does: one line on stderr naming file, line, activity and fix, exit code 2.
Textual is imported only inside :func:`run`, so the other commands start without it.
"""

from __future__ import annotations

import argparse
import os
import sys
from collections.abc import Mapping
from datetime import date

from fieldlog.commands.arguments import iso_date, shift_day
from fieldlog.errors import FieldlogError

MONO_TERMS = frozenset({"dumb", "vt52", "vt100", "vt102", "vt220", "vt320", "vt420"})
"""TERM values of terminals without colour (common practice: the terminfo names of the DEC
terminals and of a bare line); a name ending in ``-m`` or ``-mono`` is a monochrome variant."""


def add_parser(sub: argparse._SubParsersAction) -> None:
    """Register ``fieldlog open``."""
    p = sub.add_parser(
        "open",
        help="the end-of-shift app: record the day, see float and the lookahead",
        description="Open the keyboard-driven app on a site folder: record what happened "
        "today (every key writes the log at once), see the float and the two-week lookahead "
        "change, correct past entries, sync with the office. Press ? in the app for every key.",
    )
    p.add_argument("site", help="the site folder")
    p.add_argument(
        "--today",
        type=iso_date,
        metavar="DATE",
        help="the shift to record (default: this machine's date)",
    )
    p.add_argument(
        "--ascii",
        action="store_true",
        help="plain marks (#, :, .) instead of block characters, for a terminal "
        "without colour or a font without them; also on when NO_COLOR is set or "
        "TERM names a terminal without colour (dumb, vt100)",
    )
    p.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    """Load the site (errors exit 2 before the screen changes), then run the app."""
    # The one place the app's "today" is read from the clock.
    today = shift_day(args.today, date.today())
    return open_site(args.site, today, plain=args.ascii)


def plain_wanted(env: Mapping[str, str], asked: bool = False) -> bool:
    """True when the app should draw plain ASCII marks and carry no meaning by colour.

    Asked for with ``--ascii``; also when ``NO_COLOR`` is set to anything non-empty (the
    no-color.org convention) or ``TERM`` names a terminal without colour.
    """
    if asked or env.get("NO_COLOR"):
        return True
    term = env.get("TERM", "").strip().lower()
    return term in MONO_TERMS or term.endswith(("-m", "-mono"))


def require_terminal() -> None:
    """Refuse to start the app when its input or output is not a terminal.

    Without a terminal (output redirected to a file, a cron job, a pipe) the app would take
    over nothing and wait for keys that never come, spinning the CPU.

    Raises:
        FieldlogError: stdin or stdout is not a terminal (exit 2).
    """
    for name, stream in (("output", sys.stdout), ("input", sys.stdin)):
        if stream is None or not stream.isatty():
            raise FieldlogError(
                f"the app needs a terminal, and its {name} is not one",
                fix="run it in a terminal window; for files use fieldlog report, lookahead or "
                "schedule",
            )


def open_site(folder: str, today: date, notice: str = "", *, plain: bool = False) -> int:
    """Load ``folder`` as of the end of ``today`` and run the app on it until the user leaves.

    Raises:
        FieldlogError: the site cannot be loaded, or there is no terminal (the CLI prints it
            and exits 2).
    """
    from fieldlog.app.session import SiteSession

    session = SiteSession(folder, today)
    session.load()
    require_terminal()

    from fieldlog.app.app import make_app  # Textual from here on

    make_app(
        folder, today, session=session, notice=notice, plain=plain_wanted(os.environ, plain)
    ).run()
    return 0
