"""``fieldlog demo``: the app on a scratch copy of the sample site, on a day that looks alive.

The sample site's log is fixed in time and the calendar is not, so the demo opens on the
working day after the sample's last logged day (and says so), not on this machine's date.
Nothing in the installed sample changes: the copy lives in a temporary folder, removed when the
app closes unless ``--keep`` is given.
"""

from __future__ import annotations

import argparse
import shutil
import sys
import tempfile
from datetime import date, timedelta
from pathlib import Path

from fieldlog.commands.arguments import iso_date, shift_day
from fieldlog.errors import SiteError

SAMPLE = "kestrel-yard"


def add_parser(sub: argparse._SubParsersAction) -> None:
    """Register ``fieldlog demo``."""
    p = sub.add_parser(
        "demo",
        help="try the app on a scratch copy of the sample site",
        description="Copy the sample site to a temporary folder and open the app on it, on the "
        "working day after the sample's last logged day. The copy is removed afterwards.",
    )
    p.add_argument(
        "--keep",
        action="store_true",
        help="keep the scratch copy when the app closes (its folder is printed)",
    )
    p.add_argument(
        "--today",
        type=iso_date,
        metavar="DATE",
        help="open on this day instead of the day after the sample's last log day",
    )
    p.add_argument(
        "--ascii",
        action="store_true",
        help="plain ASCII marks and no colour (see fieldlog open --ascii)",
    )
    p.set_defaults(run=run)


def sample_folder() -> Path:
    """The sample site: packaged with the wheel, or in the source tree of an editable install.

    Raises:
        SiteError: neither place has it.
    """
    here = Path(__file__).resolve().parent.parent
    for candidate in (here / "_sample_sites" / SAMPLE, here.parent / "sample_sites" / SAMPLE):
        if (candidate / "site.toml").is_file():
            return candidate
    raise SiteError(
        f"the sample site '{SAMPLE}' is not installed",
        file=here,
        fix="reinstall fieldlog (pip install --force-reinstall fieldlog)",
    )


def demo_day(folder: Path) -> tuple[date, date | None]:
    """The day the demo opens on, and the sample's last logged day (None for an empty log).

    The day after the last logged day, moved to the next working day of the site's default
    calendar; with an empty log, the first working day on or after the site start.
    """
    from fieldlog.engine.calendars import build_calendar
    from fieldlog.journal import read_journal
    from fieldlog.site.files import load_site
    from fieldlog.workspace import default_status_date

    site = load_site(folder)
    journal = read_journal(folder)
    last = journal.last_day
    after = default_status_date(site, journal) + timedelta(days=1)
    calendar = build_calendar(site.calendars[site.calendar], after, after + timedelta(days=400))
    return calendar.next_working(after), last


def copy_sample(into: Path) -> Path:
    """Copy the sample site into ``into``; returns the copy's folder."""
    target = into / SAMPLE
    shutil.copytree(sample_folder(), target, ignore=shutil.ignore_patterns("prints"))
    return target


def run(args: argparse.Namespace) -> int:
    """Copy, say which day and where, run the app, clean up."""
    from fieldlog.commands.open import open_site

    scratch = Path(tempfile.mkdtemp(prefix="fieldlog-demo-"))
    try:
        folder = copy_sample(scratch)
        day, last = demo_day(folder)
        if args.today is not None:
            day = shift_day(args.today, date.today())  # the machine's date, read at the edge
            why = "the day asked for"
        elif last is None:
            why = "the site's first working day (the sample log is empty)"
        else:
            why = f"the working day after the sample's last logged day, {last:%a %d %b %Y}"
        notice = f"Demo on a scratch copy, opened on {day:%a %d %b %Y}: {why}"
        # (the status line cuts this at the screen edge; the day comes first for that reason)
        print(f"fieldlog demo: scratch copy of the sample site at {folder}", file=sys.stderr)
        print(f"fieldlog demo: opening on {day:%a %d %b %Y}, {why}", file=sys.stderr)
        code = open_site(str(folder), day, notice=notice, plain=args.ascii)
    finally:
        if args.keep:
            print(f"fieldlog demo: the scratch copy is kept at {scratch}", file=sys.stderr)
        else:
            shutil.rmtree(scratch, ignore_errors=False)
    return code
