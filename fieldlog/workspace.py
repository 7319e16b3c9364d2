"""A site folder brought to life: the site, its journal, and the schedule as of a day.

This is the one place that reads files and wires the pure core together, so that the CLI and
the app ask the same question the same way: "what does this site look like as of day D?"
"""

from __future__ import annotations

from dataclasses import dataclass
from datetime import date, timedelta
from pathlib import Path

from fieldlog.engine.compiled import CompiledSite, compile_site
from fieldlog.engine.cpm import compute_schedule
from fieldlog.engine.horizon import ScheduleTooLong
from fieldlog.engine.readiness import holds
from fieldlog.engine.result import ScheduleResult
from fieldlog.journal.reader import Journal, read_journal
from fieldlog.journal.replay import Replay, replay
from fieldlog.site.files import SCHEDULE_FILE, load_compiled
from fieldlog.site.model import Site


@dataclass(frozen=True)
class SiteState:
    """A site as of the end of ``as_of``: its files, journal replay and schedule."""

    folder: Path
    site: Site
    journal: Journal
    replay: Replay
    schedule: ScheduleResult

    @property
    def compiled(self) -> CompiledSite:
        """The site's compiled form the schedule was computed from (pass it to
        :func:`state_for` to recompute without compiling again)."""
        return self.schedule.compiled

    @property
    def as_of(self) -> date:
        """The status date (end of day)."""
        return self.schedule.as_of


def default_status_date(site: Site, journal: Journal) -> date:
    """The last day with log entries, or the day before the site start when there are none."""
    return journal.last_day or site.start - timedelta(days=1)


def load_state(folder: Path | str, as_of: date | None = None) -> SiteState:
    """Load ``folder`` and schedule it as of ``as_of`` (default: :func:`default_status_date`).

    Raises:
        SiteError: the site files are wrong.
        JournalError: the log cannot be read.
    """
    folder = Path(folder)
    comp = load_compiled(folder)  # cached with the site: compiled once per revision
    journal = read_journal(folder)
    return state_for(folder, comp, journal, as_of)


def state_for(
    folder: Path,
    site: Site | CompiledSite,
    journal: Journal,
    as_of: date | None = None,
) -> SiteState:
    """Schedule an already-loaded site and journal as of ``as_of``.

    ``site`` may be the compiled form of an earlier state (:attr:`SiteState.compiled`): the
    app recomputes after every entry, and compiling is the costly part of a first schedule.
    A plain Site is compiled here, once, and the engine and lookahead share that value.
    """
    comp = site if isinstance(site, CompiledSite) else compile_site(site)
    site = comp.site
    status = as_of or default_status_date(site, journal)
    rp = replay(site, journal, status)
    try:
        result = compute_schedule(
            comp, status, rp.progress, lost_days=rp.lost_days, holds=holds(rp.readiness, status)
        )
    except ScheduleTooLong as exc:
        raise exc.naming(folder / SCHEDULE_FILE) from exc
    return SiteState(folder=folder, site=site, journal=journal, replay=rp, schedule=result)
