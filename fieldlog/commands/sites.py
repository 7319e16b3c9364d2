"""``fieldlog sites FOLDER``: the office roll-up of every site folder under FOLDER.

One line per site: revision, last logged day, forecast finish, float against the required
finish, open conflicts. A site that does not load is listed with its error; one whose log has
problems says how many after its line. Exit 0 when every site loads without open conflicts or
log problems, 1 otherwise (a late job is not a problem), 2 for bad input.
"""

from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path

from fieldlog.errors import SyncError
from fieldlog.reports.words import count
from fieldlog.sync.rollup import SiteRow, rollup

_HEADER = ("site", "rev", "last log", "forecast finish", "finish by", "float", "conflicts")


def add_parser(sub: argparse._SubParsersAction) -> None:
    """Register ``fieldlog sites``."""
    p = sub.add_parser(
        "sites",
        help="office roll-up: every site folder under FOLDER, one line each",
        description="List every site folder under FOLDER with its schedule revision, last "
        "logged day, forecast finish, float against the required finish and open conflicts.",
    )
    p.add_argument("folder", help="the office folder that holds the site folders")
    p.add_argument("--format", choices=("text", "json"), default="text")
    p.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    """Print the roll-up on stdout."""
    folder = Path(args.folder)
    if not folder.is_dir():
        raise SyncError(
            "not a folder", file=folder, fix="give the office folder that holds the site folders"
        )
    rows = rollup(folder)
    if not rows:
        print(
            f"fieldlog: no site folders (with site.toml or schedule.toml) under {folder}",
            file=sys.stderr,
        )
        return 1
    sys.stdout.write(render_json(rows) if args.format == "json" else render_text(rows))
    return 1 if any(r.has_problem for r in rows) else 0


def _cells(r: SiteRow) -> tuple[str, ...]:
    def d(value: object) -> str:
        return "-" if value is None else str(value)

    flt = "-" if r.finish_float is None else f"{r.finish_float:+d}"
    rev = "?" if r.revision is None else str(r.revision)
    return (r.path, rev, d(r.last_log_day), d(r.finish), d(r.finish_by), flt, str(r.conflicts))


def render_text(rows: tuple[SiteRow, ...]) -> str:
    """A plain fixed-width table; broken sites show their error after the revision."""
    cells = [_cells(r) for r in rows]
    widths = [max(len(h), *(len(c[i]) for c in cells)) for i, h in enumerate(_HEADER)]
    right = {1, 5, 6}

    def line(values: tuple[str, ...]) -> str:
        parts = [
            v.rjust(w) if i in right else v.ljust(w)
            for i, (v, w) in enumerate(zip(values, widths, strict=True))
        ]
        return "  ".join(parts).rstrip()

    out = [line(_HEADER)]
    for r, c in zip(rows, cells, strict=True):
        if r.error is None:
            out.append(line(c) + _log_note(r))
        else:
            head = "  ".join((c[0].ljust(widths[0]), c[1].rjust(widths[1])))
            extra = f" ({r.conflicts} conflicts)" if r.conflicts else ""
            out.append(f"{head}  ERROR{extra}: {r.error}")
    return "\n".join(out) + "\n"


def _log_note(r: SiteRow) -> str:
    """After a site's line: how many problems its log has, and the command that lists them."""
    if not r.log_problems:
        return ""
    many = count(r.log_problems, "problem", "problems")
    return f"  LOG: {many} ('fieldlog verify' on the site lists them)"


def render_json(rows: tuple[SiteRow, ...]) -> str:
    """The roll-up as JSON (dates ISO, float in working days)."""

    def iso(value: object) -> str | None:
        return None if value is None else str(value)

    data = [
        {
            "site": r.path,
            "revision": r.revision,
            "last_log_day": iso(r.last_log_day),
            "forecast_finish": iso(r.finish),
            "finish_by": iso(r.finish_by),
            "float": r.finish_float,
            "conflicts": r.conflicts,
            "error": r.error,
            "log_problems": r.log_problems,
        }
        for r in rows
    ]
    return json.dumps(data, indent=2) + "\n"
