"""The baseline the progress checks (missed tasks, BEI, high duration) measure against.

A baseline is the plan the work is judged by. fieldlog keeps every replaced office schedule in
``schedule_history/schedule.r<N>.toml`` (see :mod:`fieldlog.sync.revision`), so the earliest
kept revision is the plan first issued to site. A site that never took a new revision has no
history; then the current schedule's planned dates, computed as of the site start with no
progress at all, stand in for it. Which one was used is always said in the report.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from datetime import date, timedelta
from pathlib import Path

from fieldlog.engine.cpm import compute_schedule
from fieldlog.engine.horizon import ScheduleTooLong
from fieldlog.site.files import SITE_FILE, build_site, read_toml
from fieldlog.site.model import Site
from fieldlog.sync.revision import HISTORY_DIR

_HISTORY_NAME = re.compile(r"schedule\.r(\d{1,9})(?:\.[0-9a-f]{8,64})?\.toml")
"""Names sync gives kept revisions: ``schedule.r3.toml`` or ``schedule.r3.<digest>.toml``."""


@dataclass(frozen=True)
class BaselineDates:
    """One activity as planned in the baseline."""

    duration: int
    start: date
    finish: date
    """Planned last day (inclusive)."""


@dataclass(frozen=True)
class Baseline:
    """Planned dates per activity id, and where they came from."""

    source: str
    """Plain words for the report, e.g. ``"schedule_history/schedule.r1.toml (revision 1)"``."""
    finish: date
    """The planned finish of the whole job."""
    activities: dict[str, BaselineDates]


def earliest_history_file(folder: Path) -> Path | None:
    """The kept schedule with the lowest revision number (ties: the name sorting first)."""
    history = folder / HISTORY_DIR
    if not history.is_dir() or history.is_symlink():
        return None
    found: list[tuple[int, str, Path]] = []
    for path in history.iterdir():
        match = _HISTORY_NAME.fullmatch(path.name)
        if match and path.is_file() and not path.is_symlink():
            found.append((int(match.group(1)), path.name, path))
    return min(found)[2] if found else None


def load_baseline(folder: Path, site: Site) -> Baseline:
    """The baseline of the site in ``folder`` (see the module docstring for the choice).

    Raises:
        SiteError: the kept revision does not load against today's site.toml; the message
            names the file, so the office can repair or remove it.
    """
    kept = earliest_history_file(folder)
    if kept is None:
        return planned_baseline(
            site,
            "planned dates of the current schedule as of the site "
            f"start {site.start.isoformat()} (no earlier revision kept)",
        )
    planned = build_site(read_toml(folder / SITE_FILE), read_toml(kept))
    source = f"{HISTORY_DIR}/{kept.name} (revision {planned.revision}, earliest kept)"
    try:
        return planned_baseline(planned, source)
    except ScheduleTooLong as exc:
        raise exc.naming(kept) from exc


def planned_baseline(site: Site, source: str) -> Baseline:
    """Every activity's planned dates: the schedule as of the day before the site start."""
    result = compute_schedule(site, site.start - timedelta(days=1), {})
    dates = {
        r.id: BaselineDates(duration=r.duration, start=r.early_start, finish=r.early_finish)
        for r in result.activities
    }
    return Baseline(source=source, finish=result.finish, activities=dates)
