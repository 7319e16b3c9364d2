"""``fieldlog verify SITE``: is the field log exactly as fieldlog wrote it, and consistent?

Prints every integrity finding (a forged entry: unsigned, signed with a key the site does not
register for its device, or changed after it was signed; an edited, removed, reordered or
misfiled entry; a file that is not a journal or key file) with its file and entry id, then
every contradiction the log holds (finish before start, two devices disagreeing on a start,
progress on an activity the schedule no longer has ...), which are fixed by recording a
correction, and every sync conflict copy.

Then the log is checked against the office receipts that vouch for it (this device's copies;
with ``--office FOLDER`` the office's own chain): an entry removed from the end of the log
after a sync, which the hash chain alone cannot show, is named with its device, entry and file,
and a device key in ``devices/`` of a device the office never heard from itself is named too.
On the device that wrote them, its own memory of its last entry here (in its data folder, see
:mod:`fieldlog.journal.own_memory`) names that entry when the log no longer holds it, even
before the first sync.
Then the registered devices with their authors. Exit code 1 when anything is found, 0 when
the log is clean; a log written before its devices signed is clean but says how many entries
are unsigned ("unsigned, chain intact").
"""

from __future__ import annotations

import argparse
from pathlib import Path

from fieldlog.commands.verify_cache import ReportCache
from fieldlog.home import fieldlog_home


def add_parser(sub: argparse._SubParsersAction) -> None:
    """Register ``fieldlog verify``."""
    p = sub.add_parser(
        "verify",
        help="check the field log is intact (exit 1 if not)",
        description=__doc__.splitlines()[0].split(": ", 1)[1],
    )
    p.add_argument("site", help="the site folder")
    p.add_argument(
        "--office",
        metavar="FOLDER",
        help="also check the log against the receipts in the office's folder for "
        "this site (catches entries removed after a sync even when this device's "
        "own copies of the receipts are gone)",
    )
    p.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    """Print findings and contradictions on stdout; 1 when there are any.

    An unchanged site gives the report kept from the last run (see
    :mod:`fieldlog.commands.verify_cache`); anything else is checked the full way.
    """
    cache = ReportCache.open(Path(args.site), fieldlog_home()) if args.office is None else None
    report = cache.found() if cache is not None else None
    if report is not None:
        for line in report.lines:
            print(line)
        return report.code
    from fieldlog.commands.verify_report import make_report  # the log, sync and engine

    report = make_report(args.site, args.office)
    if cache is not None:
        cache.keep(report)
    return report.code
