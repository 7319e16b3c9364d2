"""``fieldlog lookahead SITE``: what must, may and cannot run on each day of the next two weeks.

The text sheet is for printing and handing out; ``--format json`` and ``csv`` list every
unfinished activity for other tools and the office. The bytes written are exactly the
renderer's (UTF-8, or plain ASCII with ``--ascii``; ``\\n`` line ends on every platform).
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from fieldlog.bounds import SHEET_WIDTHS
from fieldlog.commands.arguments import EXIT_BAD_INPUT, iso_date
from fieldlog.commands.log_warnings import warn_log_problems
from fieldlog.errors import FieldlogError
from fieldlog.lookahead.build import LOOKAHEAD_DAYS, Lookahead, build_lookahead
from fieldlog.workspace import SiteState, load_state

FORMATS = ("text", "json", "csv", "ics")
MAX_DAYS = 62


def add_parser(sub: argparse._SubParsersAction) -> None:
    """Register ``fieldlog lookahead``."""
    p = sub.add_parser(
        "lookahead",
        help="the two-week lookahead: what must, may and cannot run each day",
        description="For every day of the window: which activities MUST run (or the job "
        "slips), which MAY run (they have float) and which CANNOT run yet, with the reasons, "
        "the crew load and a levelling suggestion when a crew is over its headcount.",
    )
    p.add_argument("site", help="the site folder")
    p.add_argument(
        "--as-of",
        type=iso_date,
        metavar="DATE",
        help="status date, end of day (default: last day with log entries)",
    )
    p.add_argument(
        "--from",
        dest="start",
        type=iso_date,
        metavar="DATE",
        help="first day shown (default: the data date, the day after --as-of)",
    )
    p.add_argument(
        "--days",
        type=int,
        default=LOOKAHEAD_DAYS,
        metavar="N",
        help=f"calendar days shown (default {LOOKAHEAD_DAYS}, at most {MAX_DAYS})",
    )
    p.add_argument("--format", choices=FORMATS, default="text")
    p.add_argument(
        "--width",
        type=int,
        choices=SHEET_WIDTHS,
        default=80,
        help="columns of the printed sheet (default 80)",
    )
    p.add_argument("--ascii", action="store_true", help="plain ASCII marks and names")
    p.add_argument(
        "--out",
        type=Path,
        metavar="FILE",
        help="write to FILE instead of stdout "
        "(with --per-crew: the folder the crews' .ics files go in)",
    )
    crews = p.add_mutually_exclusive_group()
    crews.add_argument(
        "--crew", metavar="NAME", help="with --format ics: only the MUST work of this crew"
    )
    crews.add_argument(
        "--per-crew",
        action="store_true",
        help="with --format ics: one calendar file per crew, in --out FOLDER",
    )
    p.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    """Write the lookahead; readiness items to chase, out-of-sequence work and log problems
    go to stderr."""
    if not 1 <= args.days <= MAX_DAYS:
        print(f"fieldlog: --days must be 1 to {MAX_DAYS}, got {args.days}", file=sys.stderr)
        return EXIT_BAD_INPUT
    if args.format == "text":
        from fieldlog.reports.lookahead_text import layout_for

        try:
            layout_for(args.width, args.days)
        except ValueError as exc:
            print(f"fieldlog: {exc}; use --width 132 or fewer --days", file=sys.stderr)
            return EXIT_BAD_INPUT
    if (args.crew is not None or args.per_crew) and args.format != "ics":
        print("fieldlog: --crew and --per-crew go with --format ics", file=sys.stderr)
        return EXIT_BAD_INPUT
    if args.per_crew and args.out is None:
        print("fieldlog: --per-crew needs --out FOLDER for the crews' files", file=sys.stderr)
        return EXIT_BAD_INPUT
    state = load_state(args.site, args.as_of)
    if args.crew is not None and args.crew not in state.site.crews:
        known = ", ".join(sorted(state.site.crews)) or "none"
        print(
            f"fieldlog: no crew '{args.crew[:40]}' in site.toml (crews: {known})", file=sys.stderr
        )
        return EXIT_BAD_INPUT
    la = build_lookahead(state.schedule, state.replay.readiness, args.start, args.days)
    if args.per_crew:
        from fieldlog.reports.lookahead_ics import crew_calendars

        _write_crew_files(args.out, crew_calendars(la))
        return _report(la, state, args.site)
    data = _rendered(la, args)
    if args.out is not None:
        _write(args.out, data)
    else:
        sys.stdout.flush()
        sys.stdout.buffer.write(data)
        sys.stdout.buffer.flush()
    return _report(la, state, args.site)


def _rendered(la: Lookahead, args: argparse.Namespace) -> bytes:
    """The lookahead in the format asked for; only that format's writer is imported (the
    others cost start-up time and are not needed)."""
    if args.format == "ics":
        from fieldlog.reports.lookahead_ics import render_ics

        return render_ics(la, args.crew)
    if args.format == "json":
        from fieldlog.reports.lookahead_data import render_json

        return render_json(la).encode("utf-8")
    if args.format == "csv":
        from fieldlog.reports.lookahead_data import render_csv

        return render_csv(la).encode("utf-8")
    from fieldlog.reports.lookahead_text import render_text

    text = render_text(la, args.width, ascii_only=args.ascii)
    return text.encode("ascii" if args.ascii else "utf-8")


def _report(la: Lookahead, state: SiteState, site: str) -> int:
    """Readiness items to chase, out-of-sequence work and log problems, on stderr; the exit
    code (1 when the log has problems)."""
    for row in la.rows:
        for flag in row.not_ready:
            print(f"fieldlog: not ready: {row.id} {flag}", file=sys.stderr)
    for oos in state.schedule.out_of_sequence:
        print(f"fieldlog: out of sequence: {oos.describe()}", file=sys.stderr)
    return warn_log_problems((p.message for p in state.replay.problems), site)


def _write_crew_files(folder: Path, files: dict[str, bytes]) -> None:
    """Each crew's calendar into ``folder`` (made if missing); names go to stderr."""
    try:
        folder.mkdir(exist_ok=True)
    except OSError as exc:
        raise FieldlogError(
            f"cannot make the folder: {exc.strerror}",
            file=folder,
            fix="give a folder whose parent exists and is writable",
        ) from exc
    if not files:
        print("fieldlog: no crew has MUST work in the window; no files written", file=sys.stderr)
    for name, data in files.items():
        _write(folder / name, data)
        print(f"fieldlog: wrote {folder / name}", file=sys.stderr)


def _write(path: Path, data: bytes) -> None:
    """Write ``data`` to ``path`` whole: a temporary file beside it, then a rename."""
    tmp = path.with_name(path.name + ".tmp")
    try:
        tmp.write_bytes(data)
        tmp.replace(path)
    except OSError as exc:
        raise FieldlogError(
            f"cannot write {path}: {exc.strerror}",
            file=path,
            fix="check the folder exists and is writable",
        ) from exc
