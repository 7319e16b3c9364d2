"""``fieldlog sync SITE TARGET``: journal files both ways, the office's newer schedule in.

The summary goes to stdout; progress on long transfers and diagnostics go to stderr. Exit 0
when both sides are whole, 1 when conflicts, refused files or schedule problems need a person,
2 for bad input (a site that does not load, a target that does not exist) or an interrupted
copy (both folders stay valid; run the same command again to finish).
"""

from __future__ import annotations

import argparse
import sys
import time
from datetime import datetime
from pathlib import Path

from fieldlog.errors import SyncError
from fieldlog.sync import SyncOptions, sync_site
from fieldlog.sync.git_remote import is_git_target, parse_remote
from fieldlog.sync.state import SyncRecord, save_record
from fieldlog.sync.summary import render_json, render_text

PROGRESS_MIN_FILES = 25
"""Show progress only when at least this many files are copied."""
PROGRESS_EVERY_S = 1.0


def add_parser(sub: argparse._SubParsersAction) -> None:
    """Register ``fieldlog sync``."""
    p = sub.add_parser(
        "sync",
        help="exchange journal files and schedule revisions with the office folder",
        description="Copy this site's journal files to TARGET (the office folder, a USB stick or "
        "a cloud-synced folder), bring back other devices' journal files, and bring in a newer "
        "office schedule revision. Nothing is overwritten or lost: differing copies are kept "
        "side by side and reported.",
    )
    p.add_argument("site", help="the site folder on this device")
    p.add_argument(
        "target",
        help="the office's folder for this site (created from the site "
        "when empty), or a git repository: git+file:///srv/jobs.git, git+ssh://..., "
        "git+https://... (one branch per site)",
    )
    p.add_argument(
        "--office",
        action="store_true",
        help="with a git target: SITE is the office's copy, whose newer schedule "
        "revisions go to the branch",
    )
    p.add_argument("--format", choices=("text", "json"), default="text")
    p.set_defaults(run=run)


class _ProgressLine:
    """Prints ``copied n of N files`` on stderr at most once a second for long transfers."""

    def __init__(self) -> None:
        self.last = time.monotonic()
        self.shown = False

    def __call__(self, done: int, total: int, copied_bytes: int) -> None:
        if total < PROGRESS_MIN_FILES:
            return
        now = time.monotonic()
        if now - self.last >= PROGRESS_EVERY_S or (done == total and self.shown):
            self.last, self.shown = now, True
            print(
                f"fieldlog: sync: copied {done} of {total} files ({copied_bytes / 1048576:.1f} MB)",
                file=sys.stderr,
                flush=True,
            )


def run(args: argparse.Namespace) -> int:
    """Sync, print the summary, remember the sync in this device's data folder."""
    site = Path(args.site)
    options = SyncOptions(progress=_ProgressLine(), now=time.time())
    target: Path | str
    if is_git_target(args.target):
        from fieldlog.sync.git_transport import sync_git

        remote = parse_remote(args.target)
        target = remote.shown
        result = sync_git(site, remote, options, office=args.office)
        summary = result.summary
        pushed = f"pushed {result.pushed[:12]}" if result.pushed else "nothing to push"
        print(
            f"fieldlog: sync: git branch {result.branch}: {pushed} (attempt {result.attempts})",
            file=sys.stderr,
        )
        if args.office:
            print(
                "fieldlog: sync: office copy: in the summary the 'site' is the branch and "
                "the 'target' is this folder",
                file=sys.stderr,
            )
    elif args.office:
        raise SyncError(
            "--office goes with a git target", fix="sync an office folder as the TARGET instead"
        )
    else:
        target = Path(args.target)
        summary = sync_site(site, target, options)
    sys.stdout.write(render_json(summary) if args.format == "json" else render_text(summary))
    if summary.has_problems:
        print(
            f"fieldlog: sync: {len(summary.conflicts)} conflicts, {len(summary.refused)} "
            f"refused files, {len(summary.restored)} restored, {len(summary.lost)} lost, "
            f"{len(summary.receipt_problems)} receipt problems; see the summary",
            file=sys.stderr,
        )
    record = SyncRecord.of(
        site, target, summary, datetime.now().astimezone().replace(microsecond=0)
    )
    try:
        save_record(record)
    except SyncError as exc:  # the sync itself is complete; only the receipt is missing
        print(f"fieldlog: warning: {exc.message}", file=sys.stderr)
    return summary.exit_code
