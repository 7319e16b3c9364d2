"""``fieldlog report SITE --day DATE``: the printable daily report of one day.

80 columns of plain text on stdout, the same bytes every time for the same log; redirect it to
a file to print or mail it. Log problems also go to stderr so they are not missed.
"""

from __future__ import annotations

import argparse
import sys

from fieldlog.commands.arguments import iso_date
from fieldlog.commands.log_warnings import warn_log_problems
from fieldlog.reports.daily_report import render_daily_report
from fieldlog.workspace import load_state


def add_parser(sub: argparse._SubParsersAction) -> None:
    """Register ``fieldlog report``."""
    p = sub.add_parser(
        "report",
        help="the printable daily report of one day",
        description=__doc__.splitlines()[0].split(": ", 1)[1],
    )
    p.add_argument("site", help="the site folder")
    p.add_argument(
        "--day",
        type=iso_date,
        metavar="DATE",
        required=True,
        help="the day to report (its end is the status date)",
    )
    p.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    """Print the report on stdout; log problems are repeated on stderr."""
    state = load_state(args.site, args.day)
    sys.stdout.write(render_daily_report(state, args.day))
    return warn_log_problems((p.message for p in state.replay.problems), args.site)
