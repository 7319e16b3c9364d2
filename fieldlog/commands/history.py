"""``fieldlog history SITE``: the forecast finish as of every logged day, why it moved, PPC."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from fieldlog.commands.arguments import EXIT_BAD_INPUT, iso_date
from fieldlog.commands.log_warnings import warn_log_problems
from fieldlog.engine.horizon import ScheduleTooLong
from fieldlog.history import GROUPINGS, build_history
from fieldlog.journal import read_journal
from fieldlog.reports.history import FORMATS, render_history
from fieldlog.site.files import SCHEDULE_FILE, load_site

MIN_WIDTH, MAX_WIDTH = 60, 400


def _width(text: str) -> int:
    try:
        n = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"'{text}' is not a whole number") from None
    if not MIN_WIDTH <= n <= MAX_WIDTH:
        raise argparse.ArgumentTypeError(f"{n} is outside {MIN_WIDTH}-{MAX_WIDTH} columns")
    return n


def add_parser(sub: argparse._SubParsersAction) -> None:
    """Register ``fieldlog history``."""
    p = sub.add_parser(
        "history",
        help="forecast finish as of every logged day, movement by cause, PPC",
        description="Recompute the schedule as of the end of every logged day and show how "
        "the forecast finish moved, split by the causes the log records, and the weekly "
        "percent plan complete. Reads the log only; it claims no cause the log does not name.",
    )
    p.add_argument("site", help="the site folder")
    p.add_argument(
        "--from",
        dest="first",
        type=iso_date,
        metavar="DATE",
        help="first day shown (default: the first logged day)",
    )
    p.add_argument(
        "--to",
        dest="last",
        type=iso_date,
        metavar="DATE",
        help="last day shown (default: the last logged day)",
    )
    p.add_argument("--by", choices=GROUPINGS, default="day", help="window length (default day)")
    p.add_argument("--format", choices=FORMATS, default="text")
    p.add_argument(
        "--width",
        type=_width,
        default=80,
        metavar="COLUMNS",
        help=f"text width, {MIN_WIDTH}-{MAX_WIDTH} (default 80; 132 for wide paper)",
    )
    p.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    """Print the history on stdout; log problems go to stderr."""
    if args.first and args.last and args.first > args.last:
        print(f"fieldlog: --from {args.first} is after --to {args.last}", file=sys.stderr)
        return EXIT_BAD_INPUT
    site = load_site(args.site)
    journal = read_journal(args.site)
    try:
        history = build_history(site, journal, first=args.first, last=args.last, by=args.by)
    except ScheduleTooLong as exc:
        raise exc.naming(Path(args.site) / SCHEDULE_FILE) from exc
    sys.stdout.write(render_history(history, args.format, args.width))
    return warn_log_problems(map(str, history.problems), args.site)
