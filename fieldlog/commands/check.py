"""``fieldlog check SITE``: the DCMA 14-point health checks before a schedule goes out.

stdout carries the report; exit 0 when every check is within its mark, 1 when one is not
(the report says which and what to review), 2 for bad input.
"""

from __future__ import annotations

import argparse
import sys

from fieldlog.commands.arguments import EXIT_OK, EXIT_PROBLEM, iso_date


def add_parser(sub: argparse._SubParsersAction) -> None:
    """Register ``fieldlog check``."""
    p = sub.add_parser(
        "check",
        help="schedule health checks (DCMA 14-point assessment)",
        description="Run the DCMA 14-point schedule assessment checks that apply to a site "
        "(logic, leads, lags, link types, hard constraints, float, durations, dates, missed "
        "work, critical path test, CPLI, BEI) and say which are outside their published mark.",
    )
    p.add_argument("site", help="the site folder")
    p.add_argument(
        "--as-of",
        type=iso_date,
        metavar="DATE",
        help="status date, end of day (default: last day with log entries)",
    )
    p.add_argument("--format", choices=("text", "json"), default="text")
    p.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    """Print the report; a failed check is exit 1."""
    from fieldlog.checks import check_site
    from fieldlog.reports.health import render_json, render_text

    report = check_site(args.site, args.as_of)
    sys.stdout.write(render_json(report) if args.format == "json" else render_text(report))
    if report.failed:
        names = ", ".join(f"{c.number} {c.name}" for c in report.failed)
        print(f"fieldlog: check: outside the mark: {names}", file=sys.stderr)
        return EXIT_PROBLEM
    return EXIT_OK
