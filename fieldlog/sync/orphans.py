"""Field entries a new schedule revision leaves without an activity: kept, and reported.

When the office removes or renames an activity that already has actuals, the entries stay in
the journal (they are the record of what happened). The journal's replay reports every entry
for an activity the schedule no longer has; this module asks it before and after the revision
and keeps what the revision newly caused, so the summary names exactly those entries.
"""

from __future__ import annotations

from pathlib import Path

from fieldlog.journal import read_journal, replay
from fieldlog.site.model import Site
from fieldlog.workspace import default_status_date


def removed_activities(old: Site, new: Site) -> tuple[str, ...]:
    """Ids the old revision had and the new one has not, in the old schedule's order."""
    return tuple(a.id for a in old.activities if not new.has_activity(a.id))


def orphaned_entries(folder: Path, old: Site, new: Site) -> tuple[str, ...]:
    """Problems the new revision causes in the site's journal, as the journal words them.

    Args:
        folder: the site folder (its ``log/`` is read).
        old: the site as loaded with the previous schedule.
        new: the site with the incoming schedule.

    Raises:
        JournalError: the journal cannot be read.
    """
    journal = read_journal(folder)
    status = default_status_date(new, journal)
    before = {p.message for p in replay(old, journal, status).problems}
    return tuple(
        p.message for p in replay(new, journal, status).problems if p.message not in before
    )
