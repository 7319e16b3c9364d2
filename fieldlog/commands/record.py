"""``fieldlog record SITE KIND ...``: add one entry to the field journal, as the app does.

One form per entry kind, built from the kinds' field lists so the command line and the app
can never disagree::

    fieldlog record SITE started FND-020 --on 2026-09-18
    fieldlog record SITE remaining FND-020 3 --on 2026-09-18
    fieldlog record SITE weather --conditions rain --high 12 --low 6 --precip-mm 14 --stopped
    fieldlog record SITE lost-day --cause weather --activities EXC-010,EXC-020
    fieldlog record SITE need STL-010 "anchor bolt layout rev C" --kind drawings
    fieldlog record SITE plant "13 t excavator" --hours-worked 5 --broken-down --hours-down 3
    fieldlog record SITE visitor "A. Inspector" --time-in 09:15 --time-out 11:40 --on yesterday
    fieldlog record SITE correct site-laptop-1.42 --reason "wrong day" --on 2026-09-17

The new entry's id goes to stdout. A refused entry is one line on stderr and exit code 2;
nothing is written then.

Every entry carries its author's name, asked once per device: on a terminal ``record`` asks
for it the first time; otherwise give ``--author NAME`` once. It is kept in fieldlog's data
folder with the device's signing key (the login name is never used).
"""

from __future__ import annotations

import argparse
import sys
from collections.abc import Sequence
from datetime import date

from fieldlog.commands.arguments import iso_date, shift_day
from fieldlog.day_words import HELP as DAY_HELP
from fieldlog.day_words import DayProblem, earliest_day, long_day, parse_day
from fieldlog.errors import EntryRefused
from fieldlog.journal import KINDS, record_entry
from fieldlog.journal.device import device_id
from fieldlog.journal.entries import FieldSpec
from fieldlog.journal.keys import MAX_AUTHOR, check_author, save_author, saved_author
from fieldlog.journal.tail import TailLink

VERBS = {
    "started": ("started", "an activity started (its actual start)"),
    "finished": ("finished", "an activity finished (its actual finish)"),
    "remaining": ("remaining", "working days an open activity still needs after the day"),
    "percent": ("percent", "physical percent complete (kept apart from remaining days)"),
    "weather": ("weather", "the day's weather and whether it stopped work"),
    "crew": ("crew", "a crew on site: trade, company, headcount, hours"),
    "lost-day": ("lost-time", "time lost and why; a whole day becomes a non-working day"),
    "plant": ("plant", "plant or equipment on site, and any breakdown"),
    "need": ("need", "a readiness item an activity needs before it can start"),
    "cleared": ("cleared", "a readiness item dealt with"),
    "delivery": ("delivery", "a delivery received"),
    "inspection": ("inspection", "an inspection or test"),
    "visitor": ("visitor", "a visitor to site"),
    "instruction": ("instruction", "an instruction received, verbal or written"),
    "incident": ("incident", "an incident (injury, damage, near miss)"),
    "safety": ("safety", "a safety observation"),
    "note": ("note", "a free note"),
    "correct": ("correction", "supersede an earlier entry (nothing is ever edited)"),
}
"""Command-line verb -> (entry kind, help)."""

_HIDDEN = {("lost-time", "whole_day"), ("correction", "corrects"), ("correction", "supersedes")}


def add_parser(sub: argparse._SubParsersAction, words: Sequence[str] = ()) -> None:
    """Register ``fieldlog record`` and one sub-form per entry kind.

    ``words`` (the command line, when known): only the forms it names get their fields
    (every form when it names none). argparse builds a form in about half a millisecond, and
    ``fieldlog record`` takes one; a form it could select is always one the words name, and
    the list of forms in ``--help`` is the same either way.
    """
    named = {w for w in words if w in VERBS or w == "lost-time"}
    p = sub.add_parser(
        "record",
        help="add an entry to the field log (what the app does)",
        description=__doc__.splitlines()[0].split(": ", 1)[1],
    )
    p.add_argument("site", help="the site folder")
    forms = p.add_subparsers(dest="verb", metavar="KIND", parser_class=type(p))
    forms.required = True
    for verb, (kind, help_) in VERBS.items():
        aliases = ["lost-time"] if verb == "lost-day" else []
        f = forms.add_parser(verb, aliases=aliases, help=help_, description=help_)
        if named and verb not in named and not named & set(aliases):
            continue
        if kind == "correction":
            f.add_argument("f_supersedes", metavar="ENTRY-ID", help="the entry to supersede")
        for spec in KINDS[kind]:
            if (kind, spec.name) not in _HIDDEN:
                _add_field(f, spec)
        if kind == "correction":
            f.add_argument(
                "--set",
                dest="changes",
                action="append",
                default=[],
                metavar="FIELD=VALUE",
                help="a corrected value, e.g. --set days=4 (repeat for more)",
            )
        f.add_argument(
            "--on",
            metavar="DAY",
            dest="on",
            help=f"the day this describes: {DAY_HELP} (default: today; for a "
            "correction, the corrected entry's day)",
        )
        f.add_argument(
            "--today",
            type=iso_date,
            metavar="DATE",
            help="today's date (default: the computer's date)",
        )
        f.add_argument(
            "--author",
            metavar="NAME",
            help="who records it (asked once per "
            "device and kept; give it here the first time on a machine without "
            "a terminal)",
        )
        f.set_defaults(run=run, kind=kind)


def _add_field(parser: argparse.ArgumentParser, spec: FieldSpec) -> None:
    dest = "f_" + spec.name
    label = spec.name.upper().replace("_", "-")
    if spec.type == "activity" and spec.cli == "positional":
        label = "ID"
    if spec.cli == "positional":
        parser.add_argument(dest, metavar=label, help=spec.help)
        return
    flag = spec.cli or "--" + spec.name.replace("_", "-")
    if spec.type == "bool":
        parser.add_argument(flag, dest=dest, action="store_true", default=None, help=spec.help)
    elif spec.type == "date":
        parser.add_argument(flag, dest=dest, type=iso_date, metavar="DATE", help=spec.help)
    elif spec.type == "choice":
        parser.add_argument(
            flag, dest=dest, choices=spec.choices, required=spec.required, help=spec.help
        )
    else:
        parser.add_argument(flag, dest=dest, metavar=label, required=spec.required, help=spec.help)


def run(args: argparse.Namespace) -> int:
    """Record the entry and print its id on stdout."""
    today = shift_day(args.today, date.today())  # the one place the real date is read
    kind = args.kind
    fields = {k[2:]: v for k, v in vars(args).items() if k.startswith("f_") and v is not None}
    if kind == "lost-time":
        fields["whole_day"] = "hours" not in fields
    if kind == "correction":
        for change in args.changes:
            key, sep, value = change.partition("=")
            if not sep or not key.strip():
                raise EntryRefused(f"--set {change!r} is not FIELD=VALUE", fix="e.g. --set days=4")
            fields[key.strip().replace("-", "_")] = value
    device = device_id()  # first: a data folder that cannot be written is the one error shown
    tail = TailLink.open(args.site)  # the site, unpickled with the log's kept facts if unchanged
    site = tail.site
    author = _author(args.author)
    day = None
    if args.on is not None:
        try:
            day = parse_day(args.on, today, earliest=earliest_day(site.start), latest=today)
        except DayProblem as exc:
            raise EntryRefused(f"--on: {exc}", fix="e.g. --on yesterday") from None
    entry = record_entry(
        args.site,
        site,
        kind,
        day,
        fields,
        today=today,
        author=author,
        device=device,
        site_name=args.site,
        tail=tail,
    )
    print(entry.id)
    print(f"fieldlog: recorded {entry.kind} for {long_day(entry.day)}", file=sys.stderr)
    return 0


def _author(given: str | None) -> str:
    """The author for this entry: ``--author``, else the kept name, else asked on a terminal.

    The first name given on a device is kept for it.

    Raises:
        EntryRefused: no name given, none kept, and no terminal to ask on (or a bad name).
    """
    kept = saved_author()
    if given is not None:
        name = check_author(given)
    elif kept is not None:
        return kept
    elif sys.stdin.isatty() and sys.stderr.isatty():
        sys.stderr.write(
            f"Your name, as it will stand on every entry from this device "
            f"(1-{MAX_AUTHOR} characters): "
        )
        sys.stderr.flush()
        name = check_author(sys.stdin.readline())
    else:
        raise EntryRefused(
            "no author name is set for this device",
            fix="give your name once with --author NAME; it is kept for this device",
        )
    if kept is None:
        save_author(name)
    return name
