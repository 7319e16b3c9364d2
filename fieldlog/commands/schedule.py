"""``fieldlog schedule SITE``: every activity's dates and floats as of a status date."""

from __future__ import annotations

import argparse
import sys

from fieldlog.commands.arguments import iso_date
from fieldlog.commands.log_warnings import warn_log_problems
from fieldlog.reports.schedule_sheet import FORMATS, render_schedule
from fieldlog.workspace import load_state


def add_parser(sub: argparse._SubParsersAction) -> None:
    """Register ``fieldlog schedule``."""
    p = sub.add_parser(
        "schedule",
        help="dates and floats of every activity (the float list)",
        description="Recompute the critical path from the field log and print "
        "every activity's early/late dates and floats.",
    )
    p.add_argument("site", help="the site folder")
    p.add_argument(
        "--as-of",
        type=iso_date,
        metavar="DATE",
        help="status date, end of day (default: last day with log entries)",
    )
    p.add_argument("--format", choices=FORMATS, default="text")
    p.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    """Print the schedule on stdout; out-of-sequence and log problems go to stderr."""
    state = load_state(args.site, args.as_of)
    sys.stdout.write(render_schedule(state.schedule, args.format))
    for oos in state.schedule.out_of_sequence:
        print(f"fieldlog: out of sequence: {oos.describe()}", file=sys.stderr)
    return warn_log_problems((p.message for p in state.replay.problems), args.site)
