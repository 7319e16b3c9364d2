"""``fieldlog export SITE... --sqlite office.db``: every site into one SQLite file.

stdout: one line per site (``exported``, ``unchanged`` or ``failed: why``) and a total.
Exit 0 when every site is in the database, 1 when a site did not load (it is recorded with its
error and keeps its last good rows), 2 for bad input (no such folder, a database fieldlog did
not write).
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from fieldlog.commands.arguments import EXIT_OK, EXIT_PROBLEM, iso_date


def add_parser(sub: argparse._SubParsersAction) -> None:
    """Register ``fieldlog export``."""
    p = sub.add_parser(
        "export",
        help="write sites into an SQLite office database (unchanged sites skipped)",
        description="Write each site's activities, schedule results, journal entries, lost "
        "time, crews and readiness items into an SQLite file the office can query with any "
        "SQL tool. A site whose files did not change since the last export is skipped.",
    )
    p.add_argument(
        "sites", nargs="+", metavar="SITE", help="site folders, or folders that hold site folders"
    )
    p.add_argument(
        "--sqlite",
        type=Path,
        required=True,
        metavar="FILE",
        help="the database file (created when missing)",
    )
    p.add_argument(
        "--as-of",
        type=iso_date,
        metavar="DATE",
        help="status date for every site (default: each site's last logged day)",
    )
    p.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    """Export and list what happened to each site."""
    from fieldlog.office import Outcome, expand_sites, export_sites

    folders = expand_sites(Path(s) for s in args.sites)
    summary = export_sites(folders, args.sqlite, args.as_of)
    for s in summary.sites:
        tail = f": {s.error}" if s.error else ""
        print(f"{s.outcome.value:<9} {s.folder}{tail}")
    print(
        f"{summary.count(Outcome.EXPORTED)} exported, {summary.count(Outcome.SKIPPED)} "
        f"unchanged, {summary.count(Outcome.FAILED)} failed: {args.sqlite}"
    )
    if summary.count(Outcome.FAILED):
        print(
            f"fieldlog: export: {summary.count(Outcome.FAILED)} sites did not load; they "
            "keep their last exported rows",
            file=sys.stderr,
        )
        return EXIT_PROBLEM
    return EXIT_OK
