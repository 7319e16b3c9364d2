"""The office roll-up: every site folder under one folder, one line each.

For each site: schedule revision, last day anyone logged, forecast finish, float against the
required finish, open conflict copies, and how many problems its log has (damaged, forged or
contradicting entries: the office must see a log that is not intact). A site that does not
load is listed with its error instead of stopping the list: the office wants to see every job,
broken ones most of all.
"""

from __future__ import annotations

import os
from collections.abc import Iterator
from dataclasses import dataclass
from datetime import date
from pathlib import Path

from fieldlog.errors import FieldlogError
from fieldlog.site.files import SCHEDULE_FILE, SITE_FILE
from fieldlog.sync.conflicts import list_conflicts
from fieldlog.sync.revision import schedule_revision
from fieldlog.workspace import load_state

MAX_DEPTH = 3
"""How deep below FOLDER to look (e.g. ``region/client/site``); keeps a big share quick."""


@dataclass(frozen=True)
class SiteRow:
    """One line of the roll-up."""

    path: str
    """The site folder relative to FOLDER (``.`` for FOLDER itself)."""
    revision: int | None
    last_log_day: date | None = None
    finish: date | None = None
    """Forecast finish as of the last logged day."""
    finish_by: date | None = None
    finish_float: int | None = None
    """Working days between forecast finish and finish_by; negative = late; None = no
    required finish."""
    conflicts: int = 0
    error: str | None = None
    log_problems: int = 0
    """Problems the site's log has (``fieldlog verify SITE`` lists them)."""

    @property
    def has_problem(self) -> bool:
        """True for a site that does not load, has open conflicts or a log with problems (a
        late job is not one)."""
        return self.error is not None or self.conflicts > 0 or self.log_problems > 0


def find_sites(folder: Path, max_depth: int = MAX_DEPTH) -> Iterator[Path]:
    """Site folders (holding site.toml or schedule.toml) under ``folder``, in name order.

    Links and hidden folders are not followed, nor are a site's own subfolders.
    """
    if any((folder / n).is_file() for n in (SITE_FILE, SCHEDULE_FILE)):
        yield folder
        return
    if max_depth <= 0:
        return
    with os.scandir(folder) as entries:
        subdirs = sorted(
            (e for e in entries if e.is_dir(follow_symlinks=False) and not e.name.startswith(".")),
            key=lambda e: e.name,
        )
    for entry in subdirs:
        yield from find_sites(Path(entry.path), max_depth - 1)


def site_row(folder: Path, base: Path) -> SiteRow:
    """The roll-up line for one site folder; load errors become the row's ``error``."""
    rel = folder.relative_to(base).as_posix() if folder != base else "."
    conflicts = len(list_conflicts(folder))
    try:
        state = load_state(folder)
    except FieldlogError as exc:
        return SiteRow(rel, schedule_revision(folder), conflicts=conflicts, error=exc.message)
    return SiteRow(
        path=rel,
        revision=state.site.revision,
        last_log_day=state.journal.last_day,
        finish=state.schedule.finish,
        finish_by=state.site.finish_by,
        finish_float=state.schedule.finish_float,
        conflicts=conflicts,
        log_problems=len(state.replay.problems),
    )


def rollup(folder: Path) -> tuple[SiteRow, ...]:
    """Every site under ``folder`` with its roll-up line."""
    return tuple(site_row(site, folder) for site in find_sites(folder))
